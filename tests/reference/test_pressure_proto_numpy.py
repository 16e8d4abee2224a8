"""The pressure family through the daemon (rockwired --stdio) against
independent numpy / scipy re-implementations on random logs, and the
brine column against IAPWS. Nothing here calls the core but through the
protocol; the references are written here from the published forms.

  - pressure.overburden on random offshore logs (random column, shallow
    law with and without a cap, null stretches) against the profile the
    contract defines (rockwire/pressure.h): the law from the mudline to
    the first valid density by scipy.integrate.quad, then cumulative
    trapezoids with the last valid density held over gaps; relative
    1e-10. The same log sent in random blocks carried by the state token
    gives the same numbers exactly.
  - pressure.hydrostatic of fresh water (salinity 0) against
    dp/dz = g rho_IAPWS95(p + p_atm, T) solved by scipy's solve_ivp
    (python3-iapws, class IAPWS95): Batzle & Wang's water is within
    0.24 % of IAPWS-95 at 20-95 degC (test_fluid_iapws.py), so the column
    must be within 0.3 %; and 35 g/kg brine against IAPWS-08 seawater
    (class SeaWater), within 0.6 % (NaCl against sea salt).
  - pressure.trend against scipy.optimize.curve_fit on the samples the
    selector keeps (intervals, vsh >= vsh_min, not washed out): the
    parameters to relative 1e-6 and the standard errors to 1e-3 (both
    optimisers stop at their own tolerances).
  - pressure.pore (Eaton 1975: pp = sv - (sv - ph)(dt_n/dt)^n with a given
    trend, random exponent; Bowers 1995 virgin curve in its published
    field units) and pressure.fracture (Eaton 1969; poroelastic by solving
    Hooke's law of isotropic poroelasticity, effective stress
    sigma - alpha pp, with numpy.linalg.solve), relative 1e-11.
  - log.process with pressures against the chain assembled here from the
    same references (overburden of the log's densities, the washed-out
    ones held; Eaton on 1/vp; Eaton 1969 on the dynamic Poisson's ratio
    (vp^2 - 2 vs^2) / (2 (vp^2 - vs^2))), in field units (ft, psi,
    lb/gal, us/ft) to check the conversions too.

Run by /usr/bin/python3 with RW_BUILD set. Prints "N passed, M failed";
exit 1 on failure."""
import json
import math
import os
import subprocess
import sys

import iapws
import numpy as np
from scipy import integrate, optimize

BUILD = os.environ.get("RW_BUILD", "build")
G0 = 9.80665
P_ATM = 101325.0
FT = 0.3048
PSI = 0.45359237 * G0 / 0.0254 ** 2        # Pa, exact by definition
PPG = 0.45359237 / 3.785411784e-3          # kg/m3 per lb/gal, exact
US_FT = 1e-6 / FT                          # s/m per us/ft
RNG = np.random.default_rng(20240617)

passed = failed = 0


def check(ok, what):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL:", what)


def rel(a, b):
    return abs(a - b) / abs(b) if b else abs(a)


def rpc(*reqs):
    lines = "".join(json.dumps(dict(jsonrpc="2.0", id=i, **r)) + "\n"
                    for i, r in enumerate(reqs))
    p = subprocess.run([os.path.join(BUILD, "rockwired"), "--stdio"],
                       input=lines.encode(), capture_output=True,
                       timeout=300, check=True)
    out = [json.loads(x) for x in p.stdout.decode().splitlines()]
    for o in out:
        if "result" not in o:
            sys.exit("daemon error: %s" % json.dumps(o)[:500])
    return [o["result"] for o in out]


def nn(v):
    return None if v is None or not np.isfinite(v) else float(v)


# ---- overburden ----------------------------------------------------------

def law(col, s):
    r = col["rho_ml"] + col["a"] * (s / col["s0"]) ** col["p"]
    return min(r, col.get("cap", math.inf))


def law_int(col, s1):
    pts = None
    if "cap" in col and col["a"] > 0:
        sc = col["s0"] * ((col["cap"] - col["rho_ml"]) / col["a"]) ** (
            1 / col["p"])
        if 0 < sc < s1:
            pts = [sc]
    v, _ = integrate.quad(lambda s: law(col, s), 0, s1, points=pts,
                          epsabs=0, epsrel=1e-13, limit=200)
    return v


def obg_ref(col, z, rho):
    g, ml = col["g"], col["air_gap"] + col["water_depth"]
    sv0 = col["rho_sea"] * g * col["water_depth"]
    valid = np.isfinite(rho) & (rho > 0)
    first = int(np.argmax(valid)) if valid.any() else len(z)
    out = [sv0 + g * law_int(col, z[i] - ml)
           for i in range(min(first + 1, len(z)))]
    if first < len(z):
        held, pr = rho[first], []
        for i in range(first, len(z)):
            held = rho[i] if valid[i] else held
            pr.append(held)
        cum = integrate.cumulative_trapezoid(np.array(pr), z[first:],
                                             initial=0)
        out += [out[-1] + g * c for c in cum[1:]]
    return np.array(out)


def col_params(col):
    p = {k: col[k] for k in ("air_gap", "water_depth", "g")}
    p["rho_sea"] = col["rho_sea"] / 1000
    p["shallow"] = {"rho_ml": col["rho_ml"] / 1000, "a": col["a"] / 1000,
                    "s0": col["s0"], "p": col["p"]}
    if "cap" in col:
        p["shallow"]["cap"] = col["cap"] / 1000
    return p


def random_col():
    c = dict(air_gap=float(RNG.uniform(0, 35)),
             water_depth=float(RNG.uniform(50, 2500)),
             rho_sea=float(RNG.uniform(1020, 1035)),
             g=float(RNG.uniform(9.78, 9.83)),
             rho_ml=float(RNG.uniform(1500, 2000)),
             a=float(RNG.uniform(0, 250)), s0=float(RNG.uniform(300, 1500)),
             p=float(RNG.uniform(0.3, 1.2)))
    if RNG.random() < 0.5:
        c["cap"] = float(RNG.uniform(2100, 2600))
    return c


for well in range(8):
    col = random_col()
    ml = col["air_gap"] + col["water_depth"]
    n = int(RNG.integers(100, 900))
    z = ml + float(RNG.uniform(20, 900)) + np.cumsum(RNG.uniform(0.05, 3, n))
    rho = RNG.uniform(1800, 2750, n)
    rho[: int(RNG.integers(0, 20))] = np.nan
    rho[RNG.random(n) < 0.03] = np.nan
    ref = obg_ref(col, z, rho)
    rhob = [nn(r / 1000) for r in rho]
    (res,) = rpc(dict(method="pressure.overburden",
                      params=dict(tvd=z.tolist(), rhob=rhob,
                                  column=col_params(col))))
    worst = max(rel(res["sv"][i] * 1e6, ref[i]) for i in range(n))
    check(worst < 1e-10, "overburden well %d: worst relative %.3g" %
          (well, worst))
    check(all(q & (1 << 48) for q in res["qc"]), "caution on every sample")
    # the same log in random blocks, carried by the state token
    cuts = sorted(set([0, n] + RNG.integers(1, n, 3).tolist()))
    tok, got = None, []
    for a, b in zip(cuts, cuts[1:]):
        p = dict(tvd=z[a:b].tolist(), rhob=rhob[a:b],
                 column=col_params(col))
        if tok:
            p["state"] = tok
        (r,) = rpc(dict(method="pressure.overburden", params=p))
        got += r["sv"]
        tok = r["pressure_state"]["token"]
    check(got == res["sv"], "well %d in %d blocks equals one request" %
          (well, len(cuts) - 1))

# ---- hydrostatic against IAPWS ------------------------------------------


def iapws_column(zs, ml, t_ml, grad, fresh, g=G0):
    def rho(p_pa, t):
        if fresh:
            return iapws.IAPWS95(P=p_pa * 1e-6, T=t + 273.15).rho
        return iapws.SeaWater(P=p_pa * 1e-6, T=t + 273.15, S=0.035).rho

    def f(z, y):
        return [g * rho(y[0] + P_ATM, t_ml + grad * (z - ml))]
    sol = integrate.solve_ivp(f, (ml, zs[-1]), [0.0], t_eval=zs,
                              rtol=1e-9, atol=1e-3)
    return sol.y[0]


zs = np.array([300.0, 800, 1400, 2000, 2500])
# 30 degC/km for water (to 95 degC); 20 degC/km for sea water, which
# keeps it inside IAPWS-08's range (to 80 degC)
for fresh, tol, grad in ((True, 0.003, 30), (False, 0.006, 20)):
    (res,) = rpc(dict(method="pressure.hydrostatic",
                      params=dict(tvd=zs.tolist(), pore_water={"brine": {
                          "salinity": 0 if fresh else 35000,
                          "mudline_temperature": 20,
                          "temperature_gradient": grad}})))
    ref = iapws_column(zs, 0.0, 20.0, grad * 1e-3, fresh)
    worst = max(rel(res["ph"][i] * 1e6, ref[i]) for i in range(len(zs)))
    check(worst < tol, "%s column against %s: %.3g (tol %g)" %
          ("fresh" if fresh else "35 g/kg", "IAPWS-95" if fresh else
           "IAPWS-08", worst, tol))

# ---- trend against curve_fit -------------------------------------------------

for k in range(4):
    ml = 120.0
    n = 400
    z = np.sort(RNG.uniform(400, 3200, n))
    ma, mlv, c = RNG.uniform(55, 70), RNG.uniform(160, 190), \
        RNG.uniform(3e-4, 8e-4)
    dt = ma + (mlv - ma) * np.exp(-c * (z - ml)) + RNG.normal(0, 2, n)
    vsh = RNG.uniform(0.3, 1, n)
    cal = np.where(RNG.random(n) < 0.05, 0.30, 0.22)
    ivs = [{"top": 500, "base": 1600}, {"top": 1900, "base": 2800}]
    (res,) = rpc(dict(method="pressure.trend", params=dict(
        tvd=z.tolist(), dtp=dt.tolist(), vsh=vsh.tolist(), vsh_min=0.6,
        caliper=cal.tolist(), bit_size=0.216, intervals=ivs,
        column={"air_gap": 20, "water_depth": 100})))
    use = (((z >= 500) & (z <= 1600)) | ((z >= 1900) & (z <= 2800))) & \
        (vsh >= 0.6) & (cal - 0.216 <= 0.0254)
    s = z[use] - ml

    def model(x, a_, b_, c_):
        return a_ + (b_ - a_) * np.exp(-c_ * x)
    popt, pcov = optimize.curve_fit(model, s, dt[use], p0=[60, 170, 5e-4],
                                    xtol=1e-14, ftol=1e-14, maxfev=20000)
    tr, fit = res["trend"], res["fit"]
    check(fit["n_used"] == int(use.sum()), "trend %d: samples used %d/%d" %
          (k, fit["n_used"], use.sum()))
    for name, i in (("dt_ma", 0), ("dt_ml", 1), ("c", 2)):
        check(rel(tr[name], popt[i]) < 1e-6, "trend %d %s %.10g vs %.10g" %
              (k, name, tr[name], popt[i]))
    for name, i in (("sigma_dt_ma", 0), ("sigma_dt_ml", 1), ("sigma_c", 2)):
        check(rel(fit[name], math.sqrt(pcov[i][i])) < 1e-3,
              "trend %d %s %.6g vs %.6g" % (k, name, fit[name],
                                            math.sqrt(pcov[i][i])))
    check(all(res["in_fit"][i] == int(use[i]) for i in range(n)),
          "trend %d: in_fit is the selection" % k)

# ---- pore pressure and fracture gradient ------------------------------------

n = 200
z = np.sort(RNG.uniform(800, 4000, n))
sv = z * RNG.uniform(0.021, 0.024, n)            # MPa
ph = z * 0.0101
trend = {"dt_ma": 60.0, "dt_ml": 180.0, "c": 5.5e-4}
dtn = 60 + 120 * np.exp(-5.5e-4 * (z - 100))
dt = dtn * RNG.uniform(0.97, 1.4, n)
expo = float(RNG.uniform(2.5, 3.5))
(res,) = rpc(dict(method="pressure.pore", params=dict(
    tvd=z.tolist(), dtp=dt.tolist(), sv=sv.tolist(), ph=ph.tolist(),
    exponent=expo, trend=trend, column={"water_depth": 100})))
want = sv - (sv - ph) * (dtn / dt) ** expo
worst = max(rel(res["pp"][i], want[i]) for i in range(n))
check(worst < 1e-11, "Eaton 1975 on %d samples: %.3g" % (n, worst))

vp = RNG.uniform(2300, 4200, n)
(res,) = rpc(dict(method="pressure.pore", params=dict(
    method="bowers", tvd=z.tolist(), vp=vp.tolist(), sv=sv.tolist(),
    ph=ph.tolist(), bowers={"a": 14.2, "a_units": "ft/s/psi^b", "b": 0.724})))
sig_psi = ((vp / FT - 5000) / 14.2) ** (1 / 0.724)
want = sv - sig_psi * PSI * 1e-6
pos = [i for i in range(n) if want[i] >= 0]
worst = max(rel(res["pp"][i], want[i]) for i in pos)
check(worst < 1e-11, "Bowers 1995 virgin curve (field units), %d samples: "
      "%.3g" % (len(pos), worst))
# where the formula goes below zero absolute (a velocity far above the
# virgin curve's reach at that depth) there is no pressure: null, flagged
neg = [i for i in range(n) if want[i] < 0]
check(neg and all(res["pp"][i] is None and res["qc"][i] >> 51 & 1
                  for i in neg),
      "Bowers: %d samples below zero absolute are null and flagged "
      "pressure_inconsistent" % len(neg))

pp = ph + (sv - ph) * RNG.uniform(0, 0.8, n)
nu = RNG.uniform(0.05, 0.45, n)
(res,) = rpc(dict(method="pressure.fracture", params=dict(
    tvd=z.tolist(), sv=sv.tolist(), pp=pp.tolist(), nu=nu.tolist())))
want = nu / (1 - nu) * (sv - pp) + pp
worst = max(rel(res["shmin"][i], want[i]) for i in range(n))
check(worst < 1e-12, "Eaton 1969: %.3g" % worst)

alpha, eh, eH = 0.8, 2e-4, 6e-4
es = RNG.uniform(5, 30, n)                       # GPa
(res,) = rpc(dict(method="pressure.fracture", params=dict(
    method="poroelastic", tvd=z.tolist(), sv=sv.tolist(), pp=pp.tolist(),
    nu=nu.tolist(), alpha=alpha, e_static=es.tolist(), eps_h=eh,
    eps_hmax=eH)))
worst = 0
for i in range(n):
    # Hooke: eps_j = (s'_j - nu (s'_k + s'_l)) / E, effective s' = s - a pp;
    # unknowns (s'_h, s'_H, eps_v) with s'_v known
    E, v, sv_e = es[i] * 1e3, nu[i], sv[i] - alpha * pp[i]   # MPa
    A = np.array([[1, -v, 0], [-v, 1, 0], [-v, -v, -E]])
    b = np.array([E * eh + v * sv_e, E * eH + v * sv_e, -sv_e])
    sh, sH, _ = np.linalg.solve(A, b)
    worst = max(worst, rel(res["shmin"][i], sh + alpha * pp[i]),
                rel(res["shmax"][i], sH + alpha * pp[i]))
check(worst < 1e-9, "poroelastic against Hooke's law: %.3g" % worst)

# ---- log.process with pressures, in field units --------------------------

n = 300
ml_ft = 400.0
zf = 3000 + np.cumsum(RNG.uniform(1, 3, n))      # ft, TVD
dtp = 60 + 120 * np.exp(-5.5e-4 * (zf * FT - ml_ft * FT)) * \
    RNG.uniform(0.98, 1.25, n)                   # us/ft
dts = dtp * RNG.uniform(1.7, 2.2, n)
rho = RNG.uniform(2.1, 2.55, n)
cal = np.where(RNG.random(n) < 0.05, 10.0, 8.6)  # in, bit 8.5
rho[RNG.random(n) < 0.02] = np.nan
# lengths (depth, caliper, bit size, s0) in ft; c stays per metre (its
# own kind, inverse_length)
units = {"length": "ft", "pressure": "psi", "mud_weight": "lb/gal"}
shallow = {"rho_ml": 1.9, "a": 0.2, "s0": 1000, "p": 0.6}   # g/cm3, ft
(res,) = rpc(dict(method="log.process", params=dict(
    depth=zf.tolist(), dtp=dtp.tolist(), dts=dts.tolist(),
    rhob=[nn(r) for r in rho], caliper=(cal / 12).tolist(), bit_size=8.5 / 12,
    units=units,
    pressures={"depth_is": "tvd",
               "column": {"air_gap": 80, "water_depth": 320,
                          "shallow": shallow},
               "trend": {"dt_ma": 60, "dt_ml": 180, "c": 5.5e-4}})))
z = zf * FT
col = dict(air_gap=80 * FT, water_depth=320 * FT, rho_sea=1025.0, g=G0,
           rho_ml=1900.0, a=200.0, s0=1000 * FT, p=0.6)
use_rho = np.where((cal - 8.5) > 1.0, np.nan, rho * 1000)   # washouts held
sv = obg_ref(col, z, use_rho)
ph = 1025 * G0 * 320 * FT + 1000 * G0 * (z - ml_ft * FT)
dtn = 60 + 120 * np.exp(-5.5e-4 * (z - ml_ft * FT))
pp = sv - (sv - ph) * (dtn / dtp) ** 3
vp, vs = FT / (dtp * 1e-6), FT / (dts * 1e-6)
nu = (vp ** 2 - 2 * vs ** 2) / (2 * (vp ** 2 - vs ** 2))
fg = nu / (1 - nu) * (sv - pp) + pp
worst = [0, 0, 0, 0]
nulls = 0
for i in range(n):
    worst[0] = max(worst[0], rel(res["sv"][i] * PSI, sv[i]))
    worst[1] = max(worst[1], rel(res["pp"][i] * PSI, pp[i]))
    if res["shmin"][i] is None:
        # no stress where the inputs contradict the frame (pp outside
        # [0, sv]), Poisson's ratio is impossible, or the log has no
        # elastic set (a null density)
        nulls += 1
        check(not (0 <= pp[i] <= sv[i]) or not (-1 < nu[i] < 0.5) or
              np.isnan(rho[i]),
              "log shmin null at %d without a reason" % i)
        continue
    worst[2] = max(worst[2], rel(res["shmin"][i] * PSI, fg[i]))
    worst[3] = max(worst[3], rel(res["pp_emw"][i] * PPG,
                                 pp[i] / (G0 * z[i])))
check(res["units"]["sv"] == "psi" and res["units"]["pp_emw"] == "lb/gal",
      "log.process answers in the units asked")
check(max(worst) < 1e-10, "log.process pressures in field units: sv %.2g "
      "pp %.2g shmin %.2g pp_emw %.2g" % tuple(worst))
check(all(q & (1 << 48) for q in res["qc"]), "caution on every sample")

print("%d passed, %d failed" % (passed, failed))
sys.exit(1 if failed else 0)
