"""Layering checks of the daemon, from the object files and the sources:

1. No call cycle inside daemon/proto/: a file's functions may call
   another file's only when that file never calls back, directly or
   through others (from `nm`: a file uses the functions another defines).
   Data references (the method table listing each family's methods) are
   not calls and are left out.
2. Dependencies point down: daemon/core/ includes no protocol, server,
   cJSON or libuv header; daemon/proto/ includes no server or libuv
   header; the client includes no core or daemon header except the
   protocol layer's number I/O.

Run by ctest with RW_BUILD and RW_SRC set."""
import glob
import os
import re
import subprocess
import sys

BUILD = os.environ.get("RW_BUILD", "build")
SRC = os.environ.get("RW_SRC", ".")
failures = 0
checks = 0


def ok(cond, what):
    global failures, checks
    checks += 1
    if not cond:
        failures += 1
        print("FAIL:", what)


def symbols(obj):
    out = subprocess.run(["nm", "--defined-only", obj], capture_output=True,
                         text=True, check=True).stdout
    defined = {l.split()[-1] for l in out.splitlines()
               if len(l.split()) == 3 and l.split()[1] == "T"}
    out = subprocess.run(["nm", "--undefined-only", obj],
                         capture_output=True, text=True, check=True).stdout
    used = {l.split()[-1] for l in out.splitlines() if l.strip()}
    return defined, used


# the objects of the sources that exist (a build directory may hold
# objects of files since removed)
objs = sorted(o for o in glob.glob(os.path.join(
    BUILD, "CMakeFiles", "rwproto.dir", "daemon", "proto", "*.o"))
    if os.path.exists(os.path.join(SRC, "daemon", "proto",
                                   os.path.basename(o)[:-2])))
ok(len(objs) > 10, "protocol objects found in %s" % BUILD)
name = {o: os.path.basename(o).split(".")[0] for o in objs}
defs, uses = {}, {}
for o in objs:
    defs[o], uses[o] = symbols(o)
owner = {}
for o in objs:
    for s in defs[o]:
        owner[s] = o
edges = {o: {owner[s] for s in uses[o] if s in owner and owner[s] != o}
         for o in objs}

# Tarjan's strongly connected components.
index, low, stack, on, sccs = {}, {}, [], set(), []


def visit(v, counter=[0]):
    index[v] = low[v] = counter[0]
    counter[0] += 1
    stack.append(v)
    on.add(v)
    for w in edges[v]:
        if w not in index:
            visit(w)
            low[v] = min(low[v], low[w])
        elif w in on:
            low[v] = min(low[v], index[w])
    if low[v] == index[v]:
        comp = []
        while True:
            w = stack.pop()
            on.discard(w)
            comp.append(w)
            if w == v:
                break
        sccs.append(comp)


sys.setrecursionlimit(10000)
for o in objs:
    if o not in index:
        visit(o)
for comp in sccs:
    if len(comp) > 1:
        names = sorted(name[c] for c in comp)
        detail = ["%s -> %s" % (name[a], name[b]) for a in comp
                  for b in edges[a] if b in comp]
        ok(False, "call cycle among %s: %s" % (", ".join(names),
                                                "; ".join(detail)))
ok(True, "%d protocol files, %d call edges" %
   (len(objs), sum(len(e) for e in edges.values())))


def includes(path):
    with open(path) as f:
        return re.findall(r'^\s*#\s*include\s*[<"]([^>"]+)[>"]', f.read(),
                          re.M)


rules = [
    ("daemon/core", ("proto/", "server/", "cjson/", "uv.h")),
    ("daemon/proto", ("server/", "uv.h")),
    ("include/rockwire", ("proto/", "server/", "cjson/", "uv.h", "gsl/")),
    ("client", ("rockwire/", "server/", "core/")),
]
for folder, banned in rules:
    for path in sorted(glob.glob(os.path.join(SRC, folder, "*.[ch]"))):
        for inc in includes(path):
            for b in banned:
                ok(not inc.startswith(b) and inc != b,
                   "%s includes %s (a higher layer or a library this "
                   "layer may not use)" % (os.path.relpath(path, SRC), inc))
print("%d passed, %d failed" % (checks - failures, failures))
sys.exit(1 if failures else 0)
