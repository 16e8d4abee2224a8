#!/usr/bin/python3
"""Uncertainty benchmark (on demand, never in ctest or tests/run):
10,000 draws through rock.substitute and reflect.interface, each
against a vectorised numpy implementation of the same Monte Carlo in the
same run, and the daemon on 2 cores against the same daemon pinned to 1
core (taskset).

    /usr/bin/python3 tests/bench/bench_uncertainty.py [BUILD_DIR]
        [--reps N] [--draws N] [--samples N] [--case substitute|avo]

Cases (both with sensitivities, percentiles 10/50/90):
  substitute: Gassmann 1951 fluid substitution of SAMPLES log samples
      (vp, vs, rho as logged with brine) to gas, porosity ~ N(0.25, 0.03),
      mineral modulus ~ U(33, 38) GPa, gas modulus ~ U(0.03, 0.12) GPa;
      outputs vp, vs, rho.
  avo: exact Zoeppritz Rpp (Aki & Richards 1980, sec. 5.2) of SAMPLES
      shale/sand interfaces at 0, 10, 20, 30, 40 deg, the sand's vp, vs,
      rho normal per interface; output rpp_re (the daemon also classifies
      each draw, which numpy does not).
numpy draws with plain Monte Carlo (the daemon's Latin hypercube costs
no more), evaluates over a (draws, samples[, angles]) array, and takes
the mean, sd, percentiles and Spearman rank correlations along the draw
axis. The three are timed back to back in each of --reps rounds, the
order reversed every other round; each time is the median of the rounds
with min and max, and each ratio (numpy / daemon, the speed-up, and 1
core / 2 cores) the median of the rounds' own ratios. Use a
release build (a sanitizer build says nothing)."""
import argparse
import json
import os
import statistics
import subprocess
import sys
import time

import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, HERE)
from bench_seismic import zoeppritz_rpp  # noqa: E402

TOP = os.path.dirname(os.path.dirname(HERE))
PCT = [10, 50, 90]


class Daemon:
    """One rockwired --stdio kept open; one request line in, one out."""

    def __init__(self, exe, cpus=None):
        argv = [exe, "--stdio"]
        if cpus:
            argv = ["taskset", "-c", cpus] + argv
        self.p = subprocess.Popen(argv, stdin=subprocess.PIPE,
                                  stdout=subprocess.PIPE,
                                  stderr=subprocess.DEVNULL)

    def call(self, line):
        self.p.stdin.write(line)
        self.p.stdin.flush()
        out = self.p.stdout.readline()
        r = json.loads(out)
        if "error" in r:
            raise RuntimeError("daemon error: %r" % r["error"])
        return r["result"]

    def close(self):
        self.p.stdin.close()
        self.p.wait(10)


def spearman_along0(x, y):
    """Spearman's rank correlation of x (draws,) or (draws, ...) with y
    (draws, ...) along axis 0 (no ties: continuous draws)."""
    def ranks(a):
        return np.argsort(np.argsort(a, axis=0), axis=0).astype(float)
    rx, ry = ranks(x), ranks(y)
    rx = rx.reshape(rx.shape + (1,) * (ry.ndim - rx.ndim))
    rx = rx - rx.mean(axis=0)
    ry = ry - ry.mean(axis=0)
    return (rx * ry).sum(axis=0) / np.sqrt((rx * rx).sum(axis=0) *
                                           (ry * ry).sum(axis=0))


def summary(y, inputs):
    out = {"mean": y.mean(axis=0), "sd": y.std(axis=0, ddof=1)}
    for p, v in zip(PCT, np.percentile(y, PCT, axis=0)):
        out["p%d" % p] = v
    out["sens"] = [spearman_along0(x, y) for x in inputs]
    return out


# ---- substitute ---------------------------------------------------------

def sub_data(n):
    rng = np.random.default_rng(5)
    vp = rng.uniform(2800, 3600, n)
    vs = vp / rng.uniform(1.7, 2.0, n)
    rho = rng.uniform(2.15, 2.35, n)
    return vp, vs, rho


def sub_request(n, draws, rid):
    vp, vs, rho = sub_data(n)
    return (json.dumps({
        "jsonrpc": "2.0", "id": rid, "method": "rock.substitute",
        "params": {
            "vp": vp.tolist(), "vs": vs.tolist(), "rho": rho.tolist(),
            "porosity": {"dist": "normal", "mean": 0.25, "sd": 0.03},
            "mineral": {"k": {"dist": "uniform", "low": 33, "high": 38},
                        "rho": 2.65},
            "fluid_in_place": {"k": 2.8, "rho": 1.05},
            "fluid_new": {"k": {"dist": "uniform", "low": 0.03,
                                "high": 0.12}, "rho": 0.25},
            "fields": ["vp", "vs", "rho"],
            "uncertainty": {"draws": draws, "seed": 3,
                            "percentiles": PCT}}}) + "\n").encode()


def sub_numpy(n, draws):
    """Gassmann 1951 both ways (Mavko et al. 2009, sec. 6.3), in SI."""
    vp, vs, rho = sub_data(n)
    rng = np.random.default_rng(3)
    phi = rng.normal(0.25, 0.03, draws)[:, None]
    km = rng.uniform(33e9, 38e9, draws)[:, None]
    k2 = rng.uniform(0.03e9, 0.12e9, draws)[:, None]
    k1, r1, r2 = 2.8e9, 1050.0, 250.0
    rh = rho * 1000.0
    mu = rh * vs ** 2
    ks = rh * vp ** 2 - 4.0 / 3.0 * mu
    a = ks * (phi * km / k1 + 1 - phi) - km
    kd = a / (phi * km / k1 + ks / km - 1 - phi)
    b = (1 - kd / km) ** 2
    kn = kd + b / (phi / k2 + (1 - phi) / km - kd / km ** 2)
    rn = rh - phi * (r1 - r2)
    bad = (phi <= 0) | (phi >= 1) | ~(kd > 0)
    vpn = np.sqrt((kn + 4.0 / 3.0 * mu) / rn)
    vsn = np.sqrt(mu / rn)
    vpn[np.broadcast_to(bad, vpn.shape)] = np.nan
    ins = [phi[:, 0], km[:, 0], k2[:, 0]]
    return [summary(np.nan_to_num(y, nan=0.0), ins)
            for y in (vpn, vsn, rn / 1000.0)]


# ---- avo ----------------------------------------------------------------

ANG = [0, 10, 20, 30, 40]


def avo_data(n):
    rng = np.random.default_rng(7)
    vp = rng.uniform(2500, 3300, n)
    vs = vp / rng.uniform(1.6, 2.0, n)
    rho = rng.uniform(2.0, 2.3, n)
    return vp, vs, rho


def avo_request(n, draws, rid):
    vp, vs, rho = avo_data(n)
    return (json.dumps({
        "jsonrpc": "2.0", "id": rid, "method": "reflect.interface",
        "params": {
            "upper": {"vp": 2900, "vs": 1350, "rho": 2.45},
            "lower": {
                "vp": {"dist": "normal", "mean": vp.tolist(), "sd": 90},
                "vs": {"dist": "normal", "mean": vs.tolist(), "sd": 60},
                "rho": {"dist": "normal", "mean": rho.tolist(),
                        "sd": 0.03}},
            "angle": ANG, "methods": "zoeppritz", "fields": ["rpp_re"],
            "uncertainty": {"draws": draws, "seed": 3,
                            "percentiles": PCT}}}) + "\n").encode()


def avo_numpy(n, draws):
    vp, vs, rho = avo_data(n)
    rng = np.random.default_rng(3)
    vp2 = rng.normal(vp, 90, (draws, n))
    vs2 = rng.normal(vs, 60, (draws, n))
    r2 = rng.normal(rho, 0.03, (draws, n))
    th = np.radians(np.array(ANG, dtype=float))
    up = np.ones(vp2.shape + (1,))
    r = zoeppritz_rpp(2900.0 * up, 1350.0 * up, 2450.0 * up, vp2[..., None],
                      vs2[..., None], r2[..., None] * 1000.0, th).real
    return [summary(r, [vp2, vs2, r2])]


# ---- running ------------------------------------------------------------

def interleaved(fns, reps):
    """Times numpy, the 2-core daemon and the 1-core daemon back to back
    in each of reps rounds, the order reversed every other round so the
    machine's drift falls on all three alike. Returns the three (median,
    min, max) and, over the rounds, (median, min, max) of numpy / 2 cores
    and of 1 core / 2 cores."""
    ts = [[] for _ in fns]
    for r in range(reps):
        order = range(len(fns)) if r % 2 == 0 else reversed(range(len(fns)))
        for k in order:
            t = time.perf_counter()
            fns[k]()
            ts[k].append(time.perf_counter() - t)

    def stat(v):
        return statistics.median(v), min(v), max(v)

    r_np = [a / b for a, b in zip(ts[0], ts[1])]
    r_cores = [a / b for a, b in zip(ts[2], ts[1])]
    return (stat(ts[0]), stat(ts[1]), stat(ts[2]), stat(r_np),
            stat(r_cores))


def fmt(t):
    return "%.3f s [%.3f, %.3f]" % t


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("build", nargs="?",
                    default=os.path.join(TOP, "build"))
    ap.add_argument("--reps", type=int, default=5)
    ap.add_argument("--draws", type=int, default=10000)
    ap.add_argument("--samples", type=int, default=100)
    ap.add_argument("--case", choices=["all", "substitute", "avo"],
                    default="all")
    a = ap.parse_args()
    exe = os.path.join(a.build, "rockwired")
    n, d = a.samples, a.draws
    print("uncertainty: %d draws x %d samples, median of %d [min, max]"
          % (d, n, a.reps))
    cases = [("substitute", sub_request, sub_numpy),
             ("avo (5 angles)", avo_request, avo_numpy)]
    if a.case != "all":
        cases = [cs for cs in cases if cs[0].startswith(a.case)]
    two = Daemon(exe)
    one = Daemon(exe, cpus="0")
    try:
        for name, mk, ref in cases:
            line = mk(n, d, 1)
            res = two.call(line)  # warm up, and a sanity check below
            one.call(line)
            tn, t2, t1, r_np, r_cores = interleaved(
                [lambda: ref(n, d), lambda: two.call(line),
                 lambda: one.call(line)], a.reps)
            # the two Monte Carlo runs agree within sampling error: the
            # P50's standard error is about 1.2533 sd / sqrt(N) for a
            # near-normal output (the asymptotic error of a sample median)
            key = "vp" if "vp" in res else "rpp_re"
            got = np.array(res[key]["p50"], dtype=float)
            want = ref(n, d)[0]
            se = 1.2533 * want["sd"] / np.sqrt(d)
            diff = float(np.nanmax(np.abs(got - want["p50"]) /
                                   np.maximum(se, 1e-12)))
            print("%-15s numpy %s  daemon 2 cores %s  1 core %s"
                  % (name, fmt(tn), fmt(t2), fmt(t1)))
            print("%-15s numpy/daemon %.1fx [%.1f, %.1f] (target >= 10x)"
                  "   1 core/2 cores %.2fx [%.2f, %.2f] (target >= 1.6x)"
                  "   P50s agree within %.1f standard errors"
                  % ("", r_np[0], r_np[1], r_np[2], r_cores[0], r_cores[1],
                     r_cores[2], diff))
    finally:
        two.close()
        one.close()


if __name__ == "__main__":
    main()
