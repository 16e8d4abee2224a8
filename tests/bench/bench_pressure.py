#!/usr/bin/python3
"""Benchmark of the pressure family (on demand, never in the pass/fail
suite). Each case is timed against a baseline measured in the same run,
on the same daemon, and printed as a ratio (median of REPEATS runs, with
min and max), never as an absolute target:

  1. log.process with pressures (trend given, Eaton, Eaton 1969) against
     log.process of the same samples without: the cost of the pressure
     chain and of computing the rows in depth order before the writer.
  2. pressure.overburden against elastic.convert on as many samples: the
     sequential integral against a per-sample method.
  3. pressure.trend (a GSL fit) against pressure.overburden on the same
     samples.
  4. rockwire feed replaying the demo well with pressures (one request on
     the wire, each carrying the state) against the same replay without
     pressures (pipelined): the price of the carried state per sample.
  5. rockwire log with pressures (one block at a time, the state carried)
     against rockwire log without (blocks in flight), on a generated log.

    /usr/bin/python3 tests/bench/bench_pressure.py [SAMPLES] [REPEATS]

RW_BUILD selects the build (default build/); use a release build, not a
sanitizer one, for numbers that mean anything."""
import json
import os
import socket
import statistics
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "e2e"))
import rwtest  # noqa: E402

N = int(sys.argv[1]) if len(sys.argv) > 1 else 100000
REPEATS = max(5, int(sys.argv[2]) if len(sys.argv) > 2 else 5)
DEMO = os.path.join(rwtest.SRC, "demo-requests")
TREND = {"dt_ma": 62.4, "dt_ml": 175.2, "c": 5.02e-4, "top": 650,
         "base": 2550}
COLUMN = {"air_gap": 27, "water_depth": 118,
          "shallow": {"rho_ml": 1.72, "a": 0.5, "s0": 1000, "p": 0.55}}


def log_of(n):
    z = [600 + 0.1524 * i for i in range(n)]
    dt = [60 + 115 * 2.718281828 ** (-5e-4 * (d - 145)) + (i % 7) * 0.3
          for i, d in enumerate(z)]
    return dict(depth=z, dtp=dt, dts=[2.1 * x for x in dt],
                rhob=[2.0 + 0.00015 * (d - 600) for d in z],
                gr=[100 + (i % 11) for i in range(n)])


def rpc_time(sock, params, method):
    line = json.dumps(dict(jsonrpc="2.0", id=1, method=method,
                           params=params)).encode() + b"\n"
    t0 = time.perf_counter()
    sock.sendall(line)
    buf = b""
    while not buf.endswith(b"\n"):
        chunk = sock.recv(1 << 20)
        if not chunk:
            sys.exit("the daemon closed the connection")
        buf += chunk
    dt = time.perf_counter() - t0
    if b'"error"' in buf[:200]:
        sys.exit("error: %s" % buf[:300])
    return dt


def ratio(name, case, base):
    a = [case() for _ in range(REPEATS)]
    b = [base() for _ in range(REPEATS)]
    r = [x / y for x, y in zip(a, b)]
    print("%-58s %7.2f  (min %.2f, max %.2f; case %.3g s, baseline %.3g s)"
          % (name, statistics.median(r), min(r), max(r),
             statistics.median(a), statistics.median(b)))


d = rwtest.Daemon()
s = d.connect()
lg = log_of(N)
gr = dict(gr_clean=35, gr_shale=110)
pres = {"depth_is": "tvd", "column": COLUMN, "pore_water": {"density": 1.03},
        "trend": TREND}
print("pressure benchmarks: %d samples, median of %d (ratios; > 1 slower "
      "than the baseline)" % (N, REPEATS))
ratio("1. log.process +pressures / log.process",
      lambda: rpc_time(s, dict(lg, pressures=pres, **gr), "log.process"),
      lambda: rpc_time(s, dict(lg, **gr), "log.process"))
ratio("2. pressure.overburden / elastic.convert",
      lambda: rpc_time(s, dict(tvd=lg["depth"], rhob=lg["rhob"],
                               column=COLUMN), "pressure.overburden"),
      lambda: rpc_time(s, dict(rho=lg["rhob"], dtp=lg["dtp"],
                               dts=lg["dts"]), "elastic.convert"))
ratio("3. pressure.trend (fit) / pressure.overburden",
      lambda: rpc_time(s, dict(tvd=lg["depth"], dtp=lg["dtp"],
                               intervals=[{"top": 600, "base": 5e4}],
                               column=COLUMN), "pressure.trend"),
      lambda: rpc_time(s, dict(tvd=lg["depth"], rhob=lg["rhob"],
                               column=COLUMN), "pressure.overburden"))
s.close()

SETS = ["--set", "gr_clean=35", "--set", "gr_shale=110"]
PSETS = SETS + ["--set", "pressures.depth_is=tvd",
                "--set", "pressures.column=" + json.dumps(COLUMN),
                "--set", "pressures.pore_water.density=1.03",
                "--set", "pressures.trend=" + json.dumps(TREND)]
with open(os.path.join(DEMO, "orrimund-5.wits"), "rb") as f:
    wits = f.read()


def client(args, inp=None):
    t0 = time.perf_counter()
    p = subprocess.run([rwtest.CLIENT, "--socket", d.path] + args,
                       input=inp, stdout=subprocess.DEVNULL,
                       stderr=subprocess.PIPE, timeout=600)
    if p.returncode:
        sys.exit("rockwire %s: %s" % (args[0], p.stderr.decode()[-300:]))
    return time.perf_counter() - t0


feedmap = ["feed", "--map-file", os.path.join(DEMO, "orrimund-5.witsmap")]
ratio("4. feed replay of Orrimund 5 +pressures / without",
      lambda: client(feedmap + PSETS, wits),
      lambda: client(feedmap + SETS, wits))

tmp = tempfile.mkdtemp(prefix="rw-bench-pres-")
las = os.path.join(tmp, "bench.las")
with open(las, "w") as f:
    f.write("~V\n VERS. 2.0 :\n WRAP. NO :\n~W\n STRT.M 600 :\n"
            " STOP.M %.4f :\n STEP.M 0.1524 :\n NULL. -999.25 :\n"
            "~C\n DEPT.M :\n DT.US/F :\n DTS.US/F :\n RHOB.G/C3 :\n"
            " GR.GAPI :\n~A\n" % lg["depth"][-1])
    for i in range(N):
        f.write("%.4f %.3f %.3f %.4f %.2f\n" % (
            lg["depth"][i], lg["dtp"][i], lg["dts"][i], lg["rhob"][i],
            lg["gr"][i]))
out = os.path.join(tmp, "out.las")
ratio("5. rockwire log +pressures / without (%d samples)" % N,
      lambda: client(["log", las, "-o", out, "--no-progress"] + PSETS),
      lambda: client(["log", las, "-o", out, "--no-progress"] + SETS))
d.stop()
