"""The end-to-end helper ends what it starts. A small test script using
rwtest starts a daemon (and, through run(), a process group with a
grandchild) and then fails in each way a test can: a failed check and an
uncaught exception, sys.exit, SIGTERM, SIGKILL, and a timeout in run().
After each, no process the script started may be left. Runs under
/usr/bin/python3 with RW_BUILD set; prints "N passed, M failed"."""
import os
import signal
import subprocess
import sys
import tempfile
import time

from rwtest import DAEMON, check, finish

HERE = os.path.dirname(os.path.abspath(__file__))

# The child test: starts a daemon, writes the pids it started, then ends
# the way argv[2] says.
CHILD = r'''
import os, signal, subprocess, sys, time
sys.path.insert(0, sys.argv[3])
import rwtest
how, out = sys.argv[1], sys.argv[2]
d = rwtest.Daemon()
pids = [d.proc.pid]
if how == "timeout":
    # A group whose leader's child outlives it: run() must end both.
    pidfile = out + ".grand"
    try:
        rwtest.run(["sh", "-c", "sleep 300 & echo $! > %s; wait" % pidfile],
                   timeout=0.5)
    except subprocess.TimeoutExpired:
        pass
    with open(pidfile) as f:
        pids.append(int(f.read()))
with open(out, "w") as f:
    f.write(" ".join(map(str, pids)))
rwtest.check("a check that fails on purpose", False)
if how in ("exception", "timeout"):
    raise RuntimeError("a test that crashes")
if how == "exit":
    sys.exit(1)
time.sleep(60)  # waits for the signal
'''


def alive(pid):
    """True while pid exists and is not a zombie."""
    try:
        with open("/proc/%d/stat" % pid) as f:
            return f.read().rsplit(")", 1)[1].split()[0] != "Z"
    except OSError:
        return False


def case(how):
    tmp = tempfile.mkdtemp(prefix="rw-helper-")
    script = os.path.join(tmp, "child.py")
    out = os.path.join(tmp, "pids")
    with open(script, "w") as f:
        f.write(CHILD)
    child = subprocess.Popen([sys.executable, script, how, out, HERE],
                             stdout=subprocess.DEVNULL,
                             stderr=subprocess.DEVNULL)
    deadline = time.time() + 20
    while time.time() < deadline and not os.path.exists(out):
        time.sleep(0.02)
    time.sleep(0.1)
    pids = []
    if os.path.exists(out):
        with open(out) as f:
            pids = [int(x) for x in f.read().split()]
    check(how + ": child started its processes", len(pids) >= 1, pids)
    if how in ("sigterm", "sigkill"):
        child.send_signal(signal.SIGTERM if how == "sigterm" else
                          signal.SIGKILL)
    try:
        rc = child.wait(30)
    except subprocess.TimeoutExpired:
        child.kill()
        rc = child.wait()
    check(how + ": child failed", rc != 0, rc)
    deadline = time.time() + 10
    while time.time() < deadline and any(alive(p) for p in pids):
        time.sleep(0.05)
    left = [p for p in pids if alive(p)]
    check(how + ": nothing left running", not left, left)
    for p in left:  # never leave them behind ourselves either
        os.kill(p, signal.SIGKILL)


def main():
    if not os.path.exists(DAEMON):
        print("no daemon at", DAEMON)
        return 1
    for how in ("exception", "exit", "sigterm", "sigkill", "timeout"):
        case(how)
    return finish()


if __name__ == "__main__":
    sys.exit(main())
