// Package ival is rigorous interval arithmetic in float64: every operation
// returns an interval that contains the exact real result of the operation
// for every choice of real arguments in its operand intervals (the
// inclusion property), on every platform, without changing the FPU's
// rounding mode.
//
// # Encoding
//
// An Interval is the closed set [Lo, Hi] of reals with Lo <= Hi; an
// infinite end means unbounded on that side (Entire() = [-Inf, +Inf]). The
// empty set is Lo = Hi = NaN. A function applied to an interval that is not
// entirely inside its domain (Sqrt of [-1, 4], Log of [0, 1]) returns the
// empty set rather than the image of the part inside the domain: a formula
// that is undefined somewhere in a box has no enclosure on that box. Every
// predicate (Contains, Subset, Interior) is false for an empty operand, so an
// empty result can never pass an enclosure test. Division by an interval
// containing 0 returns Entire().
//
// # Why the rounding is rigorous
//
// Go evaluates float64 +, -, *, / and math.Sqrt as single IEEE 754 binary64
// operations rounded to nearest, ties to even, on every architecture it
// supports (SSE2 on amd64, the FPU on arm64; never x87 extended precision),
// and math.FMA(a, b, c) returns a*b+c rounded once, in hardware or in
// software. The package relies on three facts about such an operation with
// exact result z and rounded result r = RN(z):
//
//  1. |z - r| <= ulp(r)/2 when r is finite, including the subnormal range
//     (where the spacing is 2^-1074); hence the neighbours
//     math.Nextafter(r, -Inf) <= z <= math.Nextafter(r, +Inf).
//  2. RN is monotone and RN(0) = 0, so RN(w) > 0 implies w > 0 and RN(w) < 0
//     implies w < 0 for any real w.
//  3. Overflow: r = +Inf for a finite exact z means z > MaxFloat64, so
//     MaxFloat64 is a lower bound; underflow: r = 0 for a nonzero z keeps the
//     sign of z, so 0 and ±SmallestNonzeroFloat64 bound it.
//
// Each end of a result is the rounded result r, moved one ulp outward unless
// an exact residual proves r is already on the right side:
//
//   - a+b: TwoSum's error e = (a+b) - r is exact when none of its steps
//     overflows (Knuth); e < 0 moves the lower end, e > 0 the upper end,
//     e = 0 keeps r exact. An overflowing step (possible within an ulp of
//     ±MaxFloat64) leaves e infinite or NaN, and then both ends move.
//   - a*b: e = math.FMA(a, b, -r) = RN(a*b - r) has, by fact 2, the sign of
//     a*b - r when nonzero. When it is zero, a*b = r is proven only where
//     a*b - r is itself a float64: with a = A*2^i, b = B*2^j for odd
//     integers A, B, that holds when i+j >= -1074 (Dekker 1971 gives the
//     condition for full significands; productErrExact has the proof).
//     Otherwise both ends move.
//   - a/b: RN(a - r*b) = math.FMA(-r, b, a) has the sign of a - r*b, and
//     a/b - r = (a - r*b)/b. A zero residual proves a/b = r only when r*b
//     rounds to a with a zero, provably exact, product error.
//   - sqrt(x): RN(x - r*r) = math.FMA(-r, r, x) has the sign of sqrt(x) - r;
//     zero proves exactness as for the quotient.
//
// So exact results stay exact (Add(Point(1), Point(2)) = [3, 3]), an inexact
// result has width one ulp per rounded end, and the fallback of moving both
// ways is taken only near underflow, where fact 1 alone makes it rigorous.
// math.FMA is used on purpose; every other product is a separate statement,
// so the compiler cannot fuse a multiply-add (.ci/fma.sh checks the arm64
// build).
//
// # Elementary functions
//
// Exp, Log, Sin, Cos, Tan, Atan, Atan2, Sinh, Cosh, Tanh and Pow evaluate
// each monotone piece of the function at its ends with a point kernel
// written in math/big interval arithmetic (benc: every operation rounds the
// lower end toward -Inf and the upper toward +Inf, which big.Float does
// exactly for +, -, *, /; square roots are checked by exact squaring). Each
// kernel reduces the argument, sums a Taylor or atanh series, and adds an
// explicit bound of the truncation error (Lagrange's remainder, or the
// first omitted term of an alternating series with decreasing terms), so
// the 128-bit result is an enclosure by construction; it is then rounded
// outward to float64, to at most two float64 steps. π and ln 2
// are themselves enclosed by series with remainder bounds, to as many bits
// as the largest argument needs (about 1300 for sin near MaxFloat64). The
// turning points of sin and cos and the poles of tan are found from
// enclosures of x/(π/2); an integer that may or may not be inside x is
// counted as inside, which widens a result but never makes it wrong. Each
// function's doc comment says what its enclosure rests on.
//
// Sign and Step are jumps: on an interval holding 0 they return the hull of
// the jump ([-1, 1] and [0, 1]), the set-valued reading under which an
// enclosure of a discontinuous right-hand side stays valid.
//
// Exp, Log, Sin, Cos, Atan, Atan2, Sinh, Cosh and Tanh first try a fast
// path (fast.go): reductions and series in this package's own float64
// interval arithmetic, with ln 2 and π/2 split into exact 32-bit leading
// parts and an enclosed tail, a table of atan(i/8) enclosed once by the
// 128-bit kernel, and the same kinds of truncation bounds. A fast result is
// an enclosure by the inclusion property of the basic operations; it is
// kept when at most 8 float64 steps wide, and otherwise (deep cancellation
// in the reduction, huge arguments, results near underflow) the 128-bit
// kernel decides, giving at most 2 steps. Tan divides the fast sin and cos
// and keeps results up to 16 steps wide; Pow uses the kernels.
//
// # Cost
//
// The basic operations (Add through Sqrt, PowInt, Hull, Width, Mid, Rad)
// allocate nothing and cost tens of nanoseconds. The fast paths allocate
// nothing and are about ten to a hundred times faster than the 128-bit
// kernels (Pow, huge arguments, fall-backs), which allocate math/big
// temporaries and take on the order of 0.1 ms per call
// (BenchmarkElementary). An interval Taylor method calls them once per
// function node and step, for the zeroth coefficient.
//
// # Caution
//
// An enclosure is a statement about the numerical model as written, not
// about the physical system it describes. Safety-critical use follows the
// field's codes and licensed review.
//
// References:
//
//	R. E. Moore, Interval Analysis, Prentice-Hall (1966).
//	D. E. Knuth, The Art of Computer Programming, Vol. 2: Seminumerical
//	  Algorithms, Addison-Wesley (1969), section 4.2.2 (TwoSum).
//	T. J. Dekker, A floating-point technique for extending the available
//	  precision, Numer. Math. 18 (1971) 224–242 (exact products).
//	IEEE Std 754-2019, IEEE Standard for Floating-Point Arithmetic.
//	J.-M. Muller et al., Handbook of Floating-Point Arithmetic, 2nd ed.,
//	  Birkhäuser (2018), chapters 2 and 4 (rounding, error-free
//	  transformations and their underflow conditions).
package ival
