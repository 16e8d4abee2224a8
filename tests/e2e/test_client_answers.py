#!/usr/bin/python3
"""The client does not trust any answer (issue 17): fake daemons on
private sockets answer `rockwire call` and `rockwire send` with values
that are not JSON-RPC responses, with the wrong id, with nothing at all,
with an endless line, or close early; each is an error with its own exit
code (4 invalid or unanswered, 6 timeout). The real daemon then shows that
send skips comments and blank lines, exits 1 when an answer is an error,
and 0 when none is."""
import json
import os
import resource
import socket
import subprocess
import sys
import tempfile
import threading
import time

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

t = rwtest.Checks()
CLIENT = rwtest.CLIENT
tmp = tempfile.mkdtemp(prefix="rw-answers-")
os.chmod(tmp, 0o700)


class Fake:
    """A listener on a private socket; handler(conn) serves each client."""

    def __init__(self, handler):
        self.path = os.path.join(tmp, "fake%d.sock" % id(self))
        self.srv = socket.socket(socket.AF_UNIX, socket.SOCK_STREAM)
        self.srv.bind(self.path)
        os.chmod(self.path, 0o600)
        self.srv.listen(4)
        self.handler = handler
        self.th = threading.Thread(target=self.loop, daemon=True)
        self.th.start()

    def loop(self):
        while True:
            try:
                c, _ = self.srv.accept()
            except OSError:
                return
            threading.Thread(target=self.serve, args=(c,),
                             daemon=True).start()

    def serve(self, c):
        try:
            self.handler(c)
        except OSError:
            pass
        finally:
            c.close()

    def close(self):
        self.srv.close()
        os.unlink(self.path)


def reader(c):
    """Yields request lines from a connection."""
    buf = b""
    while True:
        while b"\n" in buf:
            line, buf = buf.split(b"\n", 1)
            yield line
        chunk = c.recv(65536)
        if not chunk:
            return
        buf += chunk


def answer_with(text):
    def h(c):
        for _ in reader(c):
            c.sendall(text.encode() + b"\n")
            return
    return h


def run(args, inp=None, timeout=30):
    t0 = time.time()
    p = subprocess.run([CLIENT] + args, input=inp, capture_output=True,
                       timeout=timeout)
    return p.returncode, p.stdout.decode(), p.stderr.decode(), time.time() - t0


# 1. Answers that are not responses, and a response to another request.
for bad in ['{"jsonrpc":"2.0","id":1}', '42', 'null', '[]',
            '{"jsonrpc":"2.0","id":2,"result":{"vp":1}}',
            '{"jsonrpc":"1.0","id":1,"result":{}}',
            '{"jsonrpc":"2.0","id":1,"result":{},"error":{"code":1,'
            '"message":"x"}}',
            '{"jsonrpc":"2.0","id":1,"error":{"code":"x","message":"y"}}',
            '{"jsonrpc":"2.0","id":1,"result":{}} trailing']:
    f = Fake(answer_with(bad))
    rc, out, err, _ = run(["--socket", f.path, "call", "service.info"])
    t.ok(rc == 4 and out == "" and "invalid answer" in err,
         "call refuses the answer %s (rc %d, %r)" % (bad, rc, err[:200]))
    f.close()

# 2. A daemon that accepts and never answers: --timeout, exit 6.
hold = []


def silent(c):
    hold.append(c)
    for _ in reader(c):
        pass
    time.sleep(5)  # a hung daemon keeps the connection open


f = Fake(silent)
rc, out, err, dt = run(["--socket", f.path, "call", "--timeout", "0.5",
                        "service.info"])
t.ok(rc == 6 and "timeout" in err and dt < 10,
     "call --timeout 0.5 on a silent daemon: exit 6 in %.1f s (%d %r)" %
     (dt, rc, err[:200]))
rc, out, err, dt = run(["--socket", f.path, "--timeout", "0.5", "call",
                        "service.info"])
t.ok(rc == 6 and dt < 10, "the global --timeout works for call too")
rc, out, err, dt = run(["--socket", f.path, "send", "--timeout", "0.5"],
                       inp=b'{"jsonrpc":"2.0","id":1,"method":"x"}\n')
t.ok(rc == 6 and "1 unanswered" in err and dt < 10,
     "send --timeout 0.5 on a silent daemon: exit 6 (%d %r)" % (rc, err))
p = subprocess.run([CLIENT, "call", "--help"], capture_output=True)
t.ok(b"default 60" in p.stdout, "call documents its default timeout")
f.close()


# 3. send: the daemon answers 1 of 3 requests and closes.
def one_then_close(c):
    for line in reader(c):
        r = json.loads(line)
        c.sendall(json.dumps({"jsonrpc": "2.0", "id": r["id"],
                              "result": {}}).encode() + b"\n")
        return


f = Fake(one_then_close)
reqs = "".join(rwtest.req("service.info", id=i) + "\n" for i in range(3))
rc, out, err, _ = run(["--socket", f.path, "send"], inp=reqs.encode())
t.ok(rc == 4 and "2 unanswered" in err and len(out.splitlines()) == 1,
     "send reports the 2 unanswered requests, exit 4 (%d %r)" % (rc, err))
f.close()


# 4. send: an answer with the wrong id, and a batch answered by an object.
def wrong_ids(c):
    for line in reader(c):
        r = json.loads(line)
        if isinstance(r, list):
            c.sendall(b'{"jsonrpc":"2.0","id":null,"result":{}}\n')
        else:
            c.sendall(json.dumps({"jsonrpc": "2.0", "id": r["id"] + 100,
                                  "result": {}}).encode() + b"\n")


f = Fake(wrong_ids)
rc, out, err, _ = run(["--socket", f.path, "send"],
                      inp=(rwtest.req("service.info", id=5) + "\n" +
                           "[" + rwtest.req("service.info", id=6) + "]\n"
                           ).encode())
t.ok(rc == 4 and "answers id 105, not 5" in err and "array" in err,
     "send checks ids and batch shape (%d %r)" % (rc, err))
f.close()


# 5. An endless answer line: bounded by --max-line, memory stays small.
def endless(c):
    for _ in reader(c):
        chunk = b"x" * 65536
        try:
            for _ in range(64 * 16):  # 64 MiB, no newline
                c.sendall(chunk)
        except OSError:
            pass
        return


f = Fake(endless)
before = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss
rc, out, err, _ = run(["--socket", f.path, "--max-line", "1M", "call",
                       "service.info"])
rss = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss
t.ok(rc == 4 and "longer than 1048576 bytes" in err,
     "an over-long answer line is refused (%d %r)" % (rc, err[:200]))
if not rwtest.sanitized():
    t.ok(rss < 40000, "client stays small on a 64 MiB line (%d kB)" % rss)
f.close()

# 6. The real daemon: comments and blank lines skipped, error answers
# make the exit code 1, clean answers 0.
d = rwtest.Daemon()
try:
    text = ("# elastic constants of two samples\n\n" +
            rwtest.req("elastic.convert", {"rho": 2.3, "vp": 3000,
                                           "vs": 1500}, id=1) +
            "\n   \n  # indented comment\n" +
            rwtest.req("service.info", id=2) + "\n")
    rc, out, err, _ = run(["--socket", d.path, "send"], inp=text.encode())
    lines = out.splitlines()
    t.ok(rc == 0 and len(lines) == 2 and
         [json.loads(x)["id"] for x in lines] == [1, 2],
         "send skips comments and blank lines (%d, %r)" % (rc, err))
    rc, out, err, _ = run(["--socket", d.path, "send"],
                          inp=(text + rwtest.req("nope.nope", id=3) +
                               "\n").encode())
    t.ok(rc == 1 and len(out.splitlines()) == 3 and "1 errors" in err,
         "send exits 1 when an answer is an error (%d %r)" % (rc, err))
    # Notifications get no answer and are not waited for.
    rc, out, err, _ = run(["--socket", d.path, "send"], inp=(
        '{"jsonrpc":"2.0","method":"service.info"}\n' +
        rwtest.req("service.info", id=9) + "\n").encode())
    t.ok(rc == 0 and len(out.splitlines()) == 1, "notifications: no answer "
         "expected (%d %r)" % (rc, err))
    # A batch with a notification inside: one array answer.
    rc, out, err, _ = run(["--socket", d.path, "send"], inp=(
        "[" + rwtest.req("service.info", id="a") + "," +
        '{"jsonrpc":"2.0","method":"service.info"}]\n').encode())
    t.ok(rc == 0 and len(out.splitlines()) == 1, "a batch is checked as a "
         "batch (%d %r)" % (rc, err))
    rc, out, err, _ = run(["--socket", d.path, "send", "--help"])
    t.ok(rc == 0 and "comment" in out and "Exit codes" in out,
         "send --help documents comments and exit codes")
    # The client answers 1,000 requests of one file in order.
    many = "".join(rwtest.req("elastic.convert", {"rho": 2.3, "vp": 3000,
                                                  "vs": 1500}, id=i) + "\n"
                   for i in range(1000))
    rc, out, err, _ = run(["--socket", d.path, "send"], inp=many.encode())
    t.ok(rc == 0 and [json.loads(x)["id"] for x in out.splitlines()] ==
         list(range(1000)), "1000 pipelined requests answered in order")
finally:
    d.stop()
t.done()
