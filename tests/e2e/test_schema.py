"""Schema checks: the committed openrpc.json is the document the build
generates from the method declarations, and it is a valid OpenRPC-shaped
document whose schemas are valid JSON Schema
(draft-07); every method the daemon serves is documented and vice versa;
every request in demo-requests/*.jsonl validates against its method's
params, and the daemon's response to it validates against the result
schema."""
import glob
import json
import os

import jsonschema

from rwtest import (SRC, Checks, run, stdio, validate_request,
                    validate_response, req)

t = Checks()
doc_path = os.path.join(SRC, "protocol-docs", "openrpc.json")
p = run(["/usr/bin/python3",
         os.path.join(SRC, "protocol-docs", "build-openrpc"),
         os.environ.get("RW_BUILD", "build"), "--check"])
t.ok(p.returncode == 0, "openrpc.json is what the build generates from the "
     "declarations: %s" % p.stderr.decode().strip())
with open(doc_path) as f:
    doc = json.load(f)
t.ok(doc.get("openrpc", "").startswith("1."), "openrpc version 1.x")
p = run(["/usr/bin/python3",
         os.path.join(SRC, "protocol-docs", "build-qc-flags"),
         os.environ.get("RW_BUILD", "build"), "--check"])
t.ok(p.returncode == 0, "qc-flags.md matches the daemon's legend: %s"
     % p.stderr.decode().strip()[-200:])
for m in doc["methods"]:
    for prm in m["params"]:
        try:
            jsonschema.Draft7Validator.check_schema(prm["schema"])
            good = True
        except jsonschema.SchemaError as e:
            good = False
            print(e)
        t.ok(good, "%s.%s schema is valid draft-07" % (m["name"], prm["name"]))
    try:
        jsonschema.Draft7Validator.check_schema(m["result"]["schema"])
        good = True
    except jsonschema.SchemaError as e:
        good = False
        print(e)
    t.ok(good, "%s result schema is valid draft-07" % m["name"])

# the daemon's method list equals the documented one, and rpc.discover
# serves the same document
rc, out, err = stdio([req("service.info", id=1), req("rpc.discover", id=2)])
lines = [json.loads(x) for x in out.splitlines()]
served = set(lines[0]["result"]["methods"])
documented = {m["name"] for m in doc["methods"]}
t.ok(served == documented, "served methods %s == documented %s"
     % (sorted(served - documented), sorted(documented - served)))
t.ok(lines[1]["result"] == doc, "rpc.discover returns openrpc.json")

# every demo request and its response
files = sorted(glob.glob(os.path.join(SRC, "demo-requests", "*.jsonl")))
t.ok(len(files) > 0, "demo requests exist")
for path in files:
    with open(path) as f:
        reqs = [l.strip() for l in f if l.strip() and not l.startswith("#")]
    objs = [json.loads(l) for l in reqs]
    for o in objs:
        probs = validate_request(o)
        t.ok(not probs, "%s id %s: %s" % (os.path.basename(path),
                                          o.get("id"), probs[:3]))
    rc, out, err = stdio(reqs)
    resps = {}
    for line in out.splitlines():
        r = json.loads(line)
        resps[json.dumps(r.get("id"))] = r
    for o in objs:
        if "id" not in o:
            continue
        r = resps.get(json.dumps(o["id"]))
        t.ok(r is not None and "result" in r,
             "%s id %s answered with a result: %s" % (
                 os.path.basename(path), o["id"],
                 json.dumps(r)[:300] if r else None))
        if r is not None:
            probs = validate_response(o["method"], r)
            t.ok(not probs, "%s id %s response: %s" % (
                os.path.basename(path), o["id"], probs[:3]))
t.done()
