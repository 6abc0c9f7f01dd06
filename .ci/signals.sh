#!/usr/bin/env bash
# Signals against the built binary: SIGINT and SIGTERM end a run that waits
# on a FIFO or computes, with exit status 1, within a bound, and a canceled
# run still writes what it completed. Usage: bash .ci/signals.sh PLUMB_BINARY
set -euo pipefail
bin=${1:?usage: signals.sh PLUMB_BINARY}
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
# The bound is generous for a shared CI machine; the measured latency is
# printed so that a slow drift is seen long before it trips.
limit_ms=2000
fail=0

# case NAME SIGNAL WAIT_SECONDS ARGS...: start the binary, send SIGNAL after
# WAIT_SECONDS, and check exit status 1 and the time from signal to exit.
case_() {
  local name=$1 sig=$2 wait=$3; shift 3
  "$bin" "$@" > "$tmp/$name.out" 2> "$tmp/$name.err" &
  local pid=$!
  sleep "$wait"
  if ! kill -0 "$pid" 2>/dev/null; then
    echo "FAIL $name: ended before the signal (exit $(wait "$pid"; echo $?))"; fail=1; return
  fi
  local t0; t0=$(date +%s%N)
  kill -s "$sig" "$pid"
  local code=0
  wait "$pid" || code=$?
  local ms=$(( ($(date +%s%N) - t0) / 1000000 ))
  if [ "$code" -ne 1 ]; then
    echo "FAIL $name: exit status $code after SIG$sig, want 1"; sed 's/^/  stderr: /' "$tmp/$name.err"; fail=1; return
  fi
  if [ "$ms" -gt "$limit_ms" ]; then
    echo "FAIL $name: $ms ms from SIG$sig to exit, bound $limit_ms ms"; fail=1; return
  fi
  echo "ok   $name: exit 1, $ms ms from SIG$sig to exit"
}

mkfifo "$tmp/waits.json"
case_ fifo-int INT 0.5 solve --file "$tmp/waits.json" --quiet
case_ fifo-term TERM 0.5 solve --file "$tmp/waits.json" --quiet
case_ models-fifo-int INT 0.5 models --file "$tmp/waits.json" --quiet
case_ solve-int INT 1 solve --t1 1e7 --dt 1 --max-steps 2000000000 --format json --quiet
case_ trust-term TERM 1 trust --horizon 5000 --max-steps 10000000 --format json --quiet
case_ map-trust-int INT 1 trust --model logistic --horizon 1e7 --format json --quiet

# A canceled run writes what it completed: one whole JSON object whose
# status says so.
for name in solve-int trust-term map-trust-int; do
  out="$tmp/$name.out"
  if [ ! -s "$out" ] || [ "$(head -c 1 "$out")" != "{" ] || [ "$(tail -c 2 "$out" | head -c 1)" != "}" ]; then
    echo "FAIL $name: stdout is not one whole JSON object"; head -c 300 "$out"; fail=1
  elif command -v python3 >/dev/null && ! python3 -c 'import json,sys; json.load(open(sys.argv[1]))' "$out"; then
    echo "FAIL $name: stdout does not parse as JSON"; fail=1
  else
    if ! grep -q '"status": "canceled"' "$out"; then
      echo "FAIL $name: the JSON does not say the run was canceled"; grep -m1 '"status"' "$out"; fail=1
    else
      echo "ok   $name: the partial result is whole JSON saying canceled ($(wc -c < "$out") bytes)"
    fi
  fi
done
exit $fail
