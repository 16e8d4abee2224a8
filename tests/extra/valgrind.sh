#!/bin/sh
# End-to-end sessions under valgrind memcheck, failing on any invalid
# access or leak (definite, indirect or possible):
#   1. rockwired --stdio on a request file (hostile lines, a batch, a
#      heavy line that runs in the thread pool, notifications);
#   2. an empty and a blank regular file, and the requests through a pipe;
#   3. a socket session: requests, a client vanishing mid-line and one
#      vanishing while its heavy request runs, then SIGTERM.
# Uses the plain build in $RW_VALGRIND_BUILD (default REPO_TOP/build).
# Usage: tests/extra/valgrind.sh REPO_TOP
set -u
top=${1:-$(cd "$(dirname "$0")/../.." && pwd)}
build=${RW_VALGRIND_BUILD:-"$top/build"}
d=$build/rockwired
if ! command -v valgrind >/dev/null 2>&1; then
	echo "valgrind.sh: valgrind is not installed" >&2
	exit 1
fi
if grep -q "RW_SANITIZE:BOOL=ON" "$build/CMakeCache.txt" 2>/dev/null; then
	echo "valgrind.sh: $build is a sanitizer build; use a plain one" >&2
	exit 1
fi
[ -x "$d" ] || cmake --build "$build" --target rockwired >/dev/null || exit 1
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
vg="valgrind -q --error-exitcode=99 --leak-check=full
--errors-for-leak-kinds=definite,indirect,possible
--show-leak-kinds=definite,indirect,possible --track-fds=no"
fail=0

/usr/bin/python3 - "$tmp/req" <<'PY'
import sys
big = ",".join(["3000"] * 40000)
lines = [
    '{"jsonrpc":"2.0","id":1,"method":"service.info"}',
    '{"jsonrpc":"2.0","id":2,"method":"elastic.convert","params":'
    '{"rho":[2.4,-1],"vp":[3000,3100],"vs":1500}}',
    '{"jsonrpc":"2.0","id":3,"method":"elastic.convert","params":'
    '{"rho":2.4,"vp":[' + big + '],"vs":1500}}',
    '{"jsonrpc":"2.0","id":4,"meth', '[]', '[1,{"jsonrpc":"2.0"}]',
    '{"jsonrpc":"2.0","id":5,"id":6,"method":"x"}', '[' * 100,
    '{"jsonrpc":"2.0","method":"session.set","params":{"units":'
    '{"velocity":"ft/s"}}}',
    '{"jsonrpc":"2.0","id":7,"method":"session.get"}',
    '{"jsonrpc":"2.0","id":8,"method":"rpc.discover"}',
    '{"jsonrpc":"2.0","id":9,"method":"elastic.convert","params":'
    '{"rho":2.4,"vp":NaN,"vs":1}}',
]
with open(sys.argv[1], "wb") as f:
    f.write(("\n".join(lines) + "\n").encode() + b'{"id":"\xff"}\n\x00\n')
PY
want=13

# shellcheck disable=SC2086
$vg "$d" --stdio <"$tmp/req" >"$tmp/out" 2>"$tmp/err1"
rc=$?
n=$(wc -l <"$tmp/out")
if [ $rc -ne 0 ] || [ "$n" -ne $want ]; then
	echo "valgrind stdio file: rc=$rc, $n of $want answers"
	cat "$tmp/err1"
	fail=1
else
	echo "valgrind stdio file: ok ($n answers)"
fi

# An empty and a blank-only regular file (once a use-after-free).
: >"$tmp/empty"
printf '  \n\n' >"$tmp/blank"
for f in empty blank; do
	# shellcheck disable=SC2086
	if ! $vg "$d" --stdio <"$tmp/$f" >"$tmp/out-$f" 2>"$tmp/err-$f" ||
		[ -s "$tmp/out-$f" ]; then
		echo "valgrind stdio $f file: failed"
		cat "$tmp/err-$f"
		fail=1
	fi
done

# shellcheck disable=SC2086
cat "$tmp/req" | $vg "$d" --stdio 2>"$tmp/err2" | wc -l >"$tmp/n2"
rc=$?
if [ "$(cat "$tmp/n2")" -ne $want ] || grep -q "==[0-9]*==" "$tmp/err2"; then
	echo "valgrind stdio pipe: $(cat "$tmp/n2") answers"
	cat "$tmp/err2"
	fail=1
else
	echo "valgrind stdio pipe: ok"
fi

# shellcheck disable=SC2086
$vg --log-file="$tmp/vg3" "$d" --socket "$tmp/s" --offload 4K \
	2>"$tmp/err3" &
pid=$!
timeout 120 /usr/bin/python3 - "$tmp/s" <<'PY'
import json, socket, sys, time
path = sys.argv[1]
deadline = time.time() + 60
while time.time() < deadline:
    try:
        socket.socket(socket.AF_UNIX).connect(path)
        break
    except OSError:
        time.sleep(0.2)
def conn():
    s = socket.socket(socket.AF_UNIX)
    s.settimeout(60)
    s.connect(path)
    return s
s = conn()
s.sendall(b'{"jsonrpc":"2.0","id":1,"method":"service.info"}\n'
          b'[{"jsonrpc":"2.0","id":2,"method":"session.get"}]\n'
          b'{"bad\n')
f = s.makefile("rb")
got = [json.loads(f.readline()) for _ in range(3)]
assert got[0]["id"] == 1 and isinstance(got[1], list), got
big = ('{"jsonrpc":"2.0","id":3,"method":"elastic.convert","params":'
       '{"rho":2.4,"vp":[' + ",".join(["3000"] * 20000) + '],"vs":1}}\n')
for k in range(3):
    v = conn()
    v.sendall(big.encode())
    v.close()  # vanishes while the thread pool works for it
v = conn()
v.sendall(b'{"jsonrpc":"2.0","id":4,"meth')
v.close()
s.sendall(big.encode())
r = json.loads(f.readline())
assert r["result"]["n"] == 20000
s.close()
print("valgrind socket session: requests ok")
PY
prc=$?
kill -TERM $pid 2>/dev/null
wait $pid
rc=$?
if [ $prc -ne 0 ] || [ $rc -ne 0 ] || [ -s "$tmp/vg3" ]; then
	echo "valgrind socket: client rc=$prc, daemon rc=$rc"
	cat "$tmp/vg3" "$tmp/err3"
	fail=1
else
	echo "valgrind socket: ok"
fi
exit $fail
