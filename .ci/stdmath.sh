#!/usr/bin/env bash
# Fails (exit 1) when a numerical package calls one of the standard library's
# rounding elementary functions (math.Sin, math.Exp, math.Log, math.Pow, ...).
#
# Those are assembly on amd64 and Go on arm64 (where the compiler also fuses
# multiply-adds), and their last bits differ between the two: a run, a
# spectrum or a reference that uses them is not bit-identical across
# architectures (DESIGN.md's determinism policy). Numerical code calls
# internal/detmath instead. Exact operations (math.Sqrt, math.Abs, math.Floor,
# math.Ldexp, ...) are fine. A call may stay where its result only seeds an
# iteration that converges to the same bits, or is drawn, not computed on: the
# line then says "stdmath: allowed" and why. internal/testode (exact solutions
# that tests compare with, within tolerances), cmd/ (drawing) and examples/
# are not checked.
#
# Usage: .ci/stdmath.sh
set -euo pipefail
cd "$(dirname "$0")/.."
funcs='Sin|Cos|Tan|Sincos|Asin|Acos|Atan|Atan2|Sinh|Cosh|Tanh|Asinh|Acosh|Atanh|Exp|Exp2|Expm1|Log|Log2|Log10|Log1p|Pow|Pow10|Hypot|Cbrt|Gamma|Lgamma|Erf|Erfc|J0|J1|Y0|Y1'
hits=$(git ls-files '*.go' | grep -v '_test\.go$' | grep -v '^internal/detmath/' | grep -v '^cmd/' | grep -v '^examples/' | grep -v '^internal/testode/' \
  | xargs grep -nE "(^|[^A-Za-z0-9_.])math\.($funcs)\(" | grep -v 'stdmath: allowed' || true)
if [ -n "$hits" ]; then
  echo "stdmath.sh: standard-library elementary functions in numerical code (use internal/detmath):"
  echo "$hits"
  exit 1
fi
