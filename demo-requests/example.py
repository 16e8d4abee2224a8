#!/usr/bin/python3
"""The demo scenario through the Python client (client/python): the
invented Quillmoor prospect's AVO response, brine and gas, the invented
Orrimund 3 well's log through log.process, and the invented Korvane
sand's gas sweep. Every name is invented; the numbers are the demo's.

    PYTHONPATH=client/python /usr/bin/python3 demo-requests/example.py \\
        [--socket PATH]

Without --socket it uses the default socket when a daemon listens there,
else spawns a private rockwired (build/rockwired, $ROCKWIRED or PATH).

Screening estimates only: not a substitute for qualified review, local
regulations and licensed practice; never the sole basis for well-control
decisions.
"""
import argparse
import os
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "client", "python"))
import rockwire  # noqa: E402

try:
    import numpy as np
except ImportError:  # the client works without numpy; this script not
    sys.exit("example.py needs numpy (Debian: python3-numpy)")


def read_las(path):
    """Curves of a LAS 2.0 file (one line per depth, WRAP NO) as
    {mnemonic: (unit, numpy array)}, NULL values as NaN, and the
    ~Parameter values as {mnemonic: (unit, value)}."""
    curves, params, section, names, units, rows, null = [], {}, "", [], [], \
        [], -999.25
    with open(path) as f:
        for line in f:
            s = line.strip()
            if not s or s.startswith("#"):
                continue
            if s.startswith("~"):
                section = s[1].upper()
                continue
            if section == "A":
                rows.append([float(v) for v in s.split()])
                continue
            if "." not in s or ":" not in s:
                continue
            mnem, rest = s.split(".", 1)
            unit, _, rest = rest.partition(" ")
            value = rest.split(":", 1)[0].strip()
            mnem = mnem.strip()
            if section == "W" and mnem == "NULL":
                null = float(value)
            elif section == "C":
                names.append(mnem)
                units.append(unit)
            elif section == "P":
                try:
                    params[mnem] = (unit, float(value))
                except ValueError:
                    pass
    data = np.array(rows, dtype=float)
    data[data == null] = np.nan
    for i, (n, u) in enumerate(zip(names, units)):
        curves.append((n, (u, data[:, i])))
    return dict(curves), params


def main():
    ap = argparse.ArgumentParser(description="the demo through Python")
    ap.add_argument("--socket", help="a daemon's socket (default: the "
                    "default socket, else a private daemon)")
    a = ap.parse_args()
    rw = rockwire.connect(a.socket) if a.socket else rockwire.connect()
    with rw:
        print(rockwire.CAUTION)
        print("daemon: %s, %s" % (rw.description, rw.info()["version"]))

        # 1. Quillmoor prospect: shale cap over the sand, brine and gas
        # (the gas case is the sand after Gassmann substitution, as in
        # prospect-quillmoor.jsonl). Pipelined in one batch.
        cap = {"vp": 2900, "vs": 1350, "rho": 2.45}
        cases = {"brine": {"vp": 3150, "vs": 1650, "rho": 2.23},
                 "gas": {"vp": 2827.5, "vs": 1733.5, "rho": 2.0204}}
        angles = list(range(0, 46, 5))
        with rw.batch() as b:
            h = {k: b.reflect.interface(upper=cap, lower=v, angle=angles,
                                        methods=["zoeppritz", "shuey3"])
                 for k, v in cases.items()}
        print("\nQuillmoor AVO (exact Rpp, real part)")
        print("%6s %10s %10s" % ("angle", "brine", "gas"))
        r = {k: v.get() for k, v in h.items()}
        for i, ang in enumerate(angles):
            print("%6g %10.4f %10.4f" % (ang, r["brine"]["rpp_re"][i],
                                         r["gas"]["rpp_re"][i]))
        for k in cases:
            print("%-5s intercept %.4f gradient %.4f class %s"
                  % (k, r[k]["intercept"], r[k]["gradient"], r[k]["class"]))

        # 2. Orrimund 3: the demo well log through log.process, shear
        # predicted where it is missing, the washout check with the
        # header's bit size.
        curves, params = read_las(os.path.join(HERE, "orrimund-3.las"))
        bs_unit, bs = params.get("BS", ("IN", 8.5))
        inch = 0.0254
        res = rw.log.process(
            depth=curves["DEPT"][1], dtp=curves["DT"][1],
            dts=curves["DTS"][1], rhob=curves["RHOB"][1],
            drho=curves["DRHO"][1], caliper=curves["CALI"][1] * inch,
            bit_size=bs * inch if bs_unit.upper() == "IN" else bs,
            vs_predict="greenberg_castagna")
        qc = res["qc"]
        print("\nOrrimund 3: %d samples, %d clean" % (res["n"],
                                                     int((qc == 0).sum())))
        counts = {}
        for f in np.unique(qc[qc != 0]):
            for name in rw.qc_names(int(f)):
                counts[name] = counts.get(name, 0) + int((qc == f).sum())
        for name, n in sorted(counts.items()):
            print("  %-26s %d samples" % (name, n))
        depth = curves["DEPT"][1]
        for lo, hi, zone in ((1500, 1560, "shale"),
                             (1560, 1610, "brine sand"),
                             (1610, 1650, "gas sand")):
            m = (depth >= lo) & (depth < hi)
            print("  %-10s %4d-%4d m: mean AI %7.0f %s, Vp/Vs %.3f"
                  % (zone, lo, hi, np.nanmean(res["ai"][m]),
                     res["units"]["ai"], np.nanmean(res["vpvs"][m])))

        # 3. Korvane sand: vp, AI and Vp/Vs as gas replaces brine.
        sw = np.round(np.linspace(1, 0, 11), 10)
        sub = rw.rock.substitute(
            vp=3050, vs=1620, rho=2.24, porosity=0.26,
            mineral={"constituents": [{"mineral": "quartz",
                                       "fraction": 0.88},
                                      {"mineral": "clay", "fraction": 0.12}],
                     "method": "hill"},
            fluid_in_place={"brine": {"salinity": 65000}},
            fluid_new={"brine": {"salinity": 65000},
                       "gas": {"gravity": 0.65},
                       "saturation": {"brine": sw, "gas": 1 - sw}},
            pressure=26.5, temperature=82)
        print("\nKorvane gas sweep (Gassmann, uniform saturation)")
        print("%6s %9s %9s %7s" % ("sw", "vp", "AI", "Vp/Vs"))
        for i in range(len(sw)):
            print("%6.2f %9.1f %9.0f %7.3f"
                  % (sw[i], sub["vp"][i], sub["vp"][i] * sub["rho"][i],
                     sub["vp"][i] / sub["vs"][i]))

        # Errors are exceptions naming the parameter.
        try:
            rw.elastic.convert(rho=2.3, vp=3000, ai=6900)
        except rockwire.InvalidParams as e:
            print("\nrefused as expected: %s: %s" % (e.param, e.reason))


if __name__ == "__main__":
    main()
