"""Helpers for end-to-end tests: start rockwired on a temporary socket or
on stdio, talk to it with bounded timeouts, count checks. Used by
tests/e2e/test_*.py under Debian's /usr/bin/python3.

Every process a test starts through this module (Daemon, spawn, run,
stdio) runs in a process group of its own and is ended, with everything
it started (a client's private daemon, say), whatever happens to the
test: by Daemon.stop, by the `finally` of run(), at interpreter exit
(atexit, also after an uncaught exception or a SIGTERM/SIGINT/SIGHUP of
the test), and, should the test be killed outright, by the kernel
(PR_SET_PDEATHSIG). A failing check never leaves a daemon behind."""
import atexit
import ctypes
import json
import os
import shutil
import signal
import socket
import subprocess
import sys
import tempfile
import time

BUILD = os.environ.get("RW_BUILD") or os.path.join(
    os.path.dirname(__file__), "..", "..", "build")
SRC = os.environ.get("RW_SRC") or os.path.join(os.path.dirname(__file__),
                                               "..", "..")
DAEMON = os.path.join(BUILD, "rockwired")
CLIENT = os.path.join(BUILD, "rockwire")


def sanitized():
    """True for a build made with -DRW_SANITIZE=ON, whose memory use says
    nothing about the release build's."""
    try:
        with open(os.path.join(BUILD, "CMakeCache.txt")) as f:
            return "RW_SANITIZE:BOOL=ON" in f.read()
    except OSError:
        return False


def built_with(feature):
    """True when the build has the optional part `feature` ("tcp",
    "systemd", "client", "plot": the CMake options RW_WITH_TCP ...), from
    RW_FEATURES (a comma-separated list ctest sets) or else the build's
    CMakeCache.txt (an option not found there is ON, its default)."""
    env = os.environ.get("RW_FEATURES")
    if env is not None:
        return feature in env.split(",")
    try:
        with open(os.path.join(BUILD, "CMakeCache.txt")) as f:
            return ("RW_WITH_%s:BOOL=OFF" % feature.upper()) not in f.read()
    except OSError:
        return True


_counts = {"passed": 0, "failed": 0}


def check(name, cond, detail=""):
    """Counts one named check; prints the failures."""
    if cond:
        _counts["passed"] += 1
    else:
        _counts["failed"] += 1
        print("FAIL:", name, str(detail)[:400], flush=True)
    return cond


def finish():
    """Ends every process still running, prints 'N passed, M failed';
    returns the exit code (1 on any failure, or when nothing was
    checked)."""
    end_all()
    print("%d passed, %d failed" % (_counts["passed"], _counts["failed"]))
    return 1 if _counts["failed"] or not _counts["passed"] else 0


def run_tests(tests, *args):
    """Runs each test function (with `args`); an exception in one is a
    failed check and the next still runs."""
    for fn in tests:
        try:
            fn(*args)
        except Exception as e:  # a crash of the test is a failure
            check(fn.__name__, False, repr(e))


class Checks:
    """Counts checks; prints 'N passed, M failed' at the end."""

    def ok(self, cond, what):
        return check(what, cond)

    @property
    def passed(self):
        return _counts["passed"]

    @property
    def failed(self):
        return _counts["failed"]

    def done(self):
        sys.exit(finish())


def req(method, params=None, id=1):
    r = {"jsonrpc": "2.0", "id": id, "method": method}
    if params is not None:
        r["params"] = params
    return json.dumps(r)


# ---- processes -------------------------------------------------------------
_procs = []  # every Popen started here, ended by end_all()
try:
    _prctl = ctypes.CDLL(None, use_errno=True).prctl
except (OSError, AttributeError):
    _prctl = None


def _pdeathsig():
    """In the child, before exec: die with the test process (strictly,
    with the thread that started it: start daemons from the main
    thread)."""
    if _prctl:
        _prctl(1, int(signal.SIGKILL), 0, 0, 0)  # PR_SET_PDEATHSIG


def _end(p, timeout=5):
    """Ends p's process group: SIGTERM, then SIGKILL after `timeout`."""
    if p.poll() is None:
        try:
            os.killpg(p.pid, signal.SIGTERM)
        except OSError:
            pass
        try:
            p.wait(timeout)
        except subprocess.TimeoutExpired:
            pass
    try:
        os.killpg(p.pid, signal.SIGKILL)  # what the leader left behind
    except OSError:
        pass
    if p.poll() is None:
        p.wait()


_dirs = []  # temporary directories of Daemon, removed at exit


def end_all():
    """Ends every process (and its group) started through this module
    and removes the daemons' temporary directories."""
    while _procs:
        _end(_procs.pop())
    while _dirs:
        shutil.rmtree(_dirs.pop(), ignore_errors=True)


def spawn(argv, preexec=None, **kw):
    """subprocess.Popen in a process group of its own, ended by end_all()
    at the latest. `preexec` runs in the child before exec (e.g. to
    change uid)."""
    def child():
        if preexec:
            preexec()
        _pdeathsig()  # after any uid change, which clears it

    kw.setdefault("start_new_session", True)
    p = subprocess.Popen(argv, preexec_fn=child, **kw)
    _procs.append(p)
    return p


def run(argv, input=None, timeout=60, preexec=None, **kw):
    """Like subprocess.run(capture_output=True), with the process group
    ended on return, on timeout (raises TimeoutExpired) or on error."""
    kw.setdefault("stdout", subprocess.PIPE)
    kw.setdefault("stderr", subprocess.PIPE)
    if input is not None:
        kw["stdin"] = subprocess.PIPE
    p = spawn(argv, preexec=preexec, **kw)
    try:
        out, err = p.communicate(input, timeout=timeout)
        return subprocess.CompletedProcess(argv, p.returncode, out, err)
    finally:
        _end(p)
        if p in _procs:
            _procs.remove(p)


def _on_signal(signum, frame):
    raise SystemExit(128 + signum)  # so that finally blocks and atexit run


atexit.register(end_all)
for _sig in (signal.SIGTERM, signal.SIGHUP):
    signal.signal(_sig, _on_signal)


class Daemon:
    """rockwired on a private socket in a temporary directory (or, with
    sock=False, with only the listeners given in args). Attributes: path
    (the socket), dir, proc, log (the stderr file). Usable as a context
    manager; ended at exit in any case."""

    def __init__(self, *args, path=None, sock=True, env=None, preexec=None,
                 wait=True):
        self.dir = tempfile.mkdtemp(prefix="rw-e2e-")
        _dirs.append(self.dir)
        self.path = path or os.path.join(self.dir, "rw.sock")
        self.logpath = os.path.join(self.dir, "daemon.log")
        self.log = open(self.logpath, "w+")
        argv = [DAEMON] + (["--socket", self.path] if sock else [])
        self.proc = spawn(argv + list(args), preexec=preexec, env=env,
                          stdin=subprocess.DEVNULL,
                          stdout=subprocess.DEVNULL, stderr=self.log)
        self.p = self.proc
        if sock and wait:
            self.wait_ready()

    def wait_ready(self, timeout=10):
        deadline = time.time() + timeout
        while time.time() < deadline:
            if os.path.exists(self.path):
                try:
                    self.connect().close()
                    return
                except OSError:
                    pass
            if self.proc.poll() is not None:
                break
            time.sleep(0.02)
        raise RuntimeError("daemon did not start: " + self.logtext())

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.stop()
        return False

    def connect(self, timeout=20):
        s = socket.socket(socket.AF_UNIX, socket.SOCK_STREAM)
        s.settimeout(timeout)
        try:
            s.connect(self.path)
        except OSError:
            s.close()
            raise
        return s

    def logtext(self):
        self.log.flush()
        with open(self.logpath) as f:
            return f.read()

    def info(self, timeout=10):
        """The service.info result, on a connection of its own."""
        s = self.connect(timeout)
        try:
            r = call(s, req("service.info", id="info"), timeout)
        finally:
            s.close()
        return r["result"]

    def serves(self):
        """True when a fresh connection gets a correct small answer."""
        try:
            s = self.connect(10)
            try:
                r = call(s, req("elastic.convert",
                                {"rho": 2.4, "vp": 3000, "vs": 1500}), 10)
            finally:
                s.close()
            return r.get("result", {}).get("vp") == 3000
        except (OSError, ValueError, AttributeError):
            return False

    def stop(self, sig=signal.SIGTERM, timeout=15):
        """Signals the daemon and waits; returns its exit code, or None
        when it had to be killed."""
        rc = None
        if self.proc.poll() is None:
            self.proc.send_signal(sig)
        try:
            rc = self.proc.wait(timeout)
        except subprocess.TimeoutExpired:
            rc = None
        _end(self.proc)
        if self.proc in _procs:
            _procs.remove(self.proc)
        return rc


def read_lines(sock, n, timeout=20):
    """Reads exactly n lines from sock (or fewer at EOF)."""
    sock.settimeout(timeout)
    buf = b""
    lines = []
    while len(lines) < n:
        while b"\n" in buf and len(lines) < n:
            line, buf = buf.split(b"\n", 1)
            lines.append(line.decode())
        if len(lines) >= n:
            break
        chunk = sock.recv(1 << 16)
        if not chunk:
            break
        buf += chunk
    return lines


def call(sock, line, timeout=20):
    sock.sendall(line.encode() + b"\n")
    got = read_lines(sock, 1, timeout)
    return json.loads(got[0]) if got else None


def stdio(lines, *args, stdin_file=None, timeout=60):
    """Runs rockwired --stdio on the given lines; returns (rc, out, err)."""
    data = "".join(l + "\n" for l in lines).encode()
    if stdin_file:
        with open(stdin_file, "wb") as f:
            f.write(data)
        with open(stdin_file, "rb") as f:
            p = run([DAEMON, "--stdio"] + list(args), stdin=f,
                    timeout=timeout)
    else:
        p = run([DAEMON, "--stdio"] + list(args), input=data,
                timeout=timeout)
    return p.returncode, p.stdout.decode(), p.stderr.decode()


# ---- schema checks against protocol-docs/openrpc.json ----------------------
_DOC = None


def _doc():
    global _DOC
    if _DOC is None:
        with open(os.path.join(SRC, "protocol-docs", "openrpc.json")) as f:
            _DOC = json.load(f)
    return _DOC


def _validator(schema):
    import jsonschema
    resolver = jsonschema.RefResolver("", _doc())
    return jsonschema.Draft7Validator(schema, resolver=resolver)


def method_doc(name):
    for m in _doc()["methods"]:
        if m["name"] == name:
            return m
    return None


def validate_request(r):
    """Returns a list of problems of request object r against openrpc."""
    m = method_doc(r.get("method"))
    if m is None:
        return ["method %r not in openrpc.json" % r.get("method")]
    probs = []
    params = r.get("params", {})
    spec = {p["name"]: p for p in m["params"]}
    for name, v in params.items():
        if name not in spec:
            probs.append("%s: param %r not documented" % (m["name"], name))
            continue
        for e in _validator(spec[name]["schema"]).iter_errors(v):
            probs.append("%s.%s: %s" % (m["name"], name, e.message))
    for name, p in spec.items():
        if p.get("required") and name not in params:
            probs.append("%s: required %r missing" % (m["name"], name))
    return probs


ERROR_SCHEMA = {
    "type": "object", "required": ["jsonrpc", "id", "error"],
    "additionalProperties": False,
    "properties": {
        "jsonrpc": {"const": "2.0"},
        "id": {"type": ["string", "number", "null"]},
        "error": {"type": "object", "required": ["code", "message"],
                  "additionalProperties": False,
                  "properties": {
                      "code": {"type": "integer"},
                      "message": {"type": "string"},
                      "data": {"type": "object", "additionalProperties": False,
                               "properties": {"param": {"type": "string"},
                                              "reason": {"type": "string"}}}}}}}


def validate_response(method, resp):
    """Problems of a response object to a call of `method`."""
    if isinstance(resp, dict) and "error" in resp:
        return [e.message for e in _validator(ERROR_SCHEMA).iter_errors(resp)]
    if not isinstance(resp, dict) or set(resp) != {"jsonrpc", "id", "result"}:
        return ["not a JSON-RPC response: %.200r" % (resp,)]
    m = method_doc(method)
    if m is None:
        return ["method %r not in openrpc.json" % method]
    return ["%s result: %s at %s" % (method, e.message, list(e.path))
            for e in _validator(m["result"]["schema"]).iter_errors(
                resp["result"])]
