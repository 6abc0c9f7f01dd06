package integrate

// AuditSettings controls Audit. A nil *AuditSettings is invalid (Tol has no
// default: it is the user's statement of what difference matters).
type AuditSettings struct {
	// Tol is the divergence the user accepts, in the units of the state
	// (or, with Relative, as a fraction of the reference run's spread).
	// Must be finite and > 0; otherwise ErrSettings.
	Tol float64
	// Relative makes Tol a fraction of the spread of the reference run (the
	// root-mean-square distance of its samples from their mean, see
	// AuditResult.Spread): the size of the attractor or orbit.
	Relative bool
	// Every is the spacing of the common time grid on which the runs are
	// compared. Zero means (t1 - t0)/1000. Must be finite and >= 0.
	Every float64
	// Periods gives, per state component, the period of an angle (0 for
	// the others); differences of periodic components are wrapped into
	// [-P/2, P/2]. Nil means no periodic component; otherwise its length
	// must equal the state's (ErrDimension).
	Periods []float64
	// Scales gives, per state component, the scale its difference is
	// divided by before the norm (after wrapping on periodic components),
	// so that components in different units compare; a zero scale leaves
	// the component out of the distance (it is not observed). Nil means
	// every component at scale 1. Otherwise its length must equal the
	// state's (ErrDimension), every entry must be finite and >= 0, and at
	// least one > 0 (ErrSettings). Spread, Magnitude, the tolerance with
	// Relative, Delta0 and the reversibility miss use the same distance.
	Scales []float64
	// Lambda is the largest Lyapunov exponent, for the predicted horizons
	// ln(tol/delta0)/Lambda. Zero means no predictions. Must be finite.
	Lambda float64
	// Reverse asks for the reversibility check: the reference state at
	// ReverseAt is integrated back to t0 and its distance from the start
	// reported.
	Reverse bool
	// ReverseAt is the turning time of the reversibility check; zero means
	// the trusted horizon (AuditResult.Trusted). The check turns at the last
	// grid time at or before it. Must lie in (t0, t1].
	ReverseAt float64
	// MaxSteps bounds every run's attempted steps; zero means
	// DefaultMaxSteps. Must be >= 0.
	MaxSteps int
	// Progress, if not nil, is called after each run (the reference first)
	// with the number of runs done and the total (rungs + 1, and one more
	// for the reversibility check). It must not block for long.
	Progress func(done, total int)
}
