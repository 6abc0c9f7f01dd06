#!/usr/bin/env bash
# Fails (exit 1) when the arm64 build of the numerical packages contains fused
# multiply-add instructions that the source did not ask for.
#
# Go may fuse x*y + z into one FMADDD/FMSUBD/FNMADDD/FNMSUBD on arm64 (never
# on amd64), which changes the last bits of a result and, in a chaotic run,
# everything after a few Lyapunov times. Numerical kernels therefore write
# float64(x*y) + z; an FMA on purpose is written math.FMA(x, y, z) and is
# allowed here (the source line is checked for "math.FMA").
#
# Usage: .ci/fma.sh [package ...]   (default: every numerical package)
# Needs only Go: the arm64 build is a cross-compilation.
set -euo pipefail
cd "$(dirname "$0")/.."
pkgs=("$@")
if [ ${#pkgs[@]} -eq 0 ]; then
  pkgs=(./enclose ./integrate ./internal/models ./internal/expr ./internal/dd ./internal/detmath ./internal/runio ./internal/bigadd ./internal/ival ./lyap ./maps ./embed .)
fi
status=0
for pkg in "${pkgs[@]}"; do
  # -S prints the assembly of the named package only; the output of a cached
  # build is replayed, so this stays cheap.
  asm=$(GOARCH=arm64 GOOS=linux CGO_ENABLED=0 go build -o /dev/null -gcflags=-S "$pkg" 2>&1) || {
    echo "fma.sh: arm64 build of $pkg failed:"; echo "$asm"; exit 1; }
  # Track the function each instruction belongs to (header lines end in
  # "STEXT ..."); report function, file:line and the instruction.
  hits=$(printf '%s\n' "$asm" | awk '
    / STEXT / { fn = $1; next }
    /\t(FMADDD|FMSUBD|FNMADDD|FNMSUBD)\t/ {
      if (match($0, /\([^()]*\.go:[0-9]+\)/)) {
        loc = substr($0, RSTART + 1, RLENGTH - 2)
        for (i = 1; i <= NF; i++) if ($i ~ /^F(N?)M(ADD|SUB)D$/) ins = $i
        print fn "\t" loc "\t" ins
      }
    }' | sort -u)
  [ -z "$hits" ] && continue
  while IFS=$'\t' read -r fn loc ins; do
    file=${loc%:*}; line=${loc##*:}
    if [ -f "$file" ] && sed -n "${line}p" "$file" | grep -q 'math\.FMA'; then
      continue # asked for on purpose
    fi
    echo "fused $ins in $fn at $loc"
    status=1
  done <<< "$hits"
done
if [ $status -ne 0 ]; then
  echo "fma.sh: write float64(x*y) + z where no fusion is wanted, or math.FMA where it is"
fi
exit $status
