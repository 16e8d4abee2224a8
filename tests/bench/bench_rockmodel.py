"""Benchmark of the rock-model methods against their compute floor, both
measured in the same run (on demand, never by ctest):

  /usr/bin/python3 tests/bench/bench_rockmodel.py [BUILD_DIR] [--quick]

Cases (as issue 12 states them):
  - a 100 x 100 rock.template (porosity 0-0.4 x sw 0-1) of the soft sand
    (all outputs, then only ai and vpvs), and of DEM (an ODE per node);
  - 100,000 rock.invert samples (AI and Vp/Vs at 2 %, 3 starts, an
    11-node saturation profile) on the soft sand (--quick: 10,000).
The floor is bench_rockmodel (the core's rw_rm_template and rw_rm_invert
in a plain C loop, one thread, no JSON). The protocol side is one
request line to rockwired --stdio, timed from writing the line to
reading the whole answer: parsing, validation, the kernels on the
daemon's worker threads (one per core), writing the JSON. Each time is
the median of 5 runs with min and max; ratios (protocol / floor, per
node or per inversion) are what to read, absolute times depend on the
machine and its load. With several cores the protocol can beat the
single-threaded floor; "per core" multiplies by the cores the daemon
can use (os.cpu_count())."""
import json
import os
import statistics
import subprocess
import sys
import time

ARGS = [a for a in sys.argv[1:] if not a.startswith("--")]
QUICK = "--quick" in sys.argv
BUILD = ARGS[0] if ARGS else os.environ.get(
    "RW_BUILD", os.path.join(os.path.dirname(__file__), "..", "..", "build"))
REPS = 5
ROCK = {"brine": {"k": 2.8, "rho": 1.03},
        "hydrocarbon": {"k": 0.06, "rho": 0.2}}


def floor(*args):
    out = subprocess.run([os.path.join(BUILD, "bench_rockmodel")] +
                         [str(a) for a in args], capture_output=True,
                         text=True, check=True).stdout
    return next(iter(json.loads(out).values()))


class Daemon:
    def __init__(self):
        self.p = subprocess.Popen([os.path.join(BUILD, "rockwired"),
                                   "--stdio"], stdin=subprocess.PIPE,
                                  stdout=subprocess.PIPE)
        self.id = 0

    def time(self, method, params):
        """Seconds for one request line, and its result."""
        self.id += 1
        line = json.dumps({"jsonrpc": "2.0", "id": self.id,
                           "method": method, "params": params}) + "\n"
        data = line.encode()
        t = time.perf_counter()
        self.p.stdin.write(data)
        self.p.stdin.flush()
        ans = self.p.stdout.readline()
        dt = time.perf_counter() - t
        r = json.loads(ans)
        if "result" not in r:
            sys.exit("daemon error: %s" % r)
        return dt, r["result"]

    def close(self):
        self.p.stdin.close()
        self.p.wait(timeout=30)


def stats(ts):
    return statistics.median(ts), min(ts), max(ts)


def sample_point(i):
    """bench_rockmodel.c's sample_point."""
    return (0.05 + 0.30 * ((i * 7919) % 1000) / 999.0,
            ((i * 104729) % 1000) / 999.0)


def show(name, unit, n, proto, fl):
    pm, plo, phi = (x / n for x in stats(proto))
    ratio = pm / fl["median_s"]
    print("%s: protocol %.3g s per %s (min %.3g, max %.3g); floor %.3g s "
          "(min %.3g, max %.3g); ratio %.2f, per core %.2f"
          % (name, pm, unit, plo, phi, fl["median_s"], fl["min_s"],
             fl["max_s"], ratio, ratio * (os.cpu_count() or 1)))


def main():
    d = Daemon()
    for model in ("soft_sand", "dem"):
        par = dict(ROCK, model=model,
                   porosity_axis={"from": 0, "to": 0.4, "n": 100},
                   sw_axis={"from": 0, "to": 1, "n": 100})
        if model == "soft_sand":
            par["p_eff"] = 20
        d.time("rock.template", par)  # warm up
        ts = [d.time("rock.template", par)[0] for _ in range(REPS)]
        fl = floor("template", model, 100, 100, REPS)
        show("template 100 x 100 %s" % model, "node", 10000, ts, fl)
        if model == "soft_sand":
            # the same grid with two of the twelve attributes: most of
            # the full answer's time is writing 16 numbers per node
            par["fields"] = ["ai", "vpvs"]
            ts = [d.time("rock.template", par)[0] for _ in range(REPS)]
            show("  the same, fields ai and vpvs", "node", 10000, ts, fl)
    n = 10000 if QUICK else 100000
    pts = [sample_point(i) for i in range(n)]
    _, fwd = d.time("rock.model", dict(
        ROCK, model="soft_sand", p_eff=20, porosity=[p for p, _ in pts],
        sw=[s for _, s in pts], fields=["ai", "vpvs"]))
    par = dict(ROCK, model="soft_sand", p_eff=20,
               observations={"ai": fwd["ai"], "vpvs": fwd["vpvs"]},
               sigma_rel={"ai": 0.02, "vpvs": 0.02},
               fields=["porosity", "sw", "porosity_sd", "sw_sd", "chi2"])
    ts, res = [], None
    for _ in range(REPS):
        dt, res = d.time("rock.invert", par)
        ts.append(dt)
    fl = floor("invert", n, REPS)
    show("invert %d samples" % n, "inversion", n, ts, fl)
    print("  (mean estimated porosity %.6g over the samples; the floor "
          "inverts the same rocks)" % (sum(res["porosity"]) / n))
    d.close()
    return 0


if __name__ == "__main__":
    sys.exit(main())
