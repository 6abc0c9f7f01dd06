package integrate

import (
	"context"
	"errors"
	"fmt"
	"math"
)

// ErrLadder reports an unusable audit ladder: no rung besides the reference,
// or a rung whose fields do not fit (see Rung).
var ErrLadder = errors.New("invalid audit ladder")

// RungKind says which numerical effect a rung of the audit ladder varies.
// Its value is the effect as the reports write it (JSON as text).
type RungKind string

const (
	// KindReference is the tightest run, the one every rung is compared
	// with (without Ladder.Exact). The zero RungKind means it in
	// Ladder.Reference and in RunLadder's run.
	KindReference RungKind = "tightest"
	// KindTolerance varies the tolerances of an error-controlled method.
	KindTolerance RungKind = "tolerance"
	// KindMethod varies the method (another pair, or a fixed-step method).
	KindMethod RungKind = "method"
	// KindPrecision stores the state (and optionally every stage) at an
	// emulated precision (see Rounded).
	KindPrecision RungKind = "precision"
	// KindRestart restarts the reference run at a chosen time from its state
	// rounded as a printout would be (see Places, Digits).
	KindRestart RungKind = "restart"
	// KindRun is the caller's own run, the one being audited (see
	// RunLadder): at most one per ladder. With it, AuditResult.Trusted is
	// its horizon, and the other rungs say what changing it would buy.
	KindRun RungKind = "run"
)

// String returns the effect: "tightest", "tolerance", "method",
// "precision", "restart" or "run" ("tightest" for the zero RungKind).
func (k RungKind) String() string {
	if k == "" {
		return string(KindReference)
	}
	return string(k)
}

// valid reports a known kind (the zero kind included).
func (k RungKind) valid() bool {
	switch k {
	case "", KindReference, KindTolerance, KindMethod, KindPrecision, KindRestart, KindRun:
		return true
	}
	return false
}

// Rung is one run of the audit ladder. A field left zero takes the
// reference's value: a nil Method means the reference's method, zero RelTol
// and AbsTol its tolerances.
type Rung struct {
	// Name labels the rung in reports; empty means one made from the fields.
	Name string
	// Kind is the effect the rung varies.
	Kind RungKind
	// Method is the method of the run; nil means the reference's.
	Method Method
	// Fixed, with Step, makes the run's method Fixed(Step) (for RK4 and
	// Euler); it overrides Method.
	Fixed func(h float64) Method
	// Step is the step size of Fixed; zero means an eighth of the
	// reference run's mean accepted step (a heuristic: fine enough that a
	// fourth-order method lands near the tolerance rungs on smooth
	// problems, coarse enough to show the method's own error). Must be
	// finite and >= 0.
	Step float64
	// RelTol and AbsTol are the run's tolerances; zero means the
	// reference's. A KindTolerance rung must set RelTol > 0 (or, with
	// Fixed, a Step > 0: its step is the tolerance it varies).
	RelTol, AbsTol float64
	// Rounding is the emulated storage of a KindPrecision rung (its run uses
	// Rounded(method, Rounding)); it must not be NoRounding there.
	Rounding Rounding
	// RestartAt is the time of a KindRestart rung's restart, strictly inside
	// the audited span.
	RestartAt float64
	// Restart is the rounding of the state at RestartAt (for example
	// Places(3), a printout with three decimals).
	Restart Rounding
	// MaxSteps bounds the run's attempted steps; zero means
	// AuditSettings.MaxSteps.
	MaxSteps int
}

// Ladder is the set of runs an audit compares: a Reference (the tightest
// run) and the Rungs compared with it. The zero Reference means
// DormandPrince54 at RelTol = AbsTol = 1e-12 (DefaultLadder uses
// DormandPrince853).
type Ladder struct {
	Reference Rung
	Rungs     []Rung
	// Exact, if not nil, supplies the solution at the comparison times,
	// computed apart from the ladder (for instance a multiprecision Taylor
	// run, see SolveTaylor): every rung is then compared with it instead of
	// with the reference run, and the reference run itself gets a
	// divergence curve and a horizon (AuditResult.Reference). The
	// reference run is still made (for the fixed-step default and the
	// reversibility check) but does not count in AuditResult.Trusted.
	Exact Trajectory
}

// Trajectory returns the states of the audited problem's solution at the
// given increasing times (one slice of the state's length per time). Errors
// end the audit. Audit calls it first with the comparison times, then once
// more with the times at which it locates the horizons (inside the span);
// the second call's error only leaves the horizons as the grid gives them.
type Trajectory func(ctx context.Context, times []float64) ([][]float64, error)

// RestartFraction places the default restart rung at this fraction of the
// audited span, t0 + RestartFraction·(t1 - t0) (of a map's iterates, see
// maps.DefaultRungs): late enough that the audit has compared the runs from
// the start for most of the span, early enough that the restarted run has
// time to part (common practice).
const RestartFraction = 0.8

// Default tolerances of the reference rung.
const (
	ReferenceRelTol = 1e-12
	ReferenceAbsTol = 1e-12
)

// TightRelTol is the tightest of DefaultLadder's tolerance rungs
// (DormandPrince54 at RelTol = AbsTol = TightRelTol; the loosest is at
// DefaultRelTol): the tightest everyday run the default audit compares
// with its reference.
const TightRelTol = 1e-10

// DefaultLadder returns the ladder the audit uses when none is given, for
// the span [t0, t1]:
//
//	reference  DormandPrince853, RelTol = AbsTol = 1e-12
//	tolerance  DormandPrince54 at RelTol = AbsTol = 1e-6 (Solve's default), 1e-8, 1e-10
//	method     DormandPrince853 at RelTol = AbsTol = 1e-8 (beside DormandPrince54
//	           at 1e-8: the method's effect at equal tolerance); RK4 with an
//	           eighth of the reference's mean step
//	precision  the reference with the state stored at 24 bits (float32) and at 40 bits
//	restart    the reference restarted at t0 + RestartFraction·(t1 - t0) from its state
//	           rounded to 3 decimal places
//
// The two precisions let the audit extrapolate the horizon of float64
// storage itself (53 bits), which no run here can measure directly.
func DefaultLadder(t0, t1 float64) Ladder {
	l := Ladder{Reference: Rung{Kind: KindReference, Method: DormandPrince853, RelTol: ReferenceRelTol, AbsTol: ReferenceAbsTol}}
	for _, tol := range []float64{DefaultRelTol, 1e-8, TightRelTol} {
		l.Rungs = append(l.Rungs, Rung{Kind: KindTolerance, Method: DormandPrince54, RelTol: tol, AbsTol: tol})
	}
	l.Rungs = append(l.Rungs,
		Rung{Kind: KindMethod, Method: DormandPrince853, RelTol: 1e-8, AbsTol: 1e-8},
		Rung{Kind: KindMethod, Fixed: RK4},
		Rung{Kind: KindPrecision, Rounding: Bits(24)},
		Rung{Kind: KindPrecision, Rounding: Bits(40)},
		Rung{Kind: KindRestart, RestartAt: t0 + float64(RestartFraction*(t1-t0)), Restart: Places(3)},
	)
	return l
}

// RungError says which rung of a ladder is unusable or failed, and why.
type RungError struct {
	Index int    // index in Ladder.Rungs; -1 for the reference
	Name  string // the rung's name
	Err   error  // the cause
}

func (e *RungError) Error() string {
	if e.Index < 0 {
		return fmt.Sprintf("integrate: reference rung %q: %v", e.Name, e.Err)
	}
	return fmt.Sprintf("integrate: rung %d %q: %v", e.Index, e.Name, e.Err)
}

// Unwrap returns the cause.
func (e *RungError) Unwrap() error { return e.Err }

// resolvedRung is a rung with its defaults filled in.
type resolvedRung struct {
	Rung
	m Method // the method actually run (Rounded for precision rungs)
}

// validateRung checks the rung's own fields (not those filled from the
// reference) for the span [t0, t1].
func validateRung(r Rung, t0, t1 float64, isRef bool) error {
	bad := func(format string, a ...any) error {
		return fmt.Errorf(format+": %w", append(a, ErrLadder)...)
	}
	if !r.Kind.valid() {
		return bad("unknown kind %q", string(r.Kind))
	}
	isRefKind := r.Kind == KindReference || r.Kind == ""
	if isRef && !isRefKind {
		return bad("reference has kind %v", r.Kind)
	}
	if !isRef && isRefKind {
		return bad("only Ladder.Reference may have kind %s (a rung needs its effect as Kind)", KindReference)
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"RelTol", r.RelTol}, {"AbsTol", r.AbsTol}, {"Step", r.Step}} {
		if !positiveFinite(f.v) {
			return bad("%s = %v must be finite and >= 0", f.name, f.v)
		}
	}
	if r.MaxSteps < 0 {
		return bad("MaxSteps = %d must be >= 0", r.MaxSteps)
	}
	if isRef && r.Fixed != nil && r.Step == 0 {
		return bad("a fixed-step reference needs Step > 0")
	}
	switch r.Kind {
	case KindTolerance:
		if r.RelTol == 0 && (r.Fixed == nil || r.Step == 0) {
			return bad("a tolerance rung needs RelTol > 0 (or, for a fixed-step method, Step > 0)")
		}
	case KindPrecision:
		if r.Rounding.Kind == NoRounding {
			return bad("a precision rung needs a Rounding")
		}
		if err := r.Rounding.Validate(); err != nil {
			return bad("Rounding: %v", err)
		}
	case KindRestart:
		if !(r.RestartAt > t0 && r.RestartAt < t1) {
			return bad("RestartAt = %v is not inside (%v, %v)", r.RestartAt, t0, t1)
		}
		if err := r.Restart.Validate(); err != nil {
			return bad("Restart: %v", err)
		}
	}
	return nil
}

// resolve fills the rung's defaults from the reference ref (already
// resolved) and the reference run's mean step hRef.
func (r Rung) resolve(ref *resolvedRung, hRef float64) resolvedRung {
	out := resolvedRung{Rung: r}
	if ref != nil {
		if out.Method == nil {
			out.Method = ref.Method
		}
		if out.RelTol == 0 {
			out.RelTol = ref.RelTol
		}
		if out.AbsTol == 0 {
			out.AbsTol = ref.AbsTol
		}
	}
	if out.Method == nil {
		out.Method = DormandPrince54
	}
	if out.RelTol == 0 {
		out.RelTol = ReferenceRelTol
	}
	if out.AbsTol == 0 {
		out.AbsTol = out.RelTol
	}
	out.m = out.Method
	if out.Fixed != nil {
		if out.Step == 0 {
			out.Step = hRef / autoStepDivisor
		}
		out.m = out.Fixed(out.Step)
	}
	if out.Kind == KindPrecision {
		out.m = Rounded(out.m, out.Rounding)
	}
	if out.Name == "" && out.m != nil {
		out.Name = out.defaultName()
	}
	if out.Name == "" {
		out.Name = fmt.Sprintf("%v rung", out.Kind)
	}
	return out
}

// defaultName is a short label made from the resolved fields.
func (r resolvedRung) defaultName() string {
	switch r.Kind {
	case KindPrecision:
		return r.Rounding.String()
	case KindRestart:
		return fmt.Sprintf("restart at t=%g, %v", r.RestartAt, r.Restart)
	}
	if r.Fixed != nil {
		return fmt.Sprintf("%s h=%.3g", r.m.Name(), r.Step)
	}
	return fmt.Sprintf("%s rtol %.0e", r.m.Name(), r.RelTol)
}

// autoStepDivisor sets the automatic fixed step: the reference's mean step
// divided by it (see Rung.Step).
const autoStepDivisor = 8

// meanStep is the mean accepted step of a solution, for automatic fixed steps.
func meanStep(s *Solution) float64 {
	if s.Stats.Accepted == 0 {
		return math.Abs(s.End - s.T0)
	}
	return math.Abs(s.End-s.T0) / float64(s.Stats.Accepted)
}
