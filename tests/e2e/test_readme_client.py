#!/usr/bin/python3
"""The README's client examples run as written (issue 9): every
`build/rockwire ...` and `build/rockwired --stdio ...` line of its
"Running the daemon and the client" section is run from the top of the
repository against a daemon on a private socket (the README's
/tmp/rw.sock and /tmp output names are swapped for temporary ones), and
each must exit 0 with output (or the file it writes). The sample files it names must exist in
demo-requests/."""
import os
import re
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(__file__))
import rwtest  # noqa: E402

t = rwtest.Checks()
tmp = tempfile.mkdtemp(prefix="rw-readme-")
text = open(os.path.join(rwtest.SRC, "README.md")).read()
sec = text.split("## Running the daemon and the client")[1].split("\n## ")[0]
blocks = re.findall(r"```\n(.*?)```", sec, re.S)
cmds = [l.split("  #")[0].strip() for b in blocks for l in b.splitlines()
        if l.startswith("build/rockwire ") or
        l.startswith("build/rockwired --stdio")]
t.ok(len(cmds) >= 9, "the README shows the client commands (%d)" % len(cmds))
for f in set(re.findall(r"demo-requests/[\w.-]+", sec)):
    t.ok(os.path.exists(os.path.join(rwtest.SRC, f)), "%s is shipped" % f)

d = rwtest.Daemon()
try:
    for cmd in cmds:
        run = (cmd.replace("build/", rwtest.BUILD + "/", 1)
               .replace("/tmp/rw.sock", d.path)
               .replace("/tmp/orrimund-3", os.path.join(tmp, "orrimund-3")))
        p = subprocess.run(["sh", "-c", run], cwd=rwtest.SRC,
                           capture_output=True, timeout=120)
        t.ok(p.returncode == 0 and (p.stdout or p.stderr or " -o " in cmd),
             "runs as written: %s (%d %r)" % (cmd, p.returncode,
                                            p.stderr[-300:]))
    t.ok(os.path.exists(os.path.join(tmp, "orrimund-3-elastic.las")) and
         os.path.exists(os.path.join(tmp, "orrimund-3-qc.txt")),
         "the files the examples write exist")
finally:
    d.stop()
t.done()
