#!/usr/bin/python3
"""Benchmark (run on demand, never in the pass/fail suite): the delay from
a WITS record written into `rockwire feed` to its answer line, with the
answers going to a pipe (the normal case: another program reads them)
and, as the baseline measured in the same run, to a terminal (a pty).
One record every 200 ms, as a slow real-time feed sends them. Prints the
median and worst delay of each and the pipe/terminal ratio; a ratio near
1 means answers are not held in a buffer.
    /usr/bin/python3 tests/bench/feed_latency.py [RECORDS]"""
import json
import os
import pty
import select
import statistics
import subprocess
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(__file__), "..", "e2e"))
import rwtest  # noqa: E402

N = int(sys.argv[1]) if len(sys.argv) > 1 else 25
MAP = ["--map", "0108=depth", "--map", "0113=dtp", "--map", "0114=dts",
       "--map", "0115=rhob"]


def record(k):
    return ("&&\n0108 %.1f\n0113 100\n0114 180\n0115 2.4\n!!\n" %
            (1000 + k)).encode()


def measure(d, use_pty):
    if use_pty:
        master, slave = pty.openpty()
        out_r = master
        p = subprocess.Popen([rwtest.CLIENT, "--socket", d.path, "feed"] +
                             MAP, stdin=subprocess.PIPE, stdout=slave,
                             stderr=subprocess.DEVNULL)
        os.close(slave)
    else:
        p = subprocess.Popen([rwtest.CLIENT, "--socket", d.path, "feed"] +
                             MAP, stdin=subprocess.PIPE,
                             stdout=subprocess.PIPE,
                             stderr=subprocess.DEVNULL)
        out_r = p.stdout.fileno()
    sent, delays, buf = {}, [], b""
    k = 0
    next_send = time.monotonic()
    while len(delays) < N:
        now = time.monotonic()
        if k < N and now >= next_send:
            sent[1000 + k] = time.monotonic()
            p.stdin.write(record(k))
            p.stdin.flush()
            k += 1
            next_send += 0.2
        r, _, _ = select.select([out_r], [], [], 0.01)
        if r:
            buf += os.read(out_r, 65536)
            while b"\n" in buf:
                line, buf = buf.split(b"\n", 1)
                line = line.strip(b"\r")
                if line.startswith(b"{"):
                    dep = json.loads(line)["depth"]
                    delays.append(time.monotonic() - sent[dep])
        if now - next_send > 30:
            break
    p.stdin.close()
    p.wait(10)
    if use_pty:
        os.close(master)
    # The first record also waits for the start-up (service.info,
    # rpc.discover and the parameter check): left out.
    return delays[1:]


d = rwtest.Daemon()
try:
    term = measure(d, True)
    pipe = measure(d, False)
finally:
    d.stop()
mt, mp = statistics.median(term), statistics.median(pipe)
print("record -> answer over %d records, one every 200 ms:" % (N - 1))
print("  terminal (baseline): median %.2f ms, worst %.2f ms" %
      (mt * 1e3, max(term) * 1e3))
print("  pipe:                median %.2f ms, worst %.2f ms" %
      (mp * 1e3, max(pipe) * 1e3))
print("  ratio pipe/terminal: median %.2f, worst %.2f" %
      (mp / mt, max(pipe) / max(term)))
