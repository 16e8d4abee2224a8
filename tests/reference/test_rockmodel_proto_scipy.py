"""Checks rock.model, rock.template, rock.invert and rock.pressure_fit
through the daemon (rockwired --stdio) against the independent
numpy/scipy implementation of tests/reference/test_rockmodel_scipy.py,
on random inputs sent in field units (psi, ft/s, kg/m3, Pa):

- rock.model: the closed forms (Hertz-Mindlin, Walton, soft and stiff
  sand, contact and constant cement, critical porosity, Krief, Kuster-
  Toksoz) typed again from the published formulas, DEM integrated with
  scipy's solve_ivp (DOP853), Gassmann 1951 and Wood 1955 in numpy; the
  protocol adds the units, the broadcasting and the fluid mixing.
- rock.template: every node and both iso-line sets against the same
  numpy model.
- rock.invert: the estimate and misfit against scipy.optimize.
  least_squares (trust-region reflective, 3-point Jacobian) on the numpy
  model, for brine-rich sands where the minimum is unique.
- rock.pressure_fit: parameters and standard deviations against
  scipy.optimize.curve_fit; the prediction's standard deviation against
  the linear propagation g^T C g of curve_fit's covariance.

Tolerances (relative unless said): closed forms 1e-11 (double
arithmetic in another order, unit factors, 15 printed digits); DEM 1e-8
(both integrators near 1e-12); inversion estimates 2e-5 absolute and
misfit 1e-6 absolute (as in test_rockmodel_scipy.py: the core's
Jacobian is a one-sided difference); pressure fit 1e-6, sd 1e-4 (two
least-squares codes at the same minimum). Where the reference module
says "from memory" (contact-cement coefficients), so does this check.

Run by /usr/bin/python3 with RW_BUILD set. Prints "N passed, M failed";
exit 1 on failure."""
import importlib.util
import json
import os
import subprocess
import sys

import numpy as np
from scipy.optimize import curve_fit, least_squares

HERE = os.path.dirname(os.path.abspath(__file__))
spec = importlib.util.spec_from_file_location(
    "rmref", os.path.join(HERE, "test_rockmodel_scipy.py"))
ref = importlib.util.module_from_spec(spec)
spec.loader.exec_module(ref)

BUILD = os.environ.get("RW_BUILD", "build")
PSI_PA = 0.45359237 * 9.80665 / 0.0254**2  # NIST SP 811, exact
FT = 0.3048
GPA = 1e9
QZ = (36.6e9, 45.0e9, 2650.0)  # the core's quartz row
CLAY = (21.0e9, 7.0e9, 2600.0)  # the core's clay row

FIELD_UNITS = {"pressure": "psi", "velocity": "ft/s", "density": "kg/m3",
               "modulus": "Pa", "impedance": "kg/m2s",
               "modulus_density": "Pa*kg/m3"}


def rpc(reqs):
    lines = "".join(json.dumps(dict(jsonrpc="2.0", id=i, method=m,
                                    params=p)) + "\n"
                    for i, (m, p) in enumerate(reqs))
    p = subprocess.run([os.path.join(BUILD, "rockwired"), "--stdio"],
                       input=lines.encode(), capture_output=True,
                       timeout=240, check=True)
    out = [json.loads(x) for x in p.stdout.decode().splitlines()]
    for o in out:
        if "result" not in o:
            sys.exit("daemon error: %s" % o)
    return [o["result"] for o in out]


def arr(v):
    return np.array([np.nan if x is None else x for x in np.ravel(v)],
                    float)


def wood(sw, kb, kh):
    return 1 / (sw / kb + (1 - sw) / kh)


def dry(model, phi, p, prm):
    k, mu = QZ[0], QZ[1]
    c, phic = prm["coordination"], prm.get("phi_c", 0.4)
    if model == "hertz_mindlin":
        return ref.hertz_mindlin(k, mu, phi, c, p, prm["slip"])
    if model == "walton_rough":
        return ref.walton(k, mu, phi, c, p, True)
    if model in ("soft_sand", "stiff_sand"):
        return ref.sand(k, mu, phi, phic, c, p, prm["slip"],
                        model == "stiff_sand")
    if model == "contact_cement":
        return ref.contact_cement(k, mu, k, mu, phi, phic, c, 1)
    if model == "constant_cement":
        return ref.constant_cement(k, mu, k, mu, phi, prm["phi_b"], phic,
                                   c, 1)
    if model == "critical_porosity":
        return ref.critical(k, mu, phi, phic)
    if model == "krief":
        return ref.krief(k, mu, phi)
    if model == "kuster_toksoz":
        return ref.kuster_toksoz(k, mu, [(0.0, 0.0, phi, prm["aspect"], 4)])
    if model == "dem":
        return ref.dem(k, mu, [(0.0, 0.0, phi, prm["aspect"], 4)])
    raise ValueError(model)


# which request fields each model takes here
TAKES = {
    "hertz_mindlin": ("coordination", "slip"),
    "walton_rough": ("coordination",),
    "soft_sand": ("phi_c", "coordination", "slip"),
    "stiff_sand": ("phi_c", "coordination", "slip"),
    "contact_cement": ("phi_c", "coordination"),
    "constant_cement": ("phi_c", "coordination", "phi_b"),
    "critical_porosity": ("phi_c",),
    "krief": (),
    "kuster_toksoz": ("aspect",),
    "dem": ("aspect",),
}
PRESSURE = ("hertz_mindlin", "walton_rough", "soft_sand", "stiff_sand")


def rock(model, phi, sw, p, prm, kb, rb, kh, rh):
    kd, md = dry(model, phi, p, prm)
    return [kd, md] + ref.gassmann_sat(kd, md, phi, QZ[0], QZ[2],
                                       wood(sw, kb, kh),
                                       sw * rb + (1 - sw) * rh)


def check_model(t, rng):
    reqs, want = [], []
    for model in TAKES:
        for _ in range(4):
            prm = {"coordination": rng.uniform(6, 11),
                   "slip": rng.uniform(0.3, 1.0),
                   "phi_c": rng.uniform(0.36, 0.42),
                   "aspect": rng.uniform(0.08, 0.5)}
            prm["phi_b"] = prm["phi_c"] - rng.uniform(0.02, 0.06)
            top = {"contact_cement": prm["phi_c"] - 0.005,
                   "constant_cement": prm["phi_b"],
                   "critical_porosity": prm["phi_c"] - 0.01,
                   "kuster_toksoz": 0.15}.get(model, 0.35)
            n = 5
            phi = rng.uniform(0.02, top, n)
            sw = rng.uniform(0, 1, n)
            p = rng.uniform(5e6, 40e6, n)
            kb, rb = rng.uniform(2.2, 3.0) * GPA, rng.uniform(1000, 1100)
            kh, rh = rng.uniform(0.02, 1.2) * GPA, rng.uniform(100, 800)
            par = {"model": model, "porosity": phi.tolist(),
                   "sw": sw.tolist(), "units": FIELD_UNITS,
                   "brine": {"k": kb, "rho": rb},
                   "hydrocarbon": {"k": kh, "rho": rh}}
            for f in TAKES[model]:
                par[f] = prm[f]
            if model in PRESSURE:
                par["p_eff"] = (p / PSI_PA).tolist()
            if model in ("dem", "kuster_toksoz"):
                par["pore_shape"] = "spheroid"
            reqs.append(("rock.model", par))
            want.append([rock(model, phi[i], sw[i], p[i], prm, kb, rb, kh,
                              rh) for i in range(n)])
    for (m, par), res, w in zip(reqs, rpc(reqs), want):
        w = np.array(w)
        tol = 1e-8 if par["model"] == "dem" else 1e-11
        t.check(not any(arr(res["qc"]).astype(int) & (1 << 0)),
                "qc of %s" % par["model"])
        t.rel(arr(res["k_dry"]), w[:, 0], tol, par["model"] + " k_dry")
        t.rel(arr(res["mu_dry"]), w[:, 1], tol, par["model"] + " mu_dry")
        t.rel(arr(res["k_sat"]), w[:, 2], tol, par["model"] + " k_sat")
        t.rel(arr(res["rho"]), w[:, 3], 1e-12, par["model"] + " rho")
        t.rel(arr(res["vp"]) * FT, w[:, 4], tol, par["model"] + " vp")
        t.rel(arr(res["vs"]) * FT, w[:, 5], tol, par["model"] + " vs")
        t.rel(arr(res["ai"]), w[:, 6], tol, par["model"] + " ai")
        t.rel(arr(res["vpvs"]), w[:, 8], tol, par["model"] + " vpvs")
        t.rel(arr(res["lambda_rho"]), w[:, 10], 1e-9,
              par["model"] + " lambda_rho")


def check_template(t, rng):
    phis = [0.05, 0.15, 0.25, 0.35]
    sws = [0.0, 0.3, 1.0]
    kb, rb, kh, rh = 2.7e9, 1040.0, 0.08e9, 230.0
    par = {"model": "stiff_sand", "p_eff": 3000, "porosity_axis": phis,
           "sw_axis": sws, "coordination": 8.0, "units": FIELD_UNITS,
           "crossplot": {"x": "ai", "y": "vpvs"},
           "brine": {"k": kb, "rho": rb},
           "hydrocarbon": {"k": kh, "rho": rh}}
    prm = {"coordination": 8.0, "slip": 1.0, "phi_c": 0.4}
    res = rpc([("rock.template", par)])[0]
    p = 3000 * PSI_PA
    ai = np.array(res["ai"])
    for i, phi in enumerate(phis):
        for j, sw in enumerate(sws):
            w = rock("stiff_sand", phi, sw, p, prm, kb, rb, kh, rh)
            t.rel(ai[i][j], w[6], 1e-11, "template ai %g %g" % (phi, sw))
            t.rel(res["vpvs"][i][j], w[8], 1e-11, "template vpvs")
            line = res["iso_porosity"][i]
            t.rel(line["x"][j], w[6], 1e-11, "iso-porosity x")
            t.rel(res["iso_saturation"][j]["y"][i], w[8], 1e-11,
                  "iso-saturation y")


def check_inversion(t, rng):
    reqs, want = [], []
    for _ in range(12):
        phi, sw = rng.uniform(0.06, 0.34), rng.uniform(0.94, 0.985)
        r = ref.soft_sand_rock(phi, sw)
        obs = np.array([r[6], r[8]])
        sig = 0.01 * obs
        obs = obs + rng.normal(0, sig)
        reqs.append(("rock.invert", {
            "model": "soft_sand", "p_eff": 20e6 / PSI_PA,
            "coordination": 9, "profile": 0, "units": FIELD_UNITS,
            "brine": {"k": 2.8e9, "rho": 1030},
            "hydrocarbon": {"k": 0.06e9, "rho": 200},
            "observations": {"ai": obs[0], "vpvs": obs[1]},
            "sigma": {"ai": sig[0], "vpvs": sig[1]}}))

        def res(x, obs=obs, sig=sig):
            q = ref.soft_sand_rock(x[0], x[1])
            return (np.array([q[6], q[8]]) - obs) / sig

        fit = least_squares(res, [0.2, 0.9], bounds=([0.01, 0.0],
                                                     [0.40, 1.0]),
                            jac='3-point', x_scale=[0.1, 0.1],
                            xtol=1e-15, ftol=1e-15, gtol=1e-15)
        want.append((fit.x, 2 * fit.cost))
    for res, (x, chi2) in zip(rpc(reqs), want):
        t.abs([res["porosity"], res["sw"]], x, 2e-5, "inversion estimate")
        t.abs(res["chi2"], chi2, 1e-6, "inversion misfit")


def check_pressure_fit(t, rng):
    reqs, want = [], []
    for i in range(10):
        n = int(rng.integers(6, 14))
        p = np.sort(rng.uniform(1e6, 60e6, n))
        minf = rng.uniform(10, 40) * GPA
        m0 = minf * rng.uniform(0.2, 0.8)
        pc = rng.uniform(5e6, 20e6)
        s = np.full(n, rng.uniform(0.005, 0.02) * minf)
        m = ref.plaw(p, minf, m0, pc) + rng.normal(0, s)
        at = np.array([0.5 * (p[0] + p[-1]), 1.5 * p[-1]])
        par = {"p_eff": (p / PSI_PA).tolist(), "modulus": m.tolist(),
               "at": (at / PSI_PA).tolist(), "units": FIELD_UNITS}
        if i % 2:
            par["sigma"] = {"modulus": s.tolist()}
        reqs.append(("rock.pressure_fit", par))
        popt, pcov = curve_fit(ref.plaw, p, m, p0=[minf, m0, pc],
                               sigma=s if i % 2 else None,
                               absolute_sigma=bool(i % 2), ftol=1e-15,
                               xtol=1e-15, gtol=1e-15, maxfev=20000)
        e = np.exp(-at / popt[2])
        g = np.stack([1 - e, e, -(popt[0] - popt[1]) * e * at /
                      popt[2]**2])
        psd = np.sqrt(np.einsum("ij,ik,kj->j", g, pcov, g))
        want.append((popt, np.sqrt(np.diag(pcov)), psd, p[-1]))
    for res, (popt, sd, psd, phi) in zip(rpc(reqs), want):
        t.rel([res["m_inf"], res["m_0"], res["p_c"] * PSI_PA], popt, 1e-6,
              "pressure fit parameters")
        t.rel([res["m_inf_sd"], res["m_0_sd"], res["p_c_sd"] * PSI_PA], sd,
              1e-4, "pressure fit sd")
        t.rel(res["predicted_sd"], psd, 1e-4, "prediction sd")
        t.check(res["qc"] == [0, 1 << 36], "extrapolation flagged")


def main():
    rng = np.random.default_rng(20240517)
    t = ref.Tally()
    for f in (check_model, check_template, check_inversion,
              check_pressure_fit):
        f(t, rng)
    print("%d passed, %d failed" % (t.passed, t.failed))
    return 1 if t.failed else 0


if __name__ == "__main__":
    sys.exit(main())
