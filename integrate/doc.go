// Package integrate solves initial value problems y' = F(t, y) with error
// control, dense output and located crossings, and steps with fixed-step
// methods that users audit their runs against.
//
// # Entry points
//
// Solve integrates a Problem over [T0, t1] with a Method and Settings and
// returns a Solution: the accepted steps, a continuous extension (At),
// samples on a grid (Settings.Every, Settings.Times), located crossings
// (Settings.Crossings), work counts (Stats) and why it ended (Status).
// Stream runs the same loop but hands each sample (or each accepted step)
// to a function as it is computed and keeps none, for runs whose output is
// larger than memory; SampleCount says up front how many samples a grid
// gives. A Stepper takes one accepted step at a time for callers that own
// their loop.
// A nil Method means DormandPrince54; a nil *Settings means the documented
// defaults.
//
// # Methods
//
//	DormandPrince54    explicit 5(4) pair, FSAL (6 evaluations a step), dense output of order 4
//	DormandPrince853   explicit 8(5,3) pair, 11 evaluations an attempt plus 1 an accepted
//	                   step; dense output of order 7 (3 more evaluations, only when used;
//	                   Solution.At rebuilds a kept step when first asked, see below)
//	BogackiShampine32  explicit 3(2) pair, FSAL (3 evaluations a step), Hermite dense output
//	RK4(h), Euler(h)   fixed step (4 and 1 evaluations), Hermite and linear dense output,
//	                   for step-size audits
//
// Geometric methods for Hamiltonian problems (Problem.Split, or
// HamiltonianProblem), all with a fixed step h:
//
//	Verlet, VerletDKD           Störmer–Verlet, order 2
//	ForestRuth, Yoshida4        the triple jump, order 4
//	Yoshida6, Yoshida8          Yoshida's compositions, orders 6 and 8
//	PEFRL, BlanesMoan4          optimised order-4 splittings
//	GaussLegendre(s, h)         implicit collocation, order 2s (s = 1, 2, 3), any F
//
// EnergyAudit reports a fixed-step run's energy error history, a Richardson
// estimate of its global error and a step for a target energy error;
// SolveReversible takes variable steps by a reversible time transformation
// for close encounters. An implicit step that does not converge ends the
// solve with ErrNoConvergence, never with a wrong state.
//
// Every method passes the conformance suite in internal/testode (measured
// order, dense-output order, crossings, backward runs, bad input), and every
// Runge–Kutta tableau is checked against the order conditions of all rooted
// trees up to its order.
//
// # Precision and audits
//
// Rounded wraps any method so that its state (and, with Rounding.Stages,
// every stage value) is stored at an emulated precision: Bits(p) rounds the
// significand to p bits exactly (p = 24: float32), Digits and Places round as
// a printout does. Audit re-runs a problem on a Ladder of rungs (tolerances,
// methods, precisions, restarts from rounded states), compares every run with
// the tightest one on a common grid, and reports per rung the divergence
// curve, the agreement horizon at the user's tolerance, the fitted growth law
// and the horizon predicted from the largest Lyapunov exponent. With
// Ladder.Exact the runs are compared with an exact trajectory instead. FitGrowth
// is the growth-law fit on its own, for divergences measured elsewhere (the
// iterates of a map).
//
// # Reference runs
//
// SolveTaylor integrates with a Taylor method of order and step chosen from
// the tolerance (Jorba & Zou 2005) in double-double or big.Float
// arithmetic, from Taylor coefficients supplied by a Series (package plumb
// provides one from a system's formulas): reference trajectories correct to
// many more digits than float64, for Ladder.Exact.
//
// A Taylor series does not cross a kink (abs, min, max, sign, step). A
// KinkSeries exposes each kink's switching function (the argument of abs,
// the difference of min's or max's arguments) as a series of the same
// jet; SolveTaylor brackets its first zero within every step by sampling
// its sign and slope, polishes it by Newton's method at the working
// precision, ends the step there and restarts the series on the branch of
// the side the solution moves into (the sign of the switching function's
// first significant coefficient, checked on that side's own series, so that
// tangential touches keep their side). Where it cannot (a branch point of
// sqrt or a non-integer power reached, atan2's cut crossed, a jump the
// field slides along, kinks that accumulate) it stops with ErrKink rather
// than step over the kink. TaylorStats.KinkRestarts counts the restarts.
//
// # Batches
//
// SolveBatch and BatchStepper advance M copies of one problem (a
// BatchProblem: one field, M starts) in lockstep with DormandPrince54 and
// one step size, whose error norm is the largest member's. The field is a
// BatchFunc over the members' states stored component-major; Loop and
// LoopFork adapt a plain Func. Blocks of members go to several goroutines
// with results bit-identical whatever their number; a one-member batch
// gives Solve's bits.
//
// # Step control
//
// The local error of a trial step is measured in the root-mean-square norm
//
//	err = sqrt( (1/n) Σ (e_i / (atol_i + rtol_i·max(|y_i|, |y1_i|)))² )
//
// and the step is accepted when err <= 1. The next step comes from the PI
// controller (see Controller). The first step is chosen automatically unless
// Settings.InitialStep is set.
//
// # Errors
//
// Errors wrap the sentinels ErrSettings, ErrDimension, ErrNonFinite, ErrSpan,
// ErrStepUnderflow, ErrStepBudget and ErrMethod (test with errors.Is); a
// StepError says at which time and step size stepping failed; a FieldError
// names the component of a non-finite value; a SettingError names the
// invalid field of a Settings (Settings.Validate checks them without a
// problem). Once stepping has begun, Solve
// returns the partial Solution with the error. A step whose error estimate is
// NaN is rejected and retried with a smaller step; if that persists, the solve
// ends with a FieldError.
//
// A panic in a function the caller supplies (the vector field, the
// Jacobian, a crossing function, Settings.Progress) does not escape Solve
// or NewStepper: it is recovered into a CallbackError (wrapping ErrCallback,
// and the panic value when that is an error) that names the function and
// the time, and Solve returns it with the partial Solution. Solve recovers
// once per call, with one deferred function, so the step loop pays nothing
// for it. Stepper.Next does not recover: a caller who owns the loop sees
// the panic. A zero Stepper (not made by NewStepper) reports ErrSettings.
//
// # Allocation
//
// After set-up, Stepper.Next does not allocate. Solve allocates only to store
// what the Solution keeps (steps, samples, hits). Kept steps go to blocks
// that double up to 4096 steps and never move, so a solve allocates
// O(log steps + steps/4096) times and copies its steps once, at the end,
// into T and Y. A DormandPrince54 or DormandPrince853 solve that needs no
// dense output while it runs (no Every, Times or Crossings) keeps only the
// step size of each step beside T and Y: Solution.At takes a step again
// from its start when first asked (7 or 16 evaluations of the field, after
// Solve has returned; the same bits as a solve that built the extension
// while it ran) and keeps the two steps used last. With a grid or
// crossings they keep the part of each step's continuous extension that T
// and Y do not give: for DormandPrince54 the step size, the end derivative
// and one vector; for DormandPrince853 6 of its 8 vectors. The blocks that stage the
// times and states before that copy go back to a pool (sync.Pool) that
// later solves draw from.
//
// # Determinism
//
// Kernels write products as float64(x*y) so that no architecture fuses them
// into FMA instructions: the same input gives the same bits on amd64 and arm64.
// On amd64, DormandPrince54's trial step runs assembly from dimension 8 on:
// AVX2 (four components per instruction, never FMA) where the CPU has it,
// SSE2 (two) otherwise, with the operations, their grouping and the order
// of the error sum of the Go loops, and so their bits whichever runs.
//
// # Notation
//
// t is time, y the state (length n), h the step size (negative when
// integrating backwards), theta ∈ [0, 1] the position inside a step.
package integrate
