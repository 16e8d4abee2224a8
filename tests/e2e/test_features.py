"""The optional parts of a build (CMake RW_WITH_TCP, RW_WITH_SYSTEMD,
RW_WITH_CLIENT, RW_WITH_PLOT; DEVELOPERS.md, "Build options"), checked in
whatever build this runs in, full or minimal:
- service.info's "features", --version and --help say what is built in;
- a part left out is not compiled: rockwired imports no libuv TCP call
  without TCP, the server library defines no socket-activation function
  without systemd, the client is not built without RW_WITH_CLIENT;
- asking for a part left out is refused with exit 2, naming the option
  given and the CMake option: --listen tcp:, --allow-remote,
  --tcp-idle-timeout; LISTEN_FDS meant for the daemon and NOTIFY_SOCKET;
  `rockwire plot`.
Runs under /usr/bin/python3 with RW_BUILD set (and RW_FEATURES from ctest).
"""
import json
import os
import subprocess
import sys

from rwtest import (BUILD, CLIENT, DAEMON, Daemon, built_with, check, finish,
                    req, run, run_tests)

INFO = req("service.info", id="i")


def info_stdio(env=None):
    p = run([DAEMON, "--stdio"], input=(INFO + "\n").encode(), timeout=30,
            env=env)
    return json.loads(p.stdout.decode().splitlines()[0])["result"]


def test_reported():
    f = info_stdio()["features"]
    check("service.info features: unix and stdio always", f.get("unix") is
          True and f.get("stdio") is True, f)
    for name in ("tcp", "systemd"):
        check("service.info features.%s is %s" % (name, built_with(name)),
              f.get(name) is built_with(name), f)
    v = run([DAEMON, "--version"], timeout=10).stdout.decode()
    for name in ("tcp", "systemd"):
        check("--version lists %s only when built in" % name,
              (name in v) == built_with(name), v)
    h = run([DAEMON, "--help"], timeout=10).stdout.decode()
    line = [ln for ln in h.splitlines() if ln.startswith("Built in:")]
    check("--help has a 'Built in:' line", len(line) == 1, h[-400:])
    if line:
        left = line[0].split("left out:", 1)[-1]
        for name in ("tcp", "systemd"):
            check("--help: %s left out only when not built" % name,
                  (name in left) == (not built_with(name)), line[0])
    check("the caution is still in --help",
          "never the sole basis" in h.replace("\n", " "), h[-300:])


def nm(args):
    p = subprocess.run(["nm"] + args, capture_output=True, text=True)
    return p.stdout if p.returncode == 0 else None


def test_not_compiled():
    und = nm(["-D", "--undefined-only", DAEMON])
    if check("nm reads rockwired", und is not None):
        check("rockwired imports uv_tcp_bind only with TCP built in",
              ("uv_tcp_bind" in und) == built_with("tcp"))
    lib = os.path.join(BUILD, "librwsrv.a")
    defs = nm(["--defined-only", lib])
    if check("nm reads librwsrv.a", defs is not None):
        for sym in ("srv__listen_fds", "srv__notify_open"):
            check("%s defined only with systemd built in" % sym,
                  (" T %s" % sym in defs) == built_with("systemd"))
        check("srv__is_loopback defined only with TCP built in",
              (" T srv__is_loopback" in defs) == built_with("tcp"))
    check("the client is built only with RW_WITH_CLIENT",
          os.path.exists(CLIENT) == built_with("client"), CLIENT)


def refused(argv, what, option, env=None):
    p = run([DAEMON] + argv, stdin=subprocess.DEVNULL, timeout=20, env=env)
    err = p.stderr.decode()
    check("%s: exit 2 naming it and -D%s=ON" % (what, option),
          p.returncode == 2 and what in err and "-D%s=ON" % option in err,
          (p.returncode, err))


def test_tcp_refused():
    if built_with("tcp"):
        return  # served: test_hard_hostile, test_hard_sockets, ...
    refused(["--listen", "tcp:127.0.0.1:0"], "tcp:127.0.0.1:0", "RW_WITH_TCP")
    refused(["--stdio", "--allow-remote"], "--allow-remote", "RW_WITH_TCP")
    refused(["--stdio", "--tcp-idle-timeout", "5"], "--tcp-idle-timeout",
            "RW_WITH_TCP")
    # the Unix socket is unaffected
    with Daemon() as d:
        check("a build without TCP serves its Unix socket", d.serves())


def test_systemd_refused():
    if built_with("systemd"):
        return  # served: test_hard_systemd
    env = dict(os.environ, LISTEN_FDS="1")
    env.pop("LISTEN_PID", None)
    p = run(["/bin/sh", "-c", 'LISTEN_PID=$$ exec "$0" --socket "$1"',
             DAEMON, os.path.join(BUILD, "features-unused.sock")],
            stdin=subprocess.DEVNULL, timeout=20, env=env)
    err = p.stderr.decode()
    check("LISTEN_FDS for the daemon: exit 2 naming -DRW_WITH_SYSTEMD=ON",
          p.returncode == 2 and "LISTEN_FDS" in err and
          "-DRW_WITH_SYSTEMD=ON" in err, (p.returncode, err))
    check("no socket made when activation is refused",
          not os.path.exists(os.path.join(BUILD, "features-unused.sock")))
    refused(["--stdio"], "NOTIFY_SOCKET", "RW_WITH_SYSTEMD",
            env=dict(os.environ, NOTIFY_SOCKET="/nonexistent/notify"))
    # LISTEN_PID naming another process is ignored, as in a full build
    env = dict(os.environ, LISTEN_FDS="1", LISTEN_PID="1")
    r = info_stdio(env=env)
    check("LISTEN_PID of another process: ignored, served",
          r.get("name") == "rockwire", r)


def test_plot():
    if not built_with("client"):
        return
    h = run([CLIENT, "--help"], timeout=10).stdout.decode()
    check("client --help lists plot as built or not",
          ("plot KIND" in h) == built_with("plot"), h[:600])
    if built_with("plot"):
        return  # drawn: test_plot
    p = run([CLIENT, "plot", "avo", "in.json", "-o", "out.png"],
            stdin=subprocess.DEVNULL, timeout=20)
    err = p.stderr.decode()
    check("rockwire plot without pictures: exit 2 naming -DRW_WITH_PLOT=ON",
          p.returncode == 2 and "plot" in err and "-DRW_WITH_PLOT=ON" in err,
          (p.returncode, err))


def main():
    if not os.path.exists(DAEMON):
        print("no daemon at", DAEMON)
        return 1
    run_tests([test_reported, test_not_compiled, test_tcp_refused,
               test_systemd_refused, test_plot])
    return finish()


if __name__ == "__main__":
    sys.exit(main())
