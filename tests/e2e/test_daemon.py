"""End to end: rockwired on stdio (pipe, regular file, /dev/null, a
terminal) and on a Unix socket (mode, concurrency, framing across reads,
oversized lines, SIGTERM with requests in flight, stale and live sockets),
and the rockwire client (call, send, spawned default). Every response is
also validated against protocol-docs/openrpc.json."""
import json
import os
import pty
import signal
import socket
import stat
import subprocess
import threading
import time

from rwtest import (CLIENT, DAEMON, Checks, Daemon, call, read_lines, req,
                    run, spawn, stdio, validate_response)

t = Checks()

REQS = [
    req("service.info", id=1),
    req("elastic.convert", {"rho": 2.65, "k": 36.6, "mu": 45}, id=2),
    req("elastic.convert", {"rho": [2.2, 2.3], "vp": [3000, 3100],
                            "vs": 1500}, id="three"),
    '{"jsonrpc":"2.0","method":"service.info"}',
    "not json",
    req("elastic.convert", {"rho": 2.3, "vp": 3000, "ai": 6900}, id=None),
    '[' + req("rpc.discover", id=5) + ',' + req("nope", id=6) + ']',
]
METHODS = {1: "service.info", 2: "elastic.convert", "three": "elastic.convert",
           5: "rpc.discover"}


def strip_counters(text):
    """service.info counters and transport differ between runs."""
    out = []
    for line in text.splitlines():
        r = json.loads(line)
        items = r if isinstance(r, list) else [r]
        for x in items:
            res = x.get("result")
            if isinstance(res, dict):
                res.pop("counters", None)
                res.pop("transport", None)
        out.append(json.dumps(r, sort_keys=True))
    return out


def check_schema(lines, where):
    for line in lines:
        r = json.loads(line)
        for x in (r if isinstance(r, list) else [r]):
            m = METHODS.get(x.get("id"), "elastic.convert")
            probs = validate_response(m, x)
            t.ok(not probs, "%s: schema: %s" % (where, probs[:3]))


# --- stdio: pipe, file, /dev/null, tty give identical answers -------------
rc, out_pipe, err = stdio(REQS)
t.ok(rc == 0, "stdio pipe exits 0 at EOF (rc %s, %s)" % (rc, err))
t.ok(len(out_pipe.splitlines()) == 6, "6 answers (one notification): %d"
     % len(out_pipe.splitlines()))
t.ok(err == "", "nothing on stderr in a clean stdio run: %r" % err[:200])
check_schema(out_pipe.splitlines(), "stdio")
rc, out_file, err = stdio(REQS, stdin_file="/tmp/rw-e2e-stdin-%d" % os.getpid())
t.ok(rc == 0 and strip_counters(out_file) == strip_counters(out_pipe),
     "regular-file stdin gives the same answers")
p = run([DAEMON, "--stdio"], stdin=subprocess.DEVNULL, timeout=20)
t.ok(p.returncode == 0 and p.stdout == b"", "/dev/null stdin: exit 0, no output")
# stdout to a regular file
with open("/tmp/rw-e2e-out-%d" % os.getpid(), "w+b") as f:
    p = run([DAEMON, "--stdio"], input=("\n".join(REQS) + "\n").encode(),
            stdout=f, stderr=subprocess.PIPE, timeout=20)
    f.seek(0)
    t.ok(strip_counters(f.read().decode()) == strip_counters(out_pipe),
         "regular-file stdout gives the same answers")

# a terminal on stdin
master, slave = pty.openpty()
proc = spawn([DAEMON, "--stdio"], stdin=slave,
             stdout=subprocess.PIPE, stderr=subprocess.PIPE)
os.close(slave)
for line in REQS[:3]:
    os.write(master, line.encode() + b"\n")
os.write(master, b"\x04")  # end of input at the start of a line
try:
    out, err = proc.communicate(timeout=20)
except subprocess.TimeoutExpired:
    proc.kill()
    out, err = proc.communicate()
os.close(master)
t.ok(strip_counters(out.decode()) == strip_counters(out_pipe)[:3],
     "terminal stdin gives the same answers (%r)" % out[:200])

# --- socket ---------------------------------------------------------------
d = Daemon()
mode = stat.S_IMODE(os.lstat(d.path).st_mode)
t.ok(mode == 0o600, "socket mode is 0600 (%o)" % mode)
s = d.connect()
s.sendall(("\n".join(REQS) + "\n").encode())
got = read_lines(s, 6)
t.ok(strip_counters("\n".join(got)) == strip_counters(out_pipe),
     "socket answers equal stdio answers")
check_schema(got, "socket")
# one byte per write gives the same answers
s2 = d.connect()
for b in ("\n".join(REQS[1:3]) + "\n").encode():
    s2.sendall(bytes([b]))
got2 = read_lines(s2, 2)
t.ok(strip_counters("\n".join(got2)) == strip_counters(out_pipe)[1:3],
     "byte-by-byte writes give the same answers")
s2.close()
# many concurrent connections, each pipelining, answers in order
errors = []


def worker(k):
    try:
        c = d.connect()
        lines = [req("elastic.convert", {"rho": 2.3, "vp": 3000 + i,
                                         "vs": 1500}, id=i) for i in range(200)]
        c.sendall(("\n".join(lines) + "\n").encode())
        rs = read_lines(c, 200)
        ids = [json.loads(x)["id"] for x in rs]
        if ids != list(range(200)):
            errors.append("conn %d: ids out of order or missing" % k)
        c.close()
    except Exception as e:  # noqa: BLE001 - report any failure
        errors.append("conn %d: %r" % (k, e))


threads = [threading.Thread(target=worker, args=(k,)) for k in range(32)]
for th in threads:
    th.start()
for th in threads:
    th.join(60)
t.ok(not errors, "32 concurrent pipelined connections: %s" % errors[:3])
s.close()

# --- oversized line --------------------------------------------------------
d2 = Daemon("--max-line", "1000")
c = d2.connect()
c.sendall(b'{"jsonrpc":"2.0","id":1,"method":"service.info","params":{"x":"'
          + b"y" * 5000 + b'"}}\n' + req("service.info", id=2).encode() + b"\n")
rs = read_lines(c, 2)
r0 = json.loads(rs[0])
t.ok(r0["error"]["code"] == -32600 and "1000" in r0["error"]["data"]["reason"],
     "oversized line answered with -32600 naming the limit: %r" % rs[0])
t.ok(json.loads(rs[1]).get("id") == 2, "the next line is served")
c.close()
d2.stop()

# --- live daemon on the path: refused; stale socket: reclaimed -------------
p = run([DAEMON, "--socket", d.path],
        timeout=20)
t.ok(p.returncode == 3 and b"already listening" in p.stderr,
     "a second daemon on a live path exits 3 with a clear message (%d %r)"
     % (p.returncode, p.stderr[-200:]))
t.ok(call(d.connect(), req("service.info"))["result"]["name"] == "rockwire",
     "the first daemon still serves")

# --- the server's own settings are reported in service.info ----------------
d4 = Daemon("--max-per-peer", "7", "--offload-work", "55", "--backlog", "99",
            "--pool-per-peer", "2", path=os.path.join(d.dir, "set.sock"))
lim = call(d4.connect(), req("service.info"))["result"]["limits"]
t.ok(lim.get("max_per_peer") == 7 and lim.get("offload_work") == 55 and
     lim.get("backlog") == 99 and lim.get("pool_per_peer") == 2 and
     lim.get("owner_reserve") == 16 and lim.get("connection_cap", 0) >= 1,
     "server settings in service.info limits: %r" % lim)
d4.stop()

stale = os.path.join(d.dir, "stale.sock")
u = socket.socket(socket.AF_UNIX, socket.SOCK_STREAM)
u.bind(stale)
u.close()  # the file stays, nobody listens
d3 = Daemon(path=stale)
t.ok(call(d3.connect(), req("service.info"))["result"]["name"] == "rockwire",
     "stale socket file reclaimed")
t.ok(d3.stop() == 0 and not os.path.exists(stale),
     "socket removed at exit")
notsock = os.path.join(d.dir, "plain-file")
open(notsock, "w").close()
p = run([DAEMON, "--socket", notsock],
        timeout=20)
t.ok(p.returncode == 3 and os.path.exists(notsock),
     "a path that is not a socket is refused and left alone")

# --- SIGTERM with requests in flight ---------------------------------------
c = d.connect()
n = 3000
# Answers are read from a thread while the requests go out: the daemon
# stops reading a connection whose answers are not being read
# (back-pressure), so a sendall of everything could wait on our reading.
blob = ("\n".join(req("elastic.convert", {"rho": 2.3, "vp": [3000] * 50,
                                        "vs": 1500}, id=i)
                for i in range(n)) + "\n").encode()
got = {}
reader = threading.Thread(
    target=lambda: got.update(rs=read_lines(c, n + 1, timeout=30)))
reader.start()
c.sendall(blob)  # returns once the daemon has taken every byte
time.sleep(0.2)  # the daemon has read the requests
d.proc.send_signal(signal.SIGTERM)
reader.join()
rs = got.get("rs", [])
ids = [json.loads(x)["id"] for x in rs]
t.ok(ids == list(range(n)), "every request sent before SIGTERM is answered "
     "(%d of %d)" % (len(ids), n))
rc = d.stop()
t.ok(rc == 0, "exit 0 after SIGTERM (%s)" % rc)
t.ok(not os.path.exists(d.path), "socket file removed after SIGTERM")

# --- client ------------------------------------------------------------------
d4 = Daemon()
env = dict(os.environ)
p = run([CLIENT, "--socket", d4.path, "call", "elastic.convert",
         "rho=2.65", "k=36.6", "mu=45"],
        timeout=20)
res = json.loads(p.stdout)
t.ok(p.returncode == 0 and abs(res["vp"] - 6037.6) < 0.1,
     "rockwire call prints the result as one line (%r)" % p.stdout[:100])
t.ok(len(p.stdout.splitlines()) == 1, "compact output when not a terminal")
p = run([CLIENT, "--socket", d4.path, "call", "elastic.convert",
         "rho=2.65", "k=36.6"], timeout=20)
t.ok(p.returncode == 1 and b"-32602" in p.stderr and p.stdout == b"",
     "an error goes to stderr with exit 1 (%r)" % p.stderr)
p = run([CLIENT, "--socket", d4.path, "call", "elastic.convert",
         "rho=[2.2,2.3]", "vp=[3000,3100]", "vs=1500", "--table"], timeout=20)
head = p.stdout.decode().splitlines()
t.ok(p.returncode == 0 and any("vp[m/s]" in h for h in head) and len(head) >= 3,
     "--table prints columns with units (%r)" % head[:2])
p = run([CLIENT, "--socket", d4.path, "call", "elastic.convert",
         "--params", '{"rho":2.3,"vp":3,"vs":1.5}',
         "units.velocity=km/s"], timeout=20)
t.ok(p.returncode == 0 and json.loads(p.stdout)["units"]["vp"] == "km/s",
     "--params and dotted names combine")
many = "\n".join(req("elastic.convert", {"rho": 2.3, "vp": 3000, "vs": 1500},
                     id=i) for i in range(5000)) + "\n"
p = run([CLIENT, "--socket", d4.path, "send", "-"],
        input=many.encode(), timeout=60)
ids = [json.loads(x)["id"] for x in p.stdout.splitlines()]
t.ok(p.returncode == 0 and ids == list(range(5000)),
     "rockwire send pipelines 5000 requests in order")
# spawned default: nothing listens on the given path
p = run([CLIENT, "--socket", os.path.join(d4.dir, "nobody.sock"),
         "call", "service.info"], timeout=20)
t.ok(p.returncode == 0 and json.loads(p.stdout)["transport"] == "stdio",
     "with nothing listening the client spawns a private daemon")
p = run([CLIENT, "--socket", d4.path, "--spawn", "send"],
        input=many.encode(), timeout=60)
t.ok(p.returncode == 0 and len(p.stdout.splitlines()) == 5000,
     "--spawn send works through a private daemon")
t.ok(d4.stop() == 0, "daemon exits 0")

t.done()
