"""The power-of-ten tables of the number formatter and parser
(daemon/proto/numtab.c) against Python's exact integer arithmetic:
cmake/gen-numtab recomputes every entry from 10**k and 5**q (and checks
the fixed-point floor(k log2 10) the C code uses against the exact
value) and compares the result with the committed file."""
import os
import subprocess
import sys

src = os.environ.get("RW_SRC") or os.path.join(
    os.path.dirname(os.path.abspath(__file__)), "..", "..")
p = subprocess.run([sys.executable, os.path.join(src, "cmake", "gen-numtab"),
                    "--check"], capture_output=True, text=True, timeout=120)
sys.stdout.write(p.stdout)
sys.stderr.write(p.stderr)
sys.exit(p.returncode)
