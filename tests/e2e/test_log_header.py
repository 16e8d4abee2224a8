#!/usr/bin/python3
"""`rockwire log` as a practitioner meets it (issue 9): a LAS file written
the usual way (bit size in ~Parameter, units such as US/F, IN), header
parameters used and named in the output, the washout check skipped with a
warning when it cannot run, --set values with units, implausible bit
sizes, every input that is not a curve recorded with the caution in
~Other and in the CSV comment lines, output files following the umask, a
malformed file with exit code 5, INCOMPLETE only after output, a second
curve of the same meaning reported, depth order refused unless allowed,
--top/--base with the header's STRT/STOP set to what was written, LAS 3.0
and CSV input, more mnemonics and unit spellings, a QC summary file, a
progress bar whose percentage and count agree, and SIGINT removing the
.part file. Reference values: isotropic elasticity (Mavko, Mukerji &
Dvorkin 2009, sec. 2.2) with 1 ft = 0.3048 m, 1 in = 0.0254 m."""
import csv
import io
import json
import os
import re
import signal
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

t = rwtest.Checks()
tmp = tempfile.mkdtemp(prefix="rw-loghead-")

USUAL = """~VERSION INFORMATION
 VERS.                  2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0
 WRAP.                   NO : ONE LINE PER DEPTH STEP
~WELL INFORMATION
 STRT.M        1500.0000 : START DEPTH
 STOP.M        1501.5000 : STOP DEPTH
 STEP.M           0.5000 : STEP
 NULL.         -999.25   : NULL VALUE
 WELL.         MERRIVALT 2 (INVENTED) : WELL
~PARAMETER INFORMATION
 BS  .IN        8.5000 : BIT SIZE
 BHT .DEGC     71.5    : BOTTOM HOLE TEMPERATURE
~CURVE INFORMATION
 DEPT.M          : DEPTH
 DT  .US/F       : COMPRESSIONAL SLOWNESS
 DTS .US/F       : SHEAR SLOWNESS
 RHOB.G/C3       : BULK DENSITY
 CALI.IN         : CALIPER
~A
 1500.0 100 180 2.47 8.6
 1500.5 101 182 2.46 9.9
 1501.0 102 184 2.45 8.5
 1501.5 103 186 2.44 8.5
"""
usual = os.path.join(tmp, "merrivalt-2.las")
open(usual, "w").write(USUAL)
d = rwtest.Daemon()


def run(*args, umask=None, timeout=120):
    p = subprocess.run([rwtest.CLIENT, "--socket", d.path, "log"] +
                       list(args), capture_output=True, timeout=timeout,
                       preexec_fn=(lambda: os.umask(umask))
                       if umask is not None else None)
    return p.returncode, p.stdout.decode(), p.stderr.decode()


def table(text):
    body = [l for l in text.splitlines() if not l.startswith("#")]
    rows = list(csv.reader(io.StringIO("\n".join(body))))
    return {h: [r[i] for r in rows[1:]] for i, h in enumerate(rows[0])}


def flat(text):
    """Note lines joined: wrapping does not matter to the checks."""
    return re.sub(r"\n(# | )+", " ", text)


def las_rows(text):
    return [l.split() for l in text.split("~A")[-1].splitlines()[1:]
            if l.strip()]


WASHOUT = 1 << 25
try:
    # 1. ~Parameter BS feeds the washout check, and the output says so.
    rc, out, err = run(usual)
    rows = las_rows(out)
    t.ok(rc == 0 and len(rows) == 4, "the usual LAS file runs (%d %r)" %
         (rc, err))
    qc = [int(r[-1]) for r in rows]
    t.ok([q & WASHOUT != 0 for q in qc] == [False, True, False, False],
         "washout at 9.9 in over an 8.5 in bit (1.4 in > 1 in): %r" % qc)
    t.ok("from the header: bit_size = 0.2159 m (~Parameter BS 8.5000 IN"
         in err, "stderr names the header parameter: %r" % err)
    other = flat(out.split("\n~Other")[1].split("~A")[0])
    t.ok("bit_size = 0.2159 m (~Parameter BS = 8.5000 IN (line 11))"
         in other, "~Other records the header value")
    t.ok("Screening estimates only" in other and
         "well-control decisions" in other, "~Other carries the caution")
    k = 2470 * ((0.3048e6 / 100) ** 2 - 4 / 3 * (0.3048e6 / 180) ** 2) / 1e9
    t.ok(abs(float(rows[0][8]) - k) < 1e-5 * k, "K %.4f GPa at 1500 m" % k)

    # 2. No bit size anywhere: a warning, and the rest goes on.
    nobs = os.path.join(tmp, "nobs.las")
    open(nobs, "w").write(USUAL.replace(" BS  .IN        8.5000 : BIT SIZE\n",
                                        ""))
    rc, out, err = run(nobs)
    t.ok(rc == 0 and len(las_rows(out)) == 4 and
         "washout check skipped" in err and
         all(int(r[-1]) & WASHOUT == 0 for r in las_rows(out)),
         "no bit size: warned, processed without the check (%d %r)" %
         (rc, err))
    t.ok("washout check skipped" in out.split("\n~Other")[1],
         "the skipped check is recorded in ~Other")

    # 3. --set with a unit; a bare number is the default unit (m).
    rc, out, err = run(nobs, "--set", "bit_size=8.5in")
    t.ok(rc == 0 and int(las_rows(out)[1][-1]) & WASHOUT,
         "--set bit_size=8.5in flags the washout")
    rc, out, err = run(nobs, "--set", "bit_size=216mm", "--format", "csv")
    t.ok(rc == 0 and "bit_size = 0.216 m (--set bit_size=216mm)" in flat(out),
         "216mm is 0.216 m, recorded with its source")
    rc, out, err = run(nobs, "--set", "bit_size=8.5")
    t.ok(rc == 0 and "implausible for a bit" in err and "8.5in" in err,
         "bit_size=8.5 (8.5 m) is warned about: %r" % err)
    rc, out, err = run(nobs, "--set", "bit_size=8.5psi")
    t.ok(rc == 2 and "'psi' is not a length unit" in err,
         "a pressure unit on a length refused (%r)" % err)
    rc, out, err = run(nobs, "--set", "bit_sise=8.5in")
    t.ok(rc == 2 and "did you mean bit_size?" in err,
         "misspelt --set name suggested (%r)" % err)
    rc, out, err = run(nobs, "--set", "vs_predict=mudrok")
    t.ok(rc == 2 and "did you mean mudrock?" in err,
         "misspelt option value suggested (%r)" % err)

    # 4. BHT as the temperature of fluid substitution, said in the output;
    # the same answers as --set temperature=71.5 (degC).
    fluid = ["--set", "mineral=quartz", "--set", "porosity=25%",
             "--set", "pressure=20", "--set",
             'fluid_in_place={"brine":{"salinity":50000}}', "--set",
             'fluid_new={"brine":{"salinity":50000},"gas":{"gravity":0.65},'
             '"saturation":{"brine":0.3,"gas":0.7}}', "--format", "csv"]
    rc, out, err = run(usual, *fluid)
    rc2, out2, err2 = run(usual, *fluid, "--set", "temperature=71.5")
    t.ok(rc == 0 and rc2 == 0 and
         table(out)["vp_sub[m/s]"] == table(out2)["vp_sub[m/s]"] and
         table(out)["vp_sub[m/s]"][0] != "",
         "BHT 71.5 degC used as the temperature (%r)" % err[-300:])
    t.ok("temperature = 71.5 degC (~Parameter BHT = 71.5 DEGC (line 12); "
         "the bottom-hole temperature" in flat(out),
         "the output says the temperature came from BHT")
    # every input that is not a curve, with where it came from
    fl = flat(out)
    for want in ["porosity = 0.25 (--set porosity=25%)",
                 "mineral = \"quartz\" (--set mineral=quartz)",
                 "pressure = 20 MPa (--set pressure=20)",
                 "bit_size = 0.2159 m (~Parameter BS"]:
        t.ok(want in fl, "recorded: " + want)
    t.ok("from this file's curves" not in out, "constants not called curves")
    t.ok(out.startswith("# Screening estimates only"),
         "the CSV opens with the caution")

    # 5. Output files follow the umask.
    for um, mode in [(0o022, 0o644), (0o027, 0o640)]:
        o = os.path.join(tmp, "um%o.las" % um)
        rc, out, err = run(usual, "-o", o, "--qc-summary", o + ".qc",
                           umask=um)
        t.ok(rc == 0 and os.stat(o).st_mode & 0o777 == mode and
             os.stat(o + ".qc").st_mode & 0o777 == mode,
             "umask %03o gives %03o (%o)" % (um, mode,
                                             os.stat(o).st_mode & 0o777))

    # 6. A file that breaks after output began: exit 5 and INCOMPLETE.
    big = os.path.join(tmp, "late-error.las")
    lines = USUAL.split("~A\n")[0].replace("1501.5000", "1999.5000") + "~A\n"
    for i in range(1000):
        lines += " %.1f 100 180 2.47 8.6\n" % (1500 + 0.5 * i)
    lines = lines.replace(" 1950.0 100", " 1950.0 x00")
    open(big, "w").write(lines)
    rc, out, err = run(big, "--block", "50", "--inflight", "1")
    t.ok(rc == 5 and out and "INCOMPLETE" in err and "x00" in err,
         "late malformed line: exit 5, INCOMPLETE (%d %r)" % (rc, err[-200:]))

    # 7. Two curves of one meaning are reported.
    two = os.path.join(tmp, "two-dt.las")
    open(two, "w").write(USUAL.replace(
        " RHOB.G/C3", " DTCO.US/F       : COMPRESSIONAL SLOWNESS 2\n"
        " RHOB.G/C3").replace(" 2.47 ", " 99 2.47 ").replace(
        " 2.46 ", " 99 2.46 ").replace(" 2.45 ", " 99 2.45 ").replace(
        " 2.44 ", " 99 2.44 "))
    rc, out, err = run(two)
    t.ok(rc == 0 and "DT (line 15) and DTCO (line 17) both give the "
         "compressional slowness; DT is used" in err,
         "second DT curve reported (%r)" % err)
    t.ok("DTCO" in out.split("\n~Other")[1], "and recorded in ~Other")

    # 8. Depth order.
    for name, a, b in [("duplicate", "1501.0 102", "1500.5 102"),
                       ("decreasing", "1501.0 102", "1500.2 102")]:
        p = os.path.join(tmp, name + ".las")
        open(p, "w").write(USUAL.replace(a, b))
        rc, out, err = run(p)
        t.ok(rc == 5 and "line 22" in err and "--allow-unsorted" in err,
             "%s depth refused, naming the line (%d %r)" % (name, rc, err))
        rc, out, err = run(p, "--allow-unsorted")
        t.ok(rc == 0 and len(las_rows(out)) == 4, "--allow-unsorted "
             "accepts %s depths" % name)

    # 9. --top/--base, and the header says what was written.
    o = os.path.join(tmp, "range.las")
    rc, out, err = run(usual, "--top", "1500.5", "--base", "1501.0",
                       "-o", o)
    text = open(o).read()
    rows = las_rows(text)
    t.ok(rc == 0 and [r[0] for r in rows] == ["1500.5", "1501"],
         "--top 1500.5 --base 1501 selects two samples (%r)" % rows)
    strt = re.search(r"^ STRT\.M +(\S+)", text, re.M).group(1)
    stop = re.search(r"^ STOP\.M +(\S+)", text, re.M).group(1)
    t.ok(float(strt) == 1500.5 and float(stop) == 1501.0,
         "STRT/STOP are the range written (%s %s)" % (strt, stop))
    rc, out, err = run(usual, "--top", "4924.5ft", "--format", "csv")
    t.ok(rc == 0 and table(out)["DEPT[M]"] == ["1501", "1501.5"],
         "--top with a unit: 4924.5 ft = 1500.99 m")

    # 10. LAS 3.0 input: comma-delimited, BS in ~Log_Parameter in mm,
    # slowness in us/m, density in kg/m3; written back as 3.0.
    v3 = os.path.join(rwtest.SRC, "tests", "unit", "data",
                      "palvorin_7_v3.las")
    o = os.path.join(tmp, "v3.las")
    rc, out, err = run(v3, "-o", o, "--set", "vs_predict=mudrock")
    text = open(o).read() if rc == 0 else ""
    t.ok(rc == 0 and "VERS.   3.0" in text and "~Tops_Data" in
         text.split("\n~Log_Data")[1], "LAS 3.0 in and out, sections after "
         "the data kept (%d %r)" % (rc, err))
    data = text.split("~Log_Data | Log_Definition\n")[1].split("~")[0]
    first = data.splitlines()[0].split(",")
    vp = 1e6 / 312.5  # 312.5 us/m
    t.ok(abs(float(first[8]) - vp) < 1e-3 and int(first[-1]) & WASHOUT == 0,
         "vp from us/m, the bit size 215.9 mm from ~Log_Parameter: %r" %
         first[8:10])
    t.ok("bit_size = 0.2159 m (~Parameter BS = 215.9000 MM" in flat(text),
         "the 3.0 parameter recorded")

    # 11. CSV input, to CSV and to LAS (STOP and STEP set at the end).
    csvin = os.path.join(tmp, "merrivalt-2.csv")
    with open(csvin, "w") as f:
        f.write("DEPT[M],DT[US/F],DTS[US/F],RHOB[G/C3]\n")
        for r in USUAL.split("~A\n")[1].splitlines():
            f.write(",".join(r.split()[:4]) + "\n")
    rc, out, err = run(csvin)
    tb = table(out)
    t.ok(rc == 0 and len(tb["qc"]) == 4 and tb["DT[US/F]"][0] == "100",
         "CSV in, CSV out (%d %r)" % (rc, err))
    o = os.path.join(tmp, "from-csv.las")
    rc, out, err = run(csvin, "--format", "las", "-o", o)
    text = open(o).read() if rc == 0 else ""
    t.ok(rc == 0 and re.search(r"^ STOP\.M +1501\.5 ", text, re.M) and
         re.search(r"^ STEP\.M +0\.5 ", text, re.M),
         "CSV to LAS: STOP and STEP from the data (%r)" % err)
    rc, out, err = run(csvin, "--format", "las")
    t.ok(rc == 2 and "needs -o FILE" in err, "CSV to LAS on a pipe: refused")

    # 12. More mnemonics and unit spellings.
    alt = os.path.join(tmp, "alt.las")
    open(alt, "w").write(USUAL.replace("DT  .US/F", "DT4P.USEC/F").replace(
        "DTS .US/F", "DT4S.USEC/F").replace("RHOB.G/C3", "ZDEN.GR/CC"))
    rc, out, err = run(alt, "--format", "csv")
    tb = table(out)
    t.ok(rc == 0 and abs(float(tb["k[GPa]"][0]) - k) < 1e-5 * k,
         "DT4P, DT4S, ZDEN with USEC/F and GR/CC (%r)" % err)
    alt2 = os.path.join(tmp, "alt2.las")
    open(alt2, "w").write(USUAL.replace("RHOB.G/C3", "RHOB.K/M3").replace(
        " 2.47 ", " 2470 ").replace(" 2.46 ", " 2460 ").replace(
        " 2.45 ", " 2450 ").replace(" 2.44 ", " 2440 "))
    rc, out, err = run(alt2, "--format", "csv")
    t.ok(rc == 0 and abs(float(table(out)["k[GPa]"][0]) - k) < 1e-5 * k,
         "K/M3 density")
    # Gamma ray is in API units whatever its label.
    gr = os.path.join(tmp, "gr.las")
    open(gr, "w").write(USUAL.replace(" CALI.IN ", " GR  .API-GR  : GR\n"
                                      " CALI.IN ").replace(
        " 8.6\n", " 80 8.6\n").replace(" 9.9\n", " 90 9.9\n").replace(
        " 8.5\n", " 100 8.5\n"))
    rc, out, err = run(gr, "--format", "csv", "--set", "gr_clean=20",
                       "--set", "gr_shale=120")
    t.ok(rc == 0 and table(out)["vsh"][0] == "0.6",
         "GR labelled API-GR: vsh (80-20)/(120-20) = 0.6 (%r)" % err)

    # 13. The QC summary file.
    qs = os.path.join(tmp, "qc.txt")
    qj = os.path.join(tmp, "qc.json")
    rc, out, err = run(usual, "--qc-summary", qs)
    rc2, out2, err2 = run(usual, "--qc-summary", qj)
    js = json.load(open(qj)) if rc2 == 0 else {}
    cur = {c["curve"]: c for c in js.get("curves", [])}
    t.ok(rc == 0 and "Screening estimates only" in open(qs).read(),
         "text summary with the caution")
    cal = [8.6, 9.9, 8.5, 8.5]
    t.ok(cur.get("CALI", {}).get("count") == 4 and
         cur["CALI"]["nulls"] == 0 and cur["CALI"]["min"] == 8.5 and
         cur["CALI"]["max"] == 9.9 and
         abs(cur["CALI"]["mean"] - sum(cal) / 4) < 1e-9,
         "per curve count, nulls, min, max, mean: %r" % cur.get("CALI"))
    fl = {f["name"]: f for f in js.get("flags", [])}
    t.ok(fl.get("washout", {}).get("count") == 1 and
         fl["washout"]["intervals"] == [[1500.5, 1500.5]],
         "per flag count and depth intervals: %r" % fl.get("washout"))
    t.ok(js.get("samples") == 4 and "caution" in js, "samples counted")

    # 14. Progress: the percentage is the share of samples written.
    n = 300000
    pg = os.path.join(tmp, "progress.las")
    with open(pg, "w") as f:
        f.write(USUAL.split("~A\n")[0].replace(
            "1501.5000", "%.4f" % (1500 + 0.1 * (n - 1))).replace(
            "0.5000 : STEP", "0.1000 : STEP") + "~A\n")
        for i in range(n):
            f.write("%.1f 100 180 2.47 8.6\n" % (1500 + 0.1 * i))
    rc, out, err = run(pg, "-o", pg + ".out", "--progress", "--block", "500")
    marks = re.findall(r"(\d+)% (\d+) samples", err)
    worst = max((abs(int(p) - 100.0 * int(s) / n) for p, s in marks),
                default=99)
    t.ok(rc == 0 and marks and worst <= 1.5,
         "progress %% and count agree within 1.5 points over %d updates "
         "(worst %.2f)" % (len(marks), worst))

    # 15. SIGINT removes the .part file.
    o = os.path.join(tmp, "interrupted.las")
    p = subprocess.Popen([rwtest.CLIENT, "--socket", d.path, "log", pg,
                          "-o", o, "--block", "20", "--inflight", "1"],
                         stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    deadline = time.time() + 20
    while time.time() < deadline and not [
            f for f in os.listdir(tmp) if f.startswith("interrupted.las.part")]:
        time.sleep(0.01)
    time.sleep(0.2)
    p.send_signal(signal.SIGINT)
    p.wait(20)
    left = [f for f in os.listdir(tmp) if f.startswith("interrupted.las")]
    t.ok(p.returncode == -signal.SIGINT and not left,
         "SIGINT: killed by the signal, no .part left (%s %r)" %
         (p.returncode, left))
    # blocks of 20 samples, one in flight: some 15,000 round trips, so
    # the signal comes well before the end however fast the machine
    p = subprocess.Popen([rwtest.CLIENT, "--socket", d.path, "log", pg,
                          "-o", o, "--block", "20", "--inflight", "1"],
                         stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    deadline = time.time() + 20
    while time.time() < deadline and not [
            f for f in os.listdir(tmp) if f.startswith("interrupted.las.part")]:
        time.sleep(0.01)
    time.sleep(0.1)
    p.send_signal(signal.SIGTERM)
    p.wait(20)
    left = [f for f in os.listdir(tmp) if f.startswith("interrupted.las")]
    t.ok(p.returncode == -signal.SIGTERM and not left,
         "SIGTERM: no .part left (%s %r)" % (p.returncode, left))
finally:
    d.stop()
t.done()
