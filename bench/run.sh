#!/bin/bash
# bench/run.sh - plumb's integrators beside general-purpose ODE libraries,
# timed interleaved on one machine, and a Markdown table of the ratios.
#
#   PEERS=DIR bash bench/run.sh        5 rounds; writes bench/out/table.md
#   REPS=3 PEERS=DIR bash bench/run.sh  fewer rounds
#
# DIR holds the peer programs (c_dp5.c, gsl_bench.c, boost_bench.cpp and
# peers_common.h): plain C Dormand-Prince 5(4), GSL odeiv2 and
# Boost.Odeint, each timing itself the same way as `bench run` and printing
# the same JSON lines. Run as root on Debian or Ubuntu, the script installs
# the libraries it needs (libgsl-dev, libboost-dev); a peer that does not
# build is left out of the table, with a note on stderr.
set -euo pipefail
cd "$(dirname "$0")/.."
PEERS=${PEERS:?set PEERS to the directory of the peer programs}
REPS=${REPS:-5}
TARGET=${TARGET:-0.1} # seconds per timing sample
OUT=${OUT:-bench/out}
mkdir -p "$OUT/build"

if command -v apt-get >/dev/null && [ "$(id -u)" = 0 ]; then
    missing=()
    for p in libgsl-dev libboost-dev; do dpkg -s "$p" >/dev/null 2>&1 || missing+=("$p"); done
    if [ ${#missing[@]} -gt 0 ]; then
        apt-get update -qq && apt-get install -y -qq --no-install-recommends "${missing[@]}" >&2
    fi
fi

echo "== build" >&2
go build -o "$OUT/build/bench" ./bench
# The peers time themselves with CLOCK_MONOTONIC; built from a copy that
# reads CLOCK_PROCESS_CPUTIME_ID instead, they report CPU time, as
# `bench run` does (on a shared machine wall time measures the load).
src=$OUT/build/src
rm -rf "$src" && mkdir -p "$src"
cp "$PEERS"/c_dp5.c "$PEERS"/gsl_bench.c "$PEERS"/boost_bench.cpp "$PEERS"/peers_common.h "$src"/
sed -i 's/CLOCK_MONOTONIC/CLOCK_PROCESS_CPUTIME_ID/' "$src/peers_common.h"
progs=(plumb)
gcc -O2 -o "$OUT/build/c_dp5" "$src/c_dp5.c" -lm && progs+=(c_dp5) || echo "c_dp5 did not build: left out" >&2
gcc -O2 -o "$OUT/build/gsl" "$src/gsl_bench.c" -lgsl -lgslcblas -lm && progs+=(gsl) || echo "gsl_bench did not build: left out" >&2
g++ -O2 -o "$OUT/build/boost" "$src/boost_bench.cpp" && progs+=(boost) || echo "boost_bench did not build: left out" >&2

run_prog() {
    case "$1" in
    plumb) timeout 600 "$OUT/build/bench" run "$TARGET" ;;
    *) timeout 600 "$OUT/build/$1" "$TARGET" ;;
    esac
}

SAMPLES=$OUT/samples.jsonl
: >"$SAMPLES"
np=${#progs[@]}
start=$(date +%s)
for rep in $(seq 1 "$REPS"); do
    for i in $(seq 0 $((np - 1))); do
        p=${progs[$(((i + rep - 1) % np))]} # rotate the order every round
        run_prog "$p" | sed "s/^{/{\"rep\":$rep,/" >>"$SAMPLES"
        echo "== round $rep/$REPS $p" >&2
    done
done
secs=$(($(date +%s) - start))

{
    echo "Measured $(date -u +%Y-%m-%d) on $(uname -m), $(nproc) cores ($(grep -m1 'model name' /proc/cpuinfo | cut -d: -f2 | sed 's/^ *//'))," \
        "load average $(cut -d' ' -f1-3 /proc/loadavg) at the end; $REPS interleaved rounds in $secs s;" \
        "Go $(go env GOVERSION), $(gcc --version | head -1)."
    echo "Command: \`PEERS=DIR REPS=$REPS bash bench/run.sh\`."
    echo
    "$OUT/build/bench" table "$SAMPLES" integrate/testdata/lorenz.json
} >"$OUT/table.md"
cat "$OUT/table.md"
