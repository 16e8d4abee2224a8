"""Checks fluid.properties and rock.substitute through the daemon
(rockwired --stdio) against references this project did not write:

  - IAPWS R6-95 (IAPWS-95, Debian's python3-iapws, iapws.IAPWS95(P=MPa,
    T=K): .rho kg/m3, .w m/s): fresh water (salinity 0) on a depth
    profile sent as p and T arrays in one request, in field units (psi,
    degF, kg/m3), within the tolerances measured for the core's Batzle &
    Wang 1992 water in tests/reference/test_fluid_iapws.py (density
    0.35 %, velocity 0.50 % for 20-100 degC, 5-100 MPa). This checks the
    unit conversions and the broadcasting of the protocol on top of the
    core, against an outside reference.
  - Gassmann 1951 in the substitution form of Mavko, Mukerji & Dvorkin
    2009 (section 6.3), which needs no dry-frame step, evaluated here in
    Python and compared with the daemon's k_sat on a gas-saturation
    sweep (explicit fluid arrays) whose brine is IAPWS-95 water and whose
    mix is Wood's 1955 rule.

Run by ctest under /usr/bin/python3 with RW_BUILD set; prints
"N passed, M failed" and exits non-zero on any failure.
"""
import json
import os
import subprocess
import sys

import iapws
import numpy as np

BUILD = os.environ.get("RW_BUILD", "build")
PSI_MPA = 0.45359237 * 9.80665 / 0.0254 ** 2 / 1e6  # NIST SP 811, exact

passed = failed = 0


def check(cond, what):
    global passed, failed
    if cond:
        passed += 1
    else:
        failed += 1
        print("FAIL:", what)


def rpc(*reqs):
    lines = "".join(json.dumps(dict(jsonrpc="2.0", id=i, **r)) + "\n"
                    for i, r in enumerate(reqs))
    p = subprocess.run([os.path.join(BUILD, "rockwired"), "--stdio"],
                       input=lines.encode(), capture_output=True,
                       timeout=60, check=True)
    out = [json.loads(x) for x in p.stdout.decode().splitlines()]
    for o in out:
        if "result" not in o:
            sys.exit("daemon error: %s" % o)
    return [o["result"] for o in out]


# A profile of 20-100 degC, 5-100 MPa (inside B&W's fit), in psi and degF.
grid = [(p, t) for p in (5, 20, 40, 60, 80, 100) for t in (20, 45, 70, 95)]
p_psi = [p / PSI_MPA for p, _ in grid]
t_f = [t * 9 / 5 + 32 for _, t in grid]
(res,) = rpc(dict(method="fluid.properties",
                  params=dict(pressure=p_psi, temperature=t_f,
                              brine=dict(salinity=0),
                              units=dict(pressure="psi", temperature="degF",
                                         density="kg/m3"))))
check(res["n"] == len(grid), "profile length")
check(res["units"]["brine_rho"] == "kg/m3", "density unit reported")
kw = []
for i, (p, t) in enumerate(grid):
    w = iapws.IAPWS95(P=p, T=t + 273.15)
    drho = res["brine_rho"][i] / w.rho - 1
    dv = res["brine_v"][i] / w.w - 1
    check(abs(drho) < 0.0035, "density at %g MPa %g degC: dev %.3f %%"
          % (p, t, 100 * drho))
    check(abs(dv) < 0.0050, "velocity at %g MPa %g degC: dev %.3f %%"
          % (p, t, 100 * dv))
    check(res["qc"][i] == 0, "no flag inside the fit at %g, %g" % (p, t))
    kw.append(w.rho * w.w ** 2)

# Gassmann sweep against the substitution form.
p, t = 30.0, 70.0
w = iapws.IAPWS95(P=p, T=t + 273.15)
k_w, rho_w = w.rho * w.w ** 2, w.rho
k_g, rho_g = 0.09e9, 240.0
sg = np.linspace(0, 1, 11)
kfl = 1 / ((1 - sg) / k_w + sg / k_g)          # Wood 1955
rfl = (1 - sg) * rho_w + sg * rho_g
vp, vs, rho, phi, km = 3100.0, 1700.0, 2260.0, 0.23, 36.6e9
(sub,) = rpc(dict(method="rock.substitute",
                  params=dict(vp=vp, vs=vs, rho=rho / 1000, porosity=phi,
                              mineral=dict(k=km / 1e9),
                              fluid_in_place=dict(k=k_w / 1e9, rho=rho_w / 1000),
                              fluid_new=dict(k=list(kfl / 1e9),
                                             rho=list(rfl / 1000)))))
mu = rho * vs ** 2
k1 = rho * vp ** 2 - 4 / 3 * mu
for i in range(len(sg)):
    # y2 - kf2/(phi (km - kf2)) = y1 - kf1/(phi (km - kf1)), y = K/(km-K)
    rhs = k1 / (km - k1) - k_w / (phi * (km - k_w)) + \
        kfl[i] / (phi * (km - kfl[i]))
    k2 = rhs * km / (1 + rhs)
    got = sub["k_sat"][i] * 1e9
    check(abs(got / k2 - 1) < 1e-9, "k_sat at Sg %.1f: %g vs %g"
          % (sg[i], got, k2))
    check(abs(sub["rho"][i] * 1000 - (rho + phi * (rfl[i] - rho_w)))
          < 1e-9 * rho, "density mass balance at Sg %.1f" % sg[i])

print("%d passed, %d failed" % (passed, failed))
sys.exit(1 if failed else 0)
