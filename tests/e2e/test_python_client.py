#!/usr/bin/python3
"""The Python client (client/python, issue 16): spawning a private daemon
and ending it, Unix socket and TCP connections, the socket safety rules of
the C client, methods generated from rpc.discover with help() texts,
results as numpy arrays (QC flags uint64, NaN for null) equal to what the
daemon sent, errors as exceptions naming the parameter, pipelined batches
in order, sessions, and an offline pip install."""
import json
import os
import pydoc
import shutil
import socket
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

PKG = os.path.join(rwtest.SRC, "client", "python")
sys.path.insert(0, PKG)
os.environ["ROCKWIRED"] = rwtest.DAEMON
import numpy as np  # noqa: E402
import rockwire  # noqa: E402

t = rwtest.Checks()


def alive(pid):
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    try:  # a zombie is not alive
        with open("/proc/%d/stat" % pid) as f:
            return f.read().split()[2] != "Z"
    except OSError:
        return False


def raises(exc, fn, *a, **kw):
    try:
        fn(*a, **kw)
    except exc as e:
        return e
    except Exception as e:  # the wrong kind is a failure, shown
        return ("wrong exception", type(e).__name__, str(e))
    return None


# ---- a spawned daemon, methods from rpc.discover --------------------------
with rockwire.spawn() as rw:
    pid = rw.pid
    t.ok(pid and alive(pid), "spawn runs rockwired --stdio")
    info = rw.info()
    t.ok(sorted(info["methods"]) == rw.methods,
         "methods generated for every method service.info lists: %r"
         % rw.methods)
    t.ok(callable(rw.elastic.convert) and callable(rw.reflect.interface),
         "families and methods as attributes")
    doc = pydoc.render_doc(rw.elastic.convert, renderer=pydoc.plaintext)
    t.ok("velocity in m/s" in doc and "rho" in doc and "required" in doc
         and "lambda_=None" in doc and "Screening estimates" in doc,
         "help() shows parameters with kind and unit, the keyword alias and "
         "the caution: " + doc[:300])
    doc = pydoc.render_doc(rw.reflect.interface, renderer=pydoc.plaintext)
    t.ok("angle=0" in doc and "range [0, 90]" in doc and
         "qc (QC flags, uint64)" in doc and "critical_p [deg]" in doc,
         "help() shows defaults, bounds and outputs with units")
    t.ok("(or a distribution)" in doc,
         "help() says a number may be a distribution")
    # Uncertainty: the statistics of each output as arrays.
    u = rw.elastic.convert(rho=[2.3, 2.4], vp=3000,
                           vs={"dist": "normal", "mean": 1500, "sd": 50},
                           fields=["mu"], uncertainty={"draws": 200})
    t.ok(isinstance(u["mu"]["p50"], np.ndarray) and
         u["mu"]["p50"].shape == (2,) and u["mu"]["sd"][0] > 0,
         "statistics under uncertainty as float64 arrays: %r" % (u["mu"],))
    e = raises(AttributeError, getattr, rw, "elastik")
    t.ok(isinstance(e, AttributeError) and "elastic" in str(e),
         "an unknown family is an AttributeError listing the families")

    # Results: the same numbers the daemon wrote, as numpy arrays.
    params = {"rho": [2.3, 2.4, 2.2], "vp": [3000, 3100.5, 2900],
              "vs": [1500, None, 1400]}
    r = rw.elastic.convert(**params)
    rc, out, err = rwtest.stdio([rwtest.req("elastic.convert", params)])
    raw = json.loads(out)["result"]
    t.ok(isinstance(r["k"], np.ndarray) and r["k"].dtype == np.float64,
         "numeric outputs are float64 arrays")
    t.ok(r["qc"].dtype == np.uint64 and int(r["qc"][1]) == raw["qc"][1]
         and raw["qc"][1] != 0, "QC flags uint64, as sent: %r" % r["qc"])
    t.ok(np.isnan(r["k"][1]) and raw["k"][1] is None,
         "null becomes NaN")
    same = all(np.array_equal(np.array(raw[k], dtype=float), r[k],
                              equal_nan=True)
               for k in raw if isinstance(raw[k], list) and k != "qc")
    t.ok(same, "every array equals the daemon's numbers exactly")
    t.ok(r["units"]["k"] == "GPa" and r["n"] == 3, "units and counts kept")
    names = rw.qc_names(r["qc"][1])
    t.ok(names == ["input_missing"], "qc_names decodes by the legend: %r"
         % names)
    # What is not a rectangle of numbers stays as the daemon sent it.
    from rockwire import _schema
    conv = _schema.to_numpy(
        {"a": [1, 2.5, None], "b": [True, 1.0], "c": ["I", None],
         "d": [[1, None], [2, 3]], "e": [[1, 2], [3]], "f": [1, "2"]},
        {}, np)
    t.ok(conv["a"].dtype == np.float64 and np.isnan(conv["a"][2]) and
         conv["a"][1] == 2.5, "numbers and nulls: float64, NaN for null")
    t.ok(conv["b"] == [True, 1.0] and conv["c"] == ["I", None] and
         conv["e"] == [[1, 2], [3]] and conv["f"] == [1, "2"],
         "booleans, strings, ragged rows and a quoted number stay lists")
    t.ok(conv["d"].shape == (2, 2) and np.isnan(conv["d"][0, 1]),
         "a rectangle with nulls: 2-D float64")
    # numpy arrays in, NaN as a missing sample.
    r2 = rw.elastic.convert(rho=np.array([2.3, 2.4, 2.2]),
                            vp=np.array([3000, 3100.5, 2900]),
                            vs=np.array([1500, np.nan, 1400]))
    t.ok(np.array_equal(r2["k"], r["k"], equal_nan=True) and
         np.array_equal(r2["qc"], r["qc"]),
         "numpy arrays in, NaN sent as null")
    # Keyword names that are Python keywords; a 2-D grid.
    r3 = rw.elastic.convert(rho=2.5, lambda_=10, mu=5)
    t.ok(abs(r3["k"] - (10 + 2 * 5 / 3)) < 1e-12,
         "lambda_ is sent as lambda: K = lambda + 2 mu / 3 "
         "(Mavko et al. 2009, isotropic relations)")
    g = rw.reflect.interface(upper={"vp": 2900, "vs": 1350, "rho": 2.45},
                             lower={"vp": [3150, 2827.5], "vs": [1650, 1733.5],
                                    "rho": [2.23, 2.0204]},
                             angle=[0, 10, 20, 30], methods="shuey2")
    t.ok(g["rpp_shuey2"].shape == (2, 4) and g["qc"].shape == (2, 4) and
         g["qc"].dtype == np.uint64 and g["class"] == ["II", "III"],
         "a [interface][angle] grid is a 2-D array, strings stay lists")

    # Errors as exceptions with code, param and reason.
    e = raises(rockwire.InvalidParams, rw.elastic.convert, rho=2.3, vp=3000,
               ai=7)
    t.ok(isinstance(e, rockwire.InvalidParams) and e.code == -32602 and
         e.param == "ai" and "same property" in e.reason and
         e.method == "elastic.convert", "InvalidParams names the field: %r"
         % (e,))
    e = raises(rockwire.InvalidParams, rw.elastic.convert, rho=2.3, vp=3000,
               vs=1500, porosty=0.2)
    t.ok(isinstance(e, rockwire.InvalidParams) and e.param == "porosty",
         "an unknown parameter is named: %r" % (e,))
    e = raises(rockwire.MethodNotFound, rw.call, "elastic.nope")
    t.ok(isinstance(e, rockwire.MethodNotFound) and e.code == -32601,
         "MethodNotFound for an unknown method")
    e = raises(ValueError, rw.elastic.convert, rho=2.3, vp=float("inf"),
               vs=1500)
    t.ok(isinstance(e, ValueError) and "not finite" in str(e),
         "infinity refused before sending")
    t.ok(rw.elastic.convert(rho=2.3, vp=3000, vs=1500)["mu"] ==
         2.3 * 1500 ** 2 / 1e6, "mu = rho vs^2 after the errors")

    # Pipelined batches: in order, errors in place.
    reqs = [("elastic.convert", {"rho": 2.0 + i / 1000, "vp": 3000,
                                 "vs": 1500}) for i in range(300)]
    reqs[150] = ("elastic.convert", {"rho": 2.0, "vp": 3000})
    res = rw.call_many(reqs, raise_errors=False)
    ok = all(abs(res[i]["rho"] - (2.0 + i / 1000)) < 1e-12
             for i in range(300) if i != 150)
    t.ok(len(res) == 300 and ok and
         isinstance(res[150], rockwire.InvalidParams),
         "300 pipelined requests answered in order, the bad one in place")
    e = raises(rockwire.InvalidParams, rw.call_many, reqs)
    t.ok(isinstance(e, rockwire.InvalidParams),
         "call_many raises the first error by default")
    with rw.batch() as b:
        h1 = b.elastic.convert(rho=2.3, vp=3000, vs=1500)
        h2 = b.call("reflect.interface",
                    upper={"vp": 2900, "vs": 1350, "rho": 2.45},
                    lower={"vp": 3150, "vs": 1650, "rho": 2.23}, angle=30)
        h3 = b.elastic.convert(rho=2.3)
    t.ok(h1.get()["k"] > 0 and "rpp_re" in h2.get() and
         isinstance(raises(rockwire.InvalidParams, h3.get),
                    rockwire.InvalidParams),
         "batch handles give results and errors")
    # A large request and answer through the pipe without deadlock.
    n = 200000
    vp = np.linspace(2500, 4500, n)
    big = rw.elastic.convert(rho=np.full(n, 2.4), vp=vp, vs=vp / 1.9)
    t.ok(big["n"] == n and big["vpvs"].shape == (n,) and
         np.allclose(big["vpvs"], 1.9), "a 200000-sample answer")

    # Sessions.
    s = rw.session.set(rho=2.4)
    t.ok(s["defaults"] == {"rho": 2.4}, "session.set: %r" % s)
    t.ok(rw.elastic.convert(vp=3000, vs=1500)["rho"] == 2.4,
         "a request inherits the session's rho")
    rw.session.reset()
    e = raises(rockwire.InvalidParams, rw.elastic.convert, vp=3000, vs=1500)
    t.ok(isinstance(e, rockwire.InvalidParams) and e.param == "rho",
         "after session.reset rho is required again")
    with rw.session_scope(units={"velocity": "km/s"}):
        r = rw.elastic.convert(rho=2.4, vp=3, vs=1.5)
        # K = rho (vp^2 - 4/3 vs^2) = 2.4 (9 - 3) = 14.4 GPa.
        t.ok(r["units"]["vp"] == "km/s" and abs(r["k"] - 14.4) < 1e-9,
             "session_scope units apply: %r" % r["k"])
    r = rw.elastic.convert(rho=2.4, vp=3000, vs=1500)
    t.ok(r["units"]["vp"] == "m/s", "session_scope resets on exit")
    # Lists without numpy.
    with rockwire.spawn(numpy=False) as plain:
        r = plain.elastic.convert(rho=[2.3], vp=[3000], vs=[1500])
        t.ok(isinstance(r["k"], list) and r["qc"] == [0],
             "numpy=False gives plain lists")
t.ok(not alive(pid), "the context manager ends the spawned daemon")

# ---- Unix socket and TCP ----------------------------------------------------
d = rwtest.Daemon()
try:
    with rockwire.connect(d.path) as rw:
        t.ok(rw.pid is None and rw.description == "unix:" + d.path and
             rw.elastic.convert(rho=2, vp=3000, vs=1500)["n"] == 1,
             "connect to a socket path")
    with rockwire.connect("unix:" + d.path) as rw:
        t.ok(rw.call("service.info")["name"] == "rockwire", "unix:PATH")
finally:
    d.stop()
if rwtest.built_with("tcp"):  # a daemon built with RW_WITH_TCP=ON
    s = socket.socket()
    s.bind(("127.0.0.1", 0))
    port = s.getsockname()[1]
    s.close()
    d = rwtest.Daemon("--listen", "tcp:127.0.0.1:%d" % port)
    try:
        with rockwire.connect("tcp:127.0.0.1:%d" % port) as rw:
            r = rw.reflect.interface(
                upper={"vp": 2900, "vs": 1350, "rho": 2.45},
                lower={"vp": 3150, "vs": 1650, "rho": 2.23})
            t.ok(rw.description.startswith("tcp:") and "class" in r,
                 "connect over TCP")
        with rockwire.connect(("127.0.0.1", port)) as rw:
            t.ok(rw.info()["name"] == "rockwire", "a (host, port) tuple")
    finally:
        d.stop()
    e = raises(rockwire.ConnectError, rockwire.connect,
               "tcp:127.0.0.1:%d" % port)
    t.ok(isinstance(e, rockwire.ConnectError),
         "nothing on TCP: ConnectError")

# ---- socket safety, the C client's rules ------------------------------------
tmp = tempfile.mkdtemp(prefix="rw-py-")
try:
    open_dir = os.path.join(tmp, "open")
    os.mkdir(open_dir)
    os.chmod(open_dir, 0o777)
    planted = os.path.join(open_dir, "rw.sock")
    ls = socket.socket(socket.AF_UNIX)
    ls.bind(planted)
    ls.listen(1)
    e = raises(rockwire.ConnectError, rockwire.connect, planted)
    t.ok(isinstance(e, rockwire.ConnectError) and "sticky" in str(e),
         "a socket in a world-writable directory is refused: %s" % (e,))
    ls.close()
    # The default socket: its folder must be 0700.
    xdg = os.path.join(tmp, "xdg")
    os.mkdir(xdg, 0o755)
    os.chmod(xdg, 0o755)
    ls = socket.socket(socket.AF_UNIX)
    ls.bind(os.path.join(xdg, "rockwire.sock"))
    ls.listen(1)
    old = os.environ.get("XDG_RUNTIME_DIR")
    os.environ["XDG_RUNTIME_DIR"] = xdg
    t.ok(rockwire.default_socket() == os.path.join(xdg, "rockwire.sock"),
         "default socket under $XDG_RUNTIME_DIR")
    e = raises(rockwire.ConnectError, rockwire.connect)
    t.ok(isinstance(e, rockwire.ConnectError) and "0700" in str(e),
         "a default socket folder open to others is refused: %s" % (e,))
    ls.close()
    os.unlink(os.path.join(xdg, "rockwire.sock"))
    os.chmod(xdg, 0o700)
    with rockwire.connect() as rw:  # nothing listens: a private daemon
        t.ok(rw.pid is not None and rw.info()["name"] == "rockwire",
             "no daemon on the default socket: one is spawned")
    if old is None:
        del os.environ["XDG_RUNTIME_DIR"]
    else:
        os.environ["XDG_RUNTIME_DIR"] = old
    uid = os.getuid()
    os.environ.pop("XDG_RUNTIME_DIR", None)
    t.ok(rockwire.default_socket() ==
         "/tmp/rockwire-%d/rockwire.sock" % uid, "default socket under /tmp")
    if old is not None:
        os.environ["XDG_RUNTIME_DIR"] = old
    e = raises(rockwire.ConnectError, rockwire.spawn,
               daemon=os.path.join(tmp, "no-such-rockwired"))
    t.ok(isinstance(e, rockwire.ConnectError), "a missing daemon binary")

    # ---- offline install with Debian's pip and setuptools -----------------
    target = os.path.join(tmp, "site")
    p = subprocess.run([sys.executable, "-m", "pip", "install", "--quiet",
                        "--no-build-isolation", "--no-index", "--no-deps",
                        "--target", target, PKG],
                       capture_output=True, text=True, timeout=240,
                       cwd=tmp)
    # pip builds in a copy; a build/ folder left in the tree would be ours.
    t.ok(p.returncode == 0 and
         os.path.exists(os.path.join(target, "rockwire", "dask.py")),
         "pip install --no-index --target: %s" % p.stderr[-600:])
    code = ("import rockwire, sys; assert rockwire.__file__.startswith(%r);"
            "rw = rockwire.spawn(); print(rw.elastic.convert(rho=2.4, vp=3000,"
            " vs=1500)['k']); rw.close()" % target)
    env = dict(os.environ, PYTHONPATH=target, ROCKWIRED=rwtest.DAEMON)
    p = subprocess.run([sys.executable, "-c", code], capture_output=True,
                       text=True, timeout=60, env=env, cwd=tmp)
    t.ok(p.returncode == 0 and abs(float(p.stdout) - 14.4) < 1e-9,
         "the installed package works: %r %r" % (p.stdout, p.stderr[-300:]))
finally:
    shutil.rmtree(tmp, ignore_errors=True)
    leftovers = [d for d in ("build", "rockwire.egg-info")
                 if os.path.exists(os.path.join(PKG, d))]
    for d in leftovers:
        shutil.rmtree(os.path.join(PKG, d), ignore_errors=True)
t.done()
