#!/usr/bin/python3
"""rockwire log number text end to end (issue 11): the client reads LAS
values with the project's correctly rounded parser and prints numbers
with its shortest round-trip formatter, and nothing a user sees changes
but digits. Outside references: Python's float() (correctly rounded, as
glibc strtod) and its printf-style '%.Ng' formatting (correctly rounded,
as glibc printf).

- every input value comes back as the same double, as the text %.15g
  prints when that reads back, else the fewest digits that do (so
  0.7999999999999999 stays 0.7999999999999999, where 17 digits were
  printed before, and 2.4482 stays 2.4482);
- the forms the reader always allowed beside JSON's (".5", "85.", "+1",
  "007") read as float() reads them; 1e-400 reads as 0;
- text strtod would take but a LAS value may not be ("0x1p3", "inf",
  "nan") and a value beyond the double range are refused with the line
  and the value named, and no output is written;
- the LAS NULL (-999.25) stays NULL in and out; CSV output has empty
  fields for it;
- computed curves carry --digits significant digits: the text with 4 is
  '%.4g' of the value printed with 17;
- a wrapped LAS gives the same data rows as the unwrapped one."""
import os
import random
import sys
import tempfile

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

t = rwtest.Checks()
tmp = tempfile.mkdtemp(prefix="rw-lognum-")

HEAD = """~Version
 VERS.   2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0
 WRAP.   {wrap} : ONE LINE PER DEPTH STEP
~Well
 STRT.M  1000.0 : START
 STOP.M  {stop} : STOP
 STEP.M  0.5 : STEP
 NULL.   -999.25 : NULL
 WELL.   TALMERE 2 (INVENTED) : WELL
~Curve
 DEPT.M     : DEPTH
 DT  .US/F  : COMPRESSIONAL SLOWNESS
 DTS .US/F  : SHEAR SLOWNESS
 RHOB.G/C3  : BULK DENSITY
 XTRA.V     : A CURVE NOTHING READS
~A
"""
NHEAD = HEAD.count("\n")  # lines before the first data line


def old_text(v):
    """What the client printed before for an input value when %.15g reads
    back, and the fewest digits otherwise: the expected text."""
    for p in (15, 16, 17):
        s = "%.*g" % (p, v)
        if float(s) == v:
            return s


rnd = random.Random(11)
rows = []
N = 400
for i in range(N):
    depth = "%.1f" % (1000 + 0.5 * i)
    dt = 60 + 60 * rnd.random()
    dts = dt * (1.7 + 0.4 * rnd.random())
    # most values as a tool writes them; some with all their digits
    dt_t = repr(dt) if i % 3 == 0 else "%.3f" % dt
    dts_t = repr(dts) if i % 5 == 0 else "%.2f" % dts
    rho_t = "%.4f" % (2.0 + 0.6 * rnd.random())
    x = rnd.choice([0.1 + 0.7, 0.1 + 0.2, 2.4482, 1e-5, 1.5e-7, 0.00012,
                    123456789012345.0, 9.87654321e-300, 8.5, -0.25,
                    rnd.random() * 10 ** rnd.randint(-4, 10)])
    x_t = repr(x)
    if i == 10:
        rho_t = "-999.25"
    if i == 11:
        dt_t, dts_t, rho_t, x_t = "+85.5", "0172.25", "2.", ".5"
    if i == 12:
        x_t = "1e-400"
    if i == 13:
        x_t = "-.125E+02"
    rows.append([depth, dt_t, dts_t, rho_t, x_t])


def write_las(path, wrap=False, bad=None):
    with open(path, "w") as f:
        f.write(HEAD.format(wrap="YES" if wrap else "NO",
                            stop="%.1f" % (1000 + 0.5 * (N - 1))))
        for i, r in enumerate(rows):
            if bad and i == bad[0]:
                r = r[:1] + [bad[1]] + r[2:]
            if wrap:
                f.write(r[0] + "\n" + " ".join(r[1:3]) + "\n" +
                        " ".join(r[3:]) + "\n")
            else:
                f.write(" ".join(r) + "\n")


def data_rows(path, sep=None):
    with open(path) as f:
        text = f.read().split("\n")
    if sep is None:
        i = next(k for k, line in enumerate(text) if line.startswith("~A"))
        body = text[i + 1:]
    else:
        body = [line for line in text if line and not line.startswith("#")]
        body = body[1:]  # the column names
    return [line.split(sep) for line in body if line.strip()]


def log(args):
    p = rwtest.run([rwtest.CLIENT, "--spawn", "--daemon", rwtest.DAEMON,
                    "log"] + args + ["--no-progress"], timeout=120)
    return p.returncode, p.stdout.decode(), p.stderr.decode()


inp = os.path.join(tmp, "in.las")
write_las(inp)
out = os.path.join(tmp, "out.las")
rc, so, se = log([inp, "-o", out, "--digits", "17"])
t.ok(rc == 0, "log exits 0: " + se[-300:])
got = data_rows(out)
t.ok(len(got) == N, "one output row per input row (%d)" % len(got))

# Input values: the same double, in the expected text.
same = text_ok = 0
for r, g in zip(rows, got):
    for k in range(5):
        v = float(r[k])
        if v == -999.25:
            same += g[k] == "-999.25"
            text_ok += g[k] == "-999.25"
            continue
        same += float(g[k]) == v
        text_ok += g[k] == old_text(v)
t.ok(same == 5 * N, "every input value reads back as float() of its text "
     "(%d of %d)" % (same, 5 * N))
t.ok(text_ok == 5 * N, "every input value printed as %%.15g, else its "
     "fewest digits (%d of %d)" % (text_ok, 5 * N))
ex = {g[4] for r, g in zip(rows, got) if float(r[4]) == 0.1 + 0.7}
t.ok(ex == {"0.7999999999999999"},
     "0.7999999999999999 stays so, not 0.79999999999999993: %s" % ex)
ex = {g[3] for r, g in zip(rows, got) if r[3] == "2.4482"} | {
    g[4] for r, g in zip(rows, got) if r[4] == "2.4482"}
t.ok(ex <= {"2.4482"} and ex, "2.4482 stays 2.4482: %s" % ex)
t.ok(got[11][1:5] == ["85.5", "172.25", "2", "0.5"],
     "'+85.5' '0172.25' '2.' '.5' read as float() reads them: %s" %
     got[11][1:5])
t.ok(got[12][4] == "0" and got[13][4] == "-12.5",
     "1e-400 reads as 0, -.125E+02 as -12.5: %s %s" % (got[12][4],
                                                      got[13][4]))
# NULL: RHOB of row 10 is NULL, and so is everything computed from it.
t.ok(got[10][3] == "-999.25", "the NULL stays the NULL")
names = []
with open(out) as f:
    sec = ""
    for line in f:
        if line.startswith("~"):
            sec = line[1].upper()
        elif sec == "C" and line.strip():
            names.append(line.split(".")[0].strip())
ai = names.index("AI")
t.ok(got[10][ai] == "-999.25" and got[9][ai] != "-999.25",
     "a computed value from a NULL input is the NULL")

# --digits: 4 digits are '%.4g' of the 17-digit value (rounding of the
# same double), computed curves only.
out4 = os.path.join(tmp, "out4.las")
rc, so, se = log([inp, "-o", out4, "--digits", "4"])
got4 = data_rows(out4)
ok = rc == 0 and len(got4) == N
bad = []
for g17, g4 in zip(got, got4):
    if g17[:5] != g4[:5]:
        bad.append(("input", g17[:5], g4[:5]))
    for a, b in zip(g17[5:-1], g4[5:-1]):
        if (a == "-999.25") != (b == "-999.25") or (
                a != "-999.25" and b != "%.4g" % float(a)):
            bad.append((a, b))
t.ok(ok and not bad, "--digits 4 is %%.4g of the value (%s)" % bad[:3])
qc = names.index("QC")
t.ok(all(g17[qc] == g4[qc] and g17[qc].isdigit() for g17, g4 in
         zip(got, got4)), "QC flags are integers whatever the digits")

# CSV: the same numbers, nulls as empty fields.
outc = os.path.join(tmp, "out.csv")
rc, so, se = log([inp, "-o", outc, "--format", "csv", "--digits", "17"])
gotc = data_rows(outc, ",")
t.ok(rc == 0 and len(gotc) == N and
     all(c == (g if g != "-999.25" else "") for gc, g2 in zip(gotc, got)
         for c, g in zip(gc, g2)),
     "CSV rows: the LAS values, empty for NULL")

# Wrapped: the same data rows.
inw = os.path.join(tmp, "wrapped.las")
write_las(inw, wrap=True)
outw = os.path.join(tmp, "outw.las")
rc, so, se = log([inw, "-o", outw, "--digits", "17"])
t.ok(rc == 0 and data_rows(outw) == got,
     "a wrapped file gives the same rows: " + se[-200:])

# Refused: strtod would read these, a LAS value may not be them.
for k, text in enumerate(["0x1p3", "inf", "nan", "-INF", "1e999",
                          "1,5"]):
    bp = os.path.join(tmp, "bad%d.las" % k)
    write_las(bp, bad=(5, text))
    ob = os.path.join(tmp, "bad%d_out.las" % k)
    rc, so, se = log([bp, "-o", ob])
    want = "line %d: value 2 ('%s') is not a number" % (NHEAD + 6, text)
    t.ok(rc == 5 and want in se and not os.path.exists(ob),
         "%s refused naming line and value (%d): %s" % (text, rc,
                                                        se.strip()[:200]))
t.done()
