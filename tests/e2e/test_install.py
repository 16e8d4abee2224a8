"""The compute core as a library: `cmake --install` puts librockwire
(static and shared, with its SONAME), the public headers, version.h and
rockwire.pc into a prefix; a small C program builds against that tree with
`pkg-config --cflags --libs rockwire` alone, links the shared library
(and, separately, the static one with --static) and runs. Its numbers are
checked against the handbook moduli of quartz (Mavko, Mukerji & Dvorkin
2009 table: K 36.6 GPa, mu 45 GPa, rho 2.65 g/cm3; vp = sqrt((K + 4/3 mu)
/ rho), vs = sqrt(mu / rho) computed here) and against the daemon's own
rock.substitute of the same frame."""
import json
import os
import re
import shutil
import subprocess
import tempfile

from rwtest import BUILD, SRC, Checks, req, sanitized, stdio

t = Checks()


def build_compiler():
    """The build's C compiler, and the sanitizer flags a program linking
    its (then instrumented) library needs too."""
    cc = "cc"
    with open(os.path.join(BUILD, "CMakeCache.txt")) as f:
        for line in f:
            if line.startswith("CMAKE_C_COMPILER:"):
                cc = line.split("=", 1)[1].strip()
    return [cc] + (["-fsanitize=address,undefined"] if sanitized() else [])


CC = build_compiler()
tmp = tempfile.mkdtemp(prefix="rw-install-")
try:
    prefix = os.path.join(tmp, "prefix")
    p = subprocess.run(["cmake", "--install", BUILD, "--prefix", prefix],
                       capture_output=True, text=True, timeout=120)
    t.ok(p.returncode == 0, "cmake --install: %s" % p.stderr[-300:])
    libdir = None
    for d in ("lib", "lib64") + tuple(
            os.path.join("lib", x) for x in os.listdir(os.path.join(
                prefix, "lib")) if os.path.isdir(os.path.join(prefix, "lib",
                                                               x))):
        if os.path.exists(os.path.join(prefix, d, "pkgconfig",
                                       "rockwire.pc")):
            libdir = os.path.join(prefix, d)
            break
    t.ok(libdir is not None, "rockwire.pc installed")
    so = [f for f in os.listdir(libdir) if f.startswith("librockwire.so")]
    t.ok("librockwire.a" in os.listdir(libdir), "static library installed")
    t.ok("librockwire.so.0" in so, "shared library with SONAME .so.0: %s"
         % so)
    r = subprocess.run(["objdump", "-p", os.path.join(libdir,
                                                      "librockwire.so")],
                       capture_output=True, text=True)
    t.ok("SONAME               librockwire.so.0" in r.stdout or
         re.search(r"SONAME\s+librockwire\.so\.0", r.stdout) is not None,
         "SONAME is librockwire.so.0")
    t.ok(os.path.exists(os.path.join(prefix, "include", "rockwire",
                                     "version.h")), "version.h installed")
    env = dict(os.environ, PKG_CONFIG_PATH=os.path.join(libdir, "pkgconfig"))
    flags = subprocess.run(["pkg-config", "--cflags", "--libs", "rockwire"],
                           capture_output=True, text=True, env=env)
    t.ok(flags.returncode == 0, "pkg-config knows rockwire: %s"
         % flags.stderr.strip())
    t.ok("gsl" not in flags.stdout, "GSL is private: not on the shared "
         "link line (%s)" % flags.stdout.strip())
    exe = os.path.join(tmp, "example")
    src = os.path.join(SRC, "tests", "e2e", "install_example.c")
    c = subprocess.run(CC + ["-std=c11", "-Wall", "-Werror", src, "-o", exe]
                       + flags.stdout.split(), capture_output=True,
                       text=True)
    t.ok(c.returncode == 0, "example builds against the installed tree: %s"
         % c.stderr[-400:])
    out = ""
    if c.returncode == 0:
        run = subprocess.run([exe], capture_output=True, text=True,
                             env=dict(env, LD_LIBRARY_PATH=libdir),
                             timeout=30)
        t.ok(run.returncode == 0, "example runs: rc %d" % run.returncode)
        out = run.stdout
    m = re.search(r"quartz vp ([\d.]+) vs ([\d.]+)", out)
    vp_q = ((36.6e9 + 4 / 3 * 45e9) / 2650) ** 0.5
    vs_q = (45e9 / 2650) ** 0.5
    t.ok(m and abs(float(m.group(1)) - vp_q) < 1e-3 and
         abs(float(m.group(2)) - vs_q) < 1e-3,
         "quartz velocities from the handbook moduli: %s" % out.strip())
    m = re.search(r"saturated vp ([\d.]+)", out)
    rc, o, e = stdio([req("rock.substitute", dict(
        k_dry=10, mu_dry=8, porosity=0.25, mineral="quartz",
        fluid_new={"k": 2.8, "rho": 1.03}))])
    vp = json.loads(o.splitlines()[0])["result"]["vp"]
    t.ok(m and abs(float(m.group(1)) - vp) < 1e-6 * vp,
         "library and daemon agree: %s vs %s" % (m and m.group(1), vp))
    t.ok("version 0." in out, "version macro: %s" % out[:40])
    # the static library with --static (GSL then on the line)
    sflags = subprocess.run(["pkg-config", "--cflags", "--libs", "--static",
                             "rockwire"], capture_output=True, text=True,
                            env=env)
    c = subprocess.run(CC + ["-std=c11", src, "-o", exe + "-static",
                        "-Wl,-Bstatic"] + [f for f in sflags.stdout.split()
                                           if f == "-lrockwire" or
                                           f.startswith("-L") or
                                           f.startswith("-I")] +
                       ["-Wl,-Bdynamic"] + [f for f in sflags.stdout.split()
                                            if f.startswith("-l") and
                                            f != "-lrockwire"],
                       capture_output=True, text=True)
    t.ok(c.returncode == 0, "example links the static library: %s"
         % c.stderr[-300:])
    if c.returncode == 0:
        run = subprocess.run([exe + "-static"], capture_output=True,
                             text=True, timeout=30)
        t.ok(run.returncode == 0 and run.stdout == out,
             "static build prints the same")
finally:
    shutil.rmtree(tmp, ignore_errors=True)
t.done()
