#!/usr/bin/python3
"""rockwire.dask on a LocalCluster of 2 worker processes (issue 16): a
10^6-sample job gives answers identical to the bit to one direct call;
a worker killed mid-job is retried by Dask without losing or duplicating
samples (each sample carries a unique density that the answer echoes,
so every sample is counted once and in place); each worker keeps one
daemon, and the daemons end with their workers (none is left: every
rockwired started for the test carries a marker in its environment).
Dataframes go partition by partition with the index kept."""
import os
import signal
import sys
import time
import uuid

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

PKG = os.path.join(rwtest.SRC, "client", "python")
sys.path.insert(0, PKG)
TAG = "rw-dask-test-" + uuid.uuid4().hex[:12]
os.environ["ROCKWIRED"] = rwtest.DAEMON
os.environ["RW_DASK_TAG"] = TAG  # the probes' daemons carry it too

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
import dask  # noqa: E402
import dask.array as da  # noqa: E402
import dask.dataframe as dd  # noqa: E402
from distributed import Client as DaskClient, LocalCluster  # noqa: E402

import rockwire  # noqa: E402
import rockwire.dask as rwd  # noqa: E402

t = rwtest.Checks()


def tagged_daemons():
    """pids of rockwired processes whose environment has our marker."""
    out = []
    for p in os.listdir("/proc"):
        if not p.isdigit():
            continue
        try:
            with open("/proc/%s/environ" % p, "rb") as f:
                env = f.read()
            with open("/proc/%s/cmdline" % p, "rb") as f:
                cmd = f.read().split(b"\0")
            with open("/proc/%s/stat" % p) as f:
                state = f.read().rsplit(")", 1)[1].split()[0]
        except OSError:
            continue
        if state != "Z" and ("RW_DASK_TAG=" + TAG).encode() in env and \
                cmd and cmd[0].endswith(b"rockwired"):
            out.append(int(p))
    return out


def wait_until(cond, timeout):
    end = time.time() + timeout
    while time.time() < end:
        if cond():
            return True
        time.sleep(0.1)
    return cond()


# Worker processes start by the spawn method, which imports this file
# again: everything runs under main().
def main():
    N = 1000000
    CHUNK = 25000
    rng = np.random.default_rng(20240501)
    # Unique densities (2.0 + i * 1e-7 g/cm3 exactly representable steps are
    # not needed: distinct doubles are), velocities from a plausible range.
    rho = 2.0 + np.arange(N) * 1e-7
    vp = rng.uniform(2200.0, 5200.0, N)
    vs = vp / rng.uniform(1.6, 2.4, N)
    FIELDS = ["rho", "k", "mu", "vpvs", "ai"]

    # The direct answer: one call of 10^6 samples.
    t0 = time.time()
    with rockwire.spawn() as rw:
        direct = rw.elastic.convert(rho=rho, vp=vp, vs=vs, fields=FIELDS)
    t_direct = time.time() - t0
    t.ok(direct["n"] == N and len(direct["k"]) == N,
         "direct call of %d samples (%.1f s)" % (N, t_direct))


    def identical(out, direct, what):
        ok = True
        for k in FIELDS + ["qc"]:
            a, b = out[k], direct[k]
            same = a.dtype == b.dtype and a.shape == b.shape and \
                (a.view(np.uint64) == b.view(np.uint64)).all()
            ok &= t.ok(same, "%s: %s identical to the bit (dtype %s, %s)"
                       % (what, k, a.dtype, a.shape))
        return ok


    cluster = LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                           dashboard_address=None, silence_logs=40,
                           env={"ROCKWIRED": rwtest.DAEMON, "RW_DASK_TAG": TAG,
                                "PYTHONPATH": PKG})
    dc = DaskClient(cluster)
    try:
        vpd = da.from_array(vp, chunks=CHUNK)
        out = rwd.map_method("elastic.convert", rho=rho, vp=vpd, vs=vs,
                             fields=FIELDS, block=10000)
        t.ok(set(FIELDS + ["qc"]) <= set(out) and
             out["units"]["k"] == "GPa" and out["k"].chunks == vpd.chunks,
             "dask arrays per output, units kept")
        t0 = time.time()
        got = dict(zip(FIELDS + ["qc"], dask.compute(*[out[k] for k in
                                                         FIELDS + ["qc"]])))
        print("direct call %.1f s, 2-worker job %.1f s" % (t_direct,
                                                            time.time() - t0))
        identical(got, direct, "2 workers")
        pids = dc.run(rwd.daemon_pid)
        wpids = dc.run(os.getpid)
        t.ok(len(pids) == 2 and all(pids.values()) and
             len(set(pids.values())) == 2,
             "each worker process keeps one daemon: %r" % pids)
        t.ok(sorted(pids.values()) == sorted(
            p for p in tagged_daemons() if p in pids.values()) and
            len(tagged_daemons()) == 2,
             "exactly the workers' two daemons run: %r" % tagged_daemons())

        # Again, with a worker killed while it has tasks: Dask retries them.
        out = rwd.map_method("elastic.convert", rho=rho, vp=vpd, vs=vs,
                             fields=FIELDS, block=5000)
        futs = dc.compute([out[k] for k in FIELDS + ["qc"]])
        victim = sorted(wpids)[0]
        busy = wait_until(lambda: len(dc.processing().get(victim, ())) > 0 and
                          any(f.status == "pending" for f in futs), 30)
        time.sleep(0.5)
        processing = len(dc.processing().get(victim, ()))
        pending = any(f.status == "pending" for f in futs)
        old_daemon = pids.get(victim)
        os.kill(wpids[victim], signal.SIGKILL)
        t.ok(busy and processing > 0 and pending,
             "the killed worker had %d task(s) in hand, the job unfinished"
             % processing)
        res = dc.gather(futs)
        got = dict(zip(FIELDS + ["qc"], res))
        t.ok(len(got["rho"]) == N and
             np.array_equal(got["rho"], direct["rho"]),
             "every sample once and in place after the retry: %d of %d "
             "densities echoed"
             % (int((got["rho"] == direct["rho"]).sum()), N))
        identical(got, direct, "after a killed worker")
        gone = wait_until(lambda: old_daemon not in tagged_daemons(), 15)
        t.ok(gone, "the killed worker's daemon (pid %s) ended with it"
             % old_daemon)

        # Dataframes: columns to parameters, the index kept.
        m = 60000
        pdf = pd.DataFrame({"DT": 1e6 / 0.3048 / vp[:m], "DTS": 1e6 / 0.3048 /
                            vs[:m], "RHOB": rho[:m]},
                           index=pd.RangeIndex(5000, 5000 + m, name="sample"))
        ddf = dd.from_pandas(pdf, npartitions=4)
        res = rwd.map_frame(ddf, "elastic.convert",
                            columns={"dtp": "DT", "dts": "DTS", "rho": "RHOB"},
                            fields=["ai", "vpvs"], prefix="rw_").compute()
        with rockwire.spawn() as rw:
            ref = rw.elastic.convert(dtp=pdf["DT"].to_numpy(),
                                     dts=pdf["DTS"].to_numpy(),
                                     rho=pdf["RHOB"].to_numpy(),
                                     fields=["ai", "vpvs"])
        t.ok(list(res.columns) == ["rw_ai", "rw_vpvs", "rw_qc"] and
             res.index.equals(pdf.index) and
             np.array_equal(res["rw_ai"].to_numpy(), ref["ai"]) and
             res["rw_qc"].dtype == np.uint64,
             "map_frame: columns %r, index kept, values as one call"
             % list(res.columns))
        e = None
        try:
            rwd.map_frame(ddf, "elastic.convert", columns={"dtp": "DTX"})
        except ValueError as x:
            e = x
        t.ok(e is not None and "DTX" in str(e), "a missing column is named")
        e = None
        try:
            rwd.map_method("elastic.convert", rho=2.3, vp=vpd,
                           vs=da.from_array(vs[:10]))
        except ValueError as x:
            e = x
        t.ok(e is not None and "vs" in str(e), "mismatched lengths name the "
             "parameter: %s" % e)
    finally:
        dc.close()
        cluster.close()
    left = wait_until(lambda: not tagged_daemons(), 20)
    t.ok(left, "no rockwired left after the cluster closed: %r"
         % tagged_daemons())
    return t.done()


if __name__ == "__main__":
    main()
