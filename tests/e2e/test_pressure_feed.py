#!/usr/bin/python3
"""Pressures through the client, end to end, on the invented demo well
Orrimund 5 (demo-requests/orrimund-5.las and the same samples as a WITS
stream, orrimund-5.wits):

  - a feed replay answers every sample with the pressures `rockwire log`
    writes for the same data, exactly (the running integrals carried
    from answer to request by the state token, one request on the wire);
  - a restart from the state token printed at the end of a partial replay
    continues exactly; a restart from known values (resume) continues to
    rounding and is flagged resumed;
  - `rockwire log` with pressures.trend_fit fits the trend once over the
    whole file and equals a run given that trend; the output carries the
    pressure caution and the detail legend;
  - the start-up message prints the caution and the depth choice; a feed
    without pressures.depth_is, or with md but no tvd item, is refused
    before any data; trend_fit from stdin is a usage error.

Run by ctest under /usr/bin/python3 with RW_BUILD and RW_SRC set."""
import csv
import io
import json
import os
import re
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

t = rwtest.Checks()
tmp = tempfile.mkdtemp(prefix="rw-pres-")
DEMO = os.path.join(rwtest.SRC, "demo-requests")
LAS = os.path.join(DEMO, "orrimund-5.las")
WITS = os.path.join(DEMO, "orrimund-5.wits")
MAP = os.path.join(DEMO, "orrimund-5.witsmap")
TREND = {"dt_ma": 62.4, "dt_ml": 175.2, "c": 5.02e-4, "top": 650,
         "base": 2550}
SETS = ["--set", "gr_clean=35", "--set", "gr_shale=110",
        "--set", "pressures.depth_is=tvd",
        "--set", 'pressures.column={"air_gap":27,"water_depth":118,'
        '"shallow":{"rho_ml":1.72,"a":0.5,"s0":1000,"p":0.55}}',
        "--set", "pressures.pore_water.density=1.03",
        "--set", "pressures.trend=" + json.dumps(TREND)]
KEYS = ["sv", "sv_emw", "ph", "ph_emw", "dt_normal", "pp", "pp_emw",
        "shmin", "shmin_emw", "qc", "pressure_detail", "vp", "nu", "rho"]

d = rwtest.Daemon()


def run(args, inp=None, timeout=120):
    p = subprocess.run([rwtest.CLIENT, "--socket", d.path] + args,
                       input=inp, capture_output=True, timeout=timeout)
    return p.returncode, p.stdout.decode(), p.stderr.decode()


def log_csv(extra, name):
    out = os.path.join(tmp, name)
    rc, _, err = run(["log", LAS, "--format", "csv", "-o", out,
                      "--digits", "17", "--no-progress"] + extra)
    t.ok(rc == 0, "rockwire log %s exits 0 (%d): %s" % (name, rc, err[-300:]))
    rows = []
    if rc == 0:
        with open(out) as f:
            text = "".join(l for l in f if not l.startswith("#"))
        with open(out) as f:
            head = "".join(l for l in f if l.startswith("#"))
        for r in csv.DictReader(io.StringIO(text)):
            rows.append({k.split("[")[0].lower(): v for k, v in r.items()})
        return rows, head, err
    return rows, "", err


def num(v):
    return None if v in ("", None) else float(v)


def feed(extra, wits_text):
    rc, out, err = run(["feed", "--map-file", MAP] + extra,
                       inp=wits_text.encode())
    return rc, [json.loads(l) for l in out.splitlines() if l.strip()], err


def records(text):
    return re.findall(r"&&\n.*?!!\n", text, re.S)


with open(WITS) as f:
    wits = f.read()
recs = records(wits)
t.ok(len(recs) == 1401, "the demo stream has 1401 records (%d)" % len(recs))

# 1. the batch
rows, head, err = log_csv(SETS, "batch.csv")
t.ok(len(rows) == 1401, "rockwire log wrote 1401 samples (%d)" % len(rows))
t.ok("never the sole basis for mud-weight, casing or well-control"
     in head.replace("\n# ", " "),
     "the CSV output carries the pressure caution")
t.ok("Detail flags per sample" in head, "and the detail legend")
t.ok("one at a time" in err, "log says the blocks go one at a time")

# 2. the feed replay: every sample equals the batch
rc, lines, ferr = feed(SETS, wits)
t.ok(rc == 0, "feed replay exits 0 (%d): %s" % (rc, ferr[-300:]))
t.ok(len(lines) == 1401, "one answer per sample (%d)" % len(lines))
first = ferr.splitlines()[0] if ferr else ""
t.ok(first.startswith("rockwire feed: screening estimates only"),
     "the start-up message opens with the caution")
t.ok("rockwire feed: pressures: Pore-pressure, overburden" in ferr,
     "and prints the pressure caution")
t.ok("taken as true vertical depth below the datum" in ferr,
     "and the depth choice")
mism = []
for i, (a, b) in enumerate(zip(rows, lines)):
    for k in KEYS:
        x, y = num(a.get(k)), b.get(k)
        if x is None or y is None:
            if not (x is None and y is None):
                mism.append((i, k, x, y))
        elif abs(x - y) > 1e-15 * max(abs(x), abs(y)):
            # Answers are printed to the last bit now; the log path takes
            # LAS values through the client's unit conversion (a scale
            # of one computed as a ratio), the feed does not, so the two
            # may differ by an ulp or two, never more.
            mism.append((i, k, x, y))
t.ok(not mism, "feed == log on every sample and curve (%d differ, first %s)"
     % (len(mism), mism[:1]))
t.ok(all(int(b["qc"]) & (1 << 48) for b in lines),
     "every feed answer carries pressure_screening_only")
t.ok(any(b["pp_emw"] and b["pp_emw"] > 1.5 for b in lines
         if 2800 <= b["depth"] <= 3000),
     "the invented overpressured interval shows (pp above 1.5 g/cm3)")
tok = re.search(r"--set pressures.state=(\S+)", ferr)
t.ok(tok and tok.group(1) == lines[-1]["pressure_state"]["token"],
     "the summary prints the last state token")

# 3. restarts: from the state after sample 1300, and from known values
rc, part, perr = feed(SETS, "".join(recs[:1301]))
tok = re.search(r"--set pressures.state=(\S+)", perr)
t.ok(rc == 0 and tok, "a partial replay ends with a state token")
if tok:
    rc, rest, _ = feed(SETS + ["--set", "pressures.state=" + tok.group(1)],
                       "".join(recs[1301:]))
    same = rc == 0 and len(rest) == 100 and all(
        rest[j][k] == lines[1301 + j][k] for j in range(100) for k in KEYS)
    t.ok(same, "the restart from the token continues exactly")
at = lines[1300]
rc, rest, rerr = feed(SETS + [
    "--set", "pressures.resume.tvd=%.17gm" % at["depth"],
    "--set", "pressures.resume.sv=%.17gMPa" % at["sv"],
    "--set", "pressures.resume.rhob=%.17g" % at["rho"]],
    "".join(recs[1301:]))
t.ok(rc == 0 and len(rest) == 100, "the restart from values runs (%d)" % rc)
if rc == 0 and len(rest) == 100:
    worst = max(abs(rest[j]["sv"] / lines[1301 + j]["sv"] - 1)
                for j in range(100))
    # sv is resumed from its 15-digit answer: the same to rounding
    t.ok(worst < 1e-12, "resumed sv equals the replay (worst %.2g)" % worst)
    t.ok(all(rest[j]["pressure_detail"] & 16 for j in range(100)),
         "every resumed answer is flagged resumed")
    t.ok("restarting from the resume values" in rerr,
         "the start-up says it restarts from values")

# 4. rockwire log fitting the trend over the whole file
FIT = []
for i in range(0, len(SETS), 2):
    if not SETS[i + 1].startswith("pressures.trend="):
        FIT += SETS[i:i + 2]
FIT += ["--set", 'pressures.trend_fit={"intervals":[{"top":650,'
        '"base":2550}]}']
frows, fhead, ferr2 = log_csv(FIT, "fit.csv")
t.ok(len(frows) == 1401, "log with trend_fit wrote every sample")
t.ok("trend fitted with pressure.trend" in ferr2, "and says it fitted")
m = re.search(r'"trend":(\{"form".*?\]\]\})', fhead.replace("\n# ", ""))
t.ok(m, "the note gives the fitted trend")
if m:
    given = [a if not a.startswith("pressures.trend_fit=") else
             "pressures.trend=" + m.group(1) for a in FIT]
    grows, _, _ = log_csv(given, "given.csv")
    t.ok(len(grows) == 1401 and all(
        num(a[k]) == num(b[k]) for a, b in zip(frows, grows)
        for k in ("pp", "pp_sigma_trend", "dt_normal")),
        "and equals a run given that trend")
    t.ok(any(num(r["pp_sigma_trend"]) for r in frows),
         "the fitted trend's share of the uncertainty is written")

# 5. refusals before any data
GR = ["--set", "gr_clean=35", "--set", "gr_shale=110"]
rc, out, err = feed(GR + ["--set", "pressures.pore=none",
                          "--set", "pressures.fracture=none"], wits)
t.ok(rc == 1 and "pressures.depth_is" in err and not out,
     "a feed without depth_is is refused before any data (%d)" % rc)
rc, out, err = feed(GR + ["--set", "pressures.depth_is=md", "--set",
                          "pressures.pore=none", "--set",
                          "pressures.fracture=none"], wits)
t.ok(rc == 1 and "tvd" in err and "deviation survey" in err and not out,
     "md without a tvd item is refused (%d)" % rc)
with open(LAS, "rb") as f:
    rc, _, err = run(["log", "-", "--format", "csv"] + FIT, inp=f.read())
t.ok(rc == 2 and "reads the file twice" in err,
     "trend_fit from stdin is a usage error (%d)" % rc)
rc, _, err = run(["log", LAS, "-o", os.path.join(tmp, "x.las"),
                  "--set", "pressures.depth_is=tvd",
                  "--set", "pressures.column.water_depth=400m",
                  "--set", "pressures.pore=none",
                  "--set", "pressures.fracture=none"])
t.ok(rc == 1 and "pressures.column.shallow" in err,
     "deep water without the shallow law is refused, naming the field")

d.stop()
t.done()
