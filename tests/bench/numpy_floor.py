#!/usr/bin/python3
"""Floor (c) of tests/bench: the Python + numpy pipeline a practitioner
would write instead of calling rockwire, for the same requests and the
same outputs: JSON in, vectorised numpy, JSON out.

  numpy_floor.py rpc < REQUESTS.jsonl > ANSWERS.jsonl
      one JSON-RPC answer line per request line, for the three methods
      the benchmarks send: elastic.convert (rho, vp, vs), rock.substitute
      (logs mode, explicit {k, rho} fluids and mineral) and reflect.series
      (zoeppritz at a list of angles, with depth)
  numpy_floor.py las IN.las OUT.las
      the rockwire log pipeline: read a LAS 2.0 file (np.loadtxt), add
      VP VS RHO K MU LAMBDA E NU AI SI VPVS QC as log.process does, write
      the header, the new curve lines and the data (inputs with %.10g,
      exact for the benchmark's files; new curves with rockwire log's
      default 7 significant digits, nulls as the file's NULL)

Formulas: the isotropic relations (Mavko, Mukerji & Dvorkin 2009),
Gassmann 1951 as written in Mavko et al. 2009 ch. 6, the explicit P-P
coefficient of Aki & Richards 1980 eq. 5.39 for solids (from memory), and
Shuey-type intercept and gradient as rw_reflect_shuey_terms documents
them. QC bits are the daemon's (protocol-docs/qc-flags.md) for the
conditions this script checks. tests/bench/run compares its answers with
the daemon's on a small request before timing anything.

Run by Debian's /usr/bin/python3 (python3-numpy). Benchmark code: never
part of the test suite."""
import json
import sys

import numpy as np

FT = 0.3048


def nulls(a):
    """A numpy array as a JSON list, NaN as null."""
    a = np.asarray(a, dtype=float)
    if np.isnan(a).any():
        return np.where(np.isnan(a), None, a).tolist()
    return a.tolist()


def plausible(rho_gcc, vp, vs, nu):
    f = np.zeros(vp.shape, dtype=np.int64)
    f |= np.where((nu < 0) | (nu >= 0.5), 16, 0)
    f |= np.where((rho_gcc < 1.0) | (rho_gcc > 3.2), 32, 0)
    f |= np.where((vp < 1200) | (vp > 7500), 64, 0)
    f |= np.where((vs < 0) | (vs > 4500), 128, 0)
    return f


def elastic_convert(p):
    rho_gcc = np.asarray(p["rho"], dtype=float)
    vp = np.asarray(p["vp"], dtype=float)
    vs = np.asarray(p["vs"], dtype=float)
    rho = rho_gcc * 1000.0
    a2, b2 = vp * vp, vs * vs
    mu = rho * b2
    m = rho * a2
    k = m - 4.0 / 3.0 * mu
    lam = m - 2.0 * mu
    nu = (a2 - 2.0 * b2) / (2.0 * (a2 - b2))
    e = 2.0 * mu * (1.0 + nu)
    bad_in = ~(rho > 0) | ~(vp > 0) | ~(vs >= 0)
    bad_mod = ~bad_in & (~(mu > 0) | (k < 0))
    qc = plausible(rho_gcc, vp, vs, nu)
    qc = np.where(bad_in, 1 | np.where(rho > 0, 0, 2), qc)
    qc = np.where(bad_mod, 4 | 8, qc)
    bad = bad_in | bad_mod
    out = {"n": int(vp.size)}
    for name, v in (("vp", vp), ("vs", vs), ("rho", rho_gcc),
                    ("k", k * 1e-9), ("mu", mu * 1e-9),
                    ("lambda", lam * 1e-9), ("e", e * 1e-9), ("nu", nu),
                    ("m", m * 1e-9), ("ai", rho_gcc * vp),
                    ("si", rho_gcc * vs), ("vpvs", vp / vs),
                    ("dtp", 1e6 * FT / vp), ("dts", 1e6 * FT / vs)):
        out[name] = nulls(np.where(bad, np.nan, v))
    out["qc"] = qc.tolist()
    out["units"] = {"vp": "m/s", "vs": "m/s", "rho": "g/cm3", "k": "GPa",
                    "mu": "GPa", "lambda": "GPa", "e": "GPa", "m": "GPa",
                    "ai": "m/s*g/cm3", "si": "m/s*g/cm3", "dtp": "us/ft",
                    "dts": "us/ft"}
    return out


def rock_substitute(p):
    vp = np.asarray(p["vp"], dtype=float)
    vs = np.asarray(p["vs"], dtype=float)
    rho = np.asarray(p["rho"], dtype=float)          # g/cm3
    phi = np.broadcast_to(np.asarray(p["porosity"], dtype=float), vp.shape)
    kmin, rmin = p["mineral"]["k"] * 1e9, p["mineral"]["rho"]
    k1, r1 = p["fluid_in_place"]["k"] * 1e9, p["fluid_in_place"]["rho"]
    k2, r2 = p["fluid_new"]["k"] * 1e9, p["fluid_new"]["rho"]
    rho_si = rho * 1000.0
    mu = rho_si * vs * vs
    ksat1 = rho_si * vp * vp - 4.0 / 3.0 * mu
    a = phi * kmin / k1 + 1.0 - phi
    kdry = (ksat1 * a - kmin) / (phi * kmin / k1 + ksat1 / kmin - 1.0 - phi)
    dry_bad = (kdry < 0) | (kdry > kmin)
    ksat2 = kdry + (1.0 - kdry / kmin) ** 2 / (
        phi / k2 + (1.0 - phi) / kmin - kdry / kmin ** 2)
    rho2 = rho + phi * (r2 - r1)
    vp2 = np.sqrt((ksat2 + 4.0 / 3.0 * mu) / (rho2 * 1000.0))
    vs2 = np.sqrt(mu / (rho2 * 1000.0))
    nu2 = (vp2 ** 2 - 2 * vs2 ** 2) / (2 * (vp2 ** 2 - vs2 ** 2))
    qc = np.where(dry_bad, 1 << 12, plausible(rho2, vp2, vs2, nu2))
    qc |= np.where(phi < 0.05, 1 << 13, 0)

    def sub(x):
        return nulls(np.where(dry_bad, np.nan, x))

    def pct(new, old):
        return sub(100.0 * (new - old) / old)

    n = vp.size
    out = {"n": int(n), "mode": "logs", "vp": sub(vp2), "vs": sub(vs2),
           "rho": sub(rho2), "k_sat": sub(ksat2 * 1e-9),
           "mu": sub(mu * 1e-9), "k_dry": nulls(kdry * 1e-9),
           "fluid_in_place_k": [k1 * 1e-9] * n,
           "fluid_in_place_rho": [r1] * n,
           "fluid_new_k": [k2 * 1e-9] * n, "fluid_new_rho": [r2] * n,
           "mineral_k": [kmin * 1e-9] * n, "mineral_rho": [rmin] * n,
           "dvp_pct": pct(vp2, vp), "dvs_pct": pct(vs2, vs),
           "drho_pct": pct(rho2, rho), "dai_pct": pct(rho2 * vp2, rho * vp),
           "dvpvs_pct": pct(vp2 / vs2, vp / vs), "qc": qc.tolist(),
           "units": {"vp": "m/s", "vs": "m/s", "rho": "g/cm3",
                     "k_sat": "GPa", "mu": "GPa", "k_dry": "GPa",
                     "fluid_in_place_k": "GPa",
                     "fluid_in_place_rho": "g/cm3", "fluid_new_k": "GPa",
                     "fluid_new_rho": "g/cm3", "mineral_k": "GPa",
                     "mineral_rho": "g/cm3"}}
    return out


def rpp_aki_richards(a1, b1, r1, a2, b2, r2, p):
    """Aki & Richards 1980 eq. 5.39, P-P reflection, solids, complex."""
    ci1 = np.sqrt((1 - (a1 * p) ** 2).astype(complex)) / a1
    ci2 = np.sqrt((1 - (a2 * p) ** 2).astype(complex)) / a2
    cj1 = np.sqrt((1 - (b1 * p) ** 2).astype(complex)) / b1
    cj2 = np.sqrt((1 - (b2 * p) ** 2).astype(complex)) / b2
    p2 = p * p
    a = r2 * (1 - 2 * b2 ** 2 * p2) - r1 * (1 - 2 * b1 ** 2 * p2)
    b = r2 * (1 - 2 * b2 ** 2 * p2) + 2 * r1 * b1 ** 2 * p2
    c = r1 * (1 - 2 * b1 ** 2 * p2) + 2 * r2 * b2 ** 2 * p2
    d = 2 * (r2 * b2 ** 2 - r1 * b1 ** 2)
    E = b * ci1 + c * ci2
    F = b * cj1 + c * cj2
    G = a - d * ci1 * cj2
    H = a - d * ci2 * cj1
    D = E * F + G * H * p2
    return ((b * ci1 - c * ci2) * F - (a + d * ci1 * cj2) * H * p2) / D


def reflect_series(p):
    vp = np.asarray(p["vp"], dtype=float)
    vs = np.asarray(p["vs"], dtype=float)
    rho = np.asarray(p["rho"], dtype=float) * 1000.0
    depth = np.asarray(p["depth"], dtype=float)
    ang = np.atleast_1d(np.asarray(p["angle"], dtype=float))
    a1, a2, b1, b2 = vp[:-1], vp[1:], vs[:-1], vs[1:]
    r1, r2 = rho[:-1], rho[1:]
    ni = a1.size
    bad = (a1 <= 0) | (a2 <= 0) | (r1 <= 0) | (r2 <= 0) | (b1 < 0) | (
        b2 < 0) | (3 * a1 ** 2 <= 4 * b1 ** 2) | (3 * a2 ** 2 <= 4 * b2 ** 2)
    qcb = np.where(bad, 1 << 16, 0)
    qci = qcb
    # no_critical_p (bit 19): vp below not above vp above; no_critical_s
    # (bit 20): vs below not above vp above (qc-flags.md)
    qci = qci | np.where(~bad & (a2 <= a1), 1 << 19, 0) | np.where(
        ~bad & (b2 <= a1), 1 << 20, 0)
    rre = np.empty((ang.size, ni))
    rim = np.empty((ang.size, ni))
    qc = np.empty((ang.size, ni), dtype=np.int64)
    # sin of the P critical angle (none when the lower medium is slower)
    sin_crit = np.where(a2 > a1, a1 / np.where(a2 > 0, a2, 1), 2.0)
    for j, th in enumerate(np.radians(ang)):  # one angle at a time
        r = rpp_aki_richards(a1, b1, r1, a2, b2, r2, np.sin(th) / a1)
        rre[j] = np.where(bad, np.nan, r.real)
        rim[j] = np.where(bad, np.nan, r.imag)
        qc[j] = qcb | np.where(~bad & (np.sin(th) >= sin_crit), 1 << 17, 0)
    am, bm, rm = (a1 + a2) / 2, (b1 + b2) / 2, (r1 + r2) / 2
    dvp, dvs, drho = (a2 - a1) / am, (b2 - b1) / bm, (r2 - r1) / rm
    k = (bm / am) ** 2
    A = 0.5 * (dvp + drho)
    B = 0.5 * dvp - 2 * k * (drho + 2 * dvs)
    return {"n_interfaces": int(ni), "n_angles": int(ang.size),
            "angle": ang.tolist(), "depth": ((depth[:-1] + depth[1:]) / 2
                                             ).tolist(),
            "rpp_re": [nulls(x) for x in rre],
            "rpp_im": [nulls(x) for x in rim],
            "qc": qc.tolist(),
            "intercept": nulls(np.where(bad, np.nan, A)),
            "gradient": nulls(np.where(bad, np.nan, B)),
            "qc_interface": qci.tolist(),
            "units": {"angle": "deg", "depth": "m"}}


METHODS = {"elastic.convert": elastic_convert,
           "rock.substitute": rock_substitute,
           "reflect.series": reflect_series}


def rpc():
    out = sys.stdout
    for line in sys.stdin:
        if not line.strip():
            continue
        req = json.loads(line)
        res = METHODS[req["method"]](req["params"])
        out.write(json.dumps({"jsonrpc": "2.0", "id": req["id"],
                              "result": res}, separators=(",", ":")))
        out.write("\n")


def las(inp, outp):
    head, curves, null = [], [], -999.25
    with open(inp) as f:
        section = ""
        for line in f:
            if line.startswith("~"):
                section = line[1].upper()
                if section == "A":
                    break
            head.append(line)
            s = line.strip()
            if section == "C" and s and s[0] not in "#~":
                curves.append(s.split(".")[0].strip().upper())
            if section == "W" and s.upper().startswith("NULL"):
                null = float(s.split(".", 1)[1].split(":")[0])
        data = np.loadtxt(f, ndmin=2)
    col = {c: data[:, i] for i, c in enumerate(curves)}
    miss = np.zeros(len(data), dtype=bool)
    for c in ("DT", "DTS", "RHOB"):
        miss |= col[c] == null
    dt = np.where(miss, np.nan, col["DT"])
    dts = np.where(miss, np.nan, col["DTS"])
    rho_gcc = np.where(miss, np.nan, col["RHOB"])
    vp, vs = 1e6 * FT / dt, 1e6 * FT / dts
    res = elastic_convert({"rho": rho_gcc, "vp": vp, "vs": vs})
    qc = np.asarray(res["qc"], dtype=np.int64)
    qc = np.where(miss, 1 | (1 << 28), qc)
    if "DRHO" in col:
        qc |= np.where(np.abs(col["DRHO"]) > 0.05, 1 << 24, 0)
    if "CALI" in col and "BS" in col:
        qc |= np.where(col["CALI"] - col["BS"] > 1.0, 1 << 25, 0)
    new = ["VP", "VS", "RHO", "K", "MU", "LAMBDA", "E", "NU", "AI", "SI",
           "VPVS"]
    units = ["M/S", "M/S", "G/C3", "GPA", "GPA", "GPA", "GPA", "", "M/S*G/C3",
             "M/S*G/C3", ""]
    cols = [np.asarray(res[c.lower()], dtype=float) for c in new]
    # as log.process: vp and rho stay where only another curve is missing
    cols[0] = np.where(col["DT"] == null, np.nan, 1e6 * FT / col["DT"])
    cols[2] = np.where(col["RHOB"] == null, np.nan, col["RHOB"])
    outcols = [np.where(np.isnan(c), null, c) for c in cols]
    added = "".join(" %s.%s  : added by the numpy floor\n" % (c, u)
                    for c, u in zip(new + ["QC"], units + [""]))
    with open(outp, "w") as f:
        in_curves = False
        for line in head:
            if line.startswith("~") and in_curves:
                f.write(added)  # the end of ~Curve: the new curves
                in_curves = False
            in_curves = in_curves or line.upper().startswith("~C")
            f.write(line)
        if in_curves:
            f.write(added)
        f.write("~A\n")
        fmt = ["%.10g"] * len(curves) + ["%.7g"] * len(new) + ["%d"]
        np.savetxt(f, np.column_stack([data] + outcols + [qc]), fmt=fmt)


def main():
    if len(sys.argv) == 2 and sys.argv[1] == "rpc":
        rpc()
        return 0
    if len(sys.argv) == 4 and sys.argv[1] == "las":
        las(sys.argv[2], sys.argv[3])
        return 0
    sys.stderr.write(__doc__)
    return 2


if __name__ == "__main__":
    sys.exit(main())
