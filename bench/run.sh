#!/bin/bash
# bench/run.sh - plumb's integrators beside general-purpose ODE libraries,
# timed interleaved on one machine, and a Markdown table of the ratios.
#
#   PEERS=DIR bash bench/run.sh        5 rounds; writes bench/out/table.md
#   REPS=3 PEERS=DIR bash bench/run.sh  fewer rounds
#
# DIR holds the peer programs (c_dp5.c, gsl_bench.c, boost_bench.cpp,
# scipy_bench.py, l96_bench.cpp, many_bench.cpp and peers_common.h): plain
# C Dormand-Prince 5(4), GSL odeiv2, Boost.Odeint and SciPy's solve_ivp,
# each timing itself the same way as `bench run` and printing the same JSON
# lines. Run as root on Debian or Ubuntu, the script installs the packages
# it needs (libgsl-dev, libboost-dev, python3-scipy); a peer that does not
# build or run is left out of the table, with a note on stderr.
set -euo pipefail
cd "$(dirname "$0")/.."
PEERS=${PEERS:?set PEERS to the directory of the peer programs}
REPS=${REPS:-5}
TARGET=${TARGET:-0.1} # seconds per timing sample
OUT=${OUT:-bench/out}
mkdir -p "$OUT/build"

if command -v apt-get >/dev/null && [ "$(id -u)" = 0 ]; then
    missing=()
    for p in libgsl-dev libboost-dev python3-scipy python3-numpy; do dpkg -s "$p" >/dev/null 2>&1 || missing+=("$p"); done
    if [ ${#missing[@]} -gt 0 ]; then
        apt-get update -qq && apt-get install -y -qq --no-install-recommends "${missing[@]}" >&2
    fi
fi

# SciPy from Debian's package lives in the system Python, which a Python
# installed elsewhere may shadow on PATH.
sys_py=python3
[ -x /usr/bin/python3 ] && sys_py=/usr/bin/python3
PY=${PY:-$sys_py}

echo "== build" >&2
go build -o "$OUT/build/bench" ./bench
# The peers time themselves with CLOCK_MONOTONIC; built from a copy that
# reads CLOCK_PROCESS_CPUTIME_ID instead, they report CPU time, as
# `bench run` does (on a shared machine wall time measures the load).
src=$OUT/build/src
rm -rf "$src" && mkdir -p "$src"
cp "$PEERS"/c_dp5.c "$PEERS"/gsl_bench.c "$PEERS"/boost_bench.cpp "$PEERS"/peers_common.h \
    "$PEERS"/l96_bench.cpp "$PEERS"/many_bench.cpp "$PEERS"/scipy_bench.py "$src"/
sed -i 's/CLOCK_MONOTONIC/CLOCK_PROCESS_CPUTIME_ID/' "$src/peers_common.h" "$src/l96_bench.cpp"
# SciPy's script times itself with perf_counter (wall): process_time instead.
sed -i 's/time\.perf_counter()/time.process_time()/g' "$src/scipy_bench.py"
progs=(plumb)
gcc -O2 -o "$OUT/build/c_dp5" "$src/c_dp5.c" -lm && progs+=(c_dp5) || echo "c_dp5 did not build: left out" >&2
gcc -O2 -o "$OUT/build/gsl" "$src/gsl_bench.c" -lgsl -lgslcblas -lm && progs+=(gsl) || echo "gsl_bench did not build: left out" >&2
g++ -O2 -o "$OUT/build/boost" "$src/boost_bench.cpp" && progs+=(boost) || echo "boost_bench did not build: left out" >&2
g++ -O2 -o "$OUT/build/l96" "$src/l96_bench.cpp" -lgsl -lgslcblas -lm && progs+=(l96-boost l96-gsl) || echo "l96_bench did not build: left out" >&2
g++ -O2 -o "$OUT/build/many" "$src/many_bench.cpp" -lm && progs+=(many) || echo "many_bench did not build: left out" >&2
"$PY" -c 'import scipy, numpy' 2>/dev/null && progs+=(scipy) || echo "python3-scipy missing: SciPy left out" >&2

run_prog() {
    case "$1" in
    plumb) timeout 600 "$OUT/build/bench" run "$TARGET" ;;
    l96-boost) timeout 600 "$OUT/build/l96" boost "$TARGET" ;;
    l96-gsl) timeout 600 "$OUT/build/l96" gsl "$TARGET" ;;
    scipy) timeout 900 "$PY" "$src/scipy_bench.py" "$TARGET" ;;
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
        "Go $(go env GOVERSION), $(gcc --version | head -1)," \
        "SciPy $("$PY" -c 'import scipy; print(scipy.__version__)' 2>/dev/null || echo none)."
    echo "Command: \`PEERS=DIR REPS=$REPS bash bench/run.sh\`."
    echo
    "$OUT/build/bench" table "$SAMPLES" integrate/testdata/lorenz.json
} >"$OUT/table.md"
cat "$OUT/table.md"
