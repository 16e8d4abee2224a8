#!/usr/bin/python3
"""An answer handed to one write as several buffers arrives whole and in
order. The daemon gives libuv at most 1 GiB per buffer (a uv_buf_t length
is an unsigned int, so a longer answer in one buffer would lose what lies
past 4 GiB); rockwired_pieces is the same daemon built with 1000-byte
pieces, so these answers of a few kB to a few MB take that path. The
reference is the plain daemon's answer to the same lines."""
import os
import subprocess

import rwtest
from rwtest import BUILD, Checks, Daemon, read_lines, req

t = Checks()
PIECES = os.path.join(BUILD, "rockwired_pieces")

lines = [
    # an answer of about 2.7 kB: three pieces (the stack array of bufs)
    req("elastic.convert", {"rho": 2.4, "vp": [3000.5] * 8, "vs": 1500},
        id=1),
    # about 4 MB: thousands of pieces (a heap array of bufs)
    req("elastic.convert", {"rho": 2.4,
                            "vp": [2800 + i * 0.37 for i in range(30000)],
                            "vs": 1500}, id=2),
    req("service.info", id=3),
]
data = ("\n".join(lines) + "\n").encode()

want = subprocess.run([rwtest.DAEMON, "--stdio"], input=data,
                      stdout=subprocess.PIPE, timeout=60).stdout.splitlines()
t.ok(len(want) == 3 and len(want[1]) > 3000000,
     "the plain daemon answers all three (%d lines, %d bytes in the "
     "second)" % (len(want), len(want[1]) if len(want) > 1 else 0))

# stdout a pipe: a stream, the several-buffer uv_write
got = subprocess.run([PIECES, "--stdio"], input=data,
                     stdout=subprocess.PIPE, timeout=60).stdout.splitlines()
t.ok(got[:2] == want[:2],
     "over a pipe, the pieces give the same bytes (%d lines)" % len(got))

# a socket
rwtest.DAEMON = PIECES
with Daemon() as d:
    s = d.connect()
    s.sendall(data)
    got = read_lines(s, 3, timeout=60)
    s.close()
t.ok(len(got) == 3 and got[0] == want[0].decode() and
     got[1] == want[1].decode(),
     "over the socket, the pieces give the same bytes")

# stdout a file: uv_fs_write in pieces, short writes continued
out = os.path.join(d.dir, "answers")
with open(out, "wb") as f:
    subprocess.run([PIECES, "--stdio"], input=data, stdout=f, timeout=60)
with open(out, "rb") as f:
    got = f.read().splitlines()
t.ok(got[:2] == want[:2], "into a file, the pieces give the same bytes")
t.done()
