"""Load and fairness: 64 connections each pipeline 2000 requests while one
more connection pipelines 20000 and reads nothing until the others are
done. Every id must be answered exactly once and in order on every
connection; the slow reader must be paused (reads_paused) and not hold
the others back; the daemon's VmRSS (from /proc) must stay under a bound
derived from the per-connection high-water marks; afterwards the slow
reader gets all its answers, in order. Bounded: 64 x 2000 + 20000
requests, with timeouts. Runs under /usr/bin/python3 with RW_BUILD set.
"""
import json
import os
import socket
import sys
import threading
import time

from rwtest import DAEMON, Daemon, check, finish, run_tests, sanitized
N_CONN, N_REQ, N_SLOW = 64, 2000, 5000
HIGH = 64 << 10  # --high-water for this run




def rss_kib(pid):
    with open("/proc/%d/status" % pid) as f:
        for ln in f:
            if ln.startswith("VmRSS:"):
                return int(ln.split()[1])
    return 0


def req(k, i):
    return ('{"jsonrpc":"2.0","id":%d,"method":"elastic.convert","params":'
            '{"rho":2.4,"vp":%d,"vs":1500}}\n' % (i, 3000 + k)).encode()


def main():
    if not os.path.exists(DAEMON):
        print("no daemon at", DAEMON)
        return 1
    d = Daemon("--high-water", str(HIGH))
    run_tests([load], d)
    check("load daemon exit 0", d.stop() == 0)
    return finish()


def load(d):
    sock, p = d.path, d.proc
    base = rss_kib(p.pid)

    # The slow reader: sends everything, reads nothing for now.
    slow = socket.socket(socket.AF_UNIX)
    slow.settimeout(120)
    slow.connect(sock)
    many = "[" + ",".join(["3000"] * 400) + "]"
    slow_data = b"".join(
        ('{"jsonrpc":"2.0","id":%d,"method":"elastic.convert","params":'
         '{"rho":2.4,"vp":%s,"vs":1500}}\n' % (i, many)).encode()
        for i in range(N_SLOW))

    def slow_send():
        try:
            slow.sendall(slow_data)
        except OSError:
            pass

    st = threading.Thread(target=slow_send)
    st.start()

    results = {}
    peak = [base]
    stop = threading.Event()

    def sampler():
        while not stop.is_set():
            try:
                peak[0] = max(peak[0], rss_kib(p.pid))
            except OSError:
                break
            time.sleep(0.05)

    def client(k):
        s = socket.socket(socket.AF_UNIX)
        s.settimeout(120)
        s.connect(sock)
        data = b"".join(req(k, i) for i in range(N_REQ))
        tx = threading.Thread(target=s.sendall, args=(data,))
        tx.start()
        f = s.makefile("rb")
        ids, ok = [], True
        for _ in range(N_REQ):
            line = f.readline()
            if not line:
                break
            r = json.loads(line)
            ids.append(r.get("id"))
            ok = ok and r.get("result", {}).get("vp") == 3000 + k
        tx.join(120)
        s.close()
        results[k] = (ids, ok)

    smp = threading.Thread(target=sampler)
    smp.start()
    time.sleep(0.5)  # let the slow reader fill up and pause
    t0 = time.time()
    ts = [threading.Thread(target=client, args=(k,)) for k in range(N_CONN)]
    for t in ts:
        t.start()
    for t in ts:
        t.join(180)
    took = time.time() - t0
    check("all %d connections finished" % N_CONN, len(results) == N_CONN,
          len(results))
    for k, (ids, ok) in sorted(results.items()):
        if ids != list(range(N_REQ)) or not ok:
            check("conn %d: every id once, in order, right answer" % k,
                  False, ids[:10])
            break
    else:
        check("every id answered once, in order, on every connection", True)
    print("64 x %d requests in %.1f s" % (N_REQ, took))

    # Counters while the slow reader still holds its answers.
    c = socket.socket(socket.AF_UNIX)
    c.settimeout(30)
    c.connect(sock)
    c.sendall(b'{"jsonrpc":"2.0","id":1,"method":"service.info"}\n')
    info = json.loads(c.makefile("rb").readline())["result"]
    c.close()
    cnt, lim = info["counters"], info["limits"]
    check("slow reader was paused", cnt["reads_paused"] >= 1, cnt)
    check("slow reader not closed", cnt["connections_closed_slow"] == 0, cnt)
    stop.set()
    smp.join()
    # Bound: for each connection one high-water of unsent answers plus
    # one of buffered input, plus one read chunk, on top of the start.
    per = 2 * lim["output_high_water_bytes"] + 65536
    bound = base + ((N_CONN + 2) * per + (32 << 20)) // 1024
    if sanitized():
        print("VmRSS peak %d KiB (bound %d KiB not enforced under ASan)"
              % (peak[0], bound))
    else:
        print("VmRSS start %d KiB, peak %d KiB, bound %d KiB"
              % (base, peak[0], bound))
        check("VmRSS peak %d KiB under %d KiB" % (peak[0], bound),
              peak[0] < bound)

    # Now the slow reader reads: everything, in order.
    f = slow.makefile("rb")
    ids, total = [], 0
    for _ in range(N_SLOW):
        line = f.readline()
        if not line:
            break
        total += len(line)
        ids.append(json.loads(line).get("id"))
    st.join(60)
    check("slow reader's answers dwarf the bound (%d MB)" % (total >> 20),
          total // 1024 > 2 * bound)
    check("slow reader then gets all %d answers in order" % N_SLOW,
          ids == list(range(N_SLOW)), (len(ids), ids[:5]))
    slow.close()


if __name__ == "__main__":
    sys.exit(main())
