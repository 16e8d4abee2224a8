"""Helpers for end-to-end tests: start rockwired on a temporary socket or
on stdio, talk to it with bounded timeouts, count checks. Used by
tests/e2e/test_*.py under Debian's /usr/bin/python3."""
import json
import os
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
    """Prints 'N passed, M failed'; returns the exit code (1 on any
    failure, or when nothing was checked)."""
    print("%d passed, %d failed" % (_counts["passed"], _counts["failed"]))
    return 1 if _counts["failed"] or not _counts["passed"] else 0


class Checks:
    """Counts checks; prints 'N passed, M failed' at the end."""

    def __init__(self):
        self.passed = 0
        self.failed = 0

    def ok(self, cond, what):
        if cond:
            self.passed += 1
        else:
            self.failed += 1
            print("FAIL:", what, flush=True)
        return cond

    def done(self):
        print("%d passed, %d failed" % (self.passed, self.failed))
        sys.exit(1 if self.failed or not self.passed else 0)


def req(method, params=None, id=1):
    r = {"jsonrpc": "2.0", "id": id, "method": method}
    if params is not None:
        r["params"] = params
    return json.dumps(r)


class Daemon:
    """rockwired on a private socket in a temporary directory."""

    def __init__(self, *args, path=None):
        self.dir = tempfile.mkdtemp(prefix="rw-e2e-")
        self.path = path or os.path.join(self.dir, "rw.sock")
        self.log = open(os.path.join(self.dir, "daemon.log"), "w+")
        self.proc = subprocess.Popen(
            [DAEMON, "--socket", self.path] + list(args),
            stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL,
            stderr=self.log)
        deadline = time.time() + 10
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

    def connect(self, timeout=20):
        s = socket.socket(socket.AF_UNIX, socket.SOCK_STREAM)
        s.settimeout(timeout)
        s.connect(self.path)
        return s

    def logtext(self):
        self.log.flush()
        self.log.seek(0)
        return self.log.read()

    def stop(self, sig=signal.SIGTERM, timeout=15):
        if self.proc.poll() is None:
            self.proc.send_signal(sig)
        try:
            return self.proc.wait(timeout)
        except subprocess.TimeoutExpired:
            self.proc.kill()
            self.proc.wait()
            return None


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
            p = subprocess.run([DAEMON, "--stdio"] + list(args), stdin=f,
                               capture_output=True, timeout=timeout)
    else:
        p = subprocess.run([DAEMON, "--stdio"] + list(args), input=data,
                           capture_output=True, timeout=timeout)
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
