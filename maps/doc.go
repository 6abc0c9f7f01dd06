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
//	OrbitAfter        the iterates after a discarded transient
//	Cobweb            the corners of the cobweb picture of a 1-D map
//	AttractingPeriod  the period an orbit settles on (0: none found)
//	Cycles            every cycle of a period, with multipliers and
//	                  stability (CycleSettings)
//	Scan              orbit diagrams and exponents over one or two
//	                  parameter axes of a Family, in parallel, streamed
//	                  (ScanSettings, ScanRow)
//	PeriodDoubling    superstable parameters, period-doubling points and
//	                  Feigenbaum's ratios
//	Onset             where a window opens (tangent bifurcation)
//	SharkovskyBefore, Forces, ForcedPeriods, ConfirmForced
//	                  Sharkovsky's order and its check on a map
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
//	M. J. Feigenbaum, Quantitative universality for a class of nonlinear
//	  transformations, J. Stat. Phys. 19 (1978) 25–52.
//	T. Y. Li, J. A. Yorke, Period three implies chaos, Amer. Math. Monthly
//	  82 (1975) 985–992.
//	A. N. Sharkovsky, Ukrain. Mat. Zh. 16 (1964) 61–71.
//	R. M. May, Simple mathematical models with very complicated dynamics,
//	  Nature 261 (1976) 459–467.
package maps
