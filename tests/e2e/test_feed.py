#!/usr/bin/python3
"""rockwire feed end to end: a recorded invented WITS level 0 stream with
malformed records mixed in, replayed through stdin and through a loopback
TCP server (127.0.0.1, port 0). Every good depth sample is answered
exactly once, malformed records are skipped and counted on stderr, and
values from a record without depth join the next depth's sample."""
import json
import os
import socket
import sys
import threading

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

t = rwtest.Checks()


def record(items):
    return "&&\r\n" + "".join("%s%s\r\n" % (c, v) for c, v in items) + \
        "!!\r\n"


# The invented stream: well "Whimbrel 2", depths in m, slowness us/ft,
# density g/cm3 (codes as in rockwire feed's documented default map).
parts, expect = [], []
for i in range(200):
    depth = 2100.0 + 0.5 * i
    dt, dts, rho = 90 + (i % 20), 160 + (i % 30), 2.3 + (i % 10) * 0.01
    if i % 50 == 10:
        parts.append("&&\r\n0108%.1f\r\n01X3 95\r\n!!\r\n")  # bad line
        parts[-1] = parts[-1] % depth
        continue
    if i % 50 == 20:
        parts.append("&&\r\n0108%.1f\r\n0113%.2f\r\n" % (depth, dt))
        continue  # unterminated: the next "&&" starts over
    if i % 50 == 30:
        parts.append("noise between records\r\n")
    if i % 50 == 40:
        # Shear in a record of its own, then depth with the rest.
        parts.append(record([("0114", "%.2f" % dts)]))
        parts.append(record([("0108", "%.1f" % depth), ("0113", "%.2f" % dt),
                             ("0115", "%.3f" % rho)]))
    else:
        parts.append(record([("0108", "%.1f" % depth), ("0113", "%.2f" % dt),
                             ("0114", "%.2f" % dts), ("0115", "%.3f" % rho)]))
    expect.append((depth, dt, dts, rho))
parts.append("&&\r\n0108 9999\r\n")  # unterminated at end of input
stream = "".join(parts).encode()


def check(out, err, rc, how):
    lines = [l for l in out.decode().split("\n") if l.strip()]
    t.ok(rc == 0, "%s: exit 0 (%d) %s" % (how, rc, err[-300:]))
    t.ok(len(lines) == len(expect), "%s: one answer per good sample "
         "(%d of %d)" % (how, len(lines), len(expect)))
    got = [json.loads(l) for l in lines]
    depths = [g.get("depth") for g in got]
    t.ok(depths == [e[0] for e in expect], "%s: each depth once, in order"
         % how)
    # vp = 0.3048 m / dt (1 ft = 0.3048 m exactly).
    t.ok(all(abs(g["vp"] - 0.3048e6 / e[1]) < 1e-6 * g["vp"]
             for g, e in zip(got, expect)), "%s: vp from dt" % how)
    t.ok(all(abs(g["vs"] - 0.3048e6 / e[2]) < 1e-6 * g["vs"]
             for g, e in zip(got, expect)),
         "%s: vs, also when it came in the record before depth" % how)
    t.ok(all(g["qc"] == 0 for g in got), "%s: clean samples" % how)
    e = err.decode()
    t.ok("3 malformed records" in e or "4 malformed records" in e,
         "%s: malformed counted: %s" % (how, e.strip()[-400:]))
    t.ok("unterminated" in e and "lines outside records" in e,
         "%s: counts reported" % how)
    for g in got[:3]:
        probs = rwtest.validate_response(
            "log.process", {"jsonrpc": "2.0", "id": 1, "result": dict(
                g, n=1)})
        t.ok(not probs, "%s: answer fits the log.process schema %s" %
             (how, probs))


d = rwtest.Daemon()
try:
    # 1. stdin
    p = rwtest.run([rwtest.CLIENT, "--socket", d.path, "feed"],
                   input=stream, timeout=60)
    check(p.stdout, p.stderr, p.returncode, "stdin")

    # 2. loopback TCP: the test serves the stream in small pieces.
    srv = socket.socket(socket.AF_INET, socket.SOCK_STREAM)
    srv.bind(("127.0.0.1", 0))
    srv.listen(1)
    port = srv.getsockname()[1]

    def serve():
        c, _ = srv.accept()
        for k in range(0, len(stream), 777):
            c.sendall(stream[k:k + 777])
        c.close()

    th = threading.Thread(target=serve, daemon=True)
    th.start()
    p = rwtest.run([rwtest.CLIENT, "--socket", d.path, "feed",
                    "--connect", "127.0.0.1:%d" % port], timeout=60)
    th.join(10)
    srv.close()
    check(p.stdout, p.stderr, p.returncode, "tcp")

    # 3. CSV, an explicit map and a --set option.
    p = rwtest.run([rwtest.CLIENT, "--socket", d.path, "feed",
                    "--format", "csv", "--map", "0114=none",
                    "--set", "vs_predict=mudrock"],
                   input=stream, timeout=60)
    rows = p.stdout.decode().strip().split("\n")
    t.ok(p.returncode == 0 and len(rows) == len(expect) + 1,
         "csv: header and one row per sample (%d)" % len(rows))
    t.ok(rows[0].startswith("depth[m],vp[m/s],vs[m/s]"),
         "csv header " + rows[0][:60])
    vp = 0.3048e6 / expect[0][1]
    vs = float(rows[1].split(",")[2])
    t.ok(abs(vs - (vp - 1360) / 1.16) < 1e-6 * vs,
         "csv: mudrock vs (Castagna et al. 1985)")
    # Usage errors.
    p = rwtest.run([rwtest.CLIENT, "--socket", d.path, "feed",
                    "--map", "108=depth"], input=b"", timeout=20)
    t.ok(p.returncode == 2 and b"4-digit" in p.stderr, "bad --map code")
    p = rwtest.run([rwtest.CLIENT, "--socket", d.path, "feed",
                    "--connect", "nohostport"], input=b"", timeout=20)
    t.ok(p.returncode == 2, "bad --connect")
finally:
    d.stop()
t.done()
