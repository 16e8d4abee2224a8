#!/usr/bin/python3
"""rockwire feed end to end: a recorded invented WITS level 0 stream with
malformed records mixed in, replayed through stdin and through a loopback
TCP server (127.0.0.1, port 0). Every good depth sample is answered
exactly once, malformed records are skipped and each record is counted
once on stderr, values from a record without depth join the next depth's
sample. Then the first-contact items of issue 9: no built-in item map
(and the map in use printed), answers flushed line by line through a
pipe, the absent value -999.25 as missing (and never a depth), every
completed sample answered, garbage items counted, records that run
together told apart, map units converted, the caution at start and end,
a peer hang-up reported, --reconnect, and the idle timeout."""
import json
import os
import re
import select
import signal
import socket
import subprocess
import sys
import tempfile
import threading
import time

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

t = rwtest.Checks()
tmp = tempfile.mkdtemp(prefix="rw-feed-")
# The codes of this invented stream; a real feed's provider says which
# items mean what.
MAP = ["--map", "0108=depth", "--map", "0113=dtp", "--map", "0114=dts",
       "--map", "0115=rhob"]


def record(items):
    return "&&\r\n" + "".join("%s%s\r\n" % (c, v) for c, v in items) + \
        "!!\r\n"


# The invented stream: well "Sollantre 2", depths in m, slowness us/ft,
# density g/cm3.
parts, expect = [], []
for i in range(200):
    depth = 2100.0 + 0.5 * i
    dt, dts, rho = 90 + (i % 20), 160 + (i % 30), 2.3 + (i % 10) * 0.01
    if i % 50 == 10:
        parts.append("&&\r\n0108%.1f\r\n01X3 95\r\n!!\r\n" % depth)
        continue  # bad line: a malformed record
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


def counts(err):
    m = re.search(r"feed: (\d+) records: (\d+) delivered .*?, (\d+) "
                  r"malformed records, (\d+) unterminated .*?, (\d+) empty",
                  err)
    return [int(x) for x in m.groups()] if m else None


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
    c = counts(e)
    # 4 bad-line records, 4 cut by "&&" plus the one cut at the end.
    t.ok(c and c[2] == 4 and c[3] == 5 and c[0] == c[1] + c[2] + c[3] + c[4],
         "%s: each record counted once: %s" % (how, e.strip()[-500:]))
    t.ok("lines outside records" in e and "well-control" in e,
         "%s: counts and the caution reported" % how)
    for g in got[:3]:
        probs = rwtest.validate_response(
            "log.process", {"jsonrpc": "2.0", "id": 1, "result": dict(
                g, n=1)})
        t.ok(not probs, "%s: answer fits the log.process schema %s" %
             (how, probs))


def feed(*args, inp=b"", timeout=60):
    p = rwtest.run([rwtest.CLIENT, "--socket", d.path, "feed"] +
                   list(args), input=inp, timeout=timeout)
    return p.returncode, p.stdout, p.stderr


def lines_of(out):
    return [json.loads(l) for l in out.decode().splitlines() if l.strip()]


d = rwtest.Daemon()
try:
    # 1. stdin
    rc, out, err = feed(*MAP, inp=stream)
    check(out, err, rc, "stdin")
    t.ok(b"WITS map: 0108 -> depth (m), 0113 -> dtp (us/ft)" in err and
         err.decode().startswith("rockwire feed: screening estimates only"),
         "start-up: caution and the map in use")

    # 2. loopback TCP: the test serves the stream in small pieces, and
    # the hang-up is reported.
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
    rc, out, err = feed(*MAP, "--connect", "127.0.0.1:%d" % port)
    th.join(10)
    srv.close()
    check(out, err, rc, "tcp")
    t.ok(b"127.0.0.1:%d closed the connection" % port in err,
         "the peer's hang-up is reported")

    # 3. CSV, a map file and a --set option.
    mf = os.path.join(tmp, "sollantre.witsmap")
    with open(mf, "w") as f:
        f.write("# invented stream\n0108 depth m\n0113=dtp:us/ft\n"
                "0115 rhob\n")
    rc, out, err = feed("--map-file", mf, "--format", "csv",
                        "--set", "vs_predict=mudrock", inp=stream)
    rows = out.decode().strip().split("\n")
    t.ok(rc == 0 and len(rows) == len(expect) + 1,
         "csv: header and one row per sample (%d)" % len(rows))
    t.ok(rows[0].startswith("depth[m],vp[m/s],vs[m/s]"),
         "csv header " + rows[0][:60])
    vp = 0.3048e6 / expect[0][1]
    vs = float(rows[1].split(",")[2])
    t.ok(abs(vs - (vp - 1360) / 1.16) < 1e-6 * vs,
         "csv: mudrock vs (Castagna et al. 1985)")

    # 4. No built-in map.
    rc, out, err = feed(inp=stream)
    t.ok(rc == 2 and b"no WITS item map" in err and out == b"",
         "without --map: refused, nothing guessed (%r)" % err[:200])
    rc, out, err = feed("--map", "108=depth")
    t.ok(rc == 2 and b"4-digit" in err, "bad --map code")
    rc, out, err = feed("--map", "0108=dept")
    t.ok(rc == 2 and b"did you mean depth?" in err, "misspelt input")
    rc, out, err = feed("--map", "0108=depth:furlong")
    t.ok(rc == 2 and b"'furlong' is not a length unit" in err,
         "unknown map unit")
    rc, out, err = feed(*MAP, "--connect", "nohostport")
    t.ok(rc == 2, "bad --connect")

    # 5. The absent value, depth validity, garbage items, records that
    # run together, every completed sample answered.
    s2 = (record([("0108", "3000.0"), ("0113", "100"), ("0115", "2.4")]) +
          record([("0108", "3000.5"), ("0113", "-999.25"), ("0114", "180"),
                  ("0115", "2.4")]) +
          record([("0108", "-999.25"), ("0113", "100"), ("0114", "180"),
                  ("0115", "2.4")]) +
          record([("0108", "3001.0"), ("0113", "12.3.4"), ("0114", "180"),
                  ("0115", "2.4")]) +
          "&&\r\n0108 3001.5\r\n0108 3002.0\r\n0113 100\r\n0114 180\r\n"
          "0115 2.4\r\n!!\r\n").encode()
    rc, out, err = feed(*MAP, inp=s2)
    g = lines_of(out)
    e = err.decode()
    t.ok(rc == 0 and [x["depth"] for x in g] == [3000.0, 3000.5, 3001.0,
                                               3002.0],
         "a sample per valid depth; none at -999.25, none lost to a "
         "run-together record (%d %r)" % (rc, [x.get("depth") for x in g]))
    MISSING = 1 << 28
    t.ok(g and g[0]["vs"] is None and g[0]["qc"] & MISSING and
         "error" not in g[0], "first record without shear: answered with "
         "vs null, input_missing (not refused)")
    t.ok(len(g) > 1 and g[1]["vp"] is None and g[1]["qc"] & MISSING,
         "dtp -999.25 is missing, not a slowness: %r" % (g[1:2],))
    t.ok(len(g) > 2 and g[2]["vp"] is None and g[2]["qc"] & MISSING,
         "a garbage dtp item leaves dtp missing")
    t.ok("1 with an absent depth" in e and "2 absent values" in e and
         "1 garbage items on mapped codes" in e and
         "1 unterminated (1 cut short by the next record)" in e,
         "counted: " + e[-600:])
    c = counts(e)
    t.ok(c and c[0] == c[1] + c[2] + c[3] + c[4] and c[0] == 6,
         "6 records begun, each counted once: %r" % c)
    rc, out, err = feed(*MAP, "--absent", "-9999", inp=record(
        [("0108", "3000"), ("0113", "-9999"), ("0114", "180"),
         ("0115", "2.4")]).encode())
    t.ok(rc == 0 and lines_of(out)[0]["vp"] is None, "--absent -9999")

    # 6. Map units: depth in ft, dtp in us/m; output units separate.
    one = record([("0108", "10000"), ("0113", "328.084"), ("0114", "600"),
                  ("0115", "2.4")]).encode()
    rc, out, err = feed("--map", "0108=depth:ft", "--map", "0113=dtp:us/m",
                        "--map", "0114=dts:us/m", "--map", "0115=rhob",
                        inp=one)
    x = lines_of(out)[0]
    t.ok(rc == 0 and abs(x["depth"] - 3048) < 1e-9 and
         abs(x["vp"] - 1e6 / 328.084) < 1e-6,
         "items converted from ft and us/m (%r)" % err)
    rc, out, err = feed("--map", "0108=depth:ft", "--map", "0113=dtp:us/m",
                        "--map", "0114=dts:us/m", "--map", "0115=rhob",
                        "--set", "units.length=ft", inp=one)
    x = lines_of(out)[0]
    t.ok(rc == 0 and abs(x["depth"] - 10000) < 1e-6 and
         x["units"]["depth"] == "ft" and abs(x["vp"] - 1e6 / 328.084) < 1e-6,
         "units.length=ft: output in ft, input not reinterpreted")

    # 7. Flushed per line through a pipe: the answer to record k is
    # readable before record k+1 is sent.
    p = rwtest.spawn([rwtest.CLIENT, "--socket", d.path, "feed"] + MAP,
                         stdin=subprocess.PIPE, stdout=subprocess.PIPE,
                         stderr=subprocess.PIPE)
    ok = True
    fd = p.stdout.fileno()
    for k in range(5):
        p.stdin.write(record([("0108", "%.1f" % (4000 + k)), ("0113", "100"),
                              ("0114", "180"), ("0115", "2.4")]).encode())
        p.stdin.flush()
        line = b""
        deadline = time.time() + 10
        while not line.endswith(b"\n") and time.time() < deadline:
            r, _, _ = select.select([fd], [], [], 1)
            if r:
                chunk = os.read(fd, 65536)
                if not chunk:
                    break
                line += chunk
        ok = ok and line.count(b"\n") == 1 and \
            json.loads(line)["depth"] == 4000 + k
    p.stdin.close()
    p.wait(20)
    t.ok(ok and p.returncode == 0,
         "each answer readable through a pipe before the next record")

    # 8. --reconnect after a hang-up, and the idle timeout.
    srv = socket.socket(socket.AF_INET, socket.SOCK_STREAM)
    srv.bind(("127.0.0.1", 0))
    srv.listen(2)
    port = srv.getsockname()[1]
    served = []

    def serve_twice():
        for n in range(2):
            c, _ = srv.accept()
            for k in range(2):
                c.sendall(record([("0108", "%d" % (5000 + 10 * n + k)),
                                  ("0113", "100"), ("0114", "180"),
                                  ("0115", "2.4")]).encode())
            served.append(n)
            if n == 1:
                time.sleep(3)  # then quiet: the idle timeout reports it
            c.close()

    th = threading.Thread(target=serve_twice, daemon=True)
    th.start()
    p = rwtest.spawn([rwtest.CLIENT, "--socket", d.path, "feed"] + MAP +
                         ["--connect", "127.0.0.1:%d" % port, "--reconnect",
                          "--idle-timeout", "1"],
                         stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    got, pend = [], b""
    deadline = time.time() + 20
    fd = p.stdout.fileno()  # raw reads: no buffer hides a second line
    while len(got) < 4 and time.time() < deadline:
        r, _, _ = select.select([fd], [], [], 1)
        if r:
            chunk = os.read(fd, 65536)
            if not chunk:
                break
            pend += chunk
            while b"\n" in pend:
                line, pend = pend.split(b"\n", 1)
                got.append(json.loads(line)["depth"])
    time.sleep(2)
    p.send_signal(signal.SIGTERM)
    out, err = p.communicate(timeout=20)
    e = err.decode()
    got += [json.loads(l)["depth"] for l in (pend + out).splitlines()
            if l.strip()]
    t.ok(got == [5000, 5001, 5010, 5011],
         "--reconnect: records from both connections (%r)" % got)
    t.ok("closed the connection" in e and "connecting again" in e and
         "connected to 127.0.0.1:%d" % port in e,
         "hang-up and reconnection reported: " + e[-500:])
    t.ok("no data from 127.0.0.1:%d" % port in e,
         "the idle timeout reports the quiet feed")
    t.ok(p.returncode == 0 and "stopping (SIGTERM)" in e and
         "well-control" in e.split("stopping")[-1],
         "SIGTERM: clean end with the summary and caution (%s)" %
         p.returncode)
    srv.close()
finally:
    d.stop()
t.done()
