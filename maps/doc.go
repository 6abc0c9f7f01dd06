// Package maps iterates discrete maps x -> f(x) and audits how many of
// their iterates can be believed.
//
// A Map is made by New from plain functions (the map, its Jacobian, and
// the same map in double-double arithmetic); plumb's System.Map makes one
// for every built-in map and system file. Components with a period (an
// angle) are reduced to [0, period) after every iterate (WrapPeriodic). A
// Map satisfies lyap.Map, so lyap.MapExponents takes it as it is.
//
// # Entry points
//
//	Orbit   the iterates 0..steps of a map, stopped at the first one that is
//	        not finite
//	Audit   the map counterpart of integrate.Audit: a double-double reference
//	        orbit and float64, reduced-storage and restarted orbits iterated
//	        in lockstep, compared iterate by iterate (AuditSettings,
//	        AuditResult, Rung, DefaultRungs); AuditResult.Predict adds the
//	        predictions of a Lyapunov exponent
//
// Audit's memory does not grow with the horizon: the runs advance together
// and each divergence curve keeps at most CurvePoints points. The per-iterate
// work does not allocate.
//
// # Errors
//
// Errors wrap integrate's sentinels (integrate.ErrSettings,
// integrate.ErrDimension, integrate.ErrNonFinite, integrate.ErrLadder) and
// ErrSteps; an orbit that leaves the finite numbers says where with a
// *NonFiniteError. After work began, the partial result comes with the error.
//
// References:
//
//	S. M. Hammel, J. A. Yorke, C. Grebogi, Numerical orbits of chaotic
//	  processes represent true orbits, Bull. AMS 19 (1988) 465–469.
//	R. M. May, Simple mathematical models with very complicated dynamics,
//	  Nature 261 (1976) 459–467.
package maps
