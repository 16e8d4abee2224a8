"""Reads the SEG-Y written by client/segy.c back with Debian's
python3-segyio (a general-purpose reader of the SEG's open format) and
checks it against what was written, through tests/reference/segy_dump.

Checks and their references:
  - the EBCDIC table against Python's cp037 codec (IBM code page 037,
    the EBCDIC of SEG Y rev 1 textual headers), all printable ASCII;
  - the textual header: the raw 3200 bytes decoded with cp037 equal what
    segyio returns, 40 lines "C 1 " .. "C40 ", the rev 1 closing lines,
    the caution and the well name;
  - binary header (segyio.BinField): Interval, Samples, Format = 5,
    SEGYRevision = 0x0100, the fixed-length flag, traces per ensemble;
  - trace headers (segyio.TraceField): sequence numbers, offset (the
    angle), sample count and interval, delay recording time, trace
    identification (2 for an all-null trace), and segyio's time axis;
  - samples: equal to the written values rounded to IEEE single
    (numpy.float32), nulls as the null value;
  - a refused description writes no file;
  - end to end from the demo LAS (demo-requests/orrimund-3.las):
    the chain in the core written by the client's writer, read by
    segyio, equals the numpy re-implementation of the chain in
    test_seismic_numpy.py run on the LAS parsed here independently of the
    client's reader, to single precision (2e-7 of the gather's peak plus
    1.2e-7 relative: a float32 rounding and the 1e-10 agreement of the
    double chains), with nulls exactly where the numpy chain has them.

Run by ctest under /usr/bin/python3 with RW_BUILD and RW_SRC set. Prints
"N passed, M failed"; exit 1 on failure."""
import json
import math
import os
import subprocess
import sys
import tempfile

import numpy as np
import segyio

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from test_seismic_numpy import synth_reference  # noqa: E402

BUILD = os.environ.get("RW_BUILD", "build")
SRC = os.environ.get("RW_SRC", os.path.join(os.path.dirname(__file__),
                                            "..", ".."))
EXE = os.path.join(BUILD, "segy_dump")

passed = 0
failed = 0


def check(ok, what):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL", what)


def dump(args, stdin=""):
    res = subprocess.run([EXE] + args, input=stdin, capture_output=True,
                         text=True, timeout=120)
    return res.returncode, res.stdout, res.stderr


def test_ebcdic():
    rc, out, err = dump(["ebcdic"])
    check(rc == 0, "ebcdic mode")
    codes = json.loads(out)["codes"]
    ref = list("".join(chr(c) for c in range(0x20, 0x7F)).encode("cp037"))
    check(codes == ref, "EBCDIC table equals Python's cp037")


def write(path, well, dt, t0, data, angles, scale=1, null=0.0):
    ntr, ns = data.shape
    text = " ".join(repr(float(a)) for a in angles) + "\n"
    text += " ".join("nan" if math.isnan(v) else repr(float(v))
                     for v in data.ravel()) + "\n"
    rc, out, err = dump(["write", path, well, repr(dt), repr(t0), str(ns),
                         str(ntr), str(scale), repr(null)], text)
    return rc, json.loads(out) if out.strip() else None


def check_file(path, well, dt, t0, data, angles, scale, null):
    ntr, ns = data.shape
    with open(path, "rb") as f:
        raw = f.read()
    check(len(raw) == 3600 + ntr * (240 + 4 * ns), "file length")
    with segyio.open(path, ignore_geometry=True) as f:
        check(f.tracecount == ntr, "trace count")
        b = f.bin
        check(b[segyio.BinField.Interval] == round(dt * 1e6), "bin interval")
        check(b[segyio.BinField.Samples] == ns, "bin samples")
        check(b[segyio.BinField.Format] == 5, "bin format 5")
        check(b[segyio.BinField.SEGYRevision] == 0x0100, "bin revision")
        check(b[segyio.BinField.TraceFlag] == 1, "fixed-length flag")
        check(b[segyio.BinField.Traces] == ntr, "traces per ensemble")
        text = bytes(f.text[0])
        check(text == raw[:3200].decode("cp037").encode("ascii"),
              "textual header: cp037 decoding equals segyio's")
        lines = [text[80 * i:80 * (i + 1)].decode() for i in range(40)]
        check(all(l.startswith("C%2d " % (i + 1))
                  for i, l in enumerate(lines)), "card numbers")
        check(lines[38].startswith("C39 SEG Y REV1"), "C39 SEG Y REV1")
        check(lines[39].startswith("C40 END TEXTUAL HEADER"), "C40")
        joined = " ".join(lines)
        check("NOT A SUBSTITUTE FOR QUALIFIED" in joined and
              "WELL-CONTROL DECISIONS" in joined, "caution in text")
        check(("WELL: " + well) in joined, "well name in text")
        expect_t = t0 * 1e3 + np.arange(ns) * dt * 1e3
        check(np.allclose(f.samples, expect_t, rtol=0, atol=1e-9),
              "segyio time axis")
        for i in range(ntr):
            h = f.header[i]
            tr = data[i]
            dead = bool(np.all(np.isnan(tr)))
            check(h[segyio.TraceField.TRACE_SEQUENCE_LINE] == i + 1 and
                  h[segyio.TraceField.TRACE_SEQUENCE_FILE] == i + 1,
                  "sequence numbers")
            check(h[segyio.TraceField.offset] ==
                  round(angles[i] * scale), "offset holds the angle")
            check(h[segyio.TraceField.TRACE_SAMPLE_COUNT] == ns,
                  "trace sample count")
            check(h[segyio.TraceField.TRACE_SAMPLE_INTERVAL] ==
                  round(dt * 1e6), "trace interval")
            check(h[segyio.TraceField.DelayRecordingTime] ==
                  round(t0 * 1e3), "delay recording time")
            check(h[segyio.TraceField.TraceIdentificationCode] ==
                  (2 if dead else 1), "trace identification")
            check(h[segyio.TraceField.SourceX] == 0 and
                  h[segyio.TraceField.CDP_X] == 0, "coordinates zero")
            want = np.where(np.isnan(tr), null, tr).astype(np.float32)
            check(np.array_equal(f.trace[i], want), "samples of trace %d" %
                  (i + 1))


def test_write(rng):
    tmp = tempfile.mkdtemp(prefix="rw_segy_")
    for case in range(12):
        ntr = int(rng.integers(1, 40))
        ns = int(rng.integers(1, 2500))
        dt = [0.0005, 0.001, 0.002, 0.004][case % 4]
        t0 = float(rng.integers(0, 4000)) / 1000.0
        scale = [1, 10, 100][case % 3]
        angles = np.round(rng.uniform(0, 60, ntr) * scale) / scale
        data = rng.normal(0, 0.1, (ntr, ns))
        data[rng.uniform(size=data.shape) < 0.02] = np.nan
        if case % 3 == 0:
            data[0, :] = np.nan
        null = [0.0, -999.25][case % 2]
        path = os.path.join(tmp, "g%d.sgy" % case)
        rc, r = write(path, "TEST WELL %d" % case, dt, t0, data, angles,
                      scale, null)
        check(rc == 0 and r["status"] == 0, "write status %s" % r)
        check(r["nulls"] == int(np.sum(np.isnan(data))), "null count")
        check_file(path, "TEST WELL %d" % case, dt, t0, data, angles, scale,
                   null)
        os.unlink(path)
    # refusals leave no file
    path = os.path.join(tmp, "bad.sgy")
    rc, r = write(path, "W", 0.0020005, 0.0, np.zeros((2, 3)), [0, 5])
    check(rc != 0 and "dt:" in r["err"], "non-integral interval refused")
    check(not os.path.exists(path), "no file after a refusal")
    rc, r = write(path, "W", 0.002, 0.0, np.zeros((2, 3)), [0, 5.5])
    check(rc != 0 and "trace 2" in r["err"], "non-integral angle refused")
    os.rmdir(tmp)


def read_las(path):
    """Minimal LAS 2.0 reading for this file (WRAP NO): curve mnemonics
    from ~C, rows from ~A, NULL from ~W."""
    curves, rows, null, section = [], [], None, ""
    with open(path) as f:
        for line in f:
            s = line.strip()
            if not s or s.startswith("#"):
                continue
            if s.startswith("~"):
                section = s[1].upper()
                continue
            if section == "W" and s.upper().startswith("NULL"):
                null = float(s.split(":")[0].split()[-1])
            elif section == "C":
                curves.append(s.split(".")[0].strip())
            elif section == "A":
                rows.append([float(x) for x in s.split()])
    a = np.array(rows)
    a[a == null] = np.nan
    return {c: a[:, i] for i, c in enumerate(curves)}


def test_chain():
    las = os.path.join(SRC, "demo-requests", "orrimund-3.las")
    tmp = tempfile.mkdtemp(prefix="rw_segy_")
    path = os.path.join(tmp, "orrimund_gather.sgy")
    rc, out, err = dump(["chain", las, path])
    check(rc == 0, "chain mode: " + err)
    if rc != 0:
        return
    r = json.loads(out)
    c = read_las(las)
    z = c["DEPT"]
    vp = 0.3048e6 / c["DT"]
    vs = 0.3048e6 / c["DTS"]
    rho = 1000.0 * c["RHOB"]
    w = np.array(r["wavelet"])
    ang = np.radians(r["angles_deg"])
    ref, _ = synth_reference(z, vp, vs, rho,
                             (0.0, 0.0, r["vrep"], np.array(r["cs_z"]),
                              np.array(r["cs_t"])),
                             w, (len(w) - 1) // 2, r["t0"], r["dt"], r["nt"],
                             ang, 0, 0, 0)
    with segyio.open(path, ignore_geometry=True) as f:
        got = np.array([f.trace[i] for i in range(f.tracecount)],
                       dtype=float)
        check(f.tracecount == len(ang), "chain trace count")
        check(f.header[6][segyio.TraceField.offset] == 30, "far angle 30")
        check(np.allclose(f.samples, r["t0"] * 1e3 +
                          np.arange(r["nt"]) * r["dt"] * 1e3), "chain axis")
    nulls = np.isnan(ref)
    check(int(nulls.sum()) == r["nulls"] and nulls.sum() > 0,
          "chain nulls: %d in numpy, %d written" % (nulls.sum(), r["nulls"]))
    check(np.all(got[nulls] == 0.0), "nulls written as 0")
    peak = np.nanmax(np.abs(ref))
    d = np.max(np.abs(got[~nulls] - ref[~nulls]) -
               1.2e-7 * np.abs(ref[~nulls]))
    check(d <= 2e-7 * peak, "chain vs numpy to single precision (%g)" % d)
    check(peak > 0.01, "the gather is not empty (peak %g)" % peak)
    os.unlink(path)
    os.rmdir(tmp)


def main():
    rng = np.random.default_rng(20260402)
    test_ebcdic()
    test_write(rng)
    test_chain()
    print("%d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
