"""rockwire on Dask: apply a daemon method to Dask arrays or dataframes,
partition by partition.

Each worker process keeps one private ``rockwired --stdio`` for its
lifetime (a per-process client made on first use and closed when the
process exits; a worker killed outright closes the daemon's pipe, and the
daemon ends at end of input) and streams its partitions through it in
blocks of ``block`` samples, pipelined. Dask does the scheduling, the
retries of a lost worker's tasks and the data movement: there is no
scheduler here. Tasks are pure (the same partition gives the same
answer), so a retried task neither loses nor duplicates samples.

Needs numpy, dask and distributed (Debian: python3-numpy, python3-dask,
python3-distributed; dataframes need python3-pandas).

Screening estimates only: not a substitute for qualified review, local
regulations and licensed practice; never the sole basis for well-control
decisions.
"""
import atexit
import os
import threading

import numpy as np
import dask
import dask.array as da

from .client import Client, CAUTION  # noqa: F401 - CAUTION re-exported

DEFAULT_BLOCK = 50000

_lock = threading.Lock()
_state = {"client": None, "pid": None, "daemon": None, "args": ()}


def configure(daemon=None, daemon_args=()):
    """Which rockwired the per-process clients spawn (default: as
    rockwire.find_daemon). Call it in the driver before the job; the
    setting travels with each task."""
    _state["daemon"] = daemon
    _state["args"] = tuple(daemon_args)


def worker_client(daemon=None, daemon_args=()):
    """This process's client: a private rockwired --stdio started on first
    use and kept until the process exits (a fork gets its own)."""
    with _lock:
        c = _state["client"]
        if c is not None and _state["pid"] == os.getpid() and \
                c._sock is not None and \
                (c._proc is None or c._proc.poll() is None):
            return c
        c = Client(spawn=True, daemon=daemon or _state["daemon"],
                   daemon_args=daemon_args or _state["args"])
        _state["client"] = c
        _state["pid"] = os.getpid()
        return c


def daemon_pid():
    """The process id of this process's daemon, or None (for checks and
    monitoring: ``dask_client.run(rockwire.dask.daemon_pid)``)."""
    c = _state["client"]
    if c is None or _state["pid"] != os.getpid():
        return None
    return c.pid


def close_worker_client():
    """Ends this process's daemon (run at exit)."""
    with _lock:
        c = _state["client"]
        _state["client"] = None
        if c is not None and _state["pid"] == os.getpid():
            c.close()


atexit.register(close_worker_client)


# ---- one partition ----------------------------------------------------------
def _blocks(n, block):
    return [(i, min(n, i + block)) for i in range(0, n, block)]


def _concat(parts, key):
    vals = [p[key] for p in parts]
    if isinstance(vals[0], np.ndarray):
        return np.concatenate(vals, axis=0)
    if isinstance(vals[0], list):
        out = []
        for v in vals:
            out.extend(v)
        return np.array(out, dtype=object)
    return vals[0]


def run_partition(method, arrays, const, block=DEFAULT_BLOCK, daemon=None,
                  daemon_args=(), per_sample=None):
    """Runs method on one partition: arrays is {param: 1-D numpy array}
    (one length n), const the other parameters (sent with every block).
    The partition is sent as pipelined requests of at most block samples;
    returns {output: array over the n samples} for the per-sample outputs
    (the names in per_sample, else those whose length is the first
    block's), plus the request-level members of the first answer (units,
    ...)."""
    n = None
    for k, a in arrays.items():
        if a.ndim != 1:
            raise ValueError("%s: a 1-D array of samples, not shape %r"
                             % (k, a.shape))
        if n is None:
            n = len(a)
        elif len(a) != n:
            raise ValueError("%s: %d samples where the others have %d"
                             % (k, len(a), n))
    if not n:
        return {}
    if daemon is not None or daemon_args:
        configure(daemon, daemon_args)
    c = worker_client()
    reqs = []
    for lo, hi in _blocks(n, block):
        p = dict(const)
        for k, a in arrays.items():
            p[k] = a[lo:hi]
        reqs.append((method, p))
    with _lock:
        parts = c.call_many(reqs)
    out = {}
    for key, v in parts[0].items():
        if per_sample is not None:
            each = key in per_sample
        else:
            each = isinstance(v, (np.ndarray, list)) and np.ndim(v) >= 1 \
                and len(v) == min(n, block)
        out[key] = _concat(parts, key) if each else v
    return out


# ---- arrays -----------------------------------------------------------------
def _split(params):
    arrays, const = {}, {}
    for k, v in params.items():
        if v is None:
            continue
        if k.endswith("_") and k[:-1] in ("lambda", "class"):
            k = k[:-1]
        if isinstance(v, (da.Array, np.ndarray)) and np.ndim(v) >= 1:
            arrays[k] = v
        else:
            const[k] = v
    return arrays, const


def _probe(method, arrays, const, daemon, daemon_args):
    """Output names, dtypes and trailing shapes from the method run on two
    samples in the calling process (a private daemon of its own)."""
    sample = {}
    for k, a in arrays.items():
        head = np.asarray(a[:2]) if isinstance(a, np.ndarray) else \
            a[:2].compute()
        if len(head) < 2:
            head = np.concatenate([head, head])[:2]
        sample[k] = head
    with Client(spawn=True, daemon=daemon or _state["daemon"],
                daemon_args=daemon_args or _state["args"]) as c:
        r = c.call(method, dict(const, **sample))
    spec, meta = {}, {}
    for key, v in r.items():
        if isinstance(v, np.ndarray) and v.ndim >= 1 and len(v) == 2:
            spec[key] = (v.dtype, v.shape[1:])
        elif isinstance(v, list) and len(v) == 2:
            spec[key] = (np.dtype(object), ())
        else:
            meta[key] = v
    return spec, meta


def _part_task(method, const, block, daemon, daemon_args, keys, outputs,
               *chunks):
    arrays = dict(zip(keys, chunks))
    return run_partition(method, arrays, const, block, daemon, daemon_args,
                         per_sample=outputs)


def _pick(result, key, n, dtype, tail):
    if key in result:
        return np.asarray(result[key], dtype=dtype)
    return np.full((n,) + tail, np.nan if dtype.kind == "f" else 0,
                   dtype=dtype)


def map_method(method, block=DEFAULT_BLOCK, daemon=None, daemon_args=(),
               **params):
    """Applies method to Dask (or numpy) arrays of samples, chunk by chunk.

    Every 1-D array parameter is cut at the chunks of the first Dask array
    given (numpy arrays and other Dask arrays are rechunked to it); other
    parameters (numbers, strings, dicts such as fluids or minerals) go
    with every request. Returns a dict: each per-sample output as a Dask
    array over the samples (float64 with NaN for null, QC flags uint64,
    strings object), and the request-level members of a two-sample probe
    (``units``, ...) as they are. Nothing runs until you compute; compute
    several outputs together (``dask.compute(out["k"], out["mu"])``) so
    each chunk is sent once.
    """
    arrays, const = _split(params)
    dask_arrays = [a for a in arrays.values() if isinstance(a, da.Array)]
    if not dask_arrays:
        raise ValueError("%s: give at least one Dask array of samples (the "
                         "others may be numpy arrays or numbers)" % method)
    ref = dask_arrays[0]
    if ref.ndim != 1:
        raise ValueError("%s: arrays of samples are 1-D, not shape %r"
                         % (method, ref.shape))
    n = ref.shape[0]
    chunks = ref.chunks
    names = list(arrays)
    lined = []
    for k in names:
        a = arrays[k]
        if a.ndim != 1 or a.shape[0] != n:
            raise ValueError("%s: %s has shape %r where the samples are "
                             "(%d,)" % (method, k, a.shape, n))
        if not isinstance(a, da.Array):
            a = da.from_array(np.asarray(a), chunks=chunks)
        elif a.chunks != chunks:
            a = a.rechunk(chunks)
        lined.append(a)
    spec, meta = _probe(method, arrays, const, daemon, daemon_args)
    parts = []
    for i, size in enumerate(chunks[0]):
        blocks = [a.blocks[i] for a in lined]
        parts.append((dask.delayed(_part_task, pure=True)(
            method, const, block, daemon, tuple(daemon_args), tuple(names),
            frozenset(spec), *blocks), size))
    out = dict(meta)
    for key, (dtype, tail) in spec.items():
        pieces = [da.from_delayed(dask.delayed(_pick, pure=True)(
            d, key, size, dtype, tail), shape=(size,) + tail, dtype=dtype)
            for d, size in parts]
        out[key] = da.concatenate(pieces, axis=0)
    return out


# ---- dataframes -------------------------------------------------------------
def _frame_task(pdf, method, columns, const, block, daemon, daemon_args,
                outputs):
    import pandas as pd
    arrays = {p: pdf[c].to_numpy(dtype=np.float64) for p, c in columns.items()}
    r = run_partition(method, arrays, const, block, daemon, daemon_args,
                      per_sample=frozenset(outputs))
    data = {}
    for key, (col, dtype) in outputs.items():
        v = r.get(key)
        if v is None:
            v = np.full(len(pdf), np.nan if dtype.kind == "f" else 0, dtype)
        data[col] = np.asarray(v, dtype=dtype)
    return pd.DataFrame(data, index=pdf.index)


def map_frame(ddf, method, columns, fields=None, prefix="",
              block=DEFAULT_BLOCK, daemon=None, daemon_args=(), **params):
    """Applies method to a Dask dataframe partition by partition.

    columns maps each array parameter to a column ({"rho": "RHOB", "dtp":
    "DT"}); params are the other parameters (numbers, dicts, ...); fields
    selects outputs (default: all). Returns a Dask dataframe with the
    same index and one column per 1-D per-sample output, named prefix +
    output (QC flags uint64). Join it to the input with
    ``ddf.join(result)`` or ``dd.concat([ddf, result], axis=1)``.
    """
    import pandas as pd
    if fields is not None:
        params["fields"] = list(fields)
    missing = [c for c in columns.values() if c not in ddf.columns]
    if missing:
        raise ValueError("%s: no column %s in the dataframe (it has %s)"
                         % (method, ", ".join(map(repr, missing)),
                            ", ".join(map(str, ddf.columns))))
    _, const = _split(params)
    head = ddf.head(2, npartitions=1, compute=True)
    if len(head) == 0:
        raise ValueError("%s: the dataframe is empty" % method)
    sample = {p: head[c].to_numpy(dtype=np.float64)
              for p, c in columns.items()}
    spec, _ = _probe(method, sample, const, daemon, daemon_args)
    outputs = {k: (prefix + k, dt) for k, (dt, tail) in spec.items()
               if tail == ()}
    meta = pd.DataFrame({col: pd.Series(dtype=dt)
                         for col, dt in outputs.values()})
    return ddf.map_partitions(_frame_task, method, dict(columns), const,
                              block, daemon, tuple(daemon_args), outputs,
                              meta=meta)
