#!/usr/bin/env bash
# The Python notebook client's tests (examples/notebook) against a plumb
# binary: the standard-library tests with python3, and the NumPy tests
# (.npy results read back bit for bit) with a python3 that has NumPy.
#
# Usage: bash .ci/notebook.sh [PLUMB_BINARY]   (default: built here, cgo-free)
#
# Without python3 it prints SKIP and exits 0. For the NumPy tests it uses
# python3 when it imports numpy, else Debian's /usr/bin/python3, installing
# python3-numpy with apt-get (as root) when missing; when none can, it
# prints SKIP for them with the reason. Each skipped test is listed with
# its reason (a feature this binary's help does not list); never a silent
# pass.
set -euo pipefail
cd "$(dirname "$0")/.."
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
bin=${1:-}
if [ -z "$bin" ]; then
  CGO_ENABLED=0 go build -o "$tmp/plumb" ./cmd/plumb
  bin="$tmp/plumb"
fi
bin=$(cd "$(dirname "$bin")" && pwd)/$(basename "$bin")
export PLUMB_BIN="$bin"

if ! command -v python3 > /dev/null; then
  echo "SKIP notebook client tests: no python3 on the PATH"; exit 0
fi

fail=0
# suite PYTHON MODULE: run one test module, show the result line and every
# skipped test with its reason.
suite() {
  local py=$1 mod=$2 log="$tmp/$2.log" t0; t0=$(date +%s)
  if (cd examples/notebook && "$py" -W error::ResourceWarning -m unittest -v "$mod") > "$log" 2>&1; then
    echo "ok $mod with $py ($("$py" -c 'import platform; print(platform.python_version())')): $(grep -E '^Ran [0-9]+ tests' "$log"), $(tail -n 1 "$log") in $(( $(date +%s) - t0 )) s"
  else
    echo "FAIL $mod with $py:"; sed 's/^/  /' "$log" | tail -n 60; fail=1
  fi
  grep -E ' \.\.\. skipped ' "$log" | sed 's/^/  /' || true
}

suite python3 test_plumbclient

numpy_py=""
for py in python3 /usr/bin/python3; do
  if command -v "$py" > /dev/null && "$py" -c 'import numpy' 2> /dev/null; then numpy_py=$py; break; fi
done
if [ -z "$numpy_py" ] && [ -x /usr/bin/python3 ] && [ "$(id -u)" = 0 ] && command -v apt-get > /dev/null; then
  echo "installing Debian's python3-numpy for /usr/bin/python3"
  install() {
    DEBIAN_FRONTEND=noninteractive apt-get install -y --no-install-recommends \
      -o DPkg::Lock::Timeout=300 python3-numpy > "$tmp/apt.log" 2>&1
  }
  if install || { apt-get update -o DPkg::Lock::Timeout=300 >> "$tmp/apt.log" 2>&1; install; }; then
    /usr/bin/python3 -c 'import numpy' 2> /dev/null && numpy_py=/usr/bin/python3
  else
    echo "  apt-get install python3-numpy failed:"; tail -n 5 "$tmp/apt.log" | sed 's/^/    /'
  fi
fi
if [ -n "$numpy_py" ]; then
  suite "$numpy_py" test_plumbclient_numpy
else
  why="no python3 here imports numpy"
  [ "$(id -u)" != 0 ] && why="$why, and installing python3-numpy needs root"
  echo "SKIP the notebook client's NumPy tests: $why"
fi
exit $fail
