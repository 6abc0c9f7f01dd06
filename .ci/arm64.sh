#!/usr/bin/env bash
# The bit-identity tests on arm64, under qemu-user on an amd64 machine: the
# golden-file tests of cmd/plumb compare the arm64 binary's output with the
# same files in cmd/plumb/testdata that amd64 writes, byte for byte, and the
# packages' own bit-identity tests (hashes recorded on amd64) run beside
# them. A fused multiply-add the source did not ask for, or an elementary
# function that differs in the last bit, changes a chaotic run within a few
# Lyapunov times and fails here.
#
# Usage: bash .ci/arm64.sh
#
# Runs `GOARCH=arm64 go test -exec qemu-aarch64-static` (natively on an
# arm64 machine). When qemu-aarch64-static is missing it installs Debian's
# qemu-user-static with apt-get (as root); when it cannot, it prints SKIP
# with the reason and exits 0: never a silent pass. Each named test must
# report PASS; a pattern that matches nothing fails.
set -euo pipefail
cd "$(dirname "$0")/.."

# The tests, per package. cmd/plumb: every Test function that calls
# golden(t, ...) (found in the source, so that a new golden test joins
# without an edit here), and TestJSONArch (the result names the real
# architecture). The packages: the hash of two Lorenz solves and their
# crossings (integrate), the elementary functions' bits (internal/detmath),
# the compiled field's and its fused tape's bits (internal/expr), the sparse
# tangent product's bits (lyap), the Fourier transform's and the
# surrogates' bits (embed).
golden_tests=$(awk '
  /^func Test[A-Za-z0-9_]*\(t \*testing\.T\)/ { match($0, /Test[A-Za-z0-9_]*/); fn = substr($0, RSTART, RLENGTH) }
  /^}/ { fn = "" }
  /[^A-Za-z0-9_.]golden\(t, / && fn != "" { print fn }' cmd/plumb/*_test.go | sort -u | paste -sd ' ')
if [ -z "$golden_tests" ]; then
  echo "arm64.sh: found no Test function calling golden(t, ...) in cmd/plumb"; exit 1
fi
suites=(
  "./cmd/plumb $golden_tests TestJSONArch"
  "./integrate TestGoldenBits"
  "./internal/detmath TestBitsGolden"
  "./internal/expr TestFusedBits TestFieldFuncBits"
  "./lyap TestMulTangentBits TestFixedSizeBits"
  "./internal/models TestTangent3Bits"
  "./embed TestSurrogateBits"
)

exec_flag=()
if [ "$(go env GOHOSTARCH)" = arm64 ] && [ "$(go env GOHOSTOS)" = linux ]; then
  echo "arm64 host: the tests run natively"
else
  if ! command -v qemu-aarch64-static > /dev/null; then
    if [ "$(id -u)" != 0 ]; then
      echo "SKIP arm64 golden tests: qemu-aarch64-static is not installed and installing Debian's qemu-user-static needs root"; exit 0
    fi
    if ! command -v apt-get > /dev/null; then
      echo "SKIP arm64 golden tests: qemu-aarch64-static is not installed and there is no apt-get to install qemu-user-static"; exit 0
    fi
    echo "installing Debian's qemu-user-static"
    log=$(mktemp)
    apt_install() {
      DEBIAN_FRONTEND=noninteractive apt-get install -y --no-install-recommends \
        -o DPkg::Lock::Timeout=300 qemu-user-static > "$log" 2>&1
    }
    if ! apt_install; then
      # A fresh machine may have no package lists yet.
      apt-get update -o DPkg::Lock::Timeout=300 >> "$log" 2>&1 || true
      if ! apt_install; then
        echo "SKIP arm64 golden tests: apt-get install qemu-user-static failed:"; tail -n 5 "$log" | sed 's/^/  /'
        rm -f "$log"; exit 0
      fi
    fi
    rm -f "$log"
    if ! command -v qemu-aarch64-static > /dev/null; then
      echo "SKIP arm64 golden tests: qemu-user-static installed no qemu-aarch64-static"; exit 0
    fi
  fi
  exec_flag=(-exec qemu-aarch64-static)
  echo "$(qemu-aarch64-static --version | head -n 1)"
fi

fail=0
start=$(date +%s)
for suite in "${suites[@]}"; do
  read -r pkg tests <<< "$suite"
  pattern="^($(echo "$tests" | tr ' ' '|'))\$"
  t0=$(date +%s)
  # -trimpath as in .ci/cross.sh, so that the arm64 packages it compiled
  # are reused from the build cache. -count=1: always run, never replay.
  log=$(CGO_ENABLED=0 GOOS=linux GOARCH=arm64 go test -trimpath -count=1 "${exec_flag[@]}" -run "$pattern" -v "$pkg" 2>&1) && code=0 || code=$?
  ran=$(printf '%s\n' "$log" | grep -cE '^--- PASS: [A-Za-z0-9_]+ ' || true)
  missing=""
  for t in $tests; do
    printf '%s\n' "$log" | grep -qE "^--- PASS: $t " || missing="$missing $t"
  done
  if [ "$code" -ne 0 ] || [ -n "$missing" ]; then
    echo "FAIL $pkg (exit $code; not passed:${missing:- none}):"
    printf '%s\n' "$log" | grep -vE '^(=== RUN|--- PASS)' | tail -n 40 | sed 's/^/  /'
    fail=1
    continue
  fi
  echo "ok $pkg on linux/arm64: $ran tests passed in $(( $(date +%s) - t0 )) s ($tests)"
done
echo "arm64 checks took $(( $(date +%s) - start )) s"
if [ "$fail" -ne 0 ]; then
  echo "A golden file that amd64 matches and arm64 does not means the arithmetic differs between"
  echo "the architectures: do not refresh it with -update; look for a product the compiler fused"
  echo "(bash .ci/fma.sh) or a standard-library elementary function (bash .ci/stdmath.sh)."
fi
exit $fail
