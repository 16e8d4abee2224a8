"""Idle lockout and connection admission (issue: 1024 idle connections
made every later client get -32000 indefinitely). Other local users are
simulated with uids made up for the run: a small client runs as that uid
(setuid in the child; the test runs as root, the daemon's owner).

- --max-per-peer caps the connections of one uid on Unix sockets (one
  address, all of loopback being one, on TCP); the daemon's own uid is
  exempt; every refusal is one -32000 line naming the rule;
- --owner-reserve keeps the last slots for the owner's uid;
- TCP connections have an idle timeout of their own (--tcp-idle-timeout,
  default 120 s), Unix ones keep --idle-timeout (default off);
- with `ulimit -n 64`, connections past what the descriptors allow are
  answered -32000 (none closed unanswered), the limit is logged once and
  the refusals are counted;
- a burst of 3000 refused connections logs a handful of warnings and one
  line saying how many were not logged.
Needs root for the uid cases (prints SKIP for them otherwise). Runs under
/usr/bin/python3 with RW_BUILD set; prints "N passed, M failed"."""
import json
import os
import resource
import socket
import subprocess
import sys
import tempfile
import time

from rwtest import (DAEMON, Daemon, built_with, check, finish, run,
                    run_tests, spawn)

B = 3300000 + (os.getpid() % 100000) * 2
C = B + 1

# Opens argv[2] connections to argv[1] one after the other, sends one
# request on each and prints what came back (one JSON list), then keeps
# them open until its stdin closes.
CLIENT = r'''
import json, socket, sys
path, n = sys.argv[1], int(sys.argv[2])
out, keep = [], []
for i in range(n):
    s = socket.socket(socket.AF_UNIX)
    s.settimeout(10)
    try:
        s.connect(path)
        s.sendall(b'{"jsonrpc":"2.0","id":%d,"method":"service.info"}\n' % i)
        line = s.makefile("rb").readline()
        r = json.loads(line) if line else None
        out.append("ok" if r and "result" in r else
                   (r or {}).get("error", {}).get("data", {}).get(
                       "reason", "closed unanswered"))
    except OSError as e:
        out.append("oserror " + str(e))
    if out[-1] == "ok":
        keep.append(s)
    else:
        s.close()
print(json.dumps(out), flush=True)
sys.stdin.read()
'''


def as_uid(uid):
    def f():
        os.setgroups([])
        os.setgid(uid)
        os.setuid(uid)
    return f


def open_as(uid, path, n):
    """Runs the client as uid; returns (results, process holding them)."""
    p = spawn([sys.executable, "-c", CLIENT, path, str(n)],
              preexec=as_uid(uid) if uid is not None else None,
              stdin=subprocess.PIPE, stdout=subprocess.PIPE)
    line = p.stdout.readline()
    return (json.loads(line) if line else []), p


def release(p):
    p.stdin.close()
    p.wait(10)


def shared_daemon(*args):
    """A daemon whose socket other uids can reach."""
    d = Daemon("--socket-mode", "0666", "--allow-world-access", *args,
               path=os.path.join(tempfile.mkdtemp(prefix="rw-conns-"),
                                 "rw.sock"))
    os.chmod(os.path.dirname(d.path), 0o755)
    settle(d)
    return d


def info_closed(d):
    """service.info on a connection that is closed (by the daemon, after
    our shutdown) before this returns, so it holds no slot afterwards."""
    s = d.connect(10)
    s.sendall(b'{"jsonrpc":"2.0","id":1,"method":"service.info"}\n')
    s.shutdown(socket.SHUT_WR)
    data = b""
    while True:
        chunk = s.recv(65536)
        if not chunk:
            break
        data += chunk
    s.close()
    return json.loads(data)["result"]


def settle(d, timeout=10):
    """Waits until the daemon holds no connection but the asking one (the
    start-up probe's close may not be seen yet)."""
    deadline = time.time() + timeout
    while time.time() < deadline:
        if info_closed(d)["counters"]["connections_open"] <= 1:
            return True
        time.sleep(0.05)
    return False


def counted(d, rule_words):
    return [x for x in d.logtext().splitlines() if rule_words in x]


def test_per_peer():
    d = shared_daemon("--max-per-peer", "5")
    rb, pb = open_as(B, d.path, 8)
    check("uid B: 5 connections served", rb[:5] == ["ok"] * 5, rb)
    check("uid B: the next 3 refused naming the cap",
          len(rb) == 8 and all("uid %d" % B in x and "--max-per-peer" in x
                               for x in rb[5:]), rb)
    ro, po = open_as(None, d.path, 20)
    check("the owner is not capped per peer", ro == ["ok"] * 20, ro)
    rc, pc = open_as(C, d.path, 3)
    check("uid C has a cap of its own", rc == ["ok"] * 3, rc)
    for p in (pb, po, pc):
        release(p)
    info = d.info()
    check("refusals counted", info["counters"]["connections_refused"] == 3,
          info["counters"])
    check("per-peer refusal logged",
          len(counted(d, "per-peer limit")) == 3, d.logtext()[-600:])
    check("per-peer daemon exit 0", d.stop() == 0)


def test_owner_reserve():
    d = shared_daemon("--max-connections", "12", "--owner-reserve", "4",
                      "--max-per-peer", "0")
    rb, pb = open_as(B, d.path, 10)
    check("others fill all but the reserve (8 of 12)", rb[:8] == ["ok"] * 8,
          rb)
    check("then others are refused: kept for the owner",
          len(rb) == 10 and all("kept for the socket's owner" in x
                                for x in rb[8:]), rb)
    ro, po = open_as(None, d.path, 5)
    check("the owner still gets the 4 reserved slots", ro[:4] == ["ok"] * 4,
          ro)
    check("past the limit the owner is refused too",
          len(ro) == 5 and "too many connections" in ro[4], ro)
    release(pb)
    release(po)
    check("reserve daemon serves after", d.serves())
    check("reserve daemon exit 0", d.stop() == 0)


def tcp_port(d):
    deadline = time.time() + 10
    while time.time() < deadline:
        for ln in d.logtext().splitlines():
            if "listening on tcp:127.0.0.1:" in ln:
                return int(ln.rsplit(":", 1)[1])
        time.sleep(0.02)
    return None


def tcp_call(port, src):
    s = socket.socket(socket.AF_INET)
    s.settimeout(10)
    s.bind((src, 0))
    s.connect(("127.0.0.1", port))
    s.sendall(b'{"jsonrpc":"2.0","id":1,"method":"service.info"}\n')
    r = json.loads(s.makefile("rb").readline() or b"null")
    return s, r


def test_tcp_peer_and_idle():
    d = Daemon("--listen", "tcp:127.0.0.1:0", "--max-per-peer", "4",
               "--tcp-idle-timeout", "1", sock=False, wait=False)
    port = tcp_port(d)
    check("tcp listener up", port is not None, d.logtext())
    socks, res = [], []
    for i in range(6):  # from two loopback addresses: one peer
        s, r = tcp_call(port, "127.0.0.1" if i % 2 else "127.0.0.2")
        socks.append(s)
        res.append("ok" if r and "result" in r else
                   (r or {}).get("error", {}).get("data", {}).get("reason"))
    check("loopback is one peer: 4 served, 2 refused",
          res[:4] == ["ok"] * 4 and all("loopback" in (x or "")
                                        for x in res[4:]), res)
    for s in socks:
        s.close()
    # idle TCP connections are closed; the idle timeout is --tcp-idle
    deadline = time.time() + 10
    while True:  # until the daemon has seen the closes above
        s, r = tcp_call(port, "127.0.0.1")
        if (r and "result" in r) or time.time() > deadline:
            break
        s.close()
        time.sleep(0.05)
    check("tcp served again once the others closed", r and "result" in r,
          r)
    t0 = time.time()
    s.settimeout(15)
    gone = s.recv(100) == b""
    took = time.time() - t0
    print("idle TCP connection closed after %.1f s" % took)
    check("idle TCP connection closed by the daemon", gone)
    s.close()
    check("idle close logged", "s idle" in d.logtext())
    d.stop()
    # Unix connections keep --idle-timeout (off by default) meanwhile
    u = Daemon("--tcp-idle-timeout", "1")
    c = u.connect()
    time.sleep(2.5)
    c.sendall(b'{"jsonrpc":"2.0","id":1,"method":"service.info"}\n')
    line = c.makefile("rb").readline()
    check("an idle Unix connection is not closed by the TCP rule",
          b'"result"' in line, line)
    c.close()
    u.stop()
    h = run([DAEMON, "--help"], timeout=10).stdout.decode()
    check("TCP idle timeout on by default (--help: default 120)",
          "--tcp-idle-timeout" in h and "default 120" in h, h[-300:])


def test_fd_limit():
    def lim():
        resource.setrlimit(resource.RLIMIT_NOFILE, (64, 64))
    d = Daemon(preexec=lim)
    settle(d)
    socks, res = [], []
    for i in range(100):
        s = socket.socket(socket.AF_UNIX)
        s.settimeout(10)
        try:
            s.connect(d.path)
            s.sendall(b'{"jsonrpc":"2.0","id":%d,"method":"service.info"}'
                      b'\n' % i)
            line = s.makefile("rb").readline()
            r = json.loads(line) if line else None
            res.append("ok" if r and "result" in r else
                       (r or {}).get("error", {}).get("data", {}).get(
                           "reason", "closed unanswered"))
        except OSError as e:
            res.append("oserror %s" % e)
        if res[-1] == "ok":
            socks.append(s)  # held open
        else:
            s.close()
    served = res.count("ok")
    fds = [x for x in res if "file descriptors" in x]
    print("ulimit -n 64: %d served, %d refused for descriptors, others %r" %
          (served, len(fds), [x for x in res if x != "ok" and x not in fds]))
    check("some connections served under ulimit -n 64", 20 < served < 64,
          served)
    check("every later connection answered -32000 (none unanswered)",
          served + len(fds) == 100, res)
    for s in socks:
        s.close()
    time.sleep(0.3)
    info = d.info()
    check("descriptor refusals counted",
          info["counters"]["connections_refused"] == len(fds),
          info["counters"])
    log = d.logtext()
    check("the descriptor limit logged once at start",
          len(counted(d, "ulimit -n 64 leaves room")) == 1, log[-800:])
    check("running out logged once",
          len(counted(d, "out of file descriptors (ulimit")) == 1,
          log[-800:])
    check("fd daemon serves after", d.serves())
    check("fd daemon exit 0", d.stop() == 0)


def call_line(s):
    s.sendall(b'{"jsonrpc":"2.0","id":1,"method":"service.info"}\n')
    return s.makefile("rb").readline()


def test_refusal_log_rate():
    d = Daemon("--max-connections", "1")
    deadline = time.time() + 10
    while True:  # until the start-up probe's slot is free again
        hold = d.connect()
        r = json.loads(call_line(hold) or b"null")
        if (r and "result" in r) or time.time() > deadline:
            break
        hold.close()
        time.sleep(0.05)
    check("one connection holds the only slot", r and "result" in r, r)
    n, answered = 3000, 0
    for _ in range(n):
        s = socket.socket(socket.AF_UNIX)
        s.settimeout(10)
        try:
            s.connect(d.path)
            answered += b"-32000" in s.makefile("rb").readline()
        except OSError:
            pass
        s.close()
    check("all %d refused connections answered -32000" % n,
          answered == n, answered)
    lines = counted(d, "refused (")
    print("%d refused connections: %d warning lines" % (n, len(lines)))
    check("refusal warnings rate-limited", len(lines) <= 10, len(lines))
    deadline = time.time() + 15
    while time.time() < deadline and not counted(d, "not logged"):
        time.sleep(0.25)
    check("and the rest summed up in one line",
          len(counted(d, "not logged")) == 1, d.logtext()[-400:])
    hold.close()
    check("rate daemon exit 0", d.stop() == 0)


def main():
    if not os.path.exists(DAEMON):
        print("no daemon at", DAEMON)
        return 1
    tests = [test_fd_limit, test_refusal_log_rate]
    if built_with("tcp"):
        tests.insert(0, test_tcp_peer_and_idle)
    if os.geteuid() == 0:
        tests = [test_per_peer, test_owner_reserve] + tests
    else:
        print("SKIP: per-uid cases need root to simulate other users")
    run_tests(tests)
    return finish()


if __name__ == "__main__":
    sys.exit(main())
