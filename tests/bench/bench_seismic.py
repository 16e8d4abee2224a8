"""Benchmarks of the seismic chain against a vectorised numpy
implementation of the same chain, measured in the same run (run on
demand, never by ctest; the issue's target is a ratio of at least 5).

  /usr/bin/python3 tests/bench/bench_seismic.py [BUILD_DIR] [--core] [--reps N]

By default the cases run end to end through the daemon: rockwired on a
private socket, seismic.synthetic requests written to it and the answers
read back and parsed (json.loads) into arrays. Two daemon times are
printed: from request lines already encoded (what a client holding a file
or a C encoder sends) and with Python's own json.dumps of the arrays
counted too. Each is the median of --reps runs (default 5) with min and
max, and the ratio is numpy's median over the daemon's. --core runs the
core alone (bench_seismic.c) as before.

Cases (as issue 13 states them):
  - gather: a 10,000-sample log at 30 angles (0-45 degrees), exact
    Zoeppritz, 30 Hz Ricker, 2 ms axis over the log;
  - batch: 1,000 normal-incidence traces, each from its own 1,000-sample
    log.
The numpy side does the same work: trapezoid time-depth (numpy.cumsum),
interface times, the exact coefficients by a batched numpy.linalg.solve
of the boundary conditions (as in tests/reference/
test_zoeppritz_numpy.py), linear sub-sample placement (numpy.bincount)
and numpy.convolve of the real part with the wavelet and of the
imaginary part with its Hilbert transform. Logs are rebuilt here with the
same generator as bench_seismic.c, so both sides compute the same gather
(their sums are compared as a sanity check). Also prints the direct/FFT
convolution crossover behind RW_SEIS_CONV_AUTO. Times are best of
several runs; ratios are what to read, absolute times depend on the
machine and its load."""
import json
import os
import socket
import statistics
import subprocess
import sys
import tempfile
import threading
import time

import numpy as np

ARGS = [a for a in sys.argv[1:] if not a.startswith("--")]
BUILD = ARGS[0] if ARGS and not ARGS[0].isdigit() else os.environ.get(
    "RW_BUILD", os.path.join(os.path.dirname(__file__), "..", "..", "build"))
REPS = int(sys.argv[sys.argv.index("--reps") + 1]) \
    if "--reps" in sys.argv else 5
EXE = os.path.join(BUILD, "bench_seismic")
M64 = (1 << 64) - 1


class Lcg:
    """The generator of bench_seismic.c (urand)."""

    def __init__(self, start):
        self.s = start

    def urand(self, lo, hi):
        self.s = (self.s * 6364136223846793005 + 1442695040888963407) & M64
        return lo + (hi - lo) * (self.s >> 11) / 9007199254740992.0


def make_log(start, n):
    g = Lcg(start)
    z = 1200.0 + 0.1524 * np.arange(n)
    vp = np.empty(n)
    vs = np.empty(n)
    rho = np.empty(n)
    i = 0
    while i < n:
        length = 3 + int(g.urand(0, 37.99))
        a = g.urand(2200, 4200)
        ratio = g.urand(0.42, 0.6)
        r = g.urand(2050, 2600)
        vp[i:i + length] = a
        vs[i:i + length] = a * ratio
        rho[i:i + length] = r
        i += length
    return z, vp, vs, rho


def ricker(f, length, dt):
    n = 2 * int(length / (2 * dt) + 1e-9) + 1
    t = (np.arange(n) - (n - 1) // 2) * dt
    a = (np.pi * f * t)**2
    return (1 - 2 * a) * np.exp(-a)


def hilbert_ideal(x):
    n = len(x)
    k = np.arange(-(n - 1), n)
    g = np.zeros(len(k))
    odd = k % 2 != 0
    g[odd] = 2.0 / (np.pi * k[odd])
    return np.convolve(x, g)[n - 1:2 * n - 1]


def zoeppritz_rpp(vp1, vs1, r1, vp2, vs2, r2, th):
    """Exact Rpp of solid/solid interfaces, batched: the 4x4 boundary
    conditions of Aki & Richards 1980 sec. 5.2 (displacement and traction
    continuous), arrays of any common shape."""
    p = np.sin(th) / vp1
    sh = np.broadcast(vp1, th).shape

    def q(v):
        return np.sqrt((1.0 / v**2 - p**2).astype(complex))

    def pw(rho, a, b, up):
        qa = q(a)
        sg = -1.0 if up else 1.0
        return [a * p + 0j, sg * a * qa, sg * 2 * rho * b**2 * a * p * qa,
                rho * a * (1 - 2 * b**2 * p**2) + 0j]

    def sw(rho, b, up):
        qb = q(b)
        sg = -1.0 if up else 1.0
        return [b * qb, -sg * b * p + 0j, sg * rho * b * (1 - 2 * b**2 * p**2)
                + 0j, -2 * rho * b**3 * p * qb]

    z1 = r1 * vp1
    sc = [1.0, 1.0, 1.0 / z1, 1.0 / z1]
    cols = [pw(r1, vp1, vs1, True), sw(r1, vs1, True),
            [-x for x in pw(r2, vp2, vs2, False)],
            [-x for x in sw(r2, vs2, False)]]
    m = np.empty(sh + (4, 4), dtype=complex)
    for j, c in enumerate(cols):
        for i in range(4):
            m[..., i, j] = np.broadcast_to(c[i] * sc[i], sh)
    inc = pw(r1, vp1, vs1, False)
    rhs = np.empty(sh + (4, 1), dtype=complex)
    for i in range(4):
        rhs[..., i, 0] = np.broadcast_to(-inc[i] * sc[i], sh)
    return np.linalg.solve(m, rhs)[..., 0, 0]


def numpy_chain(z, vp, vs, rho, angles, w, dt=0.002):
    """Datum 1200 m at 1 s, replacement 2000 m/s (as bench_seismic.c)."""
    s = 1.0 / vp
    t = 1.0 + 2.0 * (z[0] - 1200.0) / 2000.0 + np.concatenate(
        ([0.0], np.cumsum(np.diff(z) * (s[1:] + s[:-1]))))
    t0 = np.floor(t[0] / dt) * dt
    nt = int((t[-1] - t0) / dt) + 2
    i0 = (len(w) - 1) // 2
    pre, post = len(w) - i0, i0 + 1
    ne = nt + pre + post
    tint = 0.5 * (t[1:] + t[:-1])
    u = (tint - (t0 - pre * dt)) / dt
    k = np.floor(u).astype(int)
    a = u - k
    rpp = zoeppritz_rpp(vp[:-1, None], vs[:-1, None], rho[:-1, None],
                        vp[1:, None], vs[1:, None], rho[1:, None],
                        np.asarray(angles)[None, :])
    h = hilbert_ideal(w)
    out = np.empty((len(angles), nt))
    for j in range(len(angles)):
        r = rpp[:, j]
        re = np.bincount(k, (1 - a) * r.real, ne) + \
            np.bincount(k + 1, a * r.real, ne + 1)[:ne]
        im = np.bincount(k, (1 - a) * r.imag, ne) + \
            np.bincount(k + 1, a * r.imag, ne + 1)[:ne]
        tr = np.convolve(re, w)[i0:i0 + ne]
        if np.any(im):
            tr += np.convolve(im, h)[i0:i0 + ne]
        out[j] = tr[pre:pre + nt]
    return out


def best_of(fn, reps):
    best = 1e30
    for _ in range(reps):
        t = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t)
    return best


def main_core():
    c = json.loads(subprocess.run([EXE, "conv"], capture_output=True,
                                  text=True, check=True).stdout)["conv"]
    print("convolution: nr nw direct/fft x=nr*nw/(N log2 N)")
    for r in c:
        print("  %6d %4d  %6.2f  x=%.2f" % (r["nr"], r["nw"],
                                            r["direct_s"] / r["fft_s"],
                                            r["x"]))
    w = ricker(30.0, 0.1, 0.002)
    # gather: 10,000 samples, 30 angles
    angles = np.radians(np.linspace(0, 45, 30))
    g = json.loads(subprocess.run([EXE, "gather", "10000", "30", "5"],
                                  capture_output=True, text=True,
                                  check=True).stdout)
    z, vp, vs, rho = make_log(7, 10000)
    res = {}
    tn = best_of(lambda: res.update(o=numpy_chain(z, vp, vs, rho, angles,
                                                  w)), 3)
    print("gather 10000 samples x 30 angles: core %.4f s, numpy %.4f s, "
          "ratio %.1f (sums %.6g / %.6g)" %
          (g["gather_s"], tn, tn / g["gather_s"], g["checksum"],
           res["o"].sum()))
    # batch: 1,000 traces of 1,000-sample logs
    b = json.loads(subprocess.run([EXE, "batch", "1000", "1000"],
                                  capture_output=True, text=True,
                                  check=True).stdout)
    logs = [make_log(1000 + i, 1000) for i in range(1000)]
    sums = [0.0]

    def batch():
        for lg in logs:
            o = numpy_chain(*lg, [0.0], w)
            sums[0] += o.sum()
    tb = best_of(batch, 1)
    print("batch 1000 traces x 1000 samples: core %.4f s, numpy %.4f s, "
          "ratio %.1f (sums %.6g / %.6g)" %
          (b["batch_s"], tb, tb / b["batch_s"], b["checksum"], sums[0]))
    return 0


# ---- end to end through the daemon ------------------------------------------


class Daemon:
    """rockwired on a private socket (default limits, worker threads)."""

    def __init__(self):
        self.dir = tempfile.mkdtemp(prefix="rw-bench-")
        self.path = os.path.join(self.dir, "rw.sock")
        self.proc = subprocess.Popen(
            [os.path.join(BUILD, "rockwired"), "--socket", self.path],
            stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL,
            stderr=subprocess.DEVNULL)
        for _ in range(500):
            if os.path.exists(self.path):
                break
            time.sleep(0.01)
        time.sleep(0.05)
        self.sock = socket.socket(socket.AF_UNIX, socket.SOCK_STREAM)
        self.sock.connect(self.path)
        self.rf = self.sock.makefile("rb", buffering=1 << 20)

    def run(self, lines):
        """Writes every line (pipelined, from a thread) and returns the
        parsed answers in order."""
        def writer():
            for ln in lines:
                self.sock.sendall(ln)
        th = threading.Thread(target=writer)
        th.start()
        out = [json.loads(self.rf.readline()) for _ in lines]
        th.join()
        return out

    def run_split(self, lines, k):
        """The same over k connections (line i on connection i % k, each
        pipelined from its own thread), the answers back in request
        order: one connection's lines run one at a time (its answers
        stay in order), so a client with a batch opens one per core."""
        socks = [self.sock] + [socket.socket(socket.AF_UNIX,
                                             socket.SOCK_STREAM)
                               for _ in range(k - 1)]
        for sk in socks[1:]:
            sk.connect(self.path)
        files = [self.rf] + [sk.makefile("rb", buffering=1 << 20)
                             for sk in socks[1:]]
        out = [None] * len(lines)

        def writer(j):
            for ln in lines[j::k]:
                socks[j].sendall(ln)

        def reader(j):
            for i in range(j, len(lines), k):
                out[i] = json.loads(files[j].readline())
        ths = [threading.Thread(target=f, args=(j,))
               for j in range(k) for f in (writer, reader)]
        for th in ths:
            th.start()
        for th in ths:
            th.join()
        for f, sk in zip(files[1:], socks[1:]):
            f.close()
            sk.close()
        return out

    def stop(self):
        self.sock.close()
        self.proc.terminate()
        self.proc.wait(10)


def request(z, vp, vs, rho, angles_deg, t0, nt, rid):
    """The seismic.synthetic request of numpy_chain's case: datum at the
    first sample (1200 m) at 1 s, 30 Hz Ricker of 100 ms, 2 ms axis."""
    return (json.dumps({
        "jsonrpc": "2.0", "id": rid, "method": "seismic.synthetic",
        "params": {
            "depth": z.tolist(), "vp": vp.tolist(), "vs": vs.tolist(),
            "rho": (rho / 1000.0).tolist(), "datum": {"twt": 1000.0},
            "wavelet": {"frequency": 30, "length": 100},
            "angle": list(angles_deg), "axis": {"t0": t0 * 1e3, "n": nt},
            "fields": ["traces"]}}) + "\n").encode()


def axis_of(z, vp, dt=0.002):
    s = 1.0 / vp
    t = 1.0 + np.concatenate(([0.0], np.cumsum(np.diff(z) *
                                               (s[1:] + s[:-1]))))
    t0 = np.floor(t[0] / dt) * dt
    return t0, int((t[-1] - t0) / dt) + 2


def proc_cpu(pid):
    """User + system CPU seconds of a process (/proc/PID/stat)."""
    with open("/proc/%d/stat" % pid) as f:
        fields = f.read().rsplit(")", 1)[1].split()
    return (int(fields[11]) + int(fields[12])) / os.sysconf("SC_CLK_TCK")


def timed(fn, reps, pid=None):
    """Median, min and max wall time of fn over reps runs, and the median
    CPU time it cost (this process, plus the daemon's when pid is given):
    on a loaded machine the CPU ratio is the steadier figure."""
    ts, cs = [], []
    for _ in range(reps):
        c0 = time.process_time() + (proc_cpu(pid) if pid else 0)
        t = time.perf_counter()
        fn()
        ts.append(time.perf_counter() - t)
        cs.append(time.process_time() + (proc_cpu(pid) if pid else 0) - c0)
    return statistics.median(ts), min(ts), max(ts), statistics.median(cs)


def realistic(lg):
    """A log at the precision logs are recorded with (depth 0.1 mm, 0.1
    m/s, 0.1 kg/m3: five or six significant digits, as in LAS files),
    not Python's 17-digit repr; both sides compute from these values."""
    z, vp, vs, rho = lg
    return np.round(z, 4), np.round(vp, 1), np.round(vs, 1), np.round(rho, 1)


def show(name, tn, td, tde, check):
    print("%s\n"
          "  numpy     wall median %.4f s (min %.4f, max %.4f), cpu %.4f s\n"
          "  daemon    wall median %.4f s (min %.4f, max %.4f), cpu %.4f s"
          "  ratio wall %.1f cpu %.1f\n"
          "  +encoding wall median %.4f s (min %.4f, max %.4f), cpu %.4f s"
          "  ratio wall %.1f cpu %.1f\n"
          "  largest |daemon - numpy| %.2e" %
          (name, tn[0], tn[1], tn[2], tn[3], td[0], td[1], td[2], td[3],
           tn[0] / td[0], tn[3] / td[3], tde[0], tde[1], tde[2], tde[3],
           tn[0] / tde[0], tn[3] / tde[3], check))


def main_e2e():
    w = ricker(30.0, 0.1, 0.002)
    d = Daemon()
    try:
        # gather: 10,000 samples x 30 angles (0-45 deg), exact Zoeppritz
        adeg = np.linspace(0, 45, 30)
        ang = np.radians(adeg)
        z, vp, vs, rho = realistic(make_log(7, 10000))
        t0, nt = axis_of(z, vp)
        res = {}
        tn = timed(lambda: res.update(o=numpy_chain(z, vp, vs, rho, ang,
                                                    w)), REPS)
        line = [request(z, vp, vs, rho, adeg, t0, nt, 1)]
        td = timed(lambda: res.update(d=d.run(line)), REPS, d.proc.pid)
        tde = timed(lambda: d.run([request(z, vp, vs, rho, adeg, t0, nt,
                                           1)]), REPS, d.proc.pid)
        got = np.array(res["d"][0]["result"]["traces"], dtype=float)
        show("gather 10000 samples x 30 angles", tn, td, tde,
             np.nanmax(np.abs(got - res["o"])))
        # batch: 1,000 normal-incidence traces of 1,000-sample logs
        logs = [realistic(make_log(1000 + i, 1000)) for i in range(1000)]
        axes = [axis_of(lg[0], lg[1]) for lg in logs]

        def nbatch():
            res["nb"] = [numpy_chain(*lg, [0.0], w)[0] for lg in logs]

        def enc():
            return [request(*lg, [0.0], a[0], a[1], i)
                    for i, (lg, a) in enumerate(zip(logs, axes))]
        lines = enc()
        tn = timed(nbatch, REPS)
        td = timed(lambda: res.update(db=d.run(lines)), REPS, d.proc.pid)
        tde = timed(lambda: d.run(enc()), REPS, d.proc.pid)
        worst = max(np.nanmax(np.abs(np.array(r["result"]["traces"],
                                              dtype=float) - o))
                    for r, o in zip(res["db"], res["nb"]))
        show("batch 1000 traces x 1000 samples", tn, td, tde, worst)
        td2 = timed(lambda: res.update(db2=d.run_split(lines, 2)), REPS,
                    d.proc.pid)
        tde2 = timed(lambda: d.run_split(enc(), 2), REPS, d.proc.pid)
        worst = max(np.nanmax(np.abs(np.array(r["result"]["traces"],
                                              dtype=float) - o))
                    for r, o in zip(res["db2"], res["nb"]))
        show("batch 1000 traces x 1000 samples, 2 connections", tn, td2,
             tde2, worst)
    finally:
        d.stop()
    return 0


if __name__ == "__main__":
    sys.exit(main_core() if "--core" in sys.argv else main_e2e())
