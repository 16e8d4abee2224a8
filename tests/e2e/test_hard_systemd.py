"""Service-manager integration without a service manager: a datagram
receiver stands in for it (the sd_notify(3) and sd_listen_fds(3)
interface). Checks READY=1 after listening and STOPPING=1 at shutdown on
a path and on an '@' abstract NOTIFY_SOCKET; socket activation with a
listening Unix socket and a loopback TCP socket passed as fd 3
(LISTEN_FDS=1, LISTEN_PID set by the shell that execs the daemon);
LISTEN_PID for another process is ignored; the daemon does not remove a
socket file it did not create; it logs where its sockets came from.
Runs under /usr/bin/python3 with RW_BUILD set.
"""
import json
import os
import signal
import socket
import subprocess
import sys
import tempfile
import time

from rwtest import DAEMON, built_with, check, finish, run_tests, spawn
PROBE = (b'{"jsonrpc":"2.0","id":"p","method":"elastic.convert",'
         b'"params":{"rho":2.4,"vp":3000,"vs":1500}}\n')




def recv_msgs(rx, until, timeout=10):
    """Datagrams until one contains `until` (or the timeout)."""
    msgs = []
    deadline = time.time() + timeout
    while time.time() < deadline:
        rx.settimeout(max(0.05, deadline - time.time()))
        try:
            m = rx.recv(4096).decode()
        except socket.timeout:
            break
        msgs.append(m)
        if until in m:
            break
    return msgs


def notify_case(addr_name, bind_addr):
    tmp = tempfile.mkdtemp(prefix="rw-sd-")
    sock = os.path.join(tmp, "rw.sock")
    rx = socket.socket(socket.AF_UNIX, socket.SOCK_DGRAM)
    rx.bind(bind_addr)
    env = dict(os.environ, NOTIFY_SOCKET=addr_name)
    p = spawn([DAEMON, "--socket", sock], env=env,
              stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL,
              stderr=subprocess.PIPE)
    msgs = recv_msgs(rx, "READY=1")
    ready = any(m.split("\n")[0] == "READY=1" for m in msgs)
    check("READY=1 on %s" % addr_name, ready, msgs)
    # READY comes after listening: connecting must work right away.
    served = False
    if ready:
        c = socket.socket(socket.AF_UNIX)
        c.settimeout(10)
        c.connect(sock)
        c.sendall(PROBE)
        served = b'"vp":3000' in c.makefile("rb").readline()
        c.close()
    check("listening when READY=1 arrives (%s)" % addr_name, served)
    p.send_signal(signal.SIGTERM)
    msgs = recv_msgs(rx, "STOPPING=1")
    check("STOPPING=1 on %s" % addr_name, any("STOPPING=1" in m
                                              for m in msgs), msgs)
    rc = p.wait(15)
    err = p.stderr.read().decode()
    check("notify daemon exit 0", rc == 0, err)
    rx.close()


def activation_case(kind):
    tmp = tempfile.mkdtemp(prefix="rw-sd-")
    if kind == "unix":
        path = os.path.join(tmp, "activated.sock")
        ls = socket.socket(socket.AF_UNIX, socket.SOCK_STREAM)
        ls.bind(path)
        addr = path
    else:
        ls = socket.socket(socket.AF_INET, socket.SOCK_STREAM)
        ls.bind(("127.0.0.1", 0))
        addr = ls.getsockname()
    ls.listen(16)
    rx = socket.socket(socket.AF_UNIX, socket.SOCK_DGRAM)
    nsock = os.path.join(tmp, "notify")
    rx.bind(nsock)
    # The shell's own pid becomes the daemon's through exec.
    script = ('LISTEN_PID=$$ LISTEN_FDS=1 LISTEN_FDNAMES=rw exec "$0" '
              '--log "$1"')
    log = os.path.join(tmp, "log")
    env = {k: v for k, v in os.environ.items()
           if k not in ("LISTEN_PID", "LISTEN_FDS")}
    env["NOTIFY_SOCKET"] = nsock
    fd = ls.fileno()
    p = spawn(
        ["sh", "-c", script, DAEMON, log], env=env,
        stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL, pass_fds=tuple(sorted({fd, 3})),
        preexec=(lambda: os.dup2(fd, 3)) if fd != 3 else None)
    msgs = recv_msgs(rx, "READY=1")
    check("activated %s: READY=1" % kind, any("READY=1" in m for m in msgs),
          msgs)
    fam = socket.AF_UNIX if kind == "unix" else socket.AF_INET
    c = socket.socket(fam, socket.SOCK_STREAM)
    c.settimeout(10)
    c.connect(addr)
    c.sendall(b'{"jsonrpc":"2.0","id":1,"method":"service.info"}\n' + PROBE)
    f = c.makefile("rb")
    info = json.loads(f.readline())
    r = json.loads(f.readline())
    c.close()
    check("activated %s: served" % kind, r.get("result", {}).get("vp") ==
          3000, r)
    tr = info.get("result", {}).get("transport", "")
    check("activated %s: transport reported" % kind,
          tr.startswith(kind + ":"), tr)
    with open(log) as lf:
        text = lf.read()
    check("activated %s: logged as passed in" % kind,
          "passed by the service manager" in text, text)
    p.send_signal(signal.SIGTERM)
    rc = p.wait(15)
    check("activated %s: exit 0" % kind, rc == 0, rc)
    if kind == "unix":
        check("activated unix: socket file left to its owner",
              os.path.exists(path))
    ls.close()
    rx.close()


def foreign_pid_case():
    tmp = tempfile.mkdtemp(prefix="rw-sd-")
    sock = os.path.join(tmp, "own.sock")
    env = dict(os.environ, LISTEN_PID="1", LISTEN_FDS="1")
    p = spawn([DAEMON, "--socket", sock, "--log",
               os.path.join(tmp, "log")], env=env,
              stdin=subprocess.DEVNULL,
              stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    deadline = time.time() + 10
    while time.time() < deadline and not os.path.exists(sock):
        time.sleep(0.05)
    check("LISTEN_PID of another process: own socket used",
          os.path.exists(sock))
    with open(os.path.join(tmp, "log")) as lf:
        text = lf.read()
    check("LISTEN_PID of another process: warned", "not meant for this "
          "process" in text, text)
    p.send_signal(signal.SIGTERM)
    check("foreign pid exit 0", p.wait(15) == 0)


def activation_tcp_refused():
    """A build without TCP (RW_WITH_TCP=OFF) refuses a passed TCP socket
    by name rather than leave it unserved."""
    ls = socket.socket(socket.AF_INET, socket.SOCK_STREAM)
    ls.bind(("127.0.0.1", 0))
    ls.listen(4)
    fd = ls.fileno()
    env = {k: v for k, v in os.environ.items()
           if k not in ("LISTEN_PID", "LISTEN_FDS", "NOTIFY_SOCKET")}
    p = spawn(["sh", "-c", 'LISTEN_PID=$$ LISTEN_FDS=1 exec "$0"', DAEMON],
              env=env, stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL,
              stderr=subprocess.PIPE, pass_fds=tuple(sorted({fd, 3})),
              preexec=(lambda: os.dup2(fd, 3)) if fd != 3 else None)
    err = p.communicate(timeout=15)[1].decode()
    check("activated tcp without TCP built in: exit 3 naming "
          "-DRW_WITH_TCP=ON", p.returncode == 3 and "TCP socket" in err and
          "-DRW_WITH_TCP=ON" in err, (p.returncode, err))
    ls.close()


def main():
    if not os.path.exists(DAEMON):
        print("no daemon at", DAEMON)
        return 1
    tmp = tempfile.mkdtemp(prefix="rw-sd-")
    path = os.path.join(tmp, "notify")
    abstract = "@rockwire-test-%d-%d" % (os.getpid(), int(time.time()))
    cases = [lambda: notify_case(path, path),
             lambda: notify_case(abstract, "\0" + abstract[1:]),
             lambda: activation_case("unix"),
             (lambda: activation_case("tcp")) if built_with("tcp")
             else activation_tcp_refused,
             foreign_pid_case]
    run_tests(cases)
    return finish()


if __name__ == "__main__":
    sys.exit(main())
