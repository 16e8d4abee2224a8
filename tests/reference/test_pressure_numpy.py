"""Cross-check of the core's pressure, stress, trend and strength results
(pressure_dump) against independent numpy / scipy re-implementations on
random logs, and of the brine hydrostatic against IAPWS formulations.

What is compared, and against what (nothing here calls the core except
through pressure_dump's printed numbers):
  - overburden: the density profile the contract in rockwire/pressure.h
    defines (shallow power law from the mudline until the first valid
    density, straight lines between valid log samples, the last valid
    density held over gaps) integrated with scipy.integrate.quad (the
    power law, cap handled as a break point) and
    scipy.integrate.cumulative_trapezoid (the log); relative 1e-10.
  - brine hydrostatic: dp/dz = g rho(p + p_atm, T(z), S(z)) solved with
    scipy.integrate.solve_ivp (DOP853, rtol 1e-12), rho from Batzle &
    Wang 1992 eqs. 27a, 27b written here from the paper (from memory),
    T and S linear in depth between samples; relative 1e-8 (the core's
    GSL driver runs at rtol 1e-10 and abs 1e-3 Pa).
  - the same column for pure water against IAPWS-95 (python3-iapws,
    class IAPWS95) at 20-95 degC: B&W density is within 0.24 % of
    IAPWS-95 there (tests/reference/test_fluid_iapws.py), so the integral
    must be within 0.35 %; and 35 g/kg brine against IAPWS-08 seawater
    (class SeaWater) at 2-30 degC: within 0.55 % (the fluid check's
    tolerance; NaCl brine against sea salt, like with near-like).
  - Eaton 1975, Bowers 1995 (both branches), Eaton 1969, Matthews &
    Kelly 1967: the published formulas in numpy; relative 1e-12.
  - poroelastic horizontal stresses: Hooke's law of isotropic
    poroelasticity (effective stress sigma - alpha pp) solved as a 3x3
    linear system with numpy.linalg.solve for the unknowns
    (sigma'_h, sigma'_H, eps_v) given (eps_h, eps_H, sigma'_v);
    relative 1e-9.
  - trend fits: scipy.optimize.curve_fit (Levenberg-Marquardt) on random
    noisy synthetic exponential trends, parameters to relative 1e-6 and
    covariance
    (pcov, scaled by the residual variance as curve_fit does by
    default) to relative 1e-3 (both optimisers stop at their own
    tolerances; the covariance is evaluated at slightly different
    points); the log-linear fit against numpy.linalg.lstsq and
    s^2 (X^T X)^-1, relative 1e-9 for the parameters and 1e-6 for the
    covariance (exact linear solves on both sides).
  - equivalent mud weight, UCS and static modulus: the published forms
    in their own units (us/ft, km/s, GPa, MPa) with the unit factors of
    their definitions; relative 1e-12.

Run by /usr/bin/python3 with RW_BUILD set (the dump is
$RW_BUILD/pressure_dump). Prints "N passed, M failed"; exit 1 on
failure."""
import json
import math
import os
import subprocess
import sys

import numpy as np
from scipy import integrate, optimize
import iapws

BUILD = os.environ.get("RW_BUILD", os.path.join(os.path.dirname(__file__),
                                                "..", "..", "build"))
DUMP = os.path.join(BUILD, "pressure_dump")
G0 = 9.80665
P_ATM = 101325.0
US_FT = 1e-6 / 0.3048
RNG = np.random.default_rng(1414)

passed = 0
failed = 0


def check(ok, what):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL:", what)


def close(got, want, rel, what, abs_tol=0.0):
    if got is None or want is None or not np.isfinite(want):
        check(got is None and (want is None or not np.isfinite(want)),
              "%s: got %r, want %r" % (what, got, want))
        return
    check(abs(got - want) <= rel * abs(want) + abs_tol,
          "%s: got %.15g, want %.15g (rel %.3g)" % (what, got, want, rel))


def run(mode, lines):
    text = "\n".join(" ".join(repr(float(x)) for x in ln) for ln in lines)
    out = subprocess.run([DUMP, mode], input=text + "\n", text=True,
                         capture_output=True, timeout=120)
    if out.returncode != 0:
        print("pressure_dump %s failed: %s" % (mode, out.stderr))
        sys.exit(1)
    return [json.loads(x) for x in out.stdout.splitlines()]


# ---- overburden -----------------------------------------------------------

def random_column(offshore):
    cap = float(RNG.uniform(2100.0, 2600.0)) if RNG.random() < 0.5 \
        else math.inf
    return [float(RNG.uniform(0.0, 35.0)),
            float(RNG.uniform(50.0, 2500.0)) if offshore else 0.0,
            float(RNG.uniform(1020.0, 1035.0)),
            float(RNG.uniform(9.78, 9.83)),
            float(RNG.uniform(1500.0, 2000.0)),
            float(RNG.uniform(0.0, 250.0)),
            float(RNG.uniform(300.0, 1500.0)),
            float(RNG.uniform(0.3, 1.2)),
            cap]


def trend_rho(col, s):
    rml, a, s0, p, cap = col[4], col[5], col[6], col[7], col[8]
    return min(cap, rml + a * (s / s0) ** p)


def trend_int(col, s0_, s1_):
    """int rho ds from s0_ to s1_ below the mudline, by quadrature."""
    rml, a, s0, p, cap = col[4], col[5], col[6], col[7], col[8]
    pts = None
    if math.isfinite(cap) and a > 0:
        sc = s0 * ((cap - rml) / a) ** (1.0 / p)
        if s0_ < sc < s1_:
            pts = [sc]
    val, _ = integrate.quad(lambda s: trend_rho(col, s), s0_, s1_,
                            points=pts, epsabs=0.0, epsrel=1e-13,
                            limit=200)
    return val


def overburden_reference(col, z, rho):
    """Sv per sample from the profile the contract defines."""
    g, zml = col[3], col[0] + col[1]
    sv0 = col[2] * g * col[1]
    out = []
    valid = np.isfinite(rho) & (rho > 0)
    first = int(np.argmax(valid)) if valid.any() else len(z)
    # shallow part: every sample up to and including the first valid one
    for i in range(min(first + 1, len(z))):
        out.append(sv0 + g * trend_int(col, 0.0, z[i] - zml))
    if first >= len(z):
        return np.array(out)
    # log part: the profile of (depth, density used) points, the last
    # valid density standing in at missing samples, integrated by
    # cumulative trapezoids (exact for the piecewise-linear profile)
    pz, pr = [], []
    held = rho[first]
    for i in range(first, len(z)):
        if valid[i]:
            held = rho[i]
        pz.append(z[i])
        pr.append(held)
    cum = integrate.cumulative_trapezoid(np.array(pr), np.array(pz),
                                         initial=0.0)
    base = out[-1]
    for k in range(1, len(pz)):
        out.append(base + g * cum[k])
    return np.array(out)


def test_overburden():
    for well in range(12):
        col = random_column(offshore=well % 3 != 0)
        zml = col[0] + col[1]
        n = int(RNG.integers(50, 1500))
        z = zml + float(RNG.uniform(20.0, 900.0)) + \
            np.cumsum(RNG.uniform(0.05, 3.0, n))
        rho = RNG.uniform(1800.0, 2750.0, n)
        # missing stretches: a leading one, random single and long gaps
        rho[: int(RNG.integers(0, 20))] = np.nan
        rho[RNG.random(n) < 0.03] = np.nan
        k = int(RNG.integers(0, n))
        rho[k: k + int(RNG.integers(0, 40))] = np.nan
        res = run("obg", [col] + [[z[i], rho[i]] for i in range(n)])
        ref = overburden_reference(col, z, rho)
        worst = 0.0
        for i in range(n):
            check(res[i]["status"] == 0, "obg status well %d" % well)
            worst = max(worst, abs(res[i]["sv"] - ref[i]) / ref[i])
            close(res[i]["grad"], ref[i] / z[i], 1e-10, "obg grad")
        check(worst <= 1e-10, "obg well %d: worst relative %.3g" %
              (well, worst))


# ---- hydrostatic ------------------------------------------------------------

def bw_rho(p_mpa, t, s):
    """Batzle & Wang 1992 eqs. 27a, 27b (from memory), kg/m^3."""
    rw = 1 + 1e-6 * (-80 * t - 3.3 * t**2 + 0.00175 * t**3 + 489 * p_mpa
                     - 2 * t * p_mpa + 0.016 * t**2 * p_mpa
                     - 1.3e-5 * t**3 * p_mpa - 0.333 * p_mpa**2
                     - 0.002 * t * p_mpa**2)
    rb = rw + s * (0.668 + 0.44 * s + 1e-6 * (
        300 * p_mpa - 2400 * p_mpa * s
        + t * (80 + 3 * t - 3300 * s - 13 * p_mpa + 47 * p_mpa * s)))
    return 1000.0 * rb


def hydro_reference(col, t_ml, s_ml, z, t, s, rho_fn, rtol=1e-12):
    g, zml = col[3], col[0] + col[1]
    p = col[2] * g * col[1]
    out = []
    z0, t0, s0 = zml, t_ml, s_ml
    for zi, ti, si in zip(z, t, s):
        def f(zz, y, z0=z0, zi=zi, t0=t0, ti=ti, s0=s0, si=si):
            fr = (zz - z0) / (zi - z0)
            return [g * rho_fn((y[0] + P_ATM) * 1e-6, t0 + fr * (ti - t0),
                               s0 + fr * (si - s0))]
        sol = integrate.solve_ivp(f, (z0, zi), [p], method="DOP853",
                                  rtol=rtol, atol=1e-6)
        p = float(sol.y[0, -1])
        out.append(p)
        z0, t0, s0 = zi, ti, si
    return np.array(out)


def test_hydrostatic():
    for well in range(6):
        col = random_column(offshore=well % 2 == 0)
        zml = col[0] + col[1]
        n = int(RNG.integers(5, 40))
        z = zml + np.cumsum(RNG.uniform(10.0, 300.0, n))
        t_ml = float(RNG.uniform(2.0, 25.0))
        t = t_ml + RNG.uniform(0.015, 0.04) * (z - zml)
        s_ml = float(RNG.uniform(0.0, 0.2))
        s = np.clip(s_ml + RNG.uniform(-1e-5, 4e-5) * (z - zml), 0, 0.3)
        res = run("hydro", [col, [t_ml, s_ml]] +
                  [[z[i], t[i], s[i]] for i in range(n)])
        ref = hydro_reference(col, t_ml, s_ml, z, t, s, bw_rho)
        for i in range(n):
            check(res[i]["status"] == 0, "hydro status")
            close(res[i]["p"], ref[i], 1e-8, "hydro well %d z %.1f" %
                  (well, z[i]))
            close(res[i]["rho"], bw_rho((ref[i] + P_ATM) * 1e-6, t[i], s[i]),
                  1e-8, "hydro rho")

    # pure water against IAPWS-95, 20-95 degC, on land
    def rho95(p_mpa, t, s):
        return iapws.IAPWS95(P=p_mpa, T=t + 273.15).rho
    col = [0.0, 0.0, 1025.0, G0, 1900.0, 0.0, 1000.0, 0.6, math.inf]
    z = np.array([500.0, 1250.0, 2000.0, 2500.0])
    t = 20.0 + 0.03 * z
    res = run("hydro", [col, [20.0, 0.0]] +
              [[z[i], t[i], 0.0] for i in range(len(z))])
    ref = hydro_reference(col, 20.0, 0.0, z, t, np.zeros(len(z)), rho95,
                          rtol=1e-8)
    dev = max(abs(res[i]["p"] / ref[i] - 1) for i in range(len(z)))
    print("measured: brine column vs IAPWS-95 max |dev| %.3f %%" % (100 * dev))
    for i in range(len(z)):
        close(res[i]["p"], ref[i], 0.0035, "hydro vs IAPWS-95 z %g" % z[i])

    # 35 g/kg brine against IAPWS-08 seawater, 2-30 degC, offshore below a
    # 400 m sea column (both start from the same mudline pressure)
    def rho08(p_mpa, t, s):
        return iapws.SeaWater(T=t + 273.15, P=p_mpa, S=0.035).rho
    col = [0.0, 400.0, 1025.0, G0, 1900.0, 0.0, 1000.0, 0.6, math.inf]
    z = np.array([900.0, 1400.0, 2000.0])
    t = 2.0 + 0.028 * (z - 400.0)
    res = run("hydro", [col, [2.0, 0.035]] +
              [[z[i], t[i], 0.035] for i in range(len(z))])
    ref = hydro_reference(col, 2.0, 0.035, z, t, np.full(len(z), 0.035),
                          rho08, rtol=1e-8)
    dev = max(abs(res[i]["p"] / ref[i] - 1) for i in range(len(z)))
    print("measured: brine column vs IAPWS-08 max |dev| %.3f %%" % (100 * dev))
    for i in range(len(z)):
        close(res[i]["p"], ref[i], 0.0055, "hydro vs IAPWS-08 z %g" % z[i])


# ---- pore pressure ----------------------------------------------------------

def test_eaton():
    rows = []
    for _ in range(500):
        sv = RNG.uniform(5e6, 200e6)
        ph = sv * RNG.uniform(0.3, 0.6)
        dtn = RNG.uniform(60, 180) * US_FT
        dt = dtn * RNG.uniform(0.8, 1.8)
        rows.append([sv, ph, dt, dtn, RNG.uniform(0.5, 5.0)])
    rows.append([50e6, 20e6, 1e-4, 1e-4, 3.0])
    res = run("eaton", rows)
    for r, o in zip(rows, res):
        sv, ph, dt, dtn, n = r
        sig = (sv - ph) * (dtn / dt) ** n
        close(o["pp"], sv - sig, 1e-12, "eaton pp")
        close(o["sigma"], sig, 1e-12, "eaton sigma")
        check(bool(o["warn"] & 0x200) == (dt < dtn), "eaton below-hydro flag")
    check(res[-1]["pp"] == 20e6, "eaton on the trend gives ph exactly")


def test_bowers():
    rows = []
    for _ in range(500):
        v0 = RNG.uniform(1400, 1700)
        b = RNG.uniform(0.6, 0.95)
        a = RNG.uniform(40, 200)
        u = RNG.uniform(1.0, 8.0)
        smax = RNG.uniform(10e6, 60e6) if RNG.random() < 0.7 else math.nan
        unl = 1.0 if math.isfinite(smax) and RNG.random() < 0.7 else 0.0
        v = v0 + RNG.uniform(50, 2500)
        sv = RNG.uniform(30e6, 120e6)
        rows.append([v0, a, b, u, smax, unl, sv, sv * 0.45, v])
    res = run("bowers", rows)
    for r, o in zip(rows, res):
        v0, a, b, u, smax, unl, sv, ph, v = r
        s = ((v - v0) / a) ** (1.0 / b)  # MPa, virgin
        used = False
        if unl and s < smax / 1e6:
            # Bowers 1995 unloading: sigma_max^(1-U) ((v-v0)/A)^(U/B)
            s = (smax / 1e6) ** (1.0 - u) * ((v - v0) / a) ** (u / b)
            used = True
        check(o["status"] == 0, "bowers status")
        close(o["sigma"], s * 1e6, 1e-11, "bowers sigma")
        close(o["pp"], sv - s * 1e6, 1e-11, "bowers pp", abs_tol=1e-4)
        check(bool(o["warn"] & 0x800) == used, "bowers unloading flag")


# ---- horizontal stress ------------------------------------------------------

def test_fracture():
    rows = []
    for _ in range(500):
        sv = RNG.uniform(10e6, 200e6)
        pp = sv * RNG.uniform(0.3, 0.9)
        nu = RNG.uniform(0.02, 0.48)
        eh = RNG.uniform(-5e-4, 1e-3)
        rows.append([sv, pp, nu, RNG.uniform(0.4, 1.0),
                     RNG.uniform(2e9, 60e9), eh, eh + RNG.uniform(0, 1e-3),
                     RNG.uniform(0, 1)])
    res = run("frac", rows)
    for r, o in zip(rows, res):
        sv, pp, nu, al, e, eh, eH, ki = r
        check(o["status"] == [0, 0, 0], "frac status")
        close(o["eaton"], nu / (1 - nu) * (sv - pp) + pp, 1e-12, "eaton69")
        close(o["mk"], pp + ki * (sv - pp), 1e-12, "matthews-kelly")
        # Hooke: eps = S sigma', S = [[1,-nu,-nu],[-nu,1,-nu],[-nu,-nu,1]]/E
        # unknowns x = (s'_h, s'_H, eps_v); knowns eps_h, eps_H, s'_v
        svp = sv - al * pp
        m = np.array([[1.0, -nu, 0.0],
                      [-nu, 1.0, 0.0],
                      [-nu / e, -nu / e, -1.0]])
        rhs = np.array([e * eh + nu * svp, e * eH + nu * svp, -svp / e])
        x = np.linalg.solve(m, rhs)
        close(o["shmin"], x[0] + al * pp, 1e-9, "poroelastic shmin")
        close(o["shmax"], x[1] + al * pp, 1e-9, "poroelastic shmax")
        check(o["eaton"] > pp and o["eaton"] < sv, "eaton69 in (pp, sv)")


# ---- trend ------------------------------------------------------------------

def test_trend():
    for k in range(12):
        ma = RNG.uniform(50, 70) * US_FT
        ml = RNG.uniform(150, 200) * US_FT
        c = RNG.uniform(2e-4, 1.2e-3)
        n = int(RNG.integers(40, 600))
        s = np.sort(RNG.uniform(100, 4000, n))
        dt = ma + (ml - ma) * np.exp(-c * s) + \
            RNG.normal(0, RNG.uniform(1, 6) * US_FT, n)
        o = run("trend", [[0, n]] + [[s[i], dt[i]] for i in range(n)])[0]
        check(o["status"] == 0, "trend exp status %d" % o["status"])
        if o["status"] != 0:
            continue

        def model(x, a, b, cc):
            return a + (b - a) * np.exp(-cc * x)
        # fit in us/m for conditioning, then scale back
        p, pcov = optimize.curve_fit(model, s, dt * 1e6,
                                     p0=[ma * 1e6, ml * 1e6, c],
                                     method="lm", xtol=1e-14, ftol=1e-14,
                                     maxfev=20000)
        sc = np.array([1e-6, 1e-6, 1.0])
        pcov = pcov * np.outer(sc, sc)
        close(o["dt_ma"], p[0] * 1e-6, 1e-6, "trend exp dt_ma")
        close(o["dt_ml"], p[1] * 1e-6, 1e-6, "trend exp dt_ml")
        close(o["c"], p[2], 1e-6, "trend exp c")
        cov = np.array(o["cov"]).reshape(3, 3)
        for a in range(3):
            for b in range(3):
                close(cov[a, b], pcov[a, b], 1e-3, "trend exp cov",
                      abs_tol=1e-6 * math.sqrt(pcov[a, a] * pcov[b, b]))
        resid = dt - model(s, *p) * 1e-6
        rms = math.sqrt(np.mean(resid ** 2))
        close(o["rms"], rms, 1e-6, "trend exp rms")
    for k in range(8):
        ml = RNG.uniform(150, 200) * US_FT
        c = RNG.uniform(1e-4, 5e-4)
        n = int(RNG.integers(20, 500))
        s = np.sort(RNG.uniform(100, 3000, n))
        dt = ml * np.exp(-c * s + RNG.normal(0, 0.03, n))
        o = run("trend", [[1, n]] + [[s[i], dt[i]] for i in range(n)])[0]
        check(o["status"] == 0, "trend loglin status")
        # ordinary least squares, exactly: numpy.linalg.lstsq, and the
        # covariance s^2 (X^T X)^-1 with s^2 = RSS / (n - 2)
        x = np.column_stack([np.ones(n), s])
        y = np.log(dt)
        p, rss, _, _ = np.linalg.lstsq(x, y, rcond=None)
        pcov = float(rss[0]) / (n - 2) * np.linalg.inv(x.T @ x)
        close(o["dt_ml"], math.exp(p[0]), 1e-9, "trend loglin dt_ml")
        close(o["c"], -p[1], 1e-9, "trend loglin c")
        cov = np.array(o["cov"]).reshape(3, 3)
        e = math.exp(p[0])
        close(cov[1, 1], e * e * pcov[0, 0], 1e-6, "trend loglin var dt_ml")
        close(cov[1, 2], -e * pcov[0, 1], 1e-6, "trend loglin cov")
        close(cov[2, 2], pcov[1, 1], 1e-6, "trend loglin var c")
        check(o["dt_ma"] is None and cov[0, 0] is None,
              "loglin has no matrix slowness")


# ---- conversions and strength -----------------------------------------------

def test_emw_strength():
    rows = [[RNG.uniform(1e5, 2e8), RNG.uniform(10, 9000),
             RNG.uniform(9.78, 9.83)] for _ in range(200)]
    for r, o in zip(rows, run("emw", rows)):
        close(o["rho"], r[0] / (r[2] * r[1]), 1e-14, "emw rho")
        close(o["grad"], r[0] / r[1], 1e-14, "emw grad")

    # UCS in MPa from the compilation's forms (dt us/ft, vp m/s, E GPa)
    forms = [
        lambda d, v, r, e, p: 0.035 * v - 31.5,
        lambda d, v, r, e, p: 1200 * math.exp(-0.036 * d),
        lambda d, v, r, e, p: 1.4138e7 * d ** -3,
        lambda d, v, r, e, p: 1.745e-9 * r * v * v - 21,
        lambda d, v, r, e, p: 2.28 + 4.1089 * e,
        lambda d, v, r, e, p: 254 * (1 - 2.7 * p) ** 2,
        lambda d, v, r, e, p: 0.77 * (304.8 / d) ** 2.93,
        lambda d, v, r, e, p: 0.43 * (304.8 / d) ** 3.2,
        lambda d, v, r, e, p: 1.35 * (304.8 / d) ** 2.6,
        lambda d, v, r, e, p: 0.5 * (304.8 / d) ** 3,
        lambda d, v, r, e, p: 10 * (304.8 / d - 1),
        lambda d, v, r, e, p: 7.97 * e ** 0.91,
        lambda d, v, r, e, p: 2.922 * p ** -0.96,
    ]
    rows, want = [], []
    for i, f in enumerate(forms):
        for _ in range(20):
            vp = RNG.uniform(1800, 5000)
            d = 1e6 / vp * 0.3048  # us/ft
            r = RNG.uniform(2000, 2650)
            e = RNG.uniform(1, 30)
            p = RNG.uniform(0.05, 0.33)
            rows.append([i, d * US_FT, vp, r, math.nan, e * 1e9, p])
            want.append(f(d, vp, r, e, p))
    for r, w, o in zip(rows, want, run("ucs", rows)):
        if w > 0:
            close(o["value"], w * 1e6, 1e-12, "ucs %d" % r[0])
        else:
            check(o["status"] == 2 and o["value"] is None,
                  "ucs %d non-positive is an error" % r[0])
    rows = [[0, math.nan, math.nan, math.nan, RNG.uniform(5e9, 90e9),
             math.nan, math.nan] for _ in range(50)] + \
           [[1, math.nan, RNG.uniform(1800, 3600), math.nan, math.nan,
             math.nan, math.nan] for _ in range(50)]
    for r, o in zip(rows, run("estat", rows)):
        w = 0.74 * r[4] / 1e9 - 0.82 if r[0] == 0 else \
            0.076 * (r[2] / 1000.0) ** 3.23
        close(o["value"], w * 1e9, 1e-12, "static E %d" % r[0])


def main():
    if not os.path.exists(DUMP):
        print("missing", DUMP)
        return 1
    test_overburden()
    test_hydrostatic()
    test_eaton()
    test_bowers()
    test_fracture()
    test_trend()
    test_emw_strength()
    print("%d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
