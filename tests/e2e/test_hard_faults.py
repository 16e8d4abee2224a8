"""Faults the daemon must survive, each followed by a check that it still
serves: disconnects mid-line, mid-batch, while answers are written and
while a thread-pool job works for the client; a one-byte-per-second
client; a connect-and-vanish flood; a malformed line mid-pipeline; the
slow-reader rule (closed past the hard bound when it stops reading, not
closed while it keeps reading a big answer); the global budget; a heavy
request not stalling another connection; SIGHUP reopening --log; SIGTERM
under load (stop accepting, answer what was read, exit 0 within 10 s).
All traffic is on Unix sockets in a temporary directory; every loop is
bounded. Runs under /usr/bin/python3 with RW_BUILD set.
"""
import json
import os
import signal
import socket
import struct
import subprocess
import sys
import tempfile
import threading
import time

from rwtest import DAEMON, Daemon, check, finish, run, run_tests


def req(i, n=1):
    vp = "3000" if n == 1 else "[" + ",".join(["3000"] * n) + "]"
    return ('{"jsonrpc":"2.0","id":%d,"method":"elastic.convert","params":'
            '{"rho":2.4,"vp":%s,"vs":1500}}\n' % (i, vp)).encode()


def rst_close(s):
    s.setsockopt(socket.SOL_SOCKET, socket.SO_LINGER, struct.pack("ii", 1, 0))
    s.close()


def test_disconnects(d):
    for name, data in (
            ("mid-line", b'{"jsonrpc":"2.0","id":1,"method":"elas'),
            ("mid-batch", b'[' + req(1)[:-1] + b',' + req(2)[:40]),
            ("after a complete line", req(1))):
        for closer in (lambda s: s.close(), rst_close):
            s = d.connect()
            s.sendall(data)
            closer(s)
        check("disconnect " + name + ": still serving", d.serves())
    # while its answers are being written: lots of big answers, unread
    for k in range(3):
        s = d.connect()
        try:
            s.sendall(b"".join(req(i, 500) for i in range(200)))
        except OSError:
            pass
        time.sleep(0.1)
        rst_close(s) if k % 2 else s.close()
    check("disconnect while writing: still serving", d.serves())
    check("disconnects: daemon alive", d.p.poll() is None)


def test_vanish_during_work(d):
    # d runs with --offload 4K: this line goes to the thread pool.
    big = req(9, 20000)
    for k in range(10):
        s = d.connect()
        s.sendall(big)
        if k % 2:
            rst_close(s)
        else:
            s.close()
    time.sleep(0.5)
    check("vanish during thread-pool work: still serving", d.serves())
    check("vanish during work: alive", d.p.poll() is None)


def test_trickle(d):
    """One byte every 0.25 s for a few seconds; others are served."""
    s = d.connect()
    line = req(5)
    other_ok = True
    t0 = time.time()
    for i, b in enumerate(line[:12]):
        s.sendall(bytes([b]))
        if i % 4 == 0:
            t1 = time.time()
            other_ok = other_ok and d.serves() and time.time() - t1 < 2
        time.sleep(0.25)
    s.sendall(line[12:])
    r = json.loads(s.makefile("rb").readline())
    check("trickled request answered", r.get("id") == 5 and
          r["result"]["vp"] == 3000, r)
    check("others served during the trickle", other_ok)
    check("trickle bounded", time.time() - t0 < 30)
    s.close()


def test_flood(d):
    n_ok = 0
    for i in range(400):
        try:
            s = socket.socket(socket.AF_UNIX)
            s.settimeout(5)
            s.connect(d.path)
            if i % 3 == 0:
                rst_close(s)
            elif i % 3 == 1:
                s.close()
            else:
                s.sendall(b'{"jsonrpc":"2.0","id":1,"meth')
                s.close()
            n_ok += 1
        except OSError:
            time.sleep(0.01)
    check("flood connections made", n_ok > 300, n_ok)
    time.sleep(0.5)
    check("after flood: serving", d.serves())
    info = d.info()
    check("after flood: connections drained",
          info["counters"]["connections_open"] <= 2, info["counters"])


def test_malformed_mid_pipeline(d):
    lines = [req(i) for i in range(100)]
    lines[50] = b'{"jsonrpc":"2.0","id":50,"method":"elastic.convert",' \
                b'"params":{"rho":2.4,"vp":[1,2],"vs":[1,2,3]}}\n'
    lines[70] = b'{"broken\n'
    s = d.connect()
    s.sendall(b"".join(lines))
    f = s.makefile("rb")
    got = [json.loads(f.readline()) for _ in range(100)]
    ids = [r.get("id") for r in got]
    want_ids = list(range(100))
    want_ids[70] = None
    check("pipeline: every line answered in order", ids == want_ids, ids)
    errs = [i for i, r in enumerate(got) if "error" in r]
    check("pipeline: only the bad lines are errors", errs == [50, 70], errs)
    check("pipeline: codes", got[50]["error"]["code"] == -32602 and
          got[70]["error"]["code"] == -32700)
    s.close()


def test_heavy_does_not_stall(d):
    """A heavy request on one connection; small ones elsewhere stay fast."""
    a = d.connect(60)
    a.sendall(req(1, 60000))
    got = {}

    def read_a():
        f = a.makefile("rb")
        got["a"] = f.readline()

    t = threading.Thread(target=read_a)
    t.start()
    worst = 0.0
    b = d.connect()
    fb = b.makefile("rb")
    for i in range(20):
        t0 = time.time()
        b.sendall(req(i))
        json.loads(fb.readline())
        worst = max(worst, time.time() - t0)
    t.join(60)
    r = json.loads(got.get("a", b"{}") or b"{}")
    check("heavy answer complete", r.get("result", {}).get("n") == 60000)
    check("small requests fast beside a heavy one", worst < 1.0, worst)
    a.close()
    b.close()


def test_slow_rule():
    d = Daemon("--high-water", "256K", "--max-output", "1M",
               "--stall-timeout", "1")
    # A non-reader with several MB of answers is closed.
    s = d.connect()
    s.setsockopt(socket.SOL_SOCKET, socket.SO_RCVBUF, 4096)
    s.sendall(req(1, 40000))
    deadline = time.time() + 10
    closed = False
    while time.time() < deadline and not closed:
        time.sleep(0.25)
        closed = "closed as slow" in d.logtext()
    check("non-reader closed as slow", closed, d.logtext()[-500:])
    info = d.info()
    check("connections_closed_slow counted",
          info["counters"]["connections_closed_slow"] == 1, info["counters"])
    s.close()
    # A reader that keeps taking a big answer (~10 MB, 10x the hard
    # bound) is not closed, even when it reads slowly.
    s = d.connect(60)
    s.sendall(req(2, 40000))
    buf = bytearray()
    t0 = time.time()
    while not buf.endswith(b"\n") and time.time() - t0 < 60:
        chunk = s.recv(262144)
        if not chunk:
            break
        buf += chunk
        time.sleep(0.02)
    r = json.loads(bytes(buf)) if buf.endswith(b"\n") else {}
    check("slow but steady reader gets its whole big answer",
          r.get("result", {}).get("n") == 40000 and len(buf) > (1 << 20),
          len(buf))
    check("still one slow close", d.info()["counters"]
          ["connections_closed_slow"] == 1)
    s.close()
    check("slow rule daemon exit 0", d.stop() == 0)


def test_budget():
    d = Daemon("--budget", "1M")
    a = d.connect()
    a.sendall(b'{"jsonrpc":"2.0","id":1,"method":"x","params":{"s":"' +
              b"y" * 300000)
    time.sleep(0.3)
    info = d.info()
    check("buffered_bytes shows a partial line",
          info["counters"]["buffered_bytes"] >= 300000, info["counters"])
    a.sendall(b"y" * 800000)
    time.sleep(0.5)
    b = d.connect(1.5)
    b.sendall(req(3))
    try:
        b.recv(100)
        waited = False
    except socket.timeout:
        waited = True
    check("past the budget new reads wait", waited)
    a.close()
    b.settimeout(10)
    r = json.loads(b.makefile("rb").readline())
    check("reads resume once the budget frees", r.get("id") == 3, r)
    b.close()
    info = d.info()
    check("buffered_bytes back down",
          info["counters"]["buffered_bytes"] < 100000, info["counters"])
    check("budget log", "past the budget" in d.logtext())
    check("budget daemon exit 0", d.stop() == 0)


def test_unfinished_lines():
    """An unfinished line over the high-water mark must keep arriving
    (the stalled-input rule); one that keeps coming is served."""
    d = Daemon("--high-water", "256K", "--stall-timeout", "1")
    s = d.connect(20)
    s.sendall(b'{"jsonrpc":"2.0","id":1,"method":"x","params":{"s":"' +
              b"y" * (1 << 20))
    t0 = time.time()
    line = s.makefile("rb").readline()
    took = time.time() - t0
    r = json.loads(line) if line else {}
    print("stalled 1 MiB line answered after %.1f s: %s" % (took, line[:120]))
    check("a stalled unfinished line gets one error",
          r.get("error", {}).get("code") == -32600 and "stalled" in
          r["error"].get("data", {}).get("reason", ""), line)
    check("and its connection is closed", s.recv(10) == b"")
    s.close()
    check("counted as closed slow",
          d.info()["counters"]["connections_closed_slow"] == 1)
    check("others still served", d.serves())
    # a big line that keeps coming (about 128 KiB every 0.5 s) is served
    s = d.connect(30)
    s.sendall(b'{"jsonrpc":"2.0","id":2,"method":"elastic.convert",'
              b'"params":{"rho":2.4,"vs":1500,"vp":[3000')
    chunk = b",3000" * 26000
    for _ in range(8):
        time.sleep(0.5)
        s.sendall(chunk)
    s.sendall(b"]}}\n")
    r = json.loads(s.makefile("rb").readline() or b"{}")
    check("a steady big line is served whole",
          r.get("result", {}).get("n") == 8 * 26000 + 1, str(r)[:200])
    s.close()
    check("unfinished-line daemon exit 0", d.stop() == 0)


def test_budget_reserve():
    """Big unfinished lines that fill the budget leave its last eighth
    to new and small requests."""
    d = Daemon("--budget", "8M")
    big = b'{"jsonrpc":"2.0","id":1,"method":"x","params":{"s":"' + \
        b"y" * (1900 << 10)
    socks = []

    def send(s):
        try:
            s.sendall(big)
        except OSError:
            pass

    ts = []
    # Four lines of 1.9 MiB, 7.4 MiB in all: into the last eighth of the
    # 8 MiB budget however the reads interleave, but never past the
    # budget itself, where by design nobody is read (five lines could
    # get there when their reads interleave evenly, and the small
    # request below would then wait like everyone else).
    for _ in range(4):
        s = d.connect(5)
        socks.append(s)
        ts.append(threading.Thread(target=send, args=(s,), daemon=True))
        ts[-1].start()
    time.sleep(1.5)
    t0 = time.time()
    try:
        b = d.connect(10)
        b.sendall(req(7))
        r = json.loads(b.makefile("rb").readline() or b"{}")
        b.close()
    except OSError as e:
        r = {"error": repr(e)}
    print("small request beside 4 big unfinished lines: %.2f s" %
          (time.time() - t0))
    check("a small request is served while big lines fill the budget",
          r.get("id") == 7 and "result" in r, r)
    cnt = d.info()["counters"]
    check("the big lines were held under the budget (%d bytes)" %
          cnt["buffered_bytes"], cnt["buffered_bytes"] <= (8 << 20), cnt)
    check("reserve logged", "last eighth of the budget" in d.logtext())
    for s in socks:
        s.close()
    check("budget-reserve daemon exit 0", d.stop() == 0)


def test_sighup():
    d0 = tempfile.mkdtemp(prefix="rw-hard-")
    log = os.path.join(d0, "daemon.log")
    d = Daemon("--log", log)
    check("log file used", "listening on" in open(log).read())
    check("log file mode 0600", os.stat(log).st_mode & 0o777 == 0o600)
    os.rename(log, log + ".1")
    d.p.send_signal(signal.SIGHUP)
    deadline = time.time() + 5
    while time.time() < deadline and not os.path.exists(log):
        time.sleep(0.05)
    check("SIGHUP reopens the log", os.path.exists(log) and
          "log reopened" in open(log).read())
    check("served after SIGHUP", d.serves())
    check("sighup daemon exit 0", d.stop() == 0)
    check("stop logged in the new file", "SIGTERM" in open(log).read())


def test_sigterm_under_load():
    d = Daemon()
    n = 3000
    conns, results = [], {}

    def client(k):
        s = d.connect(30)
        conns.append(s)
        f = s.makefile("rb")
        try:
            s.sendall(b"".join(req(i) for i in range(n)))
        except OSError:
            pass
        ids = []
        while True:
            try:
                line = f.readline()
            except OSError:
                break
            if not line:
                break
            ids.append(json.loads(line).get("id"))
        results[k] = ids

    ts = [threading.Thread(target=client, args=(k,)) for k in range(8)]
    for t in ts:
        t.start()
    time.sleep(0.3)
    t0 = time.time()
    d.p.send_signal(signal.SIGTERM)
    try:
        rc = d.p.wait(12)
    except subprocess.TimeoutExpired:
        rc = None
    took = time.time() - t0
    for t in ts:
        t.join(20)
    check("SIGTERM under load: exit 0", rc == 0, rc)
    check("SIGTERM under load: within 10 s", took < 10, took)
    for k, ids in results.items():
        check("conn %d: answers are an in-order prefix" % k,
              ids == list(range(len(ids))), ids[:5])
    check("some answers came", sum(len(v) for v in results.values()) > 0)
    check("socket removed", not os.path.exists(d.path))
    try:
        socket.socket(socket.AF_UNIX).connect(d.path)
        refused = False
    except OSError:
        refused = True
    check("no longer accepting", refused)
    d.stop()


def test_stdio_errors():
    """--stdio used to exit 0 without a word when its answers could not
    be written (stdout closed, a full disk, a reader that went away)."""
    line = b'{"jsonrpc":"2.0","id":1,"method":"rpc.discover"}\n'
    cases = [
        ("stdout closed", 'exec "$0" --stdio >&-', "stdout is closed"),
        ("stdin closed", 'exec "$0" --stdio <&-', "stdin is closed"),
        ("stdout /dev/full", 'exec "$0" --stdio >/dev/full',
         "no space left"),
        # the reader goes away: the answer (112 KB) is more than the
        # pipe holds, so it cannot all be written before
        ("stdout broken pipe",
         '("$0" --stdio < "$1"; echo "rc=$?" >&2) | true', "broken pipe"),
    ]
    tmp = tempfile.mkdtemp(prefix="rw-stdio-")
    req_file = os.path.join(tmp, "req")
    with open(req_file, "wb") as f:
        f.write(line)
    for name, script, words in cases:
        p = run(["sh", "-c", script, DAEMON, req_file], input=line,
                timeout=20)
        err = p.stderr.decode()
        rc = p.returncode
        if "rc=" in err:  # the daemon's own status, through the shell
            rc = int(err.rsplit("rc=", 1)[1].split()[0])
        check("--stdio, %s: exit 4" % name, rc == 4, (rc, err))
        check("--stdio, %s: says so" % name, words in err, err)
    p = run([DAEMON, "--stdio"], stdin=open(os.devnull), timeout=20)
    check("--stdio </dev/null still exits 0 quietly",
          p.returncode == 0 and p.stderr == b"", p.stderr)


def main():
    if not os.path.exists(DAEMON):
        print("no daemon at", DAEMON)
        return 1
    d = Daemon("--offload", "4K")
    run_tests([test_disconnects, test_vanish_during_work, test_trickle,
               test_flood, test_malformed_mid_pipeline,
               test_heavy_does_not_stall], d)
    check("shared daemon still serving", d.serves())
    check("shared daemon exit 0", d.stop() == 0)
    run_tests([test_slow_rule, test_budget, test_unfinished_lines,
               test_budget_reserve, test_sighup, test_sigterm_under_load,
               test_stdio_errors])
    return finish()


if __name__ == "__main__":
    sys.exit(main())
