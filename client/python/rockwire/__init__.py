"""rockwire: a Python client of the rockwired rock-physics daemon.

    import rockwire
    with rockwire.connect() as rw:          # default socket, else spawns
        r = rw.elastic.convert(rho=2.3, vp=[3000, 3100], vs=[1500, 1550])
        r["k"], r["qc"], r["units"]["k"]

Methods are generated from the daemon's rpc.discover (``help(rw.
reflect.interface)`` lists parameters with units, defaults and bounds);
errors are exceptions carrying ``code``, ``param`` and ``reason``;
``rockwire.dask`` applies a method to Dask arrays and dataframes.
Standard library only; numpy is used when it can be imported.

Screening estimates only: not a substitute for qualified review, local
regulations and licensed practice; never the sole basis for well-control
decisions.
"""
from .client import (CAUTION, Batch, Client, ConnectError, InternalError,
                     InvalidParams, InvalidRequest, LimitExceeded,
                     MethodNotFound, ParseError, ProtocolError, RockwireError,
                     RpcError, ServerBusy, TimeoutError, connect,
                     default_socket, find_daemon, socket_safe, spawn)

__version__ = "0.1.0"
__all__ = ["CAUTION", "Batch", "Client", "ConnectError", "InternalError",
           "InvalidParams", "InvalidRequest", "LimitExceeded",
           "MethodNotFound", "ParseError", "ProtocolError", "RockwireError",
           "RpcError", "ServerBusy", "TimeoutError", "connect",
           "default_socket", "find_daemon", "socket_safe", "spawn"]
