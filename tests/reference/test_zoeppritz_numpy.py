"""Cross-check of the core's exact P-wave coefficients against an
independent numpy solution of the plane-wave boundary-value problem.

The boundary conditions at a welded interface (Aki & Richards 1980, sec.
5.2.3: continuity of displacement u_x, u_z and traction s_xz, s_zz; at a
fluid side s_xz = 0 and u_x may slip) are written here as a linear system
from the plane-wave displacements and stresses and solved with
numpy.linalg.solve: 4x4 solid/solid, 3x3 fluid/solid and solid/fluid, 2x2
fluid/fluid. Conventions: z down, exp(-i w t), vertical slowness with
Im(q) >= 0 past critical, P polarisation along the ray, SV polarisation
(cos j, -sin j) downgoing and (cos j, sin j) upgoing, displacement
amplitudes. The C core uses the explicit Aki & Richards eq. 5.39 formulas
for solids, so agreement checks both the formulas and the branch choice.

Tolerance: |core - numpy| <= 1e-9 * max(1, |numpy|) per complex
coefficient; both are double precision and well conditioned away from
the critical angles, so the bound leaves room for rounding only.

Run by /usr/bin/python3 with RW_BUILD set (the dump is
$RW_BUILD/zoeppritz_dump). Prints "N passed, 0 failed"; exit 1 on
failure."""
import json
import os
import subprocess
import sys

import numpy as np

TOL = 1e-9


def vslow(v, p):
    s = 1.0 / v**2 - p**2
    return complex(np.sqrt(s)) if s >= 0 else 1j * np.sqrt(-s)


def p_wave(rho, a, b, p, up):
    """(u_x, u_z, s_xz, s_zz) / (i w) of a unit P wave, up or down."""
    q = vslow(a, p)
    sg = -1.0 if up else 1.0
    return np.array([a * p, sg * a * q, sg * 2 * rho * b**2 * a * p * q,
                     rho * a * (1 - 2 * b**2 * p**2)])


def s_wave(rho, b, p, up):
    """(u_x, u_z, s_xz, s_zz) / (i w) of a unit SV wave, up or down."""
    q = vslow(b, p)
    sg = -1.0 if up else 1.0
    return np.array([b * q, -sg * b * p, sg * rho * b * (1 - 2 * b**2 * p**2),
                     -2 * rho * b**3 * p * q])


def solve(vp1, vs1, r1, vp2, vs2, r2, th):
    p = np.sin(th) / vp1
    z1 = r1 * vp1
    sc = np.array([1.0, 1.0, 1.0 / z1, 1.0 / z1])  # dimensionless rows
    inc = p_wave(r1, vp1, vs1, p, False) * sc
    # columns: reflected P, reflected S, transmitted P, transmitted S;
    # rows: sum(reflected) - sum(transmitted) = -incident
    cols = [p_wave(r1, vp1, vs1, p, True) * sc]
    names = ["rpp"]
    if vs1 > 0:
        cols.append(s_wave(r1, vs1, p, True) * sc)
        names.append("rps")
    cols.append(-p_wave(r2, vp2, vs2, p, False) * sc)
    names.append("tpp")
    if vs2 > 0:
        cols.append(-s_wave(r2, vs2, p, False) * sc)
        names.append("tps")
    m = np.array(cols, dtype=complex).T
    rhs = -inc.astype(complex)
    # u_x slips at a fluid side: drop it. A fluid wave has no s_xz, so the
    # s_xz row then says "shear traction on the solid side is zero"; with
    # two fluids it is empty and dropped too.
    if vs1 > 0 and vs2 > 0:
        rows = [0, 1, 2, 3]
    elif vs1 > 0 or vs2 > 0:
        rows = [1, 2, 3]
    else:
        rows = [1, 3]
    x = np.linalg.solve(m[rows], rhs[rows])
    out = {"rpp": 0j, "rps": 0j, "tpp": 0j, "tps": 0j}
    for n, v in zip(names, x):
        out[n] = v
    return out


def interfaces(rng, n):
    rows = []
    for i in range(n):
        vp1, vp2 = rng.uniform(1400, 6000, 2)
        vs1 = 0.0 if i % 5 == 1 else vp1 * rng.uniform(0.3, 0.8)
        vs2 = 0.0 if i % 5 == 2 else vp2 * rng.uniform(0.3, 0.8)
        if i % 10 == 3:
            vs1 = vs2 = 0.0
        r1, r2 = rng.uniform(1000, 2900, 2)
        # half the angles past the P critical angle where one exists
        if vp2 > vp1 and i % 2:
            tc = np.arcsin(vp1 / vp2)
            th = rng.uniform(tc, np.pi / 2)
        else:
            th = rng.uniform(0, np.pi / 2)
        rows.append([vp1, vs1, r1, vp2, vs2, r2, th])
    return rows


def run_dump(exe, rows):
    if rows is None:
        res = subprocess.run([exe], capture_output=True, text=True,
                             timeout=120)
    else:
        text = "".join(" ".join(repr(float(v)) for v in r) + "\n"
                       for r in rows)
        res = subprocess.run([exe, "-"], input=text, capture_output=True,
                             text=True, timeout=120)
    if res.returncode != 0:
        raise RuntimeError("dump failed: " + res.stderr)
    return [json.loads(l) for l in res.stdout.splitlines() if l.strip()]


def main():
    exe = os.path.join(os.environ["RW_BUILD"], "zoeppritz_dump")
    rng = np.random.default_rng(20261201)
    passed = failed = 0
    post = 0
    results = run_dump(exe, interfaces(rng, 3000)) + run_dump(exe, None)
    for rec in results:
        vp1, vs1, r1, vp2, vs2, r2, th = rec["in"]
        if rec["status"] != 0:
            failed += 1
            print("FAIL status", rec)
            continue
        if vp2 > vp1 and np.sin(th) > vp1 / vp2:
            post += 1
        ref = solve(vp1, vs1, r1, vp2, vs2, r2, th)
        ok = True
        for k in ("rpp", "rps", "tpp", "tps"):
            got = complex(rec[k][0], rec[k][1])
            if abs(got - ref[k]) > TOL * max(1.0, abs(ref[k])):
                ok = False
                print("FAIL", k, rec["in"], got, ref[k])
        if ok:
            passed += 1
        else:
            failed += 1
    # impossible media must be refused with nulls
    bad = [[3000, 1500, -1, 3000, 1500, 2300, 0.2],
           [3000, 2700, 2300, 3000, 1500, 2300, 0.2],
           [0, 0, 2300, 3000, 1500, 2300, 0.2],
           [3000, 1500, 2300, 3000, 1500, 2300, -0.1]]
    for rec in run_dump(exe, bad):
        if rec["status"] != 0 and rec["rpp"] == [None, None]:
            passed += 1
        else:
            failed += 1
            print("FAIL bad input accepted", rec)
    if post < 500:
        failed += 1
        print("FAIL too few post-critical cases:", post)
    print("%d passed, %d failed" % (passed, failed))
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
