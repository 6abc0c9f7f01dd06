// Package enclose proves where the exact solution of a system given by
// formulas lies: validated enclosures of a flow's trajectory (Flow) or a
// map's orbit (Map) in rigorous float64 interval arithmetic
// (internal/ival), from a point or a small box of starts.
//
// Every trust horizon elsewhere in plumb is an estimate: runs agree, or a
// reference in more digits agrees. An enclosure is a proof: at every step
// the box holds the exact solution of the formulas through every start in
// the start box, so the time up to which the box stays narrower than a
// tolerance (Result.Horizon) is a proven horizon.
//
// # Why a package of its own
//
// integrate steps float64 states with error estimates; an enclosure steps
// sets (a point, a matrix and an interval box) with proofs, needs the
// formulas themselves (Taylor coefficients and derivatives in intervals,
// not a Go function), and fails for reasons integrate has no words for (a
// Picard test, a kink in the box, the wrapping effect). Kept apart, neither
// package's settings or results carry the other's fields, and integrate's
// dependants do not pay for interval arithmetic. The root package's trust
// audit calls it for systems with formulas (TrustSettings.Prove).
//
// # Methods
//
//	series   interval Taylor coefficients of the solution through a box,
//	         by the recurrences of Taylor-mode differentiation of the
//	         compiled formulas (internal/expr's tape) in ival arithmetic.
//	apriori  the Picard test: X + [0,h]·f(B) inside B proves that the
//	         solutions from X stay in B over the step; the step shrinks
//	         until it holds.
//	Flow     Taylor polynomial of order p at the box plus the Lagrange
//	         remainder h^(p+1)·f^[p+1](B), wrapped by Lohner's method:
//	         the set carried as c + A·r with QR re-orthogonalisation, the
//	         step's derivative over the box from the variational equations
//	         (symbolic Jacobian of the formulas) in interval Taylor
//	         arithmetic.
//	Map      the map and its symbolic Jacobian over the box, the same
//	         wrapping.
//
// Settings.Direct carries the hull box instead (a naive interval method)
// to show what the wrapping control buys: for Lorenz from (1, 1, 1) the
// direct box passes width 1 at t ≈ 1.8, while Lohner's stays below 1e-3
// until t ≈ 27 (TestLorenzEnclosure).
//
// # Kinks and domains
//
// abs, min, max, sign and step are exact over a box where their switching
// function keeps one sign; where it can vanish in the box the run stops
// with Failure.Kind "kink" and the function named. sqrt, log and real
// powers need a positive argument over the box, a division a divisor
// away from 0, atan2 a box off its cut.
//
// # Errors
//
// Bad formulas, starts and settings return errors wrapping ErrFormulas or
// ErrSettings (SettingError names the field) and no result. Once stepping
// began, every stop is a Result.Failure with the last time enclosed, the
// kind and the reason, and the steps before it are kept; a canceled
// context also returns an error wrapping ctx.Err().
//
// # Allocation
//
// A step of formulas built from + - * /, integer powers, abs, min, max,
// sign and step allocates nothing (TestStepAllocs); the enclosures of the
// elementary functions (internal/ival) may allocate where they fall back
// from float64 to math/big. Each recorded step allocates its box. Cost per flow step: O(p²) interval operations per instruction
// of the variational system, which has n + n² outputs.
//
// # Determinism
//
// Interval bounds are rounded outward by internal/ival without changing
// the rounding mode, products are rounded before sums, elementary
// functions come from internal/detmath and ival: the same bits on amd64
// and arm64.
//
// # Caution
//
// A proven enclosure is a statement about the model's equations as written
// and their float64 parameters, not about the real system they describe:
// a model error, a parameter known to three digits, or physics the
// formulas leave out are outside the proof. Safety-critical use follows
// the field's codes and licensed review.
//
// References:
//
//	R. E. Moore, Interval Analysis, Prentice-Hall 1966.
//	R. J. Lohner, Enclosing the solutions of ordinary initial and boundary
//	  value problems, in E. Kaucher, U. Kulisch, Ch. Ullrich (eds.),
//	  Computerarithmetic, Teubner 1987, 255–286.
//	N. S. Nedialkov, K. R. Jackson, G. F. Corliss, Validated solutions of
//	  initial value problems for ordinary differential equations, Applied
//	  Mathematics and Computation 105 (1999) 21–68.
package enclose
