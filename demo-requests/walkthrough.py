#!/usr/bin/python3
"""The rockwire demo as a walk-through: each step says what it asks,
shows the command a user would type, and prints the answer's key numbers
rounded, with QC flags by name. Every well, field, prospect and number is
invented. Run by demo-requests/run (which builds rockwire and starts a
daemon); on its own:

    /usr/bin/python3 demo-requests/walkthrough.py BUILD_DIR SOCKET

Screening estimates only: not a substitute for qualified review, local
regulations and licensed practice; never the sole basis for well-control
decisions."""
import csv
import io
import json
import os
import subprocess
import sys
import tempfile
import textwrap

HERE = os.path.dirname(os.path.abspath(__file__))
TOP = os.path.dirname(HERE)
BIN, SOCK = sys.argv[1], sys.argv[2]
TMP = tempfile.mkdtemp(prefix="rockwire-walk-")
KEEP = os.path.join(BIN, "demo")
os.makedirs(KEEP, exist_ok=True)
LEGEND = {}
STEP = [0]


def step(question):
    STEP[0] += 1
    print("\n" + "=" * 76)
    print("Step %d. %s" % (STEP[0], question))
    print("=" * 76)


def show(cmd):
    """Prints a command the way a user would type it (long JSON cut)."""
    words = []
    for w in cmd:
        if w.startswith(TOP + os.sep):
            w = os.path.relpath(w, TOP)
        elif w.startswith(TMP + os.sep):
            w = os.path.basename(w)
        if len(w) > 70:
            w = w[:60] + " ..."
        words.append("'%s'" % w if any(c in w for c in " {[\"") else w)
    line, out = "$", []
    for w in words:
        if len(line) + 1 + len(w) > 76 and line.strip() not in ("$", ""):
            out.append(line + " \\")
            line = "   "
        line += " " + w
    print("\n".join(out + [line]))


def rockwire(args, stdin=None, quiet=False, check=True):
    cmd = ["rockwire"] + args
    if not quiet:
        show(cmd)
    p = subprocess.run([os.path.join(BIN, "rockwire"), "--socket", SOCK] +
                       args, input=stdin, capture_output=True, cwd=TOP)
    if check and p.returncode not in (0,):
        sys.stderr.write(p.stderr.decode())
        raise SystemExit("demo: rockwire %s failed (exit %d)"
                         % (args[0], p.returncode))
    return p


def call(method, params, quiet=False):
    p = rockwire(["call", method, "--params", json.dumps(params)],
                 quiet=quiet)
    return json.loads(p.stdout)


def scenario(name, rid):
    """The params of request `rid` in demo-requests/NAME.jsonl."""
    with open(os.path.join(HERE, name + ".jsonl")) as f:
        for line in f:
            if line.startswith("{"):
                r = json.loads(line)
                if r["id"] == rid:
                    return r["method"], r.get("params", {})
    raise KeyError(rid)


def names(q):
    if not q:
        return "clean"
    return ", ".join(LEGEND.get(b, "bit %d" % b)
                     for b in range(64) if int(q) >> b & 1)


def r(v, nd=0):
    if v is None:
        return "-"
    return ("%%.%df" % nd) % v


# ---------------------------------------------------------------------------

step("Which daemon is answering, and what does it promise?")
info = call("service.info", {})
LEGEND = {f["index"]: f["name"] for f in info["qc_flags"]}
print(textwrap.fill("%s %s, %d methods. %s" % (
    info["name"], info["version"], len(info["methods"]), info["caution"]),
    76))

step("Elastic moduli from a sonic and density log (Orrimund 3 samples)")
m, p = scenario("elastic-basics", "orrimund-3-sonic")
res = call(m, p)
print("%8s %8s %7s %7s %7s %6s %6s  qc" % ("vp m/s", "vs m/s", "rho", "K GPa",
                                          "mu GPa", "nu", "vp/vs"))
for i in range(res["n"]):
    print("%8s %8s %7s %7s %7s %6s %6s  %s" % (
        r(res["vp"][i]), r(res["vs"][i]), r(res["rho"][i], 2),
        r(res["k"][i], 1), r(res["mu"][i], 1), r(res["nu"][i], 3),
        r(res["vpvs"][i], 2), names(res["qc"][i])))
m, p = scenario("elastic-basics", "quartz")
q = call(m, p, quiet=True)
print("check: quartz (K 36.6, mu 45 GPa, 2.65 g/cm3) -> vp %s, vs %s m/s"
      % (r(q["vp"]), r(q["vs"])))
print("       (handbook: about 6050 and 4100 m/s, Mavko et al. 2009)")

step("Pore fluids at the Korvane reservoir (26.5 MPa, 82 degC)")
m, p = scenario("reservoir-korvane", "korvane-profile")
res = call(m, p)
i = 2
print("Batzle & Wang 1992 at %s MPa, %s degC:" % (res["pressure"][i],
                                                 res["temperature"][i]))
for ph, label in (("brine", "brine 65000 ppm"), ("gas", "gas, gravity 0.65"),
                  ("oil", "oil 42 API, GOR 160")):
    print("  %-22s rho %5s g/cm3   K %6s GPa   v %5s m/s" % (
        label, r(res[ph + "_rho"][i], 3), r(res[ph + "_k"][i], 3),
        r(res[ph + "_v"][i])))
print("  %-22s rho %5s g/cm3   K %6s GPa   (Wood 1955, 15 %% brine)" % (
    "mix, 85 % gas", r(res["mix_rho"][i], 3), r(res["mix_k"][i], 3)))

step("Gassmann: what does gas do to the Korvane sand?")
m, p = scenario("reservoir-korvane", "kv3-gas-sweep")
res = call(m, p)
sg = [1 - x for x in res["fluid_new_sat_brine"]] \
    if isinstance(res.get("fluid_new_sat_brine"), list) else None
print("brine sand: vp 3050 m/s, rho 2.24 g/cm3, porosity 0.26")
print("%8s %8s %8s %7s" % ("gas sat", "vp m/s", "dvp %", "rho"))
for i in (0, 1, 2, 5, 10, 17, 20):
    if i < res["n"]:
        s = sg[i] if sg else i / (res["n"] - 1)
        print("%8s %8s %8s %7s" % (r(s, 2), r(res["vp"][i]),
                                   r(res["dvp_pct"][i], 1),
                                   r(res["rho"][i], 3)))
print("Most of the velocity drop comes with the first few per cent of gas:")
print("a velocity drop (or a bright AVO response) does not tell commercial")
print("from low-saturation gas. Density does; patchy mixing (Brie) softens")
print("the drop (kv3-gas-sweep-patchy in reservoir-korvane.jsonl).")

step("AVO: how do the Quillmoor brine and gas sands reflect?")
for rid in ("quillmoor-brine-avo", "quillmoor-gas-avo"):
    m, p = scenario("prospect-quillmoor", rid)
    p = dict(p, methods="zoeppritz")
    res = call(m, p, quiet=rid.endswith("gas-avo"))
    ang = res["angle"]
    far = ang.index(30)
    print("%-5s sand: R(0) %6s  R(30) %6s  A %6s  B %6s  class %s"
          % (rid.split("-")[1], r(res["rpp_re"][0], 3),
             r(res["rpp_re"][far], 3), r(res["intercept"], 3),
             r(res["gradient"], 3), res["class"]))
print("(Zoeppritz exact; intercept A and gradient B of Shuey 1985; class after")
print("Rutherford & Williams 1989, class IV of Castagna et al. 1998.) A class is")
print("a screening label, not a fluid: low-saturation gas gives the same.")

step("How sure is the gas case? Inputs as distributions")
m, p = scenario("prospect-quillmoor", "quillmoor-gas-avo-uncertain")
res = call(m, p)
cls = res["class"]["probability"]
rpp = res["rpp_re"]
far = p["angle"].index(30)
print("P(class III) = %s   (%s)" % (
    r(cls.get("III", 0), 3),
    ", ".join("%s %s" % (k, r(v, 4)) for k, v in cls.items())))
print("R(30 deg): P10 %s  P50 %s  P90 %s" % (r(rpp["p10"][far], 3),
                                             r(rpp["p50"][far], 3),
                                             r(rpp["p90"][far], 3)))
sens = res["sensitivity"]["rpp_re"]
top = sorted(sens, key=lambda k: -sens[k]["share"][far])
print("what drives R(30): " + ", ".join(
    "%s %s %%" % (k, r(100 * sens[k]["share"][far])) for k in top[:3]))
for w in res.get("warnings", []):
    print(textwrap.fill("note: " + w, 76, subsequent_indent="  "))
m, p = scenario("prospect-quillmoor", "quillmoor-gas-uncertain")
res = call(m, p)
print("substituted sand with gas saturation anywhere in 5-85 %:")
for k in ("vp", "rho"):
    sh = res["sensitivity"][k]
    print("  %-3s P10 %6s  P90 %6s  from: %s" % (
        k, r(res[k]["p10"], 3 if k == "rho" else 0),
        r(res[k]["p90"], 3 if k == "rho" else 0),
        ", ".join("%s %s %%" % (n.split(".")[-1], r(100 * sh[n]["share"]))
                  for n in sh)))
print("vp hardly sees the saturation; density does.")

step("A whole well log: Orrimund 3 through `rockwire log`")
las = os.path.join(HERE, "orrimund-3.las")
out = os.path.join(KEEP, "orrimund-3-elastic.las")
qcf = os.path.join(TMP, "qc.txt")
p = rockwire(["log", las, "-o", out, "--no-progress", "--summary",
              "--qc-summary", qcf, "--set", "vs_predict=greenberg_castagna",
              "--set", "gr_clean=25", "--set", "gr_shale=115"])
print(p.stderr.decode().rstrip())
print("written: %s (the inputs and the caution are in its ~Other section)"
      % os.path.relpath(out, os.path.dirname(BIN)))

step("What if the brine sand (1560-1610 m) held 80 % gas?")
gas = os.path.join(TMP, "gas.csv")
rockwire(["log", las, "--format", "csv", "-o", gas, "--no-progress",
          "--top", "1560", "--base", "1605",
          "--set", "vs_predict=greenberg_castagna", "--set", "gr_clean=25",
          "--set", "gr_shale=115", "--set", "mineral=quartz",
          "--set", 'fluid_in_place={"brine":{"salinity":60000}}',
          "--set", 'fluid_new={"brine":{"salinity":60000},"gas":{"gravity":'
          '0.65},"saturation":{"brine":0.2,"gas":0.8}}',
          "--set", "pressure_gradient=0.0105",
          "--set", "temperature_gradient=30",
          "--set", "surface_temperature=15"])
rows = list(csv.DictReader(l for l in open(gas) if not l.startswith("#")))
cols = [c for c in rows[0]] if rows else []


def col(name):
    for c in cols:
        if c.split("[")[0] == name:
            return c
    return None


def num(row, name):
    v = row[col(name)]
    return float(v) if v not in ("", None) else None


print("%7s %14s %14s %14s   (brine -> 80 %% gas)" % ("depth m", "vp m/s",
                                                    "rho g/cm3", "vp/vs"))
for row in rows:
    d = num(row, "DEPT")
    if abs(d % 10) < 1e-6:
        print("%7s %6s -> %-5s %6s -> %-5s %6s -> %-5s %s" % (
            r(d), r(num(row, "vp")), r(num(row, "vp_sub")),
            r(num(row, "rho"), 2), r(num(row, "rho_sub"), 2),
            r(num(row, "vpvs"), 2), r(num(row, "vpvs_sub"), 2),
            names(num(row, "qc"))))

step("A live feed: the same well as a WITS stream through a pipe")
p = rockwire(["feed", "--map-file",
              os.path.join(HERE, "orrimund-3.witsmap"), "--format", "csv"],
             stdin=open(os.path.join(HERE, "orrimund-3.wits"), "rb").read())
lines = [l for l in p.stdout.decode().splitlines() if not l.startswith("#")]
feed = list(csv.DictReader(lines))
print("%d answers, one per depth as it arrives; the first three:"
      % len(feed))
print("%9s %7s %7s %6s  qc" % ("depth m", "vp m/s", "vs m/s", "rho"))
for row in feed[:3]:
    def f(k):
        c = [x for x in row if x.split("[")[0] == k][0]
        return float(row[c]) if row[c] else None
    print("%9s %7s %7s %6s  %s" % (r(f("depth"), 1), r(f("vp")), r(f("vs")),
                                   r(f("rho"), 2), names(f("qc"))))
print(textwrap.fill("the feed's own summary: " + [
    l for l in p.stderr.decode().splitlines() if "records" in l][-1], 76,
    subsequent_indent="  "))

step("Rock models: where do the Orrimund 3 sands sit on a template?")
m, p = scenario("rock-models", "orrimund-3-read-off")
res = call(m, p)
depths = [1510, 1571, 1583, 1599, 1615, 1627, 1643]
print("Xu & White 1995 sand, read off from AI and Vp/Vs (2 %):")
print("%6s %10s %10s %12s  flags" % ("depth", "porosity", "sw", "sw range"))
for i, d in enumerate(depths):
    print("%6d %6s+-%s %10s %5s-%-5s  %s" % (
        d, r(res["porosity"][i], 2), r(res["porosity_sd"][i], 2),
        r(res["sw"][i], 2), r(res["sw_lo"][i], 2), r(res["sw_hi"][i], 2),
        names(res["qc"][i])))
print("the shale is outside a sand model; the gas sand's saturation is")
print("poorly fixed (a wide range): a template cannot weigh low gas.")

step("A synthetic seismogram of Orrimund 3 (the well tie)")
cs = os.path.join(TMP, "checkshots.csv")
with open(cs, "w") as f:
    f.write("DEPTH[m],OWT[ms]\n1500,640\n1600,680\n1700,716\n")
syn = os.path.join(TMP, "syn.csv")
sgy = os.path.join(KEEP, "orrimund-3-synthetic.sgy")
rockwire(["synthetic", las, "--angles", "0:30:10", "--wavelet", "ricker:30",
          "--checkshots", cs, "--datum-depth", "0", "--vrep", "2100",
          "--csv", syn, "--segy", sgy])
rows = [l for l in open(syn) if not l.startswith("#")]
data = list(csv.reader(rows))
hdr, body = data[0], [[float(x) if x else None for x in row]
                      for row in data[1:]]
for j in range(1, len(hdr)):
    if not hdr[j].startswith("SYN"):
        continue
    vals = [(b[j], b[0]) for b in body if b[j] is not None]
    lo = min(vals)
    print("trace %-14s strongest trough %6s at %s ms" % (
        hdr[j], r(lo[0], 3), r(lo[1])))
print("SEG-Y rev 1 written: %s" % os.path.relpath(sgy, os.path.dirname(BIN)))

step("Pressures while drilling: the invented Orrimund 5, overpressured "
     "below a seal")
las5 = os.path.join(HERE, "orrimund-5.las")
o5 = os.path.join(KEEP, "orrimund-5-pressures.las")
common = ["--set", "gr_clean=35", "--set", "gr_shale=110",
          "--set", "pressures.depth_is=tvd",
          "--set", 'pressures.column={"air_gap":27,"water_depth":118,'
          '"shallow":{"rho_ml":1.72,"a":0.5,"s0":1000,"p":0.55}}',
          "--set", "pressures.pore_water.density=1.03"]
p = rockwire(["log", las5, "-o", o5, "--no-progress"] + common +
             ["--set", 'pressures.trend_fit={"intervals":[{"top":650,'
              '"base":2550}]}'])
text = open(o5).read()
curves = [l.split(".")[0].strip() for l in
          text.split("~C")[1].split("~")[0].splitlines()[1:]
          if l.strip() and not l.startswith("#")]
ix = {n: k for k, n in enumerate(curves)}
print("equivalent mud weights in g/cm3 (screening estimates only):")
print("%7s %6s %6s %6s %6s  %s" % ("TVD m", "Sv", "Ph", "Pp", "Shmin",
                                   "flags beyond the screening caution"))
for line in text.split("~A")[1].splitlines()[1:]:
    v = line.split()
    d = float(v[0])
    if d % 400 == 0 or d in (2590, 2800, 3060):
        fl = int(float(v[ix["QC"]]))
        fl &= ~(1 << 48)  # pressure_screening_only: on every sample
        def emw(k):
            x = float(v[ix[k]])
            return None if x == -999.25 else x
        print("%7s %6s %6s %6s %6s  %s" % (
            r(d), r(emw("SV_EMW"), 3), r(emw("PH_EMW"), 3),
            r(emw("PP_EMW"), 3), r(emw("SHMIN_EMW"), 3),
            names(fl) if fl else ""))
other = text.split("~OTHER")[1].split("~A")[0].replace("\n ", "")
trend = other[other.index('{"form"'):]
depth_ = 0
for k, ch in enumerate(trend):
    depth_ += ch == "{"
    depth_ -= ch == "}"
    if depth_ == 0:
        trend = trend[:k + 1]
        break
print("the feed replay of the same well, given the fitted trend:")
p = rockwire(["feed", "--map-file", os.path.join(HERE, "orrimund-5.witsmap")]
             + common + ["--set", "pressures.trend=" + trend],
             stdin=open(os.path.join(HERE, "orrimund-5.wits"), "rb").read())
ans = [json.loads(l) for l in p.stdout.decode().splitlines() if l]
rows = [dict(zip([c.lower() for c in curves], l.split()))
        for l in text.split("~A")[1].splitlines()[1:]]
same = sum(1 for a, b in zip(ans, rows)
           if all(abs(a[k] - float(b[k])) <= 5e-7 * abs(a[k])
                  for k in ("sv", "pp", "shmin") if a.get(k) is not None))
print("%d answers; %d agree with rockwire log's curves to 7 digits"
      % (len(ans), same))
print("what the estimates cannot see: protocol-docs/pressure.md")

step("Pictures of the answers (rockwire plot)")
pics = os.path.join(KEEP, "pictures")
os.makedirs(pics, exist_ok=True)
qa = os.path.join(TMP, "quillmoor-answers.jsonl")
with open(qa, "wb") as f:
    f.write(rockwire(["send", os.path.join(HERE, "prospect-quillmoor.jsonl")],
                     quiet=True).stdout)
ka = os.path.join(TMP, "korvane-answers.jsonl")
with open(ka, "wb") as f:
    f.write(rockwire(["send", os.path.join(HERE, "reservoir-korvane.jsonl")],
                     quiet=True).stdout)
tp = os.path.join(TMP, "template.jsonl")
m, p = scenario("rock-models", "vessimar-template")
with open(tp, "w") as f:
    f.write(json.dumps({"jsonrpc": "2.0", "id": "t", "result": call(
        m, dict(p, fields=["ai", "vpvs"]), quiet=True)}) + "\n")
for args in (["plot", "avo", qa, "--id", "quillmoor-brine-avo", "--id",
              "quillmoor-gas-avo", "--title",
              "Quillmoor prospect (invented): brine and gas sand",
              "-o", os.path.join(pics, "quillmoor-avo.png")],
             ["plot", "ig", qa, "-o", os.path.join(pics, "quillmoor-ig.svg")],
             ["plot", "tracks", las, "-o",
              os.path.join(pics, "orrimund-3-tracks.png"), "--", "--set",
              "vs_predict=greenberg_castagna"],
             ["plot", "cross", las, "--x", "ai", "--y", "vpvs", "--template",
              tp, "-o", os.path.join(pics, "orrimund-3-template.png")],
             ["plot", "sweep", ka, "-o",
              os.path.join(pics, "korvane-sweep.pdf")]):
    rockwire(args)
print("in %s: %s" % (os.path.relpath(pics, TOP),
                     ", ".join(sorted(os.listdir(pics)))))

step("The same scenario from Python (client/python)")
show(["python3", "demo-requests/example.py", "--socket", "SOCKET"])
env = dict(os.environ, PYTHONPATH=os.path.join(TOP, "client", "python"),
           ROCKWIRED=os.path.join(BIN, "rockwired"))
p = subprocess.run(["/usr/bin/python3", os.path.join(HERE, "example.py"),
                    "--socket", SOCK], env=env, capture_output=True)
print(p.stdout.decode().rstrip())
if p.returncode:
    sys.stderr.write(p.stderr.decode())
    raise SystemExit("demo: example.py failed")

step("Every scenario file answered (rockwire send)")
total = errors = 0
for fn in sorted(os.listdir(HERE)):
    if fn.endswith(".jsonl"):
        p = rockwire(["send", os.path.join(HERE, fn)], quiet=True,
                     check=False)
        ans = [json.loads(l) for l in p.stdout.decode().splitlines() if l]
        bad = [a["id"] for a in ans if "error" in a]
        total += len(ans)
        errors += len(bad)
        print("  %-28s %3d answers%s" % (fn, len(ans),
                                         ", errors: %s" % bad if bad else ""))
print("%d answers, %d errors" % (total, errors))
if errors:
    raise SystemExit("demo: a scenario request was refused")

print("\nKept for a look: %s (LAS, SEG-Y, pictures)." % os.path.relpath(KEEP,
                                                                    TOP))
