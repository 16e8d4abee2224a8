#!/bin/sh
# The smallest build an embedded user can make: every optional part off
# (-DRW_WITH_TCP=OFF -DRW_WITH_SYSTEMD=OFF -DRW_WITH_CLIENT=OFF, so no
# plot either, and -DRW_BUILD_TESTS=OFF: neither cmocka nor cairo is
# needed), configured and built in a temporary directory. Checks that it
# builds, links neither cairo nor cmocka, answers requests on stdin, and
# passes tests/e2e/test_features.py (features reported, parts not
# compiled, refusals by name, the Unix socket served).
# Usage: tests/extra/minimal.sh [REPO_TOP]   (tests/run runs it)
set -u
top=${1:-$(cd "$(dirname "$0")/../.." && pwd)}
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
fail=0
t0=$(date +%s)
if ! cmake -S "$top" -B "$tmp" -DCMAKE_BUILD_TYPE=RelWithDebInfo \
	-DRW_WITH_TCP=OFF -DRW_WITH_SYSTEMD=OFF -DRW_WITH_CLIENT=OFF \
	-DRW_BUILD_TESTS=OFF >"$tmp/configure.log" 2>&1 ||
	! cmake --build "$tmp" -j2 >"$tmp/build.log" 2>&1; then
	echo "minimal.sh: the minimal build failed:" >&2
	tail -30 "$tmp/configure.log" "$tmp/build.log" >&2
	exit 1
fi
echo "minimal.sh: built in $(($(date +%s) - t0)) s"
d=$tmp/rockwired
needed=$(readelf -d "$d" | grep NEEDED)
case $needed in
*cairo* | *cmocka*)
	echo "FAIL: minimal rockwired links $needed" >&2
	fail=1
	;;
esac
[ -e "$tmp/rockwire" ] && {
	echo "FAIL: the client was built with RW_WITH_CLIENT=OFF" >&2
	fail=1
}
out=$(printf '%s\n' \
	'{"jsonrpc":"2.0","id":1,"method":"elastic.convert","params":{"rho":2.4,"vp":3000,"vs":1500}}' \
	'{"jsonrpc":"2.0","id":2,"method":"service.info"}' |
	"$d" --stdio 2>"$tmp/err")
/usr/bin/python3 - "$out" <<'PY' || fail=1
import json, sys
lines = [json.loads(l) for l in sys.argv[1].splitlines()]
ok = True
def check(what, cond, detail=""):
    global ok
    if not cond:
        ok = False
        print("FAIL: minimal build:", what, str(detail)[:300])
a = lines[0].get("result", {}) if lines else {}
# Vp = 3000 m/s, Vs = 1500 m/s, rho = 2.4 g/cc: shear modulus
# rho*Vs^2 = 2400*1500^2 Pa = 5.4 GPa (definition of the shear modulus).
check("elastic.convert answered", a.get("vp") == 3000, lines[:1])
mu = a.get("mu")
check("mu = rho Vs^2 = 5.4 GPa", isinstance(mu, (int, float)) and
      abs(mu - 5.4) < 1e-9, a)
i = lines[1].get("result", {}) if len(lines) > 1 else {}
check("service.info: tcp and systemd not built in",
      i.get("features") == {"unix": True, "stdio": True, "tcp": False,
                             "systemd": False}, i.get("features"))
check("service.info keeps the caution", "caution" in i and i["caution"])
sys.exit(0 if ok else 1)
PY
RW_BUILD=$tmp RW_SRC=$top RW_FEATURES="" \
	/usr/bin/python3 "$top/tests/e2e/test_features.py" || fail=1
[ "$fail" -eq 0 ] && echo "minimal.sh: the minimal build answers"
exit "$fail"
