#!/usr/bin/python3
"""Growth of the duplicate-key check: one request whose params object has
N distinct keys and then a repeat of the first (answered -32600,
"duplicate key"), for N = 10^3 .. 10^6, through `rockwired --stdio`.

The baseline, measured in the same run, is the same daemon answering one
service.info line (process start, parse, exit); it is subtracted from
each time. Printed: ns per key, median of --runs runs [min-max], and the
ratio of each size's ns/key to the previous decade's. A linear check
stays near 1 (caches make the step from 10^4 to 10^5 dearer); the
quadratic one it replaced grew 10x per decade (80,000 keys took 38 s).
Below 10^5 keys the process start-up noise dominates.

  /usr/bin/python3 tests/bench/bench_dupkeys.py [BUILD_DIR] [--runs N]
"""
import os
import statistics
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
TOP = os.path.dirname(os.path.dirname(HERE))


def timed(daemon, data):
    t0 = time.perf_counter()
    p = subprocess.run([daemon, "--stdio", "--max-line", str(1 << 30)],
                       input=data, stdout=subprocess.PIPE, check=True)
    return time.perf_counter() - t0, p.stdout


def main():
    args = [a for a in sys.argv[1:] if not a.startswith("--")]
    runs = 5
    if "--runs" in sys.argv:
        runs = int(sys.argv[sys.argv.index("--runs") + 1])
    build = args[0] if args else os.path.join(TOP, "build")
    daemon = os.path.join(build, "rockwired")
    base_line = b'{"jsonrpc":"2.0","id":1,"method":"service.info"}\n'
    sizes = [1000, 10000, 100000, 1000000]
    per_key = {}
    print("dupkeys: params objects of N distinct keys and one repeat; "
          "median of %d runs" % runs)
    for n in sizes:
        keys = ",".join('"k%d":0' % i for i in range(n))
        line = ('{"jsonrpc":"2.0","id":1,"method":"service.info",'
                '"params":{%s,"k0":1}}\n' % keys).encode()
        samples = []
        for r in range(runs):
            # baseline and subject back to back, order alternating
            pair = [("base", base_line), ("keys", line)]
            if r % 2:
                pair.reverse()
            got = {}
            for name, data in pair:
                got[name] = timed(daemon, data)
            out = got["keys"][1]
            if b"duplicate key" not in out:
                sys.exit("dupkeys: no duplicate-key answer for %d keys: %r"
                         % (n, out[:200]))
            samples.append(max(got["keys"][0] - got["base"][0], 0) / n * 1e9)
        per_key[n] = (statistics.median(samples), min(samples), max(samples))
    prev = None
    for n in sizes:
        med, lo, hi = per_key[n]
        step = ("x%.2f of the previous decade's ns/key" % (med / prev)
                if prev else "")
        print("  %8d keys: %7.1f ns/key [%.1f-%.1f]   %s%s"
              % (n, med, lo, hi, step,
                 "  (start-up noise dominates)" if n < 100000 else ""))
        prev = med if med > 0 else None

if __name__ == "__main__":
    main()
