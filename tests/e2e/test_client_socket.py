#!/usr/bin/python3
"""The client refuses a socket another user could have planted (issue 17):
a socket in a directory everyone may write to (no sticky bit), a socket
everyone may write to, a symbolic link, a default runtime directory open
to others, and (when the test runs as root, so it can act as another
user) a socket owned by another uid and a daemon running as another uid.
Each refusal exits 3 and names the path and the reason; safe sockets
still work, and the default path is $XDG_RUNTIME_DIR/rockwire.sock."""
import json
import os
import socket
import subprocess
import sys
import tempfile
import time

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

t = rwtest.Checks()
CLIENT = rwtest.CLIENT
OTHER = 65534  # nobody


def call(args, env=None):
    p = subprocess.run([CLIENT] + args + ["call", "service.info"],
                       capture_output=True, timeout=30, env=env)
    return p.returncode, p.stdout.decode(), p.stderr.decode()


def listener(path, mode=0o600):
    s = socket.socket(socket.AF_UNIX, socket.SOCK_STREAM)
    s.bind(path)
    os.chmod(path, mode)
    s.listen(4)
    return s


tmp = tempfile.mkdtemp(prefix="rw-sock-")
os.chmod(tmp, 0o700)

# A daemon on a safe socket works.
d = rwtest.Daemon()
try:
    rc, out, err = call(["--socket", d.path])
    t.ok(rc == 0 and json.loads(out)["transport"] != "stdio",
         "a safe socket is used (%d %r)" % (rc, err))
finally:
    d.stop()

# A directory everyone may write to, without the sticky bit.
open_dir = os.path.join(tmp, "open")
os.mkdir(open_dir)
s = listener(os.path.join(open_dir, "rw.sock"))
os.chmod(open_dir, 0o777)
rc, out, err = call(["--socket", os.path.join(open_dir, "rw.sock")])
t.ok(rc == 3 and out == "" and "writable by others" in err and
     open_dir in err, "world-writable directory refused (%d %r)" % (rc, err))
# The same with the sticky bit (as /tmp) is trusted.
os.chmod(open_dir, 0o1777)
s.close()
os.unlink(os.path.join(open_dir, "rw.sock"))
d = rwtest.Daemon(path=os.path.join(open_dir, "rw.sock"))
try:
    rc, out, err = call(["--socket", d.path])
    t.ok(rc == 0, "a sticky world-writable directory is trusted (%d %r)" %
         (rc, err))
    # A socket everyone may write to.
    os.chmod(d.path, 0o666)
    rc, out, err = call(["--socket", d.path])
    t.ok(rc == 3 and "writable by others" in err and "0666" in err,
         "world-writable socket refused (%d %r)" % (rc, err))
    os.chmod(d.path, 0o600)
    # A symbolic link to it.
    link = os.path.join(tmp, "link.sock")
    os.symlink(d.path, link)
    rc, out, err = call(["--socket", link])
    t.ok(rc == 3 and "symbolic link" in err, "symlink refused (%d %r)" %
         (rc, err))
finally:
    d.stop()

# Not a socket.
plain = os.path.join(tmp, "plain")
open(plain, "w").close()
rc, out, err = call(["--socket", plain])
t.ok(rc == 3 and "not a socket" in err, "a plain file refused (%r)" % err)

# The default path: $XDG_RUNTIME_DIR/rockwire.sock, the directory 0700.
xdg = os.path.join(tmp, "xdg")
os.mkdir(xdg, 0o700)
env = dict(os.environ, XDG_RUNTIME_DIR=xdg)
d = rwtest.Daemon(path=os.path.join(xdg, "rockwire.sock"))
try:
    rc, out, err = call([], env=env)
    t.ok(rc == 0 and json.loads(out)["transport"] != "stdio",
         "the default socket in $XDG_RUNTIME_DIR is used (%d %r)" %
         (rc, err))
    os.chmod(xdg, 0o755)
    rc, out, err = call([], env=env)
    t.ok(rc == 3 and "0755" in err and "0700" in err,
         "a default directory open to others is refused (%d %r)" %
         (rc, err))
    os.chmod(xdg, 0o700)
finally:
    d.stop()
# Nothing listens at the default path: a private daemon.
rc, out, err = call([], env=env)
t.ok(rc == 0 and json.loads(out)["transport"] == "stdio",
     "nothing at the default path: a private daemon (%d %r)" % (rc, err))
p = subprocess.run([CLIENT, "--help"], capture_output=True)
t.ok(b"/tmp/rockwire-<uid>/rockwire.sock" in p.stdout,
     "--help names the fallback default path")

if os.getuid() == 0:
    # Another user's socket where the client looks.
    other = os.path.join(tmp, "other")
    os.mkdir(other, 0o755)
    s = listener(os.path.join(other, "rw.sock"))
    os.chown(os.path.join(other, "rw.sock"), OTHER, OTHER)
    rc, out, err = call(["--socket", os.path.join(other, "rw.sock")])
    t.ok(rc == 3 and ("uid %d" % OTHER) in err and "not by you" in err,
         "another user's socket refused (%d %r)" % (rc, err))
    s.close()
    # A directory of another user on the way.
    os.chown(other, OTHER, OTHER)
    rc, out, err = call(["--socket", os.path.join(other, "rw.sock")])
    t.ok(rc == 3 and "directory" in err and ("uid %d" % OTHER) in err,
         "another user's directory refused (%d %r)" % (rc, err))
    # A default runtime directory owned by another user.
    os.chown(xdg, OTHER, OTHER)
    rc, out, err = call([], env=env)
    t.ok(rc == 3 and "not by you" in err, "another user's runtime "
         "directory refused (%d %r)" % (rc, err))
    os.chown(xdg, 0, 0)
    # A socket file of ours whose listener runs as another user: the
    # peer's credentials (SO_PEERCRED, taken at listen) give it away.
    peer = os.path.join(tmp, "peer.sock")
    s = socket.socket(socket.AF_UNIX, socket.SOCK_STREAM)
    s.bind(peer)
    os.chmod(peer, 0o600)
    pid = os.fork()
    if pid == 0:
        try:
            os.setgid(OTHER)
            os.setuid(OTHER)
            s.listen(4)
            c, _ = s.accept()
            c.sendall(b'{"jsonrpc":"2.0","id":1,"result":{"forged":1}}\n')
            time.sleep(2)
        finally:
            os._exit(0)
    time.sleep(0.3)
    rc, out, err = call(["--socket", peer])
    t.ok(rc == 3 and "forged" not in out and "runs as uid %d" % OTHER in err,
         "a daemon running as another user is refused (%d %r)" % (rc, err))
    os.kill(pid, 9)
    os.waitpid(pid, 0)
    s.close()
else:
    print("not root: the other-user cases are skipped")
t.done()
