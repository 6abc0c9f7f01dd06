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

# --out: the file in place after a signal is either the previous one (the
# run computed nothing) or the whole partial result, marked: a CSV whose
# last line is "# partial result: canceled: ...", a JSON object saying
# canceled. No temporary file stays beside it, and stdout stays empty.
prev='the previous result'
mkdir "$tmp/out"
for f in solve.csv solve.json trust.json fifo.csv; do echo "$prev" > "$tmp/out/$f"; done
case_ out-solve-csv-int INT 1 solve --t1 1e7 --dt 1 --max-steps 2000000000 --format csv --out "$tmp/out/solve.csv" --quiet
case_ out-solve-json-term TERM 1 solve --t1 1e7 --dt 1 --max-steps 2000000000 --format json --out "$tmp/out/solve.json" --quiet
case_ out-trust-json-int INT 1 trust --horizon 5000 --max-steps 10000000 --format json --out "$tmp/out/trust.json" --quiet
case_ out-fifo-int INT 0.5 solve --file "$tmp/waits.json" --format csv --out "$tmp/out/fifo.csv" --quiet
for name in out-solve-csv-int out-solve-json-term out-trust-json-int out-fifo-int; do
  if [ -s "$tmp/$name.out" ]; then echo "FAIL $name: stdout is not empty with --out"; fail=1; fi
done
check_csv() { # NAME FILE
  local last; last=$(tail -n 1 "$2")
  if [ "$(cat "$2")" = "$prev" ]; then
    echo "ok   $1: the previous file stayed (nothing was computed)"
  elif [[ "$last" != "# partial result: canceled: "* ]]; then
    echo "FAIL $1: the last line is not the partial mark: $last"; fail=1
  elif [ "$(head -n 1 "$2")" != "t,x,y,z" ] || [ -n "$(sed '1d;$d' "$2" | awk -F, 'NF != 4')" ]; then
    echo "FAIL $1: the rows are not whole"; fail=1
  else
    echo "ok   $1: whole partial CSV, $(( $(wc -l < "$2") - 2 )) rows, marked canceled"
  fi
}
check_json() { # NAME FILE
  if [ "$(cat "$2")" = "$prev" ]; then
    echo "ok   $1: the previous file stayed (nothing was computed)"
  elif [ "$(head -c 1 "$2")" != "{" ] || [ "$(tail -c 2 "$2" | head -c 1)" != "}" ] || ! grep -q '"status": "canceled"' "$2"; then
    echo "FAIL $1: the file is not one whole JSON object saying canceled"; fail=1
  elif command -v python3 >/dev/null && ! python3 -c 'import json,sys; json.load(open(sys.argv[1]))' "$2"; then
    echo "FAIL $1: the file does not parse as JSON"; fail=1
  else
    echo "ok   $1: whole partial JSON saying canceled ($(wc -c < "$2") bytes)"
  fi
}
check_csv out-solve-csv-int "$tmp/out/solve.csv"
check_json out-solve-json-term "$tmp/out/solve.json"
check_json out-trust-json-int "$tmp/out/trust.json"
if [ "$(cat "$tmp/out/fifo.csv")" != "$prev" ]; then
  echo "FAIL out-fifo-int: a run that read no system changed the --out file"; fail=1
else
  echo "ok   out-fifo-int: the previous file stayed"
fi
if [ "$(ls -A "$tmp/out" | wc -l)" -ne 4 ]; then
  echo "FAIL --out: files other than the results stayed:"; ls -A "$tmp/out"; fail=1
fi
exit $fail
