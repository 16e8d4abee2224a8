#!/usr/bin/python3
"""`rockwire synthetic` and the seismic family end to end (issue 13): the
demo LAS file (demo-requests/orrimund-3.las, invented) with invented
checkshots to SEG-Y traces read back by Debian's python3-segyio (a
general-purpose reader of the SEG standard), the CSV outputs checked
against the SEG-Y and against the daemon's own answer, the caution in
every file, the exit codes and "did you mean". Outside references for
the physics through the protocol: numpy.convolve (the trace of a
reflectivity series is its convolution with the wavelet), numpy's FFT
(the Ricker wavelet's amplitude spectrum peaks at its stated frequency,
Ricker 1953; the Ormsby spectrum is flat between its inner corners and
zero beyond its outer ones, Ormsby 1961)."""
import csv
import io
import json
import os
import subprocess
import sys
import tempfile

import numpy as np
import segyio

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

t = rwtest.Checks()
tmp = tempfile.mkdtemp(prefix="rw-synth-")
LAS = os.path.join(rwtest.SRC, "demo-requests", "orrimund-3.las")
d = rwtest.Daemon()


def run(*args, timeout=120):
    p = subprocess.run([rwtest.CLIENT, "--socket", d.path, "synthetic"] +
                       list(args), capture_output=True, text=True,
                       timeout=timeout, cwd=tmp)
    return p.returncode, p.stdout, p.stderr


def read_csv(path):
    """Comment lines and rows of a CSV written by the client."""
    with open(path) as f:
        lines = f.read().splitlines()
    notes = [x for x in lines if x.startswith("#")]
    rows = list(csv.reader(x for x in lines if not x.startswith("#")))
    return notes, rows


def num(s):
    return float(s) if s != "" else float("nan")


# ---- the demo well to SEG-Y ------------------------------------------------
cs = os.path.join(tmp, "checkshots.csv")
with open(cs, "w") as f:
    # invented checkshots: depth below the datum, one-way vertical time
    f.write("DEPTH[m],OWT[ms]\n1500,640\n1600,680\n1700,716\n")
sgy, syn, td = (os.path.join(tmp, x) for x in ("g.sgy", "g.csv", "td.csv"))
rc, out, err = run(LAS, "--angles", "0:30:10", "--wavelet", "ricker:30",
                   "--checkshots", cs, "--datum-depth", "0", "--vrep",
                   "2100", "--segy", sgy, "--csv", syn, "--td-csv", td)
t.ok(rc == 0, "synthetic of the demo well: rc %d %s" % (rc, err))
notes, rows = read_csv(syn)
t.ok(any("Screening estimates only" in x for x in notes),
     "the caution in the traces CSV")
t.ok(rows[0] == ["TIME[ms]", "DEPTH[m]", "SYN_0", "SYN_10", "SYN_20",
                 "SYN_30"], "traces CSV header %s" % rows[0])
data = np.array([[num(v) for v in r] for r in rows[1:]])
times = data[:, 0]
t.ok(np.allclose(np.diff(times), 2.0), "2 ms axis")
t.ok(times[0] == round(times[0]), "the axis starts on a whole ms")

with segyio.open(sgy, ignore_geometry=True) as f:
    text = segyio.tools.wrap(f.text[0])
    t.ok("SCREENING ESTIMATES" in text.upper(),
         "the caution in the SEG-Y textual header")
    t.ok("SEG Y REV1" in text, "rev 1 line in the textual header")
    t.ok("ORRIMUND 3" in text, "the well in the textual header")
    t.ok(f.tracecount == 4, "4 traces, got %d" % f.tracecount)
    t.ok(len(f.samples) == len(times), "samples %d vs CSV %d" %
         (len(f.samples), len(times)))
    t.ok(segyio.tools.dt(f) == 2000.0, "dt 2000 us")
    t.ok(int(f.bin[segyio.BinField.Format]) == 5, "IEEE float format 5")
    t.ok(np.allclose(f.samples, times), "sample times from the delay")
    offs = [f.header[i][segyio.TraceField.offset] for i in range(4)]
    t.ok(offs == [0, 10, 20, 30], "angles in bytes 37-40: %s" % offs)
    tr = f.trace.raw[:].astype(float)
csvtr = data[:, 2:].T
null = np.isnan(csvtr)
t.ok(null.any() and not null[0].all(),
     "shear missing at 1520-1540 m nulls the angle traces near it")
t.ok(not np.isnan(csvtr[0]).any(), "normal incidence needs no shear")
t.ok(np.all(tr[null] == 0), "nulls written as 0 in SEG-Y")
ok = ~null
# 4-byte floats against 9 significant digits
t.ok(np.allclose(tr[ok], csvtr[ok], rtol=1e-6, atol=1e-12),
     "SEG-Y traces equal the CSV traces")
t.ok(np.abs(csvtr[ok]).max() > 0.02, "the gather is not empty")

# the time-depth curve: checkshot times reproduced at their depths
tnotes, trows = read_csv(td)
t.ok(any("Screening estimates only" in x for x in tnotes),
     "the caution in the time-depth CSV")
t.ok(trows[0][:4] == ["DEPTH[m]", "TWT[ms]", "TWT_SONIC[ms]", "DRIFT[ms]"],
     "time-depth header %s" % trows[0])
tdd = {float(r[0]): float(r[1]) for r in trows[1:]}
t.ok(len(tdd) == 401, "one row per log sample (401), got %d" % len(tdd))
for z, owt in ((1500, 640), (1600, 680), (1700, 716)):
    t.ok(abs(tdd[z] - 2 * owt) < 1e-6,
         "checkshot at %g m: twt %g, want %g" % (z, tdd[z], 2 * owt))

# ---- the daemon's answer, numpy.convolve, numpy's FFT ----------------------
s = d.connect()
z = [1000 + 0.5 * i for i in range(300)]
rho = [2.2 + 0.2 * ((i // 37) % 2) + 0.01 * (i % 7) for i in range(300)]
vp = [2400 + 300 * ((i // 23) % 3) for i in range(300)]
vs = [v / 1.9 for v in vp]
wv = rwtest.call(s, rwtest.req("seismic.wavelet",
                               {"frequency": 25, "length": 160}))["result"]
for conv in ("direct", "fft"):
    r = rwtest.call(s, rwtest.req("seismic.synthetic", {
        "depth": z, "vp": vp, "vs": vs, "rho": rho, "angle": [0, 25],
        "wavelet": {"frequency": 25, "length": 160},
        "convolution": conv}))["result"]
    w = np.array(wv["amplitude"])
    i0 = wv["zero_index"]
    for a in range(2):
        refl = np.array(r["reflectivity"][a])
        full = np.convolve(refl, w)[i0:i0 + len(refl)]
        got = np.array(r["traces"][a], dtype=float)
        # the axis covers the wavelet's reach, so the interfaces are all
        # on it and the same-length convolution is the whole answer
        t.ok(np.max(np.abs(got - full)) < 1e-12,
             "%s convolution at angle %d equals numpy.convolve (%g)" %
             (conv, a, np.max(np.abs(got - full))))

wl = rwtest.call(s, rwtest.req("seismic.wavelet", {
    "frequency": 25, "length": 1000, "dt": 1}))["result"]
spec = np.abs(np.fft.rfft(wl["amplitude"], 1 << 16))
freq = np.fft.rfftfreq(1 << 16, 1e-3)
t.ok(abs(freq[np.argmax(spec)] - 25) < 0.05,
     "Ricker spectrum peaks at 25 Hz (numpy FFT: %g)" %
     freq[np.argmax(spec)])
wo = rwtest.call(s, rwtest.req("seismic.wavelet", {
    "kind": "ormsby", "corners": [5, 10, 40, 50], "length": 2000,
    "dt": 1}))["result"]
spec = np.abs(np.fft.rfft(wo["amplitude"], 1 << 16))
spec /= np.median(spec[(freq > 15) & (freq < 35)])
flat = spec[(freq >= 12) & (freq <= 38)]
# the cut wavelet's spectrum ripples by an amount falling with length
# (include/rockwire/seismic.h): 5% at 2 s
t.ok(np.max(np.abs(flat - 1)) < 0.05,
     "Ormsby flat between the inner corners (%g)" % np.max(np.abs(flat - 1)))
t.ok(np.max(spec[(freq > 53)]) < 0.02 and np.max(spec[freq < 3]) < 0.02,
     "Ormsby near zero beyond the outer corners")
s.close()

# ---- errors and exit codes -------------------------------------------------
rc, out, err = run(os.path.join(tmp, "none.las"))
t.ok(rc == 4 and "none.las" in err, "missing file: exit 4 (%d %s)" %
     (rc, err))
bad = os.path.join(tmp, "bad.las")
with open(bad, "w") as f:
    f.write("~V\n VERS. 2.0 :\n WRAP. NO :\n~W\n NULL. -999.25 :\n~C\n"
            " DEPT.M :\n DT.US/F :\n RHOB.G/C3 :\n~A\n1500 100 2.3\n"
            "1500.5 abc 2.3\n")
rc, out, err = run(bad)
t.ok(rc == 5 and "line" in err, "malformed LAS: exit 5 (%d %s)" % (rc, err))
rc, out, err = run(LAS, "--angls", "0:30:10")
t.ok(rc == 2 and "--angles" in err, "unknown option suggests --angles "
     "(%d %s)" % (rc, err))
rc, out, err = run(LAS, "--angles", "30:0:5")
t.ok(rc == 2 and "--angles" in err, "bad angle range: exit 2")
rc, out, err = run(LAS, "--wavelet", "rikcer:30")
t.ok(rc == 2 and "ricker" in err, "wavelet typo suggests ricker (%s)" % err)
rc, out, err = run(LAS, "--method", "zoepritz")
t.ok(rc == 1 and "zoeppritz" in err,
     "method typo: the daemon refuses, the client suggests (%d %s)" %
     (rc, err))
rc, out, err = run(LAS, "--dt", "0.0005")
t.ok(rc == 2, "dt below a microsecond: exit 2")
noshear = os.path.join(tmp, "noshear.las")
with open(LAS) as f:
    text = f.read()
with open(noshear, "w") as f:
    f.write(text.replace(" DTS .US/F", " XDTS.US/F"))
rc, out, err = run(noshear, "--angles", "0,10")
t.ok(rc == 5 and "shear" in err, "angles need a shear curve (%d %s)" %
     (rc, err))
rc, out, err = run(noshear)
t.ok(rc == 0 and out.startswith("# Screening"),
     "normal incidence without shear, CSV on stdout")
rc, out, err = run("--help")
t.ok(rc == 0 and "never the sole basis" in out and "--segy" in out,
     "--help with the caution")
d.stop()
t.done()
