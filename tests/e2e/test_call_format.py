#!/usr/bin/python3
"""`rockwire call` output that pastes into anything (issue 16) and help
from the daemon's schema (issue 9): --format table|csv|json, integers
printed as integers, 2-D results labelled by their axes, exact all-zero
imaginary members left out unless asked, QC flags by name from
service.info's legend, `call METHOD --help` from rpc.discover, full
`log|feed|send --help`, and "did you mean" for a misspelt command,
option, method, parameter or value."""
import csv
import io
import json
import os
import re
import subprocess
import sys

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

t = rwtest.Checks()
d = rwtest.Daemon()


def run(*args):
    p = subprocess.run([rwtest.CLIENT, "--socket", d.path] + list(args),
                       capture_output=True, timeout=60)
    return p.returncode, p.stdout.decode(), p.stderr.decode()


def legend():
    s = d.connect()
    r = rwtest.call(s, rwtest.req("service.info"))
    s.close()
    names = {}
    for q in r["result"]["qc_flags"]:
        m = q.get("mask", q.get("bit"))
        names[m.bit_length() - 1] = q["name"]
    return names


try:
    names = legend()
    MISSING = [b for b, n in names.items() if n == "input_missing"][0]
    # A missing sample: its QC word has bit 28 (> 2^28), which %g
    # printed as 2.684355e+08.
    logs = ["log.process", "dtp=[100,null]", "dts=[200,150]",
            "rhob=[2.3,2.4]"]
    rc, out, err = run("call", *logs, "--table")
    rows = [l.split() for l in out.splitlines() if l and l[0] != "#"]
    head = rows[0]
    qc = [r[head.index("qc")] for r in rows[1:]]
    t.ok(rc == 0 and qc[0] == "0" and int(qc[1]) & (1 << MISSING),
         "table QC words are integers (%r)" % qc)
    t.ok(all("e+" not in c for r in rows for c in r),
         "no integer in exponent form: %r" % rows[:3])
    t.ok(rows[1][head.index("vp[m/s]")] == "3048",
         "an integral value prints whole (vp 3048 = 0.3048e6/100)")
    rc, out, err = run("call", "service.info", "--table")
    t.ok("# limits.max_line_bytes = 67108864" in out or
         "# limits.max_line_bytes = " in out and "e+" not in out,
         "nested scalars flattened, integers whole")

    # CSV: name[unit] headers, exact numbers, empty cell for null.
    rc, out, err = run("call", *logs, "--format", "csv")
    body = [l for l in out.splitlines() if l and l[0] != "#"]
    r = list(csv.reader(io.StringIO("\n".join(body))))
    t.ok(rc == 0 and r[0][:3] == ["vp[m/s]", "vs[m/s]", "rho[g/cm3]"],
         "csv header " + ",".join(r[0][:4]))
    t.ok(r[2][0] == "" and r[1][0] == "3048", "csv null is an empty field")
    vs = float(r[1][1])
    t.ok(vs == 0.3048e6 / 200, "csv keeps full precision (%r)" % r[1][1])

    # --qc names: the legend's names, in table, csv and json.
    rc, out, err = run("call", *logs, "--table", "--qc", "names")
    t.ok(rc == 0 and "input_missing" in out and "clean" in out,
         "table --qc names: " + out[-200:])
    rc, out, err = run("call", *logs, "--qc", "names")
    res = json.loads(out)
    t.ok(res["qc_names"][0] == "clean" and
         "input_missing" in res["qc_names"][1].split("|") and
         res["qc"][1] & (1 << MISSING),
         "json --qc names adds qc_names beside qc: %r" % res["qc_names"])
    # bits above 31 are named too (a bit size of 5 m: implausible)
    rc, out, err = run("call", "log.process", "dtp=[100]", "dts=[180]",
                       "rhob=[2.3]", "caliper=[0.22]", "bit_size=5",
                       "--qc", "names")
    res = json.loads(out)
    t.ok(rc == 0 and res["qc"][0] >= 2 ** 32 and
         "bit_size_implausible" in res["qc_names"][0].split("|"),
         "flags above bit 31 by name: %r" % res.get("qc_names"))

    # 2-D results labelled by their axes: reflect.series is
    # [angle][interface]; with depth the interfaces are their depths.
    series = ["reflect.series", "vp=[2500,2800,2600]", "vs=[1200,1500,1300]",
              "rho=[2.3,2.2,2.35]", "angle=[0,10,20,30]",
              "depth=[1000,1010,1020]"]
    rc, out, err = run("call", *series, "--table")
    t.ok(rc == 0 and "rpp_re: rows angle[deg], columns depth[m]" in out,
         "matrix axes named: " + out[:400])
    grid = out.split("rpp_re:")[1].splitlines()
    t.ok(grid[1].split() == ["angle[deg]", "1005", "1015"] and
         grid[2].split()[0] == "0" and grid[5].split()[0] == "30",
         "rows labelled by angle, columns by interface depth: %r" % grid[:3])
    t.ok("rpp_im" not in out.split("# all zero")[0] and
         "all zero, not shown: rpp_im" in out,
         "all-zero imaginary part left out and said so")
    rc, out, err = run("call", *series, "--table", "--all-columns")
    t.ok("rpp_im:" in out, "--all-columns shows it")
    rc, out, err = run("call", *series, "--csv")
    lines = out.splitlines()
    i = lines.index("angle[deg],depth[m],rpp_re,qc")
    long = list(csv.reader(io.StringIO("\n".join(lines[i:i + 9]))))
    t.ok(len(long) == 9 and long[1][:2] == ["0", "1005"] and
         long[2][:2] == ["0", "1015"] and long[8][:2] == ["30", "1015"],
         "csv matrices in long form, one row per angle and depth")
    # The value at (30 deg, second interface) is the one the JSON has
    # at [3][1]: the layout is [angle][interface].
    rc, out, err = run("call", *series)
    js = json.loads(out)
    t.ok(float(long[8][2]) == js["rpp_re"][3][1],
         "long form follows the [angle][interface] layout")
    # reflect.interface is [interface][angle].
    iface = ["reflect.interface",
             'upper={"vp":[2500,2600],"vs":[1200,1250],"rho":2.3}',
             'lower={"vp":2800,"vs":1500,"rho":2.2}', "angle=[0,15,30]"]
    rc, out, err = run("call", *iface, "--table")
    t.ok(rc == 0 and "rows interface, columns angle[deg]" in out,
         "reflect.interface rows are interfaces: " + err + out[:300])

    # call METHOD --help from rpc.discover.
    rc, out, err = run("call", "log.process", "--help")
    doc = rwtest.method_doc("log.process")
    missing = [p["name"] for p in doc["params"]
               if "\n  %s " % p["name"] not in out and
               "\n  %s\n" % p["name"] not in out]
    t.ok(rc == 0 and out.startswith("log.process: ") and not missing,
         "every log.process parameter listed (missing %r)" % missing)
    t.ok(re.search(r"drho_limit  number( or a distribution)?\n      \([^)]*> 0\)",
                   out) is not None,
         "ranges from the schema shown")
    t.ok('one of "none"|"greenberg_castagna"|"mudrock"' in out,
         "option values shown")
    rc, out, err = run("call", "log.procss", "--help")
    t.ok(rc == 2 and "did you mean log.process?" in err,
         "--help on a misspelt method suggests (%r)" % err)

    rc, out, err = run("log", "--help")
    t.ok(rc == 0 and "--top" in out and "Exit codes" in out and
         "--qc-summary" in out, "log --help is full help")
    rc, out, err = run("feed", "--help")
    t.ok(rc == 0 and "--map" in out and "--reconnect" in out and
         "--absent" in out, "feed --help is full help")
    rc, out, err = run("send", "--help")
    t.ok(rc == 0 and "comment" in out, "send --help is full help")

    # Did you mean ...
    for args, want in [
            (["lgo", "x.las"], "did you mean log?"),
            (["call", "service.info", "--tabel"], "did you mean --table?"),
            (["call", "service.info", "--format", "tabel"],
             "did you mean table?"),
            (["call", "elastic.convrt", "rho=2"],
             "did you mean elastic.convert?"),
            (["call", "log.process", "dtp=100", "dts=200", "rhob=2.3",
              "vs_predcit=mudrock"], "did you mean vs_predict?"),
            (["call", "log.process", "dtp=100", "rhob=2.3",
              "vs_predict=mudrok"], "did you mean vs_predict=mudrock?"),
            (["call", "log.process", "dtp=100", "dts=200", "rhob=2.3",
              'fluid_new={"brine":{"salinty":3}}'],
             "did you mean fluid_new.brine.salinity?")]:
        rc, out, err = run(*args)
        t.ok(rc in (1, 2) and want in err, "%s: %r" % (want, err[-200:]))
    rc, out, err = run("call", "log.process", "dtp=100", "rhob=2.3",
                       "vs_predict=xyzzy")
    t.ok(rc == 1 and "did you mean" not in err,
         "no suggestion when nothing is close")
finally:
    d.stop()
t.done()
