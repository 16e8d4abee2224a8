"""Hostile corpus over a real Unix socket, limits and security.

Every case is sent on one connection followed by a valid request; the case
must get its expected outcome (JSON-RPC 2.0 section 5.1 codes, or a result
with QC flags, or no answer) and the valid request must then succeed.
Also: every limit is settable on the command line and shown by
service.info; the socket is created 0600; TCP refuses non-loopback
addresses without --allow-remote and logs the no-authentication warning.
Runs under /usr/bin/python3 with RW_BUILD set; prints "N passed, M failed".
"""
import json
import os
import socket
import stat
import subprocess
import sys
import time

from rwtest import DAEMON, Daemon, built_with, check, finish, run, run_tests


def readline(f):
    line = f.readline()
    return json.loads(line) if line else None


def code(r):
    return (r or {}).get("error", {}).get("code", 0)


EC = ('{"jsonrpc":"2.0","id":7,"method":"elastic.convert","params":%s}')
PROBE = (b'{"jsonrpc":"2.0","id":"probe","method":"elastic.convert",'
         b'"params":{"rho":2.4,"vp":3000,"vs":1500}}\n')
NO = "none"
QC = "qc"

# (name, line bytes without newline, expected code / NO / QC, param or None)
CORPUS = [
    ("truncated object", b'{"jsonrpc":"2.0","id":1,"meth', -32700, None),
    ("truncated string", b'{"jsonrpc":"2.0","id":"abc', -32700, None),
    ("truncated array", b'[{"jsonrpc":"2.0","id":1,"method":"x"}', -32700,
     None),
    ("trailing garbage",
     b'{"jsonrpc":"2.0","id":1,"method":"service.info"} x', -32700, None),
    ("deep arrays", b"[" * 65, -32600, None),
    ("deep objects", b'{"a":' * 65 + b"1", -32600, None),
    ("NUL byte", b'{"jsonrpc":"2.0",\x00"id":1}', -32700, None),
    ("NUL only", b"\x00", -32700, None),
    ("control byte", b'{"jsonrpc":"2.0","id":1,\x07"method":"x"}', -32700,
     None),
    ("invalid UTF-8", b'{"id":"\xff"}', -32700, None),
    ("overlong UTF-8", b'{"id":"\xc0\xaf"}', -32700, None),
    ("surrogate UTF-8", b'{"id":"\xed\xa0\x80"}', -32700, None),
    ("NaN", (EC % '{"rho":2.4,"vp":NaN,"vs":1500}').encode(), -32700, None),
    ("Infinity", (EC % '{"rho":2.4,"vp":Infinity,"vs":1}').encode(), -32700,
     None),
    ("1e400", (EC % '{"rho":2.4,"vp":1e400,"vs":1500}').encode(), -32602,
     "vp"),
    ("negative density", (EC % '{"rho":-2.4,"vp":3000,"vs":1500}').encode(),
     QC, None),
    ("mismatched lengths",
     (EC % '{"rho":2.4,"vp":[3000,3100],"vs":[1,2,3]}').encode(), -32602,
     "vs"),
    ("wrong type", (EC % '{"rho":"2.4","vp":3000,"vs":1500}').encode(),
     -32602, "rho"),
    ("bool in place of number", (EC % '{"rho":2.4,"vp":true,"vs":1}').encode(),
     -32602, "vp"),
    ("unknown parameter",
     (EC % '{"rho":2.4,"vp":3000,"vs":1500,"shade":1}').encode(), -32602,
     "shade"),
    ("unknown method", b'{"jsonrpc":"2.0","id":1,"method":"rock.nothing"}',
     -32601, "method"),
    ("missing jsonrpc", b'{"id":1,"method":"service.info"}', -32600,
     "jsonrpc"),
    ("wrong jsonrpc", b'{"jsonrpc":"2","id":1,"method":"service.info"}',
     -32600, "jsonrpc"),
    ("missing method", b'{"jsonrpc":"2.0","id":1}', -32600, "method"),
    ("unknown member",
     b'{"jsonrpc":"2.0","id":1,"method":"service.info","x":0}', -32600, "x"),
    ("duplicate key",
     b'{"jsonrpc":"2.0","id":1,"id":2,"method":"service.info"}', -32600,
     "id"),
    ("id string", b'{"jsonrpc":"2.0","id":"s","method":"service.info"}', 0,
     None),
    ("id number", b'{"jsonrpc":"2.0","id":-3.5,"method":"service.info"}', 0,
     None),
    ("id null", b'{"jsonrpc":"2.0","id":null,"method":"service.info"}', 0,
     None),
    ("id bool", b'{"jsonrpc":"2.0","id":false,"method":"service.info"}',
     -32600, "id"),
    ("id object", b'{"jsonrpc":"2.0","id":{},"method":"service.info"}',
     -32600, "id"),
    ("id array", b'{"jsonrpc":"2.0","id":[],"method":"service.info"}',
     -32600, "id"),
    ("notification", b'{"jsonrpc":"2.0","method":"service.info"}', NO, None),
    ("empty batch", b"[]", -32600, None),
    ("batch of numbers", b"[1,2]", "batch2", None),
    ("huge batch", b"[" + b",".join(
        [b'{"jsonrpc":"2.0","id":1,"method":"service.info"}'] * 21) + b"]",
     -32600, None),
    ("request a number", b"3", -32600, None),
    ("params a string",
     b'{"jsonrpc":"2.0","id":1,"method":"service.info","params":"p"}',
     -32600, "params"),
    ("blank", b"   ", NO, None),
    ("line over the limit", b'{"a":"' + b"x" * 5000 + b'"}', -32600, None),
]


def test_corpus():
    d = Daemon("--max-line", "4096", "--max-batch", "20")
    s = d.connect()
    f = s.makefile("rb")
    check("corpus size", len(CORPUS) >= 40, len(CORPUS))
    for name, line, want, param in CORPUS:
        s.sendall(line + b"\n" + PROBE)
        r = readline(f)
        if want == NO:
            ok = r is not None and r.get("id") == "probe"
            check(name + ": no answer", ok, r)
            if not ok:
                break
            continue
        if want == QC:
            res = (r or {}).get("result", {})
            check(name, res.get("qc", 0) != 0 and res.get("vp", 0) is None, r)
        elif want == "batch2":
            check(name, isinstance(r, list) and len(r) == 2 and
                  all(code(e) == -32600 for e in r), r)
        elif want == 0:
            check(name, r is not None and "result" in r, r)
        else:
            data = (r or {}).get("error", {}).get("data", {})
            check(name, code(r) == want, r)
            check(name + ": reason", bool(data.get("reason")), r)
            if param:
                check(name + ": param", data.get("param") == param, r)
        p = readline(f)
        check(name + ": next request served",
              p is not None and p.get("id") == "probe" and
              p.get("result", {}).get("vp") == 3000, p)
    s.close()
    check("daemon alive after corpus", d.p.poll() is None)
    check("clean exit", d.stop() == 0)


def test_limits_reported():
    d = Daemon("--max-line", "123456", "--max-samples", "1000",
               "--max-work", "5000", "--max-batch", "77", "--max-depth",
               "12", "--max-connections", "9", "--high-water", "200K",
               "--max-output", "3M", "--budget", "64M", "--idle-timeout",
               "42.5")
    s = d.connect()
    s.sendall(b'{"jsonrpc":"2.0","id":1,"method":"service.info"}\n')
    r = readline(s.makefile("rb"))
    lim = r["result"]["limits"]
    want = {"max_line_bytes": 123456, "max_samples": 1000, "max_work": 5000,
            "max_batch": 77, "max_depth": 12, "max_connections": 9,
            "output_high_water_bytes": 200 << 10,
            "output_hard_limit_bytes": 3 << 20,
            "global_buffer_budget_bytes": 64 << 20, "idle_timeout_s": 42.5}
    for k, v in want.items():
        check("service.info limits." + k, lim.get(k) == v, (k, lim.get(k)))
    cnt = r["result"]["counters"]
    for k in ("connections_closed_slow", "buffered_bytes",
              "connections_refused"):
        check("service.info counters." + k, k in cnt)
    # max-samples enforced with a named limit error
    s.sendall((EC % ('{"rho":2.4,"vp":[%s],"vs":1500}' %
                     ",".join(["3000"] * 1001))).encode() + b"\n")
    r = readline(s.makefile("rb"))
    check("max-samples enforced", code(r) == -32001, r)
    s.close()
    check("limits daemon exit", d.stop() == 0)
    for bad in (["--max-line", "0"], ["--max-line", "-5"],
                ["--idle-timeout", "nan"], ["--max-output", "1K"],
                ["--listen", "udp:1"], ["--budget", "99999999999G"]):
        p = run([DAEMON, "--stdio"] + bad, stdin=subprocess.DEVNULL,
                timeout=10)
        check("usage error for %s" % bad, p.returncode == 2 and
              bad[0].encode() in p.stderr, p.stderr)


def test_security():
    d = Daemon()
    mode = stat.S_IMODE(os.lstat(d.path).st_mode)
    check("socket mode 0600", mode == 0o600, oct(mode))
    check("socket removed at exit", d.stop() == 0 and
          not os.path.exists(d.path))
    if not built_with("tcp"):
        return  # tests/e2e/test_features.py checks the refusal
    # TCP beyond loopback is refused without --allow-remote
    p = run([DAEMON, "--listen", "tcp:0.0.0.0:0"],
                       stdin=subprocess.DEVNULL,
                       timeout=10)
    check("0.0.0.0 refused", p.returncode == 3 and
          b"--allow-remote" in p.stderr, p.stderr)
    p = run([DAEMON, "--listen", "tcp:[::]:0"],
                       stdin=subprocess.DEVNULL,
                       timeout=10)
    check(":: refused", p.returncode == 3, p.stderr)
    p = run([DAEMON, "--listen", "tcp:example:1"],
                       stdin=subprocess.DEVNULL,
                       timeout=10)
    check("host names other than localhost refused", p.returncode == 3,
          p.stderr)
    # loopback TCP works and warns
    d = Daemon("--listen", "tcp:127.0.0.1:0", sock=False)
    port = None
    deadline = time.time() + 10
    while time.time() < deadline and port is None:
        for ln in d.logtext().splitlines():
            if "listening on tcp:127.0.0.1:" in ln:
                port = int(ln.rsplit(":", 1)[1])
        time.sleep(0.05)
    check("tcp port logged", port is not None, d.logtext())
    if port:
        c = socket.create_connection(("127.0.0.1", port), timeout=10)
        c.sendall(PROBE)
        r = readline(c.makefile("rb"))
        check("tcp request served", r and r["result"]["vp"] == 3000, r)
        c.close()
    check("no-authentication warning", "no authentication" in d.logtext())
    check("tcp daemon exit", d.stop() == 0)
    # --allow-remote binds the wildcard, with the stronger warning; only
    # a loopback client talks to it here.
    d = Daemon("--listen", "tcp:0.0.0.0:0", "--allow-remote", sock=False)
    time.sleep(0.5)
    check("allow-remote warns", "beyond loopback" in d.logtext(),
          d.logtext())
    check("allow-remote exit", d.stop() == 0)


def main():
    if not os.path.exists(DAEMON):
        print("no daemon at", DAEMON)
        return 1
    run_tests([test_corpus, test_limits_reported, test_security])
    return finish()


if __name__ == "__main__":
    sys.exit(main())
