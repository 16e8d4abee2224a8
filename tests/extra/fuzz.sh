#!/bin/sh
# Fuzz smoke for tests/run: builds the libFuzzer targets (request handler,
# line framer, LAS reader, WITS parser, number parser and formatter) and
# runs each for
# RW_FUZZ_SECONDS (default 30) on its seed corpus. A longer run is
#   tests/fuzz/run 3600
# Usage: tests/extra/fuzz.sh REPO_TOP. Exits non-zero on any finding.
set -eu
top=${1:-$(cd "$(dirname "$0")/../.." && pwd)}
if ! command -v clang >/dev/null 2>&1; then
	echo "fuzz.sh: clang is not installed (tests/setup installs it)" >&2
	exit 1
fi
RW_FUZZ_BUILD=${RW_FUZZ_BUILD:-"$top/build-fuzz"} \
	timeout 600 sh "$top/tests/fuzz/run" "${RW_FUZZ_SECONDS:-30}"
