"""Cross-check of the core's rock models (rockwire/rockmodel.h) against an
independent numpy/scipy implementation on random inputs.

What is independent of the C code, and what is not:
- Berryman's general-spheroid P and Q are checked against the Eshelby
  tensor of a spheroid integrated numerically (Mura 1987, eq. 11.x form
  S_ijkl = 1/(8 pi) C_mnkl int (G_imjn + G_jmin), G from the inverse
  Christoffel matrix; from memory) and the dilute strain-concentration
  tensor T = (I + S C0^-1 (C1 - C0))^-1 (Wu 1966), P = T_iijj / 3,
  Q = (T_ijij - T_iijj / 3) / 5: a different route to the same numbers.
  The quadrature is checked against Eshelby's sphere first.
- The self-consistent equations are solved with scipy.optimize.fsolve
  (MINPACK's hybrid Powell method on log moduli), DEM and Xu-White with
  scipy.integrate.solve_ivp (DOP853), the pressure law with
  scipy.optimize.curve_fit and the inversion with
  scipy.optimize.least_squares (trust-region reflective, its own
  Jacobian): different algorithms from the GSL ones in the core.
- The closed forms (Hertz-Mindlin, Walton, the sand bounds, contact and
  constant cement, critical porosity, Krief, Gassmann, Wood) are typed
  again here from the published formulas. That checks the C coding,
  not the coefficients themselves: where the C code says "from memory",
  so does this file (contact-cement coefficients in particular).

Tolerances (relative unless said): closed forms 1e-12 (double
arithmetic in a different order); spheroid P, Q against the quadrature
1e-9 (the quadrature agrees with the closed form to about 1e-11 from
a = 0.001 to 300); KT 1e-11; self-consistent 1e-9 (both solvers at
1e-12 or better); DEM and Xu-White 1e-8 (both integrators at
tolerances of 1e-12, global errors of the order of 1e-11); pressure
fit parameters 1e-6 and sd 1e-4 (two least-squares codes converging to
the same minimum); inversion estimates 2e-5 absolute, misfit 1e-6
absolute, sd 2e-3 (the core's Jacobian is a one-sided difference).

Run by /usr/bin/python3 with RW_BUILD set (the dump is
$RW_BUILD/rockmodel_dump). Prints "N passed, M failed"; exit 1 on
failure."""
import json
import os
import subprocess
import sys

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import curve_fit, fsolve, least_squares

GPA = 1e9
MINERALS = [(36.6, 45.0), (76.8, 32.0), (94.9, 45.0), (21.0, 7.0),
            (75.6, 25.6), (56.1, 29.1)]  # the core's table rows, GPa


class Tally:
    def __init__(self):
        self.passed = 0
        self.failed = 0

    def check(self, ok, what):
        if ok:
            self.passed += 1
        else:
            self.failed += 1
            print("FAIL", what)

    def rel(self, got, want, tol, what):
        got = np.asarray(got, float)
        want = np.asarray(want, float)
        ok = bool(np.all(np.abs(got - want) <= tol * np.abs(want)))
        self.check(ok, "%s: got %r want %r (rel tol %g)"
                   % (what, got.tolist(), want.tolist(), tol))

    def abs(self, got, want, tol, what):
        ok = bool(np.all(np.abs(np.asarray(got) - np.asarray(want)) <= tol))
        self.check(ok, "%s: got %r want %r (abs tol %g)"
                   % (what, got, want, tol))


def run_dump(lines):
    exe = os.path.join(os.environ["RW_BUILD"], "rockmodel_dump")
    text = "".join(" ".join(l[:1] + [repr(float(v)) for v in l[1:]])
                   + "\n" for l in lines)
    res = subprocess.run([exe], input=text, capture_output=True, text=True,
                         timeout=240)
    if res.returncode != 0:
        raise RuntimeError("dump failed: " + res.stderr)
    out = [json.loads(l) for l in res.stdout.splitlines() if l.strip()]
    if len(out) != len(lines):
        raise RuntimeError("dump answered %d of %d lines"
                           % (len(out), len(lines)))
    return out


def vals(rec):
    return np.array([np.nan if v is None else v for v in rec["out"]])


# ---- the formulas -------------------------------------------------------

def poisson(k, mu):
    return (3 * k - 2 * mu) / (2 * (3 * k + mu))


def zeta(k, mu):
    return mu / 6 * (9 * k + 8 * mu) / (k + 2 * mu)


def hertz_mindlin(k, mu, phi, c, p, f):
    """Mindlin 1949 (Mavko, Mukerji & Dvorkin 2009 sec. 5.4), slip f."""
    nu = poisson(k, mu)
    kk = (c**2 * (1 - phi)**2 * mu**2 * p
          / (18 * np.pi**2 * (1 - nu)**2))**(1 / 3)
    mm = ((2 + 3 * f - nu * (1 + 3 * f)) / (5 * (2 - nu))
          * (3 * c**2 * (1 - phi)**2 * mu**2 * p
             / (2 * np.pi**2 * (1 - nu)**2))**(1 / 3))
    return kk, mm


def walton(k, mu, phi, c, p, rough):
    """Walton 1987 in the A, B form of Mavko et al. 2009 sec. 5.4."""
    lam = k - 2 * mu / 3
    a = (1 / mu - 1 / (mu + lam)) / (4 * np.pi)
    b = (1 / mu + 1 / (mu + lam)) / (4 * np.pi)
    kk = (3 * (1 - phi)**2 * c**2 * p / (np.pi**4 * b**2))**(1 / 3) / 6
    mm = 0.6 * kk * ((5 * b + a) / (2 * b + a) if rough else 1.0)
    return kk, mm


def mhs(f1, k1, m1, k2, m2, mref, zref):
    a = 4 / 3 * mref
    kk = 1 / (f1 / (k1 + a) + (1 - f1) / (k2 + a)) - a
    mm = 1 / (f1 / (m1 + zref) + (1 - f1) / (m2 + zref)) - zref
    return kk, mm


def sand(k, mu, phi, phic, c, p, f, stiff):
    """Dvorkin & Nur 1996 soft sand, Gal et al. 1998 stiff sand."""
    kh, mh = hertz_mindlin(k, mu, phic, c, p, f)
    if phi > phic:
        return mhs((1 - phi) / (1 - phic), kh, mh, 0.0, 0.0, mh,
                   zeta(kh, mh))
    if stiff:
        return mhs(phi / phic, kh, mh, k, mu, mu, zeta(k, mu))
    return mhs(phi / phic, kh, mh, k, mu, mh, zeta(kh, mh))


def contact_cement(k, mu, kc, muc, phi, phic, c, scheme):
    """Dvorkin & Nur 1996 / Dvorkin, Nur & Yin 1994 (coefficients from
    memory, as in the core)."""
    nu, nuc = poisson(k, mu), poisson(kc, muc)
    if scheme == 1:
        al = 2 * ((phic - phi) / (3 * c * (1 - phic)))**0.25
    else:
        al = (2 * (phic - phi) / (3 * (1 - phic)))**0.5
    ln = 2 * muc * (1 - nu) * (1 - nuc) / (np.pi * mu * (1 - 2 * nuc))
    lt = muc / (np.pi * mu)
    sn = (-0.024153 * ln**-1.3646 * al**2 + 0.20405 * ln**-0.89008 * al
          + 0.00024649 * ln**-1.9864)
    at = -1e-2 * (2.26 * nu**2 + 2.07 * nu + 2.3) * lt**(
        0.079 * nu**2 + 0.1754 * nu - 1.342)
    bt = (0.0573 * nu**2 + 0.0937 * nu + 0.202) * lt**(
        0.0274 * nu**2 + 0.0529 * nu - 0.8765)
    ct = 1e-4 * (9.654 * nu**2 + 4.945 * nu + 3.1) * lt**(
        0.01867 * nu**2 + 0.4011 * nu - 1.8186)
    st = at * al**2 + bt * al + ct
    kd = c * (1 - phic) * (kc + 4 / 3 * muc) * sn / 6
    return kd, 0.6 * kd + 0.15 * c * (1 - phic) * muc * st


def constant_cement(k, mu, kc, muc, phi, phib, phic, c, scheme):
    """Avseth et al. 2000."""
    kb, mb = contact_cement(k, mu, kc, muc, phib, phic, c, scheme)
    return mhs(phi / phib, kb, mb, k, mu, mb, zeta(kb, mb))


def critical(k, mu, phi, phic):
    """Nur et al. 1998."""
    f = max(0.0, 1 - phi / phic)
    return k * f, mu * f


def krief(k, mu, phi):
    """Krief et al. 1990 (exponent 3 from memory)."""
    f = (1 - phi)**(3 / (1 - phi))
    return k * f, mu * f


def pq_closed(shape, a, km, mm, ki, mi):
    """Berryman 1980 closed forms (Mavko et al. 2009 sec. 4.8)."""
    if shape == 0:
        return ((km + 4 / 3 * mm) / (ki + 4 / 3 * mm),
                (mm + zeta(km, mm)) / (mi + zeta(km, mm)))
    if shape == 1:
        g = mm * (3 * km + mm) / (3 * km + 7 * mm)
        return ((km + mm + mi / 3) / (ki + mm + mi / 3),
                0.2 * (4 * mm / (mm + mi) + 2 * (mm + g) / (mi + g)
                       + (ki + 4 / 3 * mm) / (ki + mm + mi / 3)))
    if shape == 2:
        z = zeta(ki, mi)
        return ((km + 4 / 3 * mi) / (ki + 4 / 3 * mi),
                (mm + z) / (mi + z))
    b = mm * (3 * km + mm) / (3 * km + 4 * mm)
    return ((km + 4 / 3 * mi) / (ki + 4 / 3 * mi + np.pi * a * b),
            0.2 * (1 + 8 * mm / (4 * mi + np.pi * a * (mm + 2 * b))
                   + 2 * (ki + 2 / 3 * (mi + mm))
                   / (ki + 4 / 3 * mi + np.pi * a * b)))


def pq_berryman(a, km, mm, ki, mi):
    """Berryman's F1..F9 form, typed again (used inside the ODE and
    fixed-point references for speed; checked against the quadrature
    below)."""
    if abs(a - 1) < 1e-6:
        return pq_closed(0, 1, km, mm, ki, mi)
    if a < 1:
        th = a / (1 - a * a)**1.5 * (np.arccos(a) - a * np.sqrt(1 - a * a))
    else:
        th = a / (a * a - 1)**1.5 * (a * np.sqrt(a * a - 1) - np.arccosh(a))
    f = a * a / (1 - a * a) * (3 * th - 2)
    A = mi / mm - 1
    B = (ki / km - mi / mm) / 3
    R = 3 * mm / (3 * km + 4 * mm)
    F1 = 1 + A * (1.5 * (f + th) - R * (1.5 * f + 2.5 * th - 4 / 3))
    F2 = (1 + A * (1 + 1.5 * (f + th) - R / 2 * (3 * f + 5 * th))
          + B * (3 - 4 * R) + A / 2 * (A + 3 * B) * (3 - 4 * R)
          * (f + th - R * (f - th + 2 * th * th)))
    F3 = 1 + A * (1 - (f + 1.5 * th) + R * (f + th))
    F4 = 1 + A / 4 * (f + 3 * th - R * (f - th))
    F5 = A * (-f + R * (f + th - 4 / 3)) + B * th * (3 - 4 * R)
    F6 = 1 + A * (1 + f - R * (f + th)) + B * (1 - th) * (3 - 4 * R)
    F7 = (2 + A / 4 * (3 * f + 9 * th - R * (3 * f + 5 * th))
          + B * th * (3 - 4 * R))
    F8 = (A * (1 - 2 * R + f / 2 * (R - 1) + th / 2 * (5 * R - 3))
          + B * (1 - th) * (3 - 4 * R))
    F9 = A * ((R - 1) * f - R * th) + B * th * (3 - 4 * R)
    tiijj = 3 * F1 / F2
    tijij = tiijj / 3 + 2 / F3 + 1 / F4 + (F4 * F5 + F6 * F7 - F8 * F9) / (
        F2 * F4)
    return tiijj / 3, (tijij - tiijj / 3) / 5


def pq(shape, a, km, mm, ki, mi):
    if shape == 4:
        return pq_berryman(a, km, mm, ki, mi)
    return pq_closed(shape, a, km, mm, ki, mi)


# Eshelby tensor by quadrature ------------------------------------------

def ciso(k, mu):
    lam = k - 2 * mu / 3
    d = np.eye(3)
    return (lam * np.einsum('ij,kl->ijkl', d, d)
            + mu * (np.einsum('ik,jl->ijkl', d, d)
                    + np.einsum('il,jk->ijkl', d, d)))


def z_nodes(a, n=24):
    """Gauss-Legendre panels on [-1, 1] in z = cos(polar angle), refined
    where a thin (a < 1) or long (a > 1) spheroid's integrand lives."""
    if a < 1:
        edges = [0.0]
        e = a / 8
        while e < 1.0:
            edges.append(e)
            e *= 4
        edges.append(1.0)
    else:
        u = [1.0]
        e = 1.0 / (8 * a * a)
        while e < 1.0:
            u.append(e)
            e *= 4
        u.append(0.0)
        edges = sorted(1.0 - np.array(u))
    x, w = np.polynomial.legendre.leggauss(n)
    zs, ws = [], []
    for lo, hi in zip(edges[:-1], edges[1:]):
        zs.append(lo + (hi - lo) * (x + 1) / 2)
        ws.append(w * (hi - lo) / 2)
    z = np.concatenate(zs)
    w = np.concatenate(ws)
    return np.concatenate([-z[::-1], z]), np.concatenate([w[::-1], w])


def eshelby(a, k, mu, n=24, nw=32):
    c = ciso(k, mu)
    z, wz = z_nodes(a, n)
    om = np.linspace(0, 2 * np.pi, nw, endpoint=False)
    zz, oo = np.meshgrid(z, om, indexing='ij')
    w = np.outer(wz, np.full(nw, 2 * np.pi / nw)).reshape(-1)
    s = np.sqrt(1 - zz**2)
    xi = np.stack([s * np.cos(oo), s * np.sin(oo), zz / a],
                  axis=-1).reshape(-1, 3)
    kc = np.einsum('ijkl,nj,nl->nik', c, xi, xi)
    g = np.einsum('n,nij,nk,nl->ijkl', w, np.linalg.inv(kc), xi, xi)
    return (np.einsum('mnkl,imjn->ijkl', c, g)
            + np.einsum('mnkl,jmin->ijkl', c, g)) / (8 * np.pi)


MANDEL = [(0, 0), (1, 1), (2, 2), (1, 2), (0, 2), (0, 1)]


def mandel(t):
    m = np.zeros((6, 6))
    for i, (p, q) in enumerate(MANDEL):
        for j, (r, s) in enumerate(MANDEL):
            m[i, j] = ((np.sqrt(2) if i >= 3 else 1)
                       * (np.sqrt(2) if j >= 3 else 1) * t[p, q, r, s])
    return m


def pq_eshelby(a, km, mm, ki, mi):
    s = mandel(eshelby(a, km, mm))
    c0 = mandel(ciso(km, mm))
    c1 = mandel(ciso(ki, mi))
    t = np.linalg.inv(np.eye(6) + s @ np.linalg.inv(c0) @ (c1 - c0))
    return t[:3, :3].sum() / 3, (np.trace(t) - t[:3, :3].sum() / 3) / 5


# inclusion models --------------------------------------------------------

def kuster_toksoz(km, mm, incl):
    lk = sum(c * (k - km) * pq(sh, a, km, mm, k, m)[0]
             for k, m, c, a, sh in incl)
    lm = sum(c * (m - mm) * pq(sh, a, km, mm, k, m)[1]
             for k, m, c, a, sh in incl)
    ak = km + 4 / 3 * mm
    z = zeta(km, mm)
    return ((km * ak + 4 / 3 * mm * lk) / (ak - lk),
            (mm * (mm + z) + z * lm) / (mm + z - lm))


def self_consistent(phases):
    """Berryman 1980 equations, solved by fsolve on (ln K, ln mu)."""
    kv = sum(c * k for k, m, c, a, sh in phases)
    mv = sum(c * m for k, m, c, a, sh in phases)

    def eqs(x):
        k, m = np.exp(x) * [kv, mv]
        ek = sum(c * (ki - k) * pq(sh, a, k, m, ki, mi)[0]
                 for ki, mi, c, a, sh in phases)
        em = sum(c * (mi - m) * pq(sh, a, k, m, ki, mi)[1]
                 for ki, mi, c, a, sh in phases)
        return [ek / kv, em / mv]

    # MINPACK stops with "no good progress" once steps reach rounding;
    # judge convergence by the residual of the equations instead
    x = fsolve(eqs, [np.log(0.9), np.log(0.9)], xtol=1e-13)
    if np.max(np.abs(eqs(x))) > 1e-13:
        raise RuntimeError("fsolve did not converge: %r" % (eqs(x),))
    return tuple(np.exp(x) * [kv, mv])


def dem(k1, m1, incl):
    ctot = sum(c for k, m, c, a, sh in incl)

    def rhs(t, y):
        k, m = y[0] * k1, y[1] * m1
        dk = dm = 0.0
        for ki, mi, c, a, sh in incl:
            p, q = pq(sh, a, k, m, ki, mi)
            dk += c / ctot * (ki - k) * p
            dm += c / ctot * (mi - m) * q
        return [dk / ((1 - t) * k1), dm / ((1 - t) * m1)]

    sol = solve_ivp(rhs, (0.0, ctot), [1.0, 1.0], method='DOP853',
                    rtol=1e-12, atol=1e-14)
    if not sol.success:
        raise RuntimeError("solve_ivp: " + sol.message)
    return sol.y[0, -1] * k1, sol.y[1, -1] * m1


def gassmann_sat(kd, md, phi, kmin, rmin, kfl, rfl):
    """Gassmann 1951 (Mavko et al. 2009 ch. 6) and the attributes."""
    if phi == 0:
        ks, rho = kd, rmin
    else:
        ks = kd + (1 - kd / kmin)**2 / (phi / kfl + (1 - phi) / kmin
                                        - kd / kmin**2)
        rho = (1 - phi) * rmin + phi * rfl
    vp = np.sqrt((ks + 4 / 3 * md) / rho)
    vs = np.sqrt(md / rho)
    ai, si = rho * vp, rho * vs
    return [ks, rho, vp, vs, ai, si, vp / vs,
            (3 * ks - 2 * md) / (2 * (3 * ks + md)), ai**2 - 2 * si**2,
            si**2]


# ---- checks --------------------------------------------------------------

def rnd_mineral(rng):
    k, m = MINERALS[rng.integers(len(MINERALS))]
    return k * GPA, m * GPA


def check_granular(t, rng):
    lines, want = [], []
    for _ in range(150):
        k, mu = rnd_mineral(rng)
        phi = rng.uniform(0.0, 0.45)
        phic = rng.uniform(0.3, 0.45)
        c = rng.uniform(4, 12)
        p = rng.uniform(0.5e6, 45e6)
        f = rng.uniform(0, 1)
        lines.append(["hm", k, mu, phi, c, p, f])
        want.append(hertz_mindlin(k, mu, phi, c, p, f))
        r = int(rng.integers(2))
        lines.append(["walton", k, mu, phi, c, p, r])
        want.append(walton(k, mu, phi, c, p, r))
        for name, st in (("soft", 0), ("stiff", 1)):
            lines.append([name, k, mu, phi, phic, c, p, f])
            want.append(sand(k, mu, phi, phic, c, p, f, st))
        kc, mc = rnd_mineral(rng)
        pc = phic - rng.uniform(0.0, 0.12)
        sch = int(rng.integers(1, 3))
        lines.append(["cc", k, mu, kc, mc, pc, phic, c, sch])
        want.append(contact_cement(k, mu, kc, mc, pc, phic, c, sch))
        pb = phic - rng.uniform(0.0, 0.08)
        pp = rng.uniform(0, pb)
        lines.append(["constc", k, mu, kc, mc, pp, pb, phic, c, sch])
        want.append(constant_cement(k, mu, kc, mc, pp, pb, phic, c, sch))
        lines.append(["crit", k, mu, phi, phic])
        want.append(critical(k, mu, phi, phic))
        lines.append(["krief", k, mu, phi])
        want.append(krief(k, mu, phi))
    for rec, w in zip(run_dump(lines), want):
        t.check(rec["status"] == 0, "%s status %d" % (rec["fn"],
                                                     rec["status"]))
        t.rel(vals(rec), w, 1e-12, rec["fn"])


def check_pq(t, rng):
    # the quadrature first: Eshelby's sphere (Eshelby 1957)
    k, mu = 36.6 * GPA, 45 * GPA
    nu = poisson(k, mu)
    s = eshelby(1.0, k, mu)
    t.rel([s[0, 0, 0, 0], s[0, 0, 1, 1], s[0, 1, 0, 1]],
          [(7 - 5 * nu) / (15 * (1 - nu)), (5 * nu - 1) / (15 * (1 - nu)),
           (4 - 5 * nu) / (15 * (1 - nu))], 1e-12, "Eshelby sphere")
    lines, want, alt = [], [], []
    for i in range(80):
        km, mm = rnd_mineral(rng)
        a = 10**rng.uniform(-3, 2.5)
        ki, mi = [(0, 0), (rng.uniform(0.02, 3) * GPA, 0),
                  rnd_mineral(rng)][i % 3]
        lines.append(["pq", 4, a, km, mm, ki, mi])
        want.append(pq_eshelby(a, km, mm, ki, mi))
        alt.append(pq_berryman(a, km, mm, ki, mi))
    for rec, w, b in zip(run_dump(lines), want, alt):
        t.rel(vals(rec), w, 1e-9, "spheroid P, Q vs Eshelby quadrature "
              + repr(rec))
        t.rel(b, w, 1e-9, "python F1..F9 vs quadrature")
    lines, want = [], []
    for i in range(120):
        km, mm = rnd_mineral(rng)
        sh = i % 4
        a = 10**rng.uniform(-4, -1)
        ki, mi = [(0, 0), (rng.uniform(0.02, 3) * GPA, 0),
                  rnd_mineral(rng)][i % 3]
        if sh == 2:
            ki, mi = rnd_mineral(rng)
        lines.append(["pq", sh, a, km, mm, ki, mi])
        want.append(pq_closed(sh, a, km, mm, ki, mi))
    for rec, w in zip(run_dump(lines), want):
        t.rel(vals(rec), w, 1e-12, "closed-form P, Q " + repr(rec))


def incl_line(incl):
    out = [len(incl)]
    for k, m, c, a, sh in incl:
        out += [k, m, c, a, sh]
    return out


def rnd_pores(rng, n, cmax, amin):
    incl = []
    for _ in range(n):
        sh = int(rng.choice([0, 1, 4]))
        a = 10**rng.uniform(np.log10(amin), 0.5) if sh == 4 else 1.0
        k = 0.0 if rng.uniform() < 0.5 else rng.uniform(0.05, 3) * GPA
        incl.append((k, 0.0, rng.uniform(0.01, cmax) / n, a, sh))
    return incl


def check_inclusion(t, rng):
    lines, want = [], []
    for _ in range(60):
        km, mm = rnd_mineral(rng)
        incl = rnd_pores(rng, int(rng.integers(1, 4)), 0.3, 0.2)
        lines.append(["kt", km, mm] + incl_line(incl))
        want.append(kuster_toksoz(km, mm, incl))
    for rec, w in zip(run_dump(lines), want):
        t.check(rec["status"] == 0, "kt status")
        t.rel(vals(rec), w, 1e-11, "kt " + repr(rec))
    # self-consistent: mineral spheres and pores, away from percolation
    lines, want = [], []
    for _ in range(40):
        km, mm = rnd_mineral(rng)
        pores = rnd_pores(rng, int(rng.integers(1, 3)), 0.3, 0.15)
        ctot = sum(c for k, m, c, a, sh in pores)
        phases = [(km, mm, 1 - ctot, 1.0, 0)] + pores
        lines.append(["sca", 1e-13] + incl_line(phases))
        want.append(self_consistent(phases))
    for rec, w in zip(run_dump(lines), want):
        t.check(rec["status"] == 0 and rec["warn"] == 0, "sca status "
                + repr(rec))
        t.rel(vals(rec), w, 1e-9, "sca " + repr(rec))
    # DEM and Xu-White against solve_ivp
    lines, want = [], []
    for _ in range(25):
        km, mm = rnd_mineral(rng)
        incl = rnd_pores(rng, int(rng.integers(1, 3)), 0.5, 0.02)
        lines.append(["dem", km, mm, 1e-12] + incl_line(incl))
        want.append(dem(km, mm, incl))
    for _ in range(15):
        km, mm = rnd_mineral(rng)
        phi = rng.uniform(0.02, 0.35)
        vcl = rng.uniform(0, 1)
        a_s, a_c = rng.uniform(0.08, 0.2), rng.uniform(0.02, 0.06)
        lines.append(["xw", km, mm, phi, vcl, a_s, a_c, 1e-12])
        want.append(dem(km, mm, [(0, 0, (1 - vcl) * phi, a_s, 4),
                                 (0, 0, vcl * phi, a_c, 4)]))
    for rec, w in zip(run_dump(lines), want):
        t.check(rec["status"] == 0, "%s status" % rec["fn"])
        t.rel(vals(rec), w, 1e-8, rec["fn"] + " " + repr(rec))


def check_saturation(t, rng):
    lines, want = [], []
    for _ in range(100):
        kmin, mmin = rnd_mineral(rng)
        phi = rng.uniform(0.0, 0.4) if rng.uniform() < 0.9 else 0.0
        kd = rng.uniform(0.05, 0.8) * kmin * (1 - phi)
        md = rng.uniform(0.05, 0.8) * mmin * (1 - phi)
        rmin = rng.uniform(2500, 2900)
        kfl, rfl = rng.uniform(0.02, 3) * GPA, rng.uniform(100, 1100)
        lines.append(["sat", kd, md, phi, kmin, rmin, kfl, rfl])
        want.append(gassmann_sat(kd, md, phi, kmin, rmin, kfl, rfl))
    for rec, w in zip(run_dump(lines), want):
        t.check(rec["status"] == 0, "sat status")
        t.rel(vals(rec), w, 1e-12, "sat " + repr(rec))


def plaw(p, minf, m0, pc):
    return minf - (minf - m0) * np.exp(-p / pc)


def check_pressure_fit(t, rng):
    lines, want = [], []
    for i in range(30):
        n = int(rng.integers(6, 16))
        p = np.sort(rng.uniform(1e6, 70e6, n))
        minf = rng.uniform(10, 40) * GPA
        m0 = minf * rng.uniform(0.2, 0.8)
        pc = rng.uniform(5e6, 25e6)
        s = np.full(n, rng.uniform(0.005, 0.02) * minf)
        m = plaw(p, minf, m0, pc) + rng.normal(0, s)
        weighted = i % 2
        row = ["pfit", n, weighted]
        for j in range(n):
            row += [p[j], m[j], s[j]]
        lines.append(row)
        popt, pcov = curve_fit(plaw, p, m, p0=[minf, m0, pc],
                               sigma=s if weighted else None,
                               absolute_sigma=bool(weighted),
                               ftol=1e-15, xtol=1e-15, gtol=1e-15,
                               maxfev=20000)
        want.append((popt, np.sqrt(np.diag(pcov))))
    for rec, (popt, sd) in zip(run_dump(lines), want):
        o = vals(rec)
        t.check(rec["status"] == 0, "pfit status")
        t.rel(o[:3], popt, 1e-6, "pfit parameters")
        t.rel(np.sqrt(o[[3, 7, 11]]), sd, 1e-4, "pfit sd")


# the shared invented sand of the unit tests (tests/unit/rm_check.h)
SPEC = [3, 36.6e9, 45e9, 2650, 21e9, 7e9, 2600, 2, 0.40, 9.0, 1.0,
        36.6e9, 45e9, 1, 0.34, 4, 0.1, 0.03, 1e-10, 2.8e9, 1030.0,
        0.06e9, 200.0, 0, 3.0]


def soft_sand_rock(phi, sw, p=20e6):
    """Soft sand, Wood's brine-gas mix (Wood 1955), Gassmann."""
    k, mu, rho = 36.6e9, 45e9, 2650.0
    kd, md = sand(k, mu, phi, 0.4, 9.0, p, 1.0, 0)
    kfl = 1 / (sw / 2.8e9 + (1 - sw) / 0.06e9)
    rfl = sw * 1030.0 + (1 - sw) * 200.0
    return [kd, md] + gassmann_sat(kd, md, phi, k, rho, kfl, rfl)


def check_eval(t, rng):
    lines, want = [], []
    for _ in range(60):
        phi, sw = rng.uniform(0.01, 0.4), rng.uniform(0, 1)
        lines.append(["eval"] + SPEC + [phi, sw, 0.0, 20e6])
        want.append(soft_sand_rock(phi, sw))
    for rec, w in zip(run_dump(lines), want):
        t.check(rec["status"] == 0, "eval status")
        t.rel(vals(rec), w, 1e-12, "eval soft sand " + repr(rec))


def check_inversion(t, rng):
    """Noisy AI and Vp/Vs of brine-rich soft sands, where the minimum is
    unique: the core's estimate against least_squares from its own
    start; sd against (J^T J)^-1 of least_squares' 3-point Jacobian."""
    lines, want = [], []
    for _ in range(25):
        phi, sw = rng.uniform(0.06, 0.34), rng.uniform(0.94, 0.985)
        r = soft_sand_rock(phi, sw)
        obs = np.array([r[6], r[8]])  # ai, vpvs
        sig = 0.01 * obs
        obs = obs + rng.normal(0, sig)
        lines.append(["inv"] + SPEC + [
            2, 3, 5, 0, 0.01, 0.0, 0.0, 0.40, 1.0, 0.0, 0.0, 20e6, 3, 0,
            0.2, 2, obs[0], obs[1], 0.0, sig[0], sig[1], 1.0])

        def res(x):
            q = soft_sand_rock(x[0], x[1])
            return (np.array([q[6], q[8]]) - obs) / sig

        fit = least_squares(res, [0.2, 0.9], bounds=([0.01, 0.0],
                                                     [0.40, 1.0]),
                            jac='3-point', x_scale=[0.1, 0.1],
                            xtol=1e-15, ftol=1e-15, gtol=1e-15)
        jj = fit.jac
        cov = np.linalg.inv(jj.T @ jj)
        want.append((fit.x, 2 * fit.cost, np.sqrt(np.diag(cov))))
    for rec, (x, chi2, sd) in zip(run_dump(lines), want):
        o = vals(rec)
        flags = int(o[9])
        t.check(rec["status"] == 0, "inv status")
        t.abs(o[:2], x, 2e-5, "inversion estimate")
        t.abs(o[6], chi2, 1e-6, "inversion misfit")
        if not flags & 0x0c and x[1] < 0.999:  # not on a bound
            t.rel(o[3:5], sd, 2e-3, "inversion sd")


def main():
    rng = np.random.default_rng(20261214)
    t = Tally()
    for f in (check_granular, check_pq, check_inclusion, check_saturation,
              check_pressure_fit, check_eval, check_inversion):
        f(t, rng)
    print("%d passed, %d failed" % (t.passed, t.failed))
    return 1 if t.failed else 0


if __name__ == "__main__":
    sys.exit(main())
