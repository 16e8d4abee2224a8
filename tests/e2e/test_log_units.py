#!/usr/bin/python3
"""Units in `rockwire log` (issue 9): input curves are read in the units
their ~C lines state, whatever --set units.* says; units.* only chooses
the output units. Every output unit option the daemon lists is run and
the moduli, converted back with the daemon's own factors, are unchanged,
the input columns are written as read, and the QC flags (washout with
units.length=ft) do not move. The same rock logged in other units gives
the same moduli. Reference values: K = rho (vp^2 - 4/3 vs^2), mu = rho
vs^2 (isotropic elasticity, Mavko, Mukerji & Dvorkin 2009, sec. 2.2),
with 1 ft = 0.3048 m and 1 in = 0.0254 m exactly (international yard and
pound, 1959)."""
import csv
import io
import os
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

t = rwtest.Checks()
tmp = tempfile.mkdtemp(prefix="rw-units-")

# An invented well (Tarvossen 4): slowness in us/ft, density in g/cm3,
# caliper in inches, the bit size in ~Parameter; the third sample is
# washed out by 1.4 in (more than the 1 in default limit).
ROWS = [(1800.0, 100.0, 180.0, 2.47, 8.6), (1800.5, 101.0, 182.0, 2.46, 9.9),
        (1801.0, 102.0, 184.0, 2.45, 8.5), (1801.5, 95.0, 170.0, 2.40, 8.7)]
HEAD = """~VERSION INFORMATION
 VERS.   2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0
 WRAP.    NO : ONE LINE PER DEPTH STEP
~WELL INFORMATION
 STRT.{du} {strt} : START DEPTH
 STOP.{du} {stop} : STOP DEPTH
 STEP.{du} {step} : STEP
 NULL.   -999.25 : NULL VALUE
 WELL.   TARVOSSEN 4 (INVENTED) : WELL
~PARAMETER INFORMATION
 BS  .{bu}   {bs} : BIT SIZE
~CURVE INFORMATION
 DEPT.{du}  : DEPTH
 DT  .{su}  : COMPRESSIONAL SLOWNESS
 DTS .{su}  : SHEAR SLOWNESS
 RHOB.{ru}  : BULK DENSITY
 CALI.{bu}  : CALIPER
~A
"""


def write_las(path, du, dk, su, sk, ru, rk, bu, bk):
    """The rows in other units: value * k (k = input unit per unit)."""
    with open(path, "w") as f:
        f.write(HEAD.format(du=du, su=su, ru=ru, bu=bu,
                            strt=ROWS[0][0] * dk, stop=ROWS[-1][0] * dk,
                            step=0.5 * dk, bs=8.5 * bk))
        for d, dt, dts, rho, cal in ROWS:
            f.write("%.10g %.10g %.10g %.10g %.10g\n" % (
                d * dk, dt * sk, dts * sk, rho * rk, cal * bk))


plain = os.path.join(tmp, "tarvossen-4.las")
write_las(plain, "M", 1, "US/F", 1, "G/C3", 1, "IN", 1)
# The same rock: depth in ft, slowness in us/m (1 us/ft = 1/0.3048 us/m),
# density in kg/m3, caliper and bit size in mm.
other = os.path.join(tmp, "tarvossen-4-si.las")
write_las(other, "FT", 1 / 0.3048, "US/M", 1 / 0.3048, "K/M3", 1000,
          "MM", 25.4)

d = rwtest.Daemon()


def run(*args):
    p = subprocess.run([rwtest.CLIENT, "--socket", d.path, "log"] +
                       list(args) + ["--format", "csv", "--digits", "15"],
                       capture_output=True, timeout=60)
    body = [l for l in p.stdout.decode().splitlines() if not l.startswith("#")]
    rows = list(csv.reader(io.StringIO("\n".join(body))))
    return p.returncode, rows, p.stderr.decode()


def cols(rows):
    head = rows[0]
    return {h: [float(r[i]) if r[i] else None for r in rows[1:]]
            for i, h in enumerate(head)}


try:
    s = d.connect()
    info = rwtest.call(s, rwtest.req("service.info"))["result"]
    s.close()
    units = info["units"]

    rc, rows, err = run(plain)
    base = cols(rows)
    t.ok(rc == 0 and len(rows) == 5, "default run (%d %r)" % (rc, err))
    for i, (dep, dt, dts, rho, cal) in enumerate(ROWS):
        vp, vs, r = 0.3048e6 / dt, 0.3048e6 / dts, rho * 1000
        k = r * (vp * vp - 4 / 3 * vs * vs) / 1e9
        mu = r * vs * vs / 1e9
        t.ok(abs(base["k[GPa]"][i] - k) < 1e-9 * k and
             abs(base["mu[GPa]"][i] - mu) < 1e-9 * mu,
             "sample %d: K %.6f mu %.6f GPa from the stated units" %
             (i, k, mu))
    t.ok([int(q) >> 25 & 1 for q in base["qc"]] == [0, 1, 0, 0],
         "washout only at 1800.5 m (9.9 in in an 8.5 in hole)")

    # The same rock in ft, us/m, kg/m3 and mm: the same answers.
    rc, rows, err = run(other)
    o = cols(rows)
    t.ok(rc == 0 and all(abs(a - b) < 1e-9 * abs(b) for a, b in
                         zip(o["k[GPa]"], base["k[GPa]"])),
         "curves in ft, us/m, kg/m3, mm give the same K (%r)" % err)
    t.ok(o["qc"] == base["qc"], "and the same QC flags")

    # Every output unit the daemon lists, kind by kind.
    n = 0
    for kind, spec in units.items():
        for unit, f in spec.get("to_default", {}).items():
            rc, rows, err = run(plain, "--set", "units.%s=%s" % (kind, unit))
            c = cols(rows)
            n += 1
            if not t.ok(rc == 0, "units.%s=%s runs (%r)" % (kind, unit,
                                                             err)):
                continue
            # Input columns are written as read.
            same_in = all(c[h] == base[h] for h in rows[0][:5])
            t.ok(same_in, "units.%s=%s: input curves unchanged" %
                 (kind, unit))
            t.ok(c["qc"] == base["qc"], "units.%s=%s: QC unchanged" %
                 (kind, unit))
            # Every computed column, back to the default unit with the
            # daemon's factors, equals the default run.
            bad = []
            for h in rows[0][5:]:
                name, _, u = h.partition("[")
                u = u.rstrip("]")
                bh = [x for x in base if x.split("[")[0] == name][0]
                bu = bh.partition("[")[2].rstrip("]")
                if u != bu:
                    ff = [v["to_default"][u] for v in units.values()
                          if u in v.get("to_default", {}) and
                          v["default"] == bu]
                    if not ff:
                        bad.append("%s: unit %s" % (h, u))
                        continue
                    sc, of = ff[0]["scale"], ff[0]["offset"]
                else:
                    sc, of = 1, 0
                for a, b in zip(c[h], base[bh]):
                    if a is None or b is None:
                        if a != b:
                            bad.append(h)
                        continue
                    if abs(a * sc + of - b) > 1e-9 * max(1, abs(b)):
                        bad.append("%s %r vs %r" % (h, a * sc + of, b))
            t.ok(not bad, "units.%s=%s: every result the same in the "
                 "default unit %s" % (kind, unit, bad[:3]))
            if kind == "modulus":
                t.ok("k[%s]" % unit in rows[0], "K labelled %s" % unit)
    print("%d unit options run" % n)
    t.ok(n >= 30, "every unit option of service.info ran (%d)" % n)
    # --units is the same as --set units.
    rc, rows, err = run(plain, "--units", "modulus=MPa")
    t.ok(rc == 0 and abs(cols(rows)["k[MPa]"][0] -
                         1000 * base["k[GPa]"][0]) < 1e-6,
         "--units modulus=MPa")
    # A misspelt kind or unit is refused with a suggestion.
    rc, rows, err = run(plain, "--set", "units.velocty=km/s")
    t.ok(rc == 2 and "did you mean velocity?" in err, "kind suggestion")
    rc, rows, err = run(plain, "--set", "units.velocity=kms")
    t.ok(rc == 2 and "did you mean km/s?" in err, "unit suggestion")
finally:
    d.stop()
t.done()
