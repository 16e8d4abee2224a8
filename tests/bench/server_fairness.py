#!/usr/bin/python3
"""Benchmark (run on demand, never in the pass/fail suite): what heavy
clients cost everyone else, as ratios against a baseline measured in the
same run on the same daemon.

  /usr/bin/python3 tests/bench/server_fairness.py [BUILD_DIR]

1. Small-request latency (elastic.convert, one sample) on one connection
   while another runs a heavy line: reflect.series 4000 interfaces x
   2000 angles in 134 KB, and a 72-byte elastic.convert that inherits a
   10^6-sample session default. Baseline: the same small requests with
   nothing else running.
2. Pool share: one peer (TCP loopback) sends four heavy lines at once;
   the time until another peer's (the owner's, on the Unix socket) heavy
   line is answered, against the same line alone.
3. Idle memory: resident size after four 400k-sample requests run side
   by side, against the resident size at start.
4. Accept burst: connects the kernel queues while the daemon is stopped
   (SIGSTOP), with the default --backlog.
Nothing here asserts; it prints figures."""
import json
import os
import signal
import socket
import sys
import threading
import time

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "e2e"))
if len(sys.argv) > 1:
    os.environ["RW_BUILD"] = os.path.abspath(sys.argv[1])
import rwtest  # noqa: E402


def small(i):
    return (b'{"jsonrpc":"2.0","id":%d,"method":"elastic.convert",'
            b'"params":{"rho":2.4,"vp":3000,"vs":1500}}\n' % i)


def series(n, m, id="heavy"):
    return json.dumps({"jsonrpc": "2.0", "id": id, "method":
                       "reflect.series", "params": {
                           "vp": [3000 + i % 50 for i in range(n)],
                           "vs": [1500 + i % 30 for i in range(n)],
                           "rho": [2.3 + 0.001 * (i % 40) for i in range(n)],
                           "angle": [i * 40.0 / m for i in range(m)]}},
                      separators=(",", ":")).encode() + b"\n"


def drain(s):
    """Reads one answer line; returns (first byte time, end time)."""
    first, buf = None, b""
    s.settimeout(300)
    while not buf.endswith(b"\n"):
        c = s.recv(1 << 20)
        if not c:
            break
        if first is None:
            first = time.monotonic()
        buf = c[-1:]
    return first, time.monotonic()


def latencies(d, n=50):
    b = d.connect(300)
    f = b.makefile("rb")
    out = []
    for i in range(n):
        t = time.monotonic()
        b.sendall(small(i))
        f.readline()
        out.append(time.monotonic() - t)
    b.close()
    return out


def beside(d, prepare, heavy):
    a = d.connect(300)
    prepare(a)
    a.sendall(heavy)
    res = {}
    th = threading.Thread(target=lambda: res.update(t=drain(a)))
    th.start()
    time.sleep(0.05)
    lat = latencies(d, 20)
    th.join()
    a.close()
    return lat


def no_prep(a):
    pass


def session_prep(a):
    a.sendall(b'{"jsonrpc":"2.0","id":"s","method":"session.set","params":'
              b'{"vp":[' + b",".join([b"3000"] * 10**6) + b'],"vs":1500}}\n')
    a.makefile("rb").readline()


def bench_latency():
    with rwtest.Daemon() as d:
        base = latencies(d)
        b_med = sorted(base)[len(base) // 2]
        print("1. small-request latency, baseline median %.3f ms, max "
              "%.3f ms" % (b_med * 1e3, max(base) * 1e3))
        for name, prep, line in (
                ("reflect.series 4000x2000 (%d KB)" % (len(series(4000, 2000))
                                                       >> 10),
                 no_prep, series(4000, 2000)),
                ("72-byte line, 10^6 session samples", session_prep,
                 b'{"jsonrpc":"2.0","id":"h","method":"elastic.convert",'
                 b'"params":{"rho":2.4}}\n')):
            lat = beside(d, prep, line)
            print("   beside %s: max %.3f ms = %.1f x baseline median" %
                  (name, max(lat) * 1e3, max(lat) / b_med))


def bench_pool():
    d = rwtest.Daemon("--threads", "4", "--listen", "tcp:127.0.0.1:0")
    port = None
    while port is None:
        for ln in d.logtext().splitlines():
            if "listening on tcp:127.0.0.1:" in ln:
                port = int(ln.rsplit(":", 1)[1])
        time.sleep(0.02)
    mine = series(1000, 300, "own")
    s = d.connect(300)
    t = time.monotonic()
    s.sendall(mine)
    alone = drain(s)[0] - t
    hogs = []
    for _ in range(4):
        h = socket.create_connection(("127.0.0.1", port), timeout=300)
        h.sendall(series(4000, 700, "hog"))
        hogs.append(h)
    time.sleep(0.3)
    t = time.monotonic()
    s.sendall(mine)
    busy = drain(s)[0] - t
    for h in hogs:
        drain(h)
        h.close()
    s.close()
    print("2. another peer's heavy line: alone %.2f s, beside four heavy "
          "lines of one peer %.2f s = %.1f x" % (alone, busy, busy / alone))
    d.stop()


def rss(pid):
    with open("/proc/%d/status" % pid) as f:
        for ln in f:
            if ln.startswith("VmRSS:"):
                return int(ln.split()[1]) << 10
    return 0


def bench_memory():
    with rwtest.Daemon() as d:
        start = rss(d.proc.pid)
        line = (b'{"jsonrpc":"2.0","id":1,"method":"elastic.convert",'
                b'"params":{"rho":2.4,"vp":[' +
                b",".join([b"3000"] * 400000) + b'],"vs":1500}}\n')

        def one():
            s = d.connect(300)
            s.sendall(line)
            drain(s)
            s.close()

        ts = [threading.Thread(target=one) for _ in range(4)]
        for t in ts:
            t.start()
        peak = 0
        while any(t.is_alive() for t in ts):
            peak = max(peak, rss(d.proc.pid))
            time.sleep(0.05)
        time.sleep(1.5)
        after = rss(d.proc.pid)
        print("3. resident: start %.1f MB, peak %.1f MB, 1.5 s after four "
              "400k-sample requests %.1f MB = %.1f x start" %
              (start / 1e6, peak / 1e6, after / 1e6, after / start))


def bench_backlog():
    with rwtest.Daemon() as d:
        socks, ok = [], 0
        d.proc.send_signal(signal.SIGSTOP)
        try:
            for _ in range(5000):
                c = socket.socket(socket.AF_UNIX)
                c.setblocking(False)
                try:
                    c.connect(d.path)
                    ok += 1
                except (BlockingIOError, InterruptedError):
                    pass
                socks.append(c)
        finally:
            d.proc.send_signal(signal.SIGCONT)
            for c in socks:
                c.close()
        print("4. accept burst while stopped: %d of 5000 connects queued "
              "(kernel somaxconn %s)" % (ok, open(
                  "/proc/sys/net/core/somaxconn").read().strip()))


if __name__ == "__main__":
    if rwtest.sanitized():
        print("note: a sanitizer build; figures are not the release "
              "build's")
    for b in (bench_latency, bench_pool, bench_memory, bench_backlog):
        b()
    rwtest.end_all()
