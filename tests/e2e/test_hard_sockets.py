"""Socket paths another local user could subvert (issue: a planted default
socket), simulated with two uids made up for the run: the daemon runs as
uid A (setuid in the child; the test runs as root), "another user" B owns
what is planted. Checks, with protocol-docs/limits.md ("Default socket
path"):

- the default path is $XDG_RUNTIME_DIR/rockwire.sock when that is an
  absolute path, else /tmp/rockwire-<uid>/rockwire.sock in a directory
  the daemon creates 0700;
- a default directory owned by B, a symlink there, or one writable by
  others is refused (exit 3) with a message naming the owner;
- at an explicit --socket path, a socket B owns (listening or stale) or a
  symlink B owns is refused, naming B, and left alone;
- a socket path longer than a socket address is refused with exit 2 and
  nothing is created under a cut name; TCP ports outside 1..65535 are
  refused with exit 2;
- --socket-mode wider than the group is refused unless
  --allow-world-access is given;
- the listen backlog (once a fixed 128) takes a burst of 1000 connects
  by default, and --backlog sets it.
Needs root (to take two uids); prints SKIP otherwise. Runs under
/usr/bin/python3 with RW_BUILD set; prints "N passed, M failed"."""
import os
import shutil
import signal
import socket
import stat
import sys
import tempfile
import time

from rwtest import DAEMON, Daemon, built_with, check, finish, run, run_tests

# Two uids nobody uses, distinct per run so parallel runs do not meet.
A = 3000000 + (os.getpid() % 100000) * 2
B = A + 1
TMPDIR = "/tmp/rockwire-%d" % A
BASE = tempfile.mkdtemp(prefix="rw-users-")  # everything else, removed
os.chmod(BASE, 0o755)                        # at the end


def as_a():
    os.setgroups([])
    os.setgid(A)
    os.setuid(A)


def env(**kw):
    e = {k: v for k, v in os.environ.items() if k != "XDG_RUNTIME_DIR"}
    e.update(kw)
    return e


def daemon_a(*args, **kw):
    """rockwired as uid A; returns the finished run (for refusals)."""
    return run([DAEMON] + list(args), preexec=as_a, timeout=20,
               stdin=open(os.devnull), **kw)


def clean():
    if os.path.islink(TMPDIR) or os.path.isfile(TMPDIR):
        os.unlink(TMPDIR)
    elif os.path.isdir(TMPDIR):
        shutil.rmtree(TMPDIR)


def private_dir(owner, mode=0o700):
    d = tempfile.mkdtemp(dir=BASE)
    os.chown(d, owner, owner)
    os.chmod(d, mode)
    return d


def sticky_dir():
    """A world-writable sticky directory like /tmp, private to the run."""
    d = tempfile.mkdtemp(dir=BASE)
    os.chmod(d, 0o1777)
    return d


def test_default_tmp():
    clean()
    d = Daemon(sock=False, wait=False, env=env(), preexec=as_a)
    d.path = os.path.join(TMPDIR, "rockwire.sock")
    d.wait_ready()
    st = os.lstat(TMPDIR)
    check("default dir created by the daemon's uid", st.st_uid == A,
          st.st_uid)
    check("default dir mode 0700", stat.S_IMODE(st.st_mode) == 0o700,
          oct(st.st_mode))
    st = os.lstat(d.path)
    check("default socket owned by A, mode 0600", st.st_uid == A and
          stat.S_IMODE(st.st_mode) == 0o600, (st.st_uid, oct(st.st_mode)))
    check("default socket serves", d.serves())
    check("default tmp daemon exit 0", d.stop() == 0)
    # a second start reuses the directory it made
    d = Daemon(sock=False, wait=False, env=env(), preexec=as_a)
    d.path = os.path.join(TMPDIR, "rockwire.sock")
    d.wait_ready()
    check("existing own dir reused", d.serves())
    d.stop()
    clean()


def test_default_xdg():
    x = private_dir(A)
    d = Daemon(sock=False, wait=False, env=env(XDG_RUNTIME_DIR=x + "/"),
               preexec=as_a)
    d.path = os.path.join(x, "rockwire.sock")
    d.wait_ready()
    check("XDG_RUNTIME_DIR/rockwire.sock used", d.serves())
    d.stop()
    clean()
    d = Daemon(sock=False, wait=False, env=env(XDG_RUNTIME_DIR="rel/dir"),
               preexec=as_a)
    d.path = os.path.join(TMPDIR, "rockwire.sock")
    d.wait_ready()
    check("a relative XDG_RUNTIME_DIR is ignored", d.serves())
    d.stop()
    clean()
    bad = private_dir(B)
    p = daemon_a(env=env(XDG_RUNTIME_DIR=bad))
    check("XDG_RUNTIME_DIR owned by another user refused", p.returncode == 3
          and ("owned by uid %d" % B).encode() in p.stderr, p.stderr)
    p = daemon_a(env=env(XDG_RUNTIME_DIR="/" + "x" * 200))
    check("a default path too long for a socket address: exit 2",
          p.returncode == 2 and b"longer than a socket address" in p.stderr,
          p.stderr)
    shutil.rmtree(x)
    shutil.rmtree(bad)


def test_planted_default():
    # B made /tmp/rockwire-A first.
    clean()
    os.mkdir(TMPDIR, 0o700)
    os.chown(TMPDIR, B, B)
    p = daemon_a(env=env())
    check("planted default dir refused (exit 3)", p.returncode == 3,
          (p.returncode, p.stderr))
    check("planted default dir: owner named",
          ("owned by uid %d" % B).encode() in p.stderr, p.stderr)
    check("planted default dir: nothing created in it",
          os.listdir(TMPDIR) == [])
    clean()
    # B made it a symlink to a directory of B's.
    target = private_dir(B, 0o777)
    os.symlink(target, TMPDIR)
    os.lchown(TMPDIR, B, B)
    p = daemon_a(env=env())
    check("symlinked default dir refused (exit 3)", p.returncode == 3 and
          b"symbolic link" in p.stderr and
          ("uid %d" % B).encode() in p.stderr, p.stderr)
    check("symlinked default dir: nothing created behind it",
          os.listdir(target) == [])
    clean()
    shutil.rmtree(target)
    # A's own directory, but writable by everyone.
    os.mkdir(TMPDIR)
    os.chown(TMPDIR, A, A)
    os.chmod(TMPDIR, 0o777)
    p = daemon_a(env=env())
    check("world-writable default dir refused (exit 3)",
          p.returncode == 3 and b"writable by everyone" in p.stderr,
          p.stderr)
    clean()


def test_planted_explicit():
    d = sticky_dir()
    # a live socket of B's at the path
    path = os.path.join(d, "rw.sock")
    ls = socket.socket(socket.AF_UNIX)
    ls.bind(path)
    ls.listen(4)
    os.lchown(path, B, B)
    p = daemon_a("--socket", path)
    check("B's listening socket refused, naming B", p.returncode == 3 and
          ("owned by uid %d" % B).encode() in p.stderr and
          b"already listening" not in p.stderr, p.stderr)
    ls.close()
    # B's stale socket
    p = daemon_a("--socket", path)
    check("B's stale socket refused, naming B (not EPERM)",
          p.returncode == 3 and ("owned by uid %d" % B).encode() in p.stderr
          and b"not permitted" not in p.stderr, p.stderr)
    check("B's socket left in place", os.path.exists(path))
    # B's symlink
    link = os.path.join(d, "link.sock")
    os.symlink(path, link)
    os.lchown(link, B, B)
    p = daemon_a("--socket", link)
    check("B's symlink refused, naming B", p.returncode == 3 and
          b"symbolic link" in p.stderr and
          ("uid %d" % B).encode() in p.stderr, p.stderr)
    check("B's symlink left alone", os.path.islink(link))
    # A's own stale socket is still reclaimed
    own = os.path.join(d, "own.sock")
    u = socket.socket(socket.AF_UNIX)
    u.bind(own)
    u.close()
    os.lchown(own, A, A)
    dm = Daemon(path=own, preexec=as_a)
    check("own stale socket reclaimed", dm.serves())
    dm.stop()
    shutil.rmtree(d)


def test_path_and_port_checks():
    d = tempfile.mkdtemp(dir=BASE)
    long = os.path.join(d, "s" * (120 - len(d)))
    for argv in (["--socket", long], ["--listen", "unix:" + long]):
        p = run([DAEMON] + argv, stdin=open(os.devnull), timeout=20)
        check("socket path of %d bytes: exit 2" % len(long),
              p.returncode == 2 and b"longer than a socket address" in
              p.stderr, p.stderr)
    check("nothing created under a cut name", os.listdir(d) == [],
          os.listdir(d))
    if not built_with("tcp"):
        shutil.rmtree(d)
        return  # tests/e2e/test_features.py checks the refusal
    for port in ("99999", "65536", "-1", "1e3", "", "0x50", "123456"):
        p = run([DAEMON, "--listen", "tcp:127.0.0.1:" + port],
                stdin=open(os.devnull), timeout=20)
        check("port %r refused with exit 2" % port, p.returncode == 2 and
              b"1..65535" in p.stderr, p.stderr)
    dm = Daemon("--listen", "tcp:127.0.0.1:0", "--backlog", "64",
                sock=False, wait=False)
    deadline = time.time() + 10
    while (time.time() < deadline and
           "listening on tcp:127.0.0.1:" not in dm.logtext()):
        time.sleep(0.02)
    check("port 0 still picks a free port",
          "listening on tcp:127.0.0.1:" in dm.logtext(), dm.logtext())
    dm.stop()
    shutil.rmtree(d)


def queued(d, n):
    """Connects n sockets while the daemon is stopped (SIGSTOP), so none
    is accepted: returns how many the kernel queued (the rest get
    EAGAIN once the backlog is full)."""
    socks, ok = [], 0
    d.proc.send_signal(signal.SIGSTOP)
    try:
        for _ in range(n):
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
    return ok


def test_backlog():
    """The listen backlog was a fixed 128: a burst of quick connects got
    EAGAIN. It is an option with a larger default."""
    d = Daemon()
    n = queued(d, 1000)
    print("default backlog: %d of 1000 connects queued" % n)
    check("default backlog queues a burst of 1000 connects", n == 1000, n)
    check("serves after the burst", d.serves())
    d.stop()
    d = Daemon("--backlog", "16")
    n = queued(d, 200)
    print("--backlog 16: %d of 200 connects queued" % n)
    check("--backlog 16 queues about 16", 10 <= n <= 40, n)
    d.stop()
    p = run([DAEMON, "--backlog", "0"], stdin=open(os.devnull), timeout=20)
    check("--backlog 0 refused", p.returncode == 2 and b"--backlog" in
          p.stderr, p.stderr)


def test_socket_mode():
    for mode in ("0666", "0604", "0602", "0777"):
        p = run([DAEMON, "--socket-mode", mode], stdin=open(os.devnull),
                timeout=20)
        check("--socket-mode %s refused without --allow-world-access" % mode,
              p.returncode == 2 and b"--allow-world-access" in p.stderr,
              p.stderr)
    d = Daemon("--socket-mode", "0660")
    check("--socket-mode 0660 allowed",
          stat.S_IMODE(os.lstat(d.path).st_mode) == 0o660)
    d.stop()
    d = Daemon("--socket-mode", "0666", "--allow-world-access")
    check("--allow-world-access gives 0666",
          stat.S_IMODE(os.lstat(d.path).st_mode) == 0o666)
    check("--allow-world-access warns", "every local user" in d.logtext(),
          d.logtext())
    d.stop()


def main():
    if not os.path.exists(DAEMON):
        print("no daemon at", DAEMON)
        return 1
    if os.geteuid() != 0:
        print("SKIP: needs root to simulate other users")
        return 0
    try:
        run_tests([test_default_tmp, test_default_xdg, test_planted_default,
                   test_planted_explicit, test_path_and_port_checks,
                   test_backlog, test_socket_mode])
        return finish()
    finally:
        clean()
        shutil.rmtree(BASE, ignore_errors=True)


if __name__ == "__main__":
    sys.exit(main())
