#!/usr/bin/env bash
# Peak memory of plumb solve does not grow with the span: in every format,
# the peak resident set of 'plumb solve --t1 100000 --dt 0.01' (10^7
# samples) must stay within 2x that of the '--t1 100' run (10^4 samples).
# Measured with GNU time (%M, the maximum resident set in KiB); installs
# Debian's 'time' package when it is missing and we are root with apt-get,
# and otherwise says so and skips. Costs about 40 s of CPU (the ten runs;
# each long one integrates ~2.7e7 steps and writes 10^7 rows), 2 minutes of
# wall time on a busy two-core machine; the output goes to /dev/null, the
# .npy to a temporary file (320 MB, removed at once).
# Usage: bash .ci/memory.sh [PLUMB_BINARY]
set -euo pipefail
cd "$(dirname "$0")/.."
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
bin=${1:-}
if [ -z "$bin" ]; then
  CGO_ENABLED=0 go build -o "$tmp/plumb" ./cmd/plumb
  bin="$tmp/plumb"
fi

gtime=/usr/bin/time
if ! "$gtime" -f %M true >/dev/null 2>&1; then
  if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null; then
    echo "installing GNU time (Debian package 'time')"
    apt-get install -y -qq time >/dev/null 2>&1 || { apt-get update -qq >/dev/null 2>&1 && apt-get install -y -qq time >/dev/null 2>&1; } || true
  fi
  if ! "$gtime" -f %M true >/dev/null 2>&1; then
    echo "skipped: GNU time (/usr/bin/time) is missing and could not be installed (needs root and apt-get); peak memory NOT checked"
    exit 0
  fi
fi

limit=2 # the long run's peak may be at most this many times the short run's
fail=0
# peak FORMAT OUT ARGS...: the run's peak resident set in KiB; the run must exit 0.
peak() {
  local format=$1 out=$2; shift 2
  local code=0
  "$gtime" -f %M -o "$tmp/rss" "$bin" solve --format "$format" --quiet "$@" > "$out" 2> "$tmp/err" || code=$?
  if [ "$code" -ne 0 ]; then
    echo "FAIL $format $*: exit $code" >&2; sed 's/^/  stderr: /' "$tmp/err" >&2; return 1
  fi
  tail -n 1 "$tmp/rss"
}
for format in table csv json jsonl npy; do
  out=/dev/null
  if [ "$format" = npy ]; then out="$tmp/run.npy"; fi
  start=$(date +%s)
  short=$(peak "$format" "$out" --t1 100 --dt 0.01) || { fail=1; continue; }
  long=$(peak "$format" "$out" --t1 100000 --dt 0.01) || { fail=1; continue; }
  secs=$(( $(date +%s) - start ))
  if [ "$format" = npy ]; then
    # 10^7 + 1 rows of 4 float64 and a 128-byte header.
    size=$(wc -c < "$out"); want=$(( (10000001 * 4 * 8) + 128 ))
    if [ "$size" -ne "$want" ]; then
      echo "FAIL npy: the long run's file has $size bytes, want $want"; fail=1
    fi
    rm -f "$out"
  fi
  ratio=$(awk -v l="$long" -v s="$short" 'BEGIN { printf "%.2f", l / s }')
  if awk -v l="$long" -v s="$short" -v k="$limit" 'BEGIN { exit !(l > k * s) }'; then
    echo "FAIL $format: peak $long KiB over 10^7 samples, $short KiB over 10^4 (${ratio}x > ${limit}x) [${secs}s]"; fail=1
  else
    echo "ok   $format: peak $long KiB over 10^7 samples, $short KiB over 10^4 (${ratio}x) [${secs}s]"
  fi
done
exit $fail
