#!/usr/bin/python3
"""Sessions and log.process across connections: two clients on one daemon
socket; defaults set on one (session.set) apply there only, a request's
own parameters override the session, and session.reset clears them."""
import os
import sys

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

t = rwtest.Checks()
d = rwtest.Daemon()
try:
    a, b = d.connect(), d.connect()
    r = rwtest.call(a, rwtest.req("session.set", {
        "vs_predict": "mudrock", "drho_limit": 0.1}))
    t.ok("result" in r, "session.set on A: %s" % r)
    base = {"vp": 3000, "rhob": 2.3, "drho": 0.07}
    # A inherits: vs by the mudrock line (Castagna et al. 1985:
    # vs = (vp - 1360) / 1.16), drho 0.07 below A's limit 0.1.
    r = rwtest.call(a, rwtest.req("log.process", base))
    res = r.get("result", {})
    t.ok(abs(res.get("vs", 0) - (3000 - 1360) / 1.16) < 1e-9,
         "A: mudrock vs from the session")
    t.ok(res.get("qc") == 1 << 26, "A: only vs_predicted (%s)" %
         res.get("qc"))
    t.ok(res.get("vs_predicted_by") == "mudrock", "A: says which relation")
    # B, same daemon, sees none of it: no shear and no prediction is a
    # structural error naming dts.
    r = rwtest.call(b, rwtest.req("log.process", base))
    t.ok(r.get("error", {}).get("data", {}).get("param") == "dts",
         "B: no session defaults leak (%s)" % r)
    r = rwtest.call(b, rwtest.req("log.process", dict(base, dts=180)))
    t.ok(r["result"]["qc"] == 1 << 24,
         "B: default drho limit 0.05 flags 0.07 (%s)" % r["result"]["qc"])
    # A request's own parameters override A's session.
    r = rwtest.call(a, rwtest.req("log.process", dict(
        base, vs_predict="greenberg_castagna", drho_limit=0.05)))
    res = r["result"]
    t.ok(abs(res["vs"] - 1000 * (0.80416 * 3 - 0.85588)) < 1e-6,
         "A: request's greenberg_castagna overrides the session "
         "(Greenberg & Castagna 1992 sandstone, from memory)")
    t.ok(res["qc"] == (1 << 26) | (1 << 24),
         "A: request's drho_limit overrides (%s)" % res["qc"])
    t.ok(res["vs_predicted_by"] == "greenberg_castagna", "A: names it")
    # Lithology from the session feeds rock.empirical too.
    rwtest.call(a, rwtest.req("session.set", {"lithology": "shale"}))
    r = rwtest.call(a, rwtest.req("rock.empirical", {
        "relation": "greenberg_castagna", "vp": 3000}))
    t.ok(abs(r["result"]["vs"] - 1000 * (0.76969 * 3 - 0.86735)) < 1e-6,
         "A: session lithology shale in rock.empirical")
    r = rwtest.call(b, rwtest.req("rock.empirical", {
        "relation": "greenberg_castagna", "vp": 3000}))
    t.ok(abs(r["result"]["vs"] - 1000 * (0.80416 * 3 - 0.85588)) < 1e-6,
         "B: default sandstone")
    rwtest.call(a, rwtest.req("session.reset"))
    r = rwtest.call(a, rwtest.req("log.process", base))
    t.ok(r.get("error", {}).get("data", {}).get("param") == "dts",
         "A after reset: defaults gone")
    a.close()
    b.close()
finally:
    t.ok(d.stop() == 0, "daemon stops cleanly")
t.done()
