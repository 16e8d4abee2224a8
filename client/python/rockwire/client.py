"""The rockwire client: a connection to a rockwired daemon (a Unix socket,
a TCP address, or a private ``rockwired --stdio`` child), requests and
pipelined batches, and methods generated from the daemon's rpc.discover.

Standard library only; numpy is used for array results when it can be
imported. Screening estimates only: not a substitute for qualified review,
local regulations and licensed practice; never the sole basis for
well-control decisions.
"""
import errno
import json
import math
import os
import pwd
import selectors
import shutil
import socket
import stat
import struct
import subprocess
import sys
import time

from . import _schema

try:  # numpy is optional: plain lists without it
    import numpy as _np
except ImportError:  # pragma: no cover - exercised where numpy is absent
    _np = None

CAUTION = ("Screening estimates only: not a substitute for qualified "
           "review, local regulations and licensed practice; never the "
           "sole basis for well-control decisions.")

# Requests in flight at once in a pipelined batch, and bytes written ahead
# of the answers read: enough to keep the daemon busy, bounded so neither
# side buffers a whole job.
_WINDOW = 64
_READ_CHUNK = 1 << 18


# ---- errors ---------------------------------------------------------------
class RockwireError(Exception):
    """Base class of every error this package raises."""


class ConnectError(RockwireError):
    """No daemon reachable, or its socket refused as unsafe."""


class ProtocolError(RockwireError):
    """An answer that is not a valid JSON-RPC 2.0 response, or none."""


class TimeoutError(RockwireError):  # noqa: A001 - ours, not the builtin
    """No answer within the client's timeout."""


class RpcError(RockwireError):
    """The daemon answered with an error.

    Attributes: ``code`` (JSON-RPC code), ``message``, ``param`` (the
    offending parameter, dotted for nested members, or None), ``reason``
    (why, or None), ``data`` (the whole error.data) and ``method``.
    """

    def __init__(self, code, message, data=None, method=None):
        self.code = code
        self.message = message
        self.data = data if isinstance(data, dict) else {}
        self.param = self.data.get("param")
        self.reason = self.data.get("reason")
        self.method = method
        text = "%s: error %d: %s" % (method or "rockwire", code, message)
        if self.param:
            text += ": " + self.param
        if self.reason:
            text += ": " + self.reason
        super().__init__(text)


class ParseError(RpcError):
    """-32700: the daemon could not parse the request line."""


class InvalidRequest(RpcError):
    """-32600: not a valid JSON-RPC request (or a line over the limit)."""


class MethodNotFound(RpcError):
    """-32601: no such method."""


class InvalidParams(RpcError):
    """-32602: a parameter is unknown, of the wrong type, out of range,
    or the parameters do not fit together; ``param`` names it."""


class InternalError(RpcError):
    """-32603: the daemon ran out of memory or failed inside."""


class ServerBusy(RpcError):
    """-32000: too many connections."""


class LimitExceeded(RpcError):
    """-32001: samples, work or session bytes over the daemon's limits."""


_ERRORS = {-32700: ParseError, -32600: InvalidRequest, -32601: MethodNotFound,
           -32602: InvalidParams, -32603: InternalError, -32000: ServerBusy,
           -32001: LimitExceeded}


def _error_of(err, method):
    cls = _ERRORS.get(err.get("code"), RpcError)
    return cls(err.get("code"), err.get("message", ""), err.get("data"),
               method)


# ---- where the daemon is ----------------------------------------------------
def default_socket():
    """The default socket path, as the C client has it:
    ``$XDG_RUNTIME_DIR/rockwire.sock``, else
    ``/tmp/rockwire-<uid>/rockwire.sock``."""
    xdg = os.environ.get("XDG_RUNTIME_DIR")
    if xdg:
        return os.path.join(xdg, "rockwire.sock")
    return "/tmp/rockwire-%d/rockwire.sock" % os.getuid()


def _owner(uid):
    try:
        return "uid %d (%s)" % (uid, pwd.getpwuid(uid).pw_name)
    except KeyError:
        return "uid %d" % uid


def socket_safe(path, is_default=False):
    """Checks that a socket path may be trusted, by the C client's rules:
    every directory above it is owned by this user or root and, when
    others may write to it, has the sticky bit; with is_default the
    directory holding it is this user's and mode 0700; the socket is a
    socket (not a symbolic link) owned by this user or root and not
    writable by others. Returns True when it exists and is safe, False
    when it (or its directory) does not exist; raises ConnectError with
    the reason when it must not be used."""
    me = os.getuid()
    d = os.path.dirname(path) or "."
    try:
        real = os.path.realpath(d, strict=True)
    except (FileNotFoundError, NotADirectoryError):
        return False
    parts = [p for p in real.split("/") if p]
    dirs = ["/"] + ["/" + "/".join(parts[:i + 1]) for i in range(len(parts))]
    for i, dd in enumerate(dirs):
        last = i == len(dirs) - 1
        try:
            st = os.stat(dd)
        except (FileNotFoundError, NotADirectoryError):
            return False
        mode = stat.S_IMODE(st.st_mode)
        if last and is_default:
            if st.st_uid != me:
                raise ConnectError("refusing the socket: directory %s is "
                                   "owned by %s, not by you"
                                   % (dd, _owner(st.st_uid)))
            if mode & 0o077:
                raise ConnectError("refusing the socket: directory %s has "
                                   "mode %04o; it must be 0700 (open to "
                                   "you only)" % (dd, mode))
            continue
        if st.st_uid not in (me, 0):
            raise ConnectError("refusing the socket: directory %s is owned "
                               "by %s, not by you or root"
                               % (dd, _owner(st.st_uid)))
        if mode & stat.S_IWOTH and not mode & stat.S_ISVTX:
            raise ConnectError("refusing the socket: directory %s is "
                               "writable by others (mode %04o) without the "
                               "sticky bit" % (dd, mode))
    try:
        st = os.lstat(path)
    except FileNotFoundError:
        return False
    if stat.S_ISLNK(st.st_mode):
        raise ConnectError("refusing the socket: %s is a symbolic link "
                           "(owned by %s)" % (path, _owner(st.st_uid)))
    if not stat.S_ISSOCK(st.st_mode):
        raise ConnectError("refusing the socket: %s is not a socket" % path)
    if st.st_uid not in (me, 0):
        raise ConnectError("refusing the socket: %s is owned by %s, not by "
                           "you" % (path, _owner(st.st_uid)))
    if st.st_mode & stat.S_IWOTH:
        raise ConnectError("refusing the socket: %s is writable by others "
                           "(mode %04o): anyone could talk to that daemon"
                           % (path, stat.S_IMODE(st.st_mode)))
    return True


def find_daemon(daemon=None):
    """The rockwired to spawn: ``daemon`` when given, else
    ``$ROCKWIRED``, else the build tree this package sits in
    (``<top>/build/rockwired`` for ``<top>/client/python/rockwire``),
    else ``rockwired`` on PATH. Raises ConnectError when none is found."""
    if daemon:
        return daemon
    env = os.environ.get("ROCKWIRED")
    if env:
        return env
    here = os.path.dirname(os.path.abspath(__file__))
    top = os.path.normpath(os.path.join(here, "..", "..", ".."))
    for b in (os.environ.get("RW_BUILD"), os.path.join(top, "build")):
        if b:
            cand = os.path.join(b, "rockwired")
            if os.access(cand, os.X_OK):
                return cand
    found = shutil.which("rockwired")
    if found:
        return found
    raise ConnectError("no rockwired found: give daemon=PATH, set "
                       "$ROCKWIRED, build the tree, or install rockwire")


def _parse_address(address):
    """("unix", path) or ("tcp", (host, port)) for an address string:
    "unix:PATH", "tcp:HOST:PORT", "HOST:PORT", or a path."""
    if isinstance(address, tuple):
        return "tcp", (address[0], int(address[1]))
    a = str(address)
    if a.startswith("unix:"):
        return "unix", a[5:]
    if a.startswith("tcp:"):
        a = a[4:]
    elif "/" in a or ":" not in a:
        return "unix", a
    host, sep, port = a.rpartition(":")
    if not sep or not port.isdigit():
        raise ValueError("address %r: want unix:PATH, tcp:HOST:PORT or a "
                         "socket path" % (address,))
    if host.startswith("[") and host.endswith("]"):
        host = host[1:-1]
    return "tcp", (host or "127.0.0.1", int(port))


# ---- encoding -------------------------------------------------------------
def _plain(v):
    """A JSON-ready copy of v: numpy arrays and scalars to lists and
    numbers, NaN to null (a missing sample), tuples to lists."""
    if _np is not None:
        if isinstance(v, _np.ndarray):
            if v.dtype.kind == "f":
                if _np.isfinite(v).all():
                    return v.tolist()
                return _nan_to_none(v.tolist())
            if v.dtype.kind in "iub":
                return v.tolist()
            return [_plain(x) for x in v.tolist()]
        if isinstance(v, _np.generic):
            v = v.item()
    if isinstance(v, float):
        return None if math.isnan(v) else v
    if isinstance(v, dict):
        return {str(k): _plain(x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return [_plain(x) for x in v]
    return v


def _nan_to_none(x):
    if isinstance(x, list):
        return [_nan_to_none(y) for y in x]
    if isinstance(x, float) and math.isnan(x):
        return None
    return x


def _encode(obj):
    try:
        return json.dumps(obj, separators=(",", ":"), allow_nan=False)
    except ValueError as e:
        raise ValueError("a parameter is not finite (infinity cannot be "
                         "sent; NaN is sent as null, a missing sample): %s"
                         % e) from None


# ---- transports -----------------------------------------------------------
class _Pending:
    """A request in a batch: its method and, once answered, its result or
    error."""
    __slots__ = ("method", "line", "id", "result", "error", "done")

    def __init__(self, method, line, rid):
        self.method = method
        self.line = line
        self.id = rid
        self.result = None
        self.error = None
        self.done = False

    def get(self):
        """The result; raises the RpcError when the answer was one."""
        if not self.done:
            raise RockwireError("request %r not answered yet" % (self.id,))
        if self.error is not None:
            raise self.error
        return self.result


class Client:
    """A connection to rockwired.

    ``Client()`` uses the default socket when a daemon listens there and
    spawns a private ``rockwired --stdio`` otherwise (as the C client);
    ``Client("unix:/path")``, ``Client("/path/rw.sock")``,
    ``Client("tcp:127.0.0.1:7000")`` or ``Client(("host", port))`` connect
    there; ``Client(spawn=True)`` always spawns (``daemon=PATH`` names the
    binary). A socket not owned by you (or root), in a directory others
    can plant files in, or served by a daemon of another user, is refused
    with ConnectError.

    Methods are attributes generated from the daemon's rpc.discover:
    ``rw.elastic.convert(rho=2.3, vp=3000, vs=1500)``; ``help()`` on one
    shows its parameters with units, defaults and bounds. A parameter
    whose name is a Python keyword takes a trailing underscore
    (``lambda_=...``, ``class_=...``). ``rw.call(method, **params)`` calls
    any method by name. Results are dicts; with numpy, array outputs are
    numpy arrays (float64 with NaN for null, QC flags uint64).

    Use as a context manager (``with rockwire.Client() as rw:``) so a
    spawned daemon ends with the block.
    """

    def __init__(self, address=None, *, spawn=False, daemon=None,
                 timeout=60.0, discover=True, numpy=True, daemon_args=()):
        self.timeout = timeout
        self.numpy = bool(numpy) and _np is not None
        self._sock = None
        self._proc = None
        self._buf = bytearray()
        self._next_id = 0
        self.description = None
        self._discover = None
        self._families = {}
        self._schemas = {}
        self._connect(address, spawn, daemon, tuple(daemon_args))
        if discover:
            self.refresh_methods()

    # -- connection --
    def _connect(self, address, spawn, daemon, daemon_args):
        if address is not None and spawn:
            raise ValueError("give an address or spawn=True, not both")
        if address is None and not spawn:
            path = default_socket()
            if socket_safe(path, is_default=True):
                if self._try_unix(path):
                    return
            spawn = True
        if spawn:
            self._spawn(find_daemon(daemon), daemon_args)
            return
        kind, where = _parse_address(address)
        if kind == "unix":
            if not socket_safe(where, is_default=False):
                raise ConnectError("no daemon at %s (no such socket)" % where)
            if not self._try_unix(where, must=True):
                raise ConnectError("no daemon listens at %s" % where)
            return
        try:
            s = socket.create_connection(where, timeout=self.timeout)
        except OSError as e:
            raise ConnectError("tcp:%s:%d: %s" % (where[0], where[1],
                                                  e.strerror or e)) from None
        s.setsockopt(socket.IPPROTO_TCP, socket.TCP_NODELAY, 1)
        self._sock = s
        self.description = "tcp:%s:%d" % where

    def _try_unix(self, path, must=False):
        s = socket.socket(socket.AF_UNIX, socket.SOCK_STREAM)
        try:
            s.connect(path)
        except OSError as e:
            s.close()
            if e.errno in (errno.ECONNREFUSED, errno.ENOENT) and not must:
                return False
            if e.errno in (errno.ECONNREFUSED, errno.ENOENT):
                return False
            raise ConnectError("%s: %s" % (path, e.strerror)) from None
        fmt = "3i"
        try:
            cred = s.getsockopt(socket.SOL_SOCKET, socket.SO_PEERCRED,
                                struct.calcsize(fmt))
            _pid, uid, _gid = struct.unpack(fmt, cred)
            if uid not in (os.getuid(), 0):
                s.close()
                raise ConnectError("refusing %s: the daemon there runs as "
                                   "%s, not as you; give another address "
                                   "or spawn=True" % (path, _owner(uid)))
        except (AttributeError, OSError):
            pass  # not knowable here: the path checks stand
        self._sock = s
        self.description = "unix:" + path
        return True

    def _spawn(self, path, extra):
        mine, theirs = socket.socketpair()
        try:
            self._proc = subprocess.Popen(
                [path, "--stdio"] + list(extra), stdin=theirs, stdout=theirs,
                stderr=subprocess.DEVNULL, close_fds=True)
        except OSError as e:
            mine.close()
            raise ConnectError("cannot run %s: %s" % (path, e.strerror)) \
                from None
        finally:
            theirs.close()
        self._sock = mine
        self.description = "spawned:%s (pid %d)" % (path, self._proc.pid)

    @property
    def pid(self):
        """The spawned daemon's process id, or None on a socket."""
        return self._proc.pid if self._proc else None

    def close(self):
        """Closes the connection; a spawned daemon sees end of input,
        answers what it has and exits (it is killed after 10 s)."""
        if self._sock is not None:
            try:
                self._sock.shutdown(socket.SHUT_WR)
            except OSError:
                pass
            self._sock.close()
            self._sock = None
        if self._proc is not None:
            try:
                self._proc.wait(10)
            except subprocess.TimeoutExpired:
                self._proc.kill()
                self._proc.wait()
            self._proc = None

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()

    def __del__(self):
        try:
            self.close()
        except Exception:
            pass

    # -- requests --
    def _new_id(self):
        self._next_id += 1
        return self._next_id

    def _line(self, method, params, rid):
        req = {"jsonrpc": "2.0", "id": rid, "method": method}
        if params:
            req["params"] = _plain(params)
        return (_encode(req) + "\n").encode()

    def _pump(self, pend):
        """Writes the request lines of pend (a list of _Pending) and reads
        their answers, at most _WINDOW in flight, without blocking on a
        full pipe in either direction."""
        if self._sock is None:
            raise RockwireError("the connection is closed")
        sock = self._sock
        sel = selectors.DefaultSelector()
        sock.setblocking(False)
        sent = 0           # requests fully written
        answered = 0
        out = memoryview(b"")
        deadline = None if self.timeout is None else \
            time.monotonic() + self.timeout
        try:
            sel.register(sock, selectors.EVENT_READ)
            while answered < len(pend):
                if not len(out) and sent < len(pend) and \
                        sent - answered < _WINDOW:
                    out = memoryview(pend[sent].line)
                    sent += 1
                want = selectors.EVENT_READ
                if len(out):
                    want |= selectors.EVENT_WRITE
                sel.modify(sock, want)
                wait = None if deadline is None else \
                    max(0.0, deadline - time.monotonic())
                ev = sel.select(wait)
                if not ev:
                    raise TimeoutError("no answer within %.3g s"
                                       % self.timeout)
                for _key, mask in ev:
                    if mask & selectors.EVENT_WRITE and len(out):
                        try:
                            n = sock.send(out)
                        except (BlockingIOError, InterruptedError):
                            n = 0
                        except OSError as e:
                            raise ProtocolError("the daemon closed the "
                                                "connection: %s"
                                                % e.strerror) from None
                        out = out[n:]
                    if mask & selectors.EVENT_READ:
                        try:
                            chunk = sock.recv(_READ_CHUNK)
                        except (BlockingIOError, InterruptedError):
                            continue
                        if not chunk:
                            raise ProtocolError(
                                "the daemon closed the connection with %d "
                                "request(s) unanswered"
                                % (len(pend) - answered))
                        answered = self._take(chunk, pend, answered)
                        if deadline is not None:
                            deadline = time.monotonic() + self.timeout
        finally:
            sel.close()
            if self._sock is not None:
                sock.setblocking(True)

    def _take(self, chunk, pend, answered):
        buf = self._buf
        start = len(buf)
        buf += chunk
        pos = 0
        nl = buf.find(b"\n", start)
        while nl >= 0:
            line = bytes(buf[pos:nl])
            pos = nl + 1
            if line.strip():
                if answered >= len(pend):
                    raise ProtocolError("an answer nobody asked for: %.200r"
                                        % line)
                self._answer(pend[answered], line)
                answered += 1
            nl = buf.find(b"\n", pos)
        del buf[:pos]
        return answered

    def _answer(self, p, line):
        try:
            r = json.loads(line)
        except ValueError as e:
            raise ProtocolError("an answer that is not JSON (%s): %.200r"
                                % (e, line)) from None
        if not isinstance(r, dict) or r.get("jsonrpc") != "2.0" or \
                "id" not in r or ("result" in r) == ("error" in r):
            raise ProtocolError("not a JSON-RPC 2.0 response: %.200r" % line)
        if r["id"] != p.id:
            raise ProtocolError("answer for id %r where %r was expected"
                                % (r["id"], p.id))
        p.done = True
        if "error" in r:
            e = r["error"]
            if not isinstance(e, dict) or not isinstance(e.get("code"), int):
                raise ProtocolError("malformed error object: %.200r" % line)
            p.error = _error_of(e, p.method)
        else:
            p.result = self._convert(p.method, r["result"])

    def _convert(self, method, result):
        if not self.numpy or not isinstance(result, dict):
            return result
        return _schema.to_numpy(result, self._schemas.get(method), _np)

    @staticmethod
    def _fix_names(params):
        """Keyword parameters as sent: names that are Python keywords
        take a trailing underscore (``lambda_`` -> ``lambda``), and a
        keyword given as None is left out (not given). A None inside a
        dict or an array is sent as null (a missing sample)."""
        out = {}
        for k, v in params.items():
            if v is None:
                continue
            if k.endswith("_") and k[:-1] in _schema.KEYWORDS:
                k = k[:-1]
            out[k] = v
        return out

    def call(self, method, params=None, /, **kw):
        """Calls method with params (a dict, sent as it is) and/or keyword
        parameters (None means not given); returns the result, or raises
        RpcError (InvalidParams naming the parameter and the reason,
        ...)."""
        p = dict(params or {})
        p.update(self._fix_names(kw))
        rid = self._new_id()
        pend = _Pending(method, self._line(method, p, rid), rid)
        self._pump([pend])
        return pend.get()

    def call_many(self, requests, raise_errors=True):
        """Pipelines a batch: requests is an iterable of (method, params)
        pairs; they are written back to back (a bounded number in flight)
        and answered in order. Returns the list of results; with
        raise_errors False, an error answer stands in the list as its
        RpcError instead of being raised (the first one is raised
        otherwise, after every answer has arrived)."""
        pend = []
        for method, params in requests:
            rid = self._new_id()
            pend.append(_Pending(method,
                                 self._line(method, params or {}, rid), rid))
        self._pump(pend)
        out = []
        for p in pend:
            if p.error is not None and raise_errors:
                raise p.error
            out.append(p.error if p.error is not None else p.result)
        return out

    def batch(self):
        """A pipelined batch as a context manager::

            with rw.batch() as b:
                a = b.call("elastic.convert", rho=2.3, vp=3000, vs=1500)
                c = b.reflect.interface(upper=..., lower=..., angle=30)
            a.get(), c.get()

        The requests are sent when the block ends; each call returns a
        handle whose get() gives the result or raises its error."""
        return Batch(self)

    # -- generated methods --
    def refresh_methods(self):
        """Fetches rpc.discover and (re)builds the method attributes."""
        self._schemas = {}
        doc = self.call("rpc.discover")
        self._discover = doc
        self._schemas = _schema.result_schemas(doc)
        fams = {}
        for m in doc.get("methods", []):
            name = m.get("name", "")
            fam, _, verb = name.partition(".")
            if not verb:
                continue
            fams.setdefault(fam, {})[verb] = m
        self._families = {}
        for fam, methods in fams.items():
            self._families[fam] = _schema.Family(self, fam, methods, doc)

    @property
    def methods(self):
        """Names of the methods the daemon offers (from rpc.discover)."""
        return sorted("%s.%s" % (f, v) for f, fam in self._families.items()
                      for v in fam._verbs)

    def describe(self, method):
        """The method's rpc.discover entry (a dict)."""
        for m in (self._discover or {}).get("methods", []):
            if m.get("name") == method:
                return m
        raise KeyError(method)

    def __getattr__(self, name):
        fams = self.__dict__.get("_families") or {}
        if name in fams:
            return fams[name]
        raise AttributeError("%r: no such attribute or method family (the "
                             "daemon offers: %s)"
                             % (name, ", ".join(sorted(fams)) or "none"))

    def __dir__(self):
        return sorted(set(super().__dir__()) | set(self._families))

    # -- sessions --
    def session_scope(self, **defaults):
        """A context manager: session.set(**defaults) on entry,
        session.reset() on exit (defaults belong to this connection)."""
        return _SessionScope(self, defaults)

    def info(self):
        """service.info: version, limits, units, QC legend, counters."""
        return self.call("service.info")

    def qc_names(self, flags):
        """Names of the QC bits set in one flag word (an int), from
        service.info's legend."""
        legend = getattr(self, "_legend", None)
        if legend is None:
            legend = {}
            for q in self.info().get("qc_flags", []):
                idx = q.get("index")
                if idx is None:
                    idx = int(q.get("mask", q.get("bit", 0))).bit_length() - 1
                legend[idx] = q.get("name")
            self._legend = legend
        f = int(flags)
        return [legend.get(b, "bit%d" % b) for b in range(64) if f >> b & 1]


class Batch:
    """Requests collected and sent together (see Client.batch)."""

    def __init__(self, client):
        self._c = client
        self._pend = []

    def call(self, method, params=None, /, **kw):
        p = dict(params or {})
        p.update(Client._fix_names(kw))
        rid = self._c._new_id()
        h = _Pending(method, self._c._line(method, p, rid), rid)
        self._pend.append(h)
        return h

    def __getattr__(self, fam):
        c = self.__dict__["_c"]
        if fam in c._families:
            return _BatchFamily(self, fam)
        raise AttributeError(fam)

    def run(self):
        """Sends what was collected; returns the handles."""
        pend, self._pend = self._pend, []
        if pend:
            self._c._pump(pend)
        return pend

    def __enter__(self):
        return self

    def __exit__(self, et, ev, tb):
        if et is None:
            self.run()


class _BatchFamily:
    def __init__(self, batch, fam):
        self._b = batch
        self._fam = fam

    def __getattr__(self, verb):
        name = "%s.%s" % (self._fam, verb)
        b = self._b

        def queue(params=None, /, **kw):
            return b.call(name, params, **kw)
        queue.__name__ = verb
        return queue


class _SessionScope:
    def __init__(self, client, defaults):
        self._c = client
        self._d = defaults

    def __enter__(self):
        return self._c.call("session.set", self._d)

    def __exit__(self, *exc):
        if self._c._sock is not None:
            self._c.call("session.reset")


def connect(address=None, **kw):
    """Client(address, **kw): the default socket, else a private daemon."""
    return Client(address, **kw)


def spawn(daemon=None, **kw):
    """Client(spawn=True): a private rockwired --stdio for this process."""
    return Client(spawn=True, daemon=daemon, **kw)


if sys.version_info < (3, 8):  # pragma: no cover
    raise ImportError("rockwire needs Python 3.8 or later")
