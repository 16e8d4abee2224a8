#!/usr/bin/python3
"""Speed-up of rockwire.dask from 1 to 2 worker processes (issue 16;
target >= 1.6x on 2 cores): the same elastic.convert job of 2 x 10^6
samples on a LocalCluster of 1 worker and on one of 2 workers, both kept
open, timed back to back in an order that alternates between runs;
printed as the median of the --runs pair ratios (with min and max), and
the ratio of the medians. Run on demand, never in the pass/fail suite:

    /usr/bin/python3 tests/bench/bench_dask.py [--samples N] [--runs R]

The machine's other load shows in the ratio: run it on a quiet machine.
"""
import argparse
import os
import statistics
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
TOP = os.path.normpath(os.path.join(HERE, "..", ".."))
PKG = os.path.join(TOP, "client", "python")
sys.path.insert(0, PKG)


class Cluster:
    """A LocalCluster of n worker processes (one thread each) with the
    inputs scattered to it, kept open so runs can alternate."""

    def __init__(self, n_workers, vp, vs, rho, chunk):
        import dask.array as da
        from distributed import Client as DaskClient, LocalCluster

        env = {"ROCKWIRED": os.environ["ROCKWIRED"], "PYTHONPATH": PKG}
        self.cl = LocalCluster(n_workers=n_workers, threads_per_worker=1,
                               processes=True, dashboard_address=None,
                               silence_logs=40, env=env)
        self.dc = DaskClient(self.cl)
        # Scatter the inputs first: the timing is the rock physics and
        # the protocol, not the driver shipping arrays.
        self.inputs = self.dc.persist([da.from_array(x, chunks=chunk)
                                       for x in (vp, vs, rho)])

    def run(self):
        """One timed job on this cluster: seconds."""
        import dask
        import rockwire.dask as rwd

        vpd, vsd, rhod = self.inputs
        with self.dc.as_current():
            out = rwd.map_method("elastic.convert", rho=rhod, vp=vpd,
                                 vs=vsd, fields=["k", "mu", "ai", "vpvs"])
            t0 = time.perf_counter()
            dask.compute(out["k"], out["mu"], out["ai"], out["vpvs"],
                         out["qc"])
            return time.perf_counter() - t0

    def close(self):
        self.dc.close()
        self.cl.close()


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--samples", type=int, default=2000000)
    ap.add_argument("--runs", type=int, default=5)
    ap.add_argument("--chunk", type=int, default=50000)
    a = ap.parse_args()
    build = os.environ.get("RW_BUILD") or os.path.join(TOP, "build")
    os.environ.setdefault("ROCKWIRED", os.path.join(build, "rockwired"))
    import numpy as np
    rng = np.random.default_rng(7)
    vp = rng.uniform(2200.0, 5200.0, a.samples)
    vs = vp / rng.uniform(1.6, 2.4, a.samples)
    rho = rng.uniform(2.0, 2.7, a.samples)
    c1 = Cluster(1, vp, vs, rho, a.chunk)
    c2 = Cluster(2, vp, vs, rho, a.chunk)
    one, two, pair = [], [], []
    try:
        c1.run()  # the first run warms each cluster's daemons
        c2.run()
        for i in range(a.runs):
            # back to back, in an order that alternates between runs,
            # so the machine's drift falls on both alike
            if i % 2:
                t2, t1 = c2.run(), c1.run()
            else:
                t1, t2 = c1.run(), c2.run()
            one.append(t1)
            two.append(t2)
            pair.append(t1 / t2)
    finally:
        c2.close()
        c1.close()
    m1, m2 = statistics.median(one), statistics.median(two)
    print("samples %d, chunk %d, %d runs each, the two clusters "
          "alternating" % (a.samples, a.chunk, a.runs))
    print("1 worker : median %.2f s (min %.2f, max %.2f)"
          % (m1, min(one), max(one)))
    print("2 workers: median %.2f s (min %.2f, max %.2f)"
          % (m2, min(two), max(two)))
    print("speed-up 1 -> 2 workers: %.2fx, median of the %d back-to-back "
          "pairs (target >= 1.6x on 2 cores; pairs %.2fx .. %.2fx; ratio "
          "of the medians %.2fx)" % (statistics.median(pair), len(pair),
                                     min(pair), max(pair), m1 / m2))


if __name__ == "__main__":
    main()
