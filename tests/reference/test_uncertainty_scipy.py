"""Uncertainty against scipy.stats (an outside reference): the daemon's
percentiles of an output equal to one uncertain input (elastic.convert
echoes vp when given vp and vs) match scipy's quantile functions of the
same distribution within the sampling error of a percentile,
sqrt(p (1 - p) / N) / f(x_p) (the asymptotic standard error of a sample
quantile), for every distribution the protocol accepts; and the mean and
sd of a nonlinear output (mu = rho vs^2 with vs normal) match the exact
moments of that function (E[vs^2] = m^2 + s^2) within 3 sigma."""
import json
import math
import os
import sys

import numpy as np
from scipy import stats

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)),
                                "..", "e2e"))
from rwtest import Checks, req, stdio  # noqa: E402

t = Checks()
N = 20000
cases = [
    ("normal", {"mean": 3000, "sd": 200}, stats.norm(3000, 200)),
    ("lognormal", {"mean": 3000, "sd": 400},
     stats.lognorm(s=math.sqrt(math.log1p((400 / 3000) ** 2)),
                   scale=3000 / math.sqrt(1 + (400 / 3000) ** 2))),
    ("uniform", {"low": 2500, "high": 3500}, stats.uniform(2500, 1000)),
    ("triangular", {"low": 2500, "mode": 2800, "high": 3500},
     stats.triang(0.3, loc=2500, scale=1000)),
    ("truncated_normal", {"mean": 3000, "sd": 300, "low": 2800, "high": 3600},
     stats.truncnorm((2800 - 3000) / 300, (3600 - 3000) / 300, 3000, 300)),
    ("percentiles", {"p10": 2700, "p90": 3300},
     stats.norm(3000, 300 / stats.norm.ppf(0.9))),
]
pct = [5, 10, 50, 90, 95]
for i, (kind, prm, ref) in enumerate(cases):
    d = dict(prm, dist=kind)
    line = req("elastic.convert", {
        "rho": 2.3, "vp": d, "vs": 1200, "fields": ["vp"],
        "uncertainty": {"draws": N, "seed": 100 + i, "percentiles": pct,
                        "sampling": "monte_carlo"}}, id=i)
    rc, out, err = stdio([line])
    r = json.loads(out.splitlines()[0])
    t.ok("result" in r, "%s: answered: %s" % (kind, out[:200]))
    if "result" not in r:
        continue
    v = r["result"]["vp"]
    for p in pct:
        want = ref.ppf(p / 100)
        se = math.sqrt(p / 100 * (1 - p / 100) / N) / ref.pdf(want)
        got = v["p%d" % p]
        t.ok(abs(got - want) < 4 * se,
             "%s p%d: %.3f vs scipy %.3f (4 se = %.3f)" % (kind, p, got, want,
                                                          4 * se))
    t.ok(abs(v["mean"] - ref.mean()) < 4 * ref.std() / math.sqrt(N),
         "%s mean %.3f vs %.3f" % (kind, v["mean"], ref.mean()))

# a nonlinear function: mu = rho vs^2, vs ~ N(1500, 100): E[mu] = rho (m^2
# + s^2), Var = rho^2 Var(vs^2) = rho^2 (4 m^2 s^2 + 2 s^4)
line = req("elastic.convert", {
    "rho": 2.3, "vp": 3000, "vs": {"dist": "normal", "mean": 1500, "sd": 100},
    "fields": ["mu"], "uncertainty": {"draws": N, "seed": 9}})
rc, out, err = stdio([line])
mu = json.loads(out.splitlines()[0])["result"]["mu"]
m, s, rho = 1500.0, 100.0, 2300.0
emu = rho * (m * m + s * s) / 1e9
sdmu = rho * math.sqrt(4 * m * m * s * s + 2 * s ** 4) / 1e9
t.ok(abs(mu["mean"] - emu) < 3 * sdmu / math.sqrt(N),
     "E[rho vs^2] %.6f vs exact %.6f" % (mu["mean"], emu))
t.ok(abs(mu["sd"] - sdmu) < 3 * sdmu / math.sqrt(2 * N),
     "sd %.6f vs exact %.6f" % (mu["sd"], sdmu))
t.done()
