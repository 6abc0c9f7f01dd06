package integrate

import (
	"fmt"
	"math"
)

// Limits of RunLadder's tolerances.
const (
	// MinRunRelTol is the tightest RelTol RunLadder audits: its tighter rung
	// runs at a hundredth of it, and Settings refuses a RelTol below 1e-15.
	MinRunRelTol = 1e-13
	// maxLooserRelTol is the loosest tolerance RunLadder's looser rung
	// takes: looser than a percent no run is meant to be read (common
	// practice); above it the rung is left out.
	maxLooserRelTol = 1e-2
	// runLadderFactor is the factor between the run's tolerances and those
	// of its tighter and looser rungs.
	runLadderFactor = 100
)

// RunLadder returns the ladder that audits the caller's own run on [t0, t1]:
// run says how the caller integrates (Method, RelTol and AbsTol for an
// error-controlled method, or Fixed and Step for a fixed-step one; Name
// optional; its Kind is set to KindRun), and the rungs around it say what
// changing it would buy:
//
//	run        the caller's run (zero RelTol and AbsTol mean Solve's
//	           defaults, DefaultRelTol and DefaultAbsTol; a nil Method
//	           DormandPrince54, as in Solve)
//	tolerance  the run at 100 times tighter RelTol and AbsTol, and at 100
//	           times looser (left out above RelTol 1e-2); for a fixed-step
//	           run, half and twice the step
//	method     another method of similar accuracy at the same tolerances:
//	           DormandPrince853 for DormandPrince54 and BogackiShampine32,
//	           DormandPrince54 for the others; for a fixed-step run, the
//	           two-stage Gauss–Legendre method (order 4) at the same step for
//	           RK4, RK4 at the same step for the others
//	precision  the run with its state stored at 40 and at 24 bits
//	restart    the run restarted at t0 + RestartFraction·(t1 - t0) from the reference's
//	           state rounded to 3 decimal places
//
// The reference is DormandPrince853 at RelTol = AbsTol = min(1e-12,
// RelTol/10^4), at least 1e-14 (DefaultLadder's for a fixed-step run).
// Audit then reports the run's own agreement horizon as
// AuditResult.Trusted.
//
// Errors (wrapping ErrLadder): a run of another kind than KindReference
// (zero) or KindRun, a fixed-step run without Step > 0, a RelTol below
// MinRunRelTol or not below 1, an AbsTol or Step that is not finite and
// >= 0, t1 not after t0.
func RunLadder(t0, t1 float64, run Rung) (Ladder, error) {
	bad := func(format string, a ...any) (Ladder, error) {
		return Ladder{}, fmt.Errorf("integrate: RunLadder: "+format+": %w", append(a, ErrLadder)...)
	}
	if !(t1 > t0) || math.IsInf(t1-t0, 0) {
		return bad("span [%v, %v] is not a finite forward span", t0, t1)
	}
	if run.Kind != "" && run.Kind != KindReference && run.Kind != KindRun {
		return bad("the run has kind %v; it is the caller's run (kind run)", run.Kind)
	}
	run.Kind = KindRun
	for _, f := range []struct {
		name string
		v    float64
	}{{"RelTol", run.RelTol}, {"AbsTol", run.AbsTol}, {"Step", run.Step}} {
		if !positiveFinite(f.v) {
			return bad("%s = %v must be finite and >= 0", f.name, f.v)
		}
	}
	ref := Rung{Kind: KindReference, Method: DormandPrince853, RelTol: ReferenceRelTol, AbsTol: ReferenceAbsTol}
	l := Ladder{Reference: ref}
	at := t0 + float64(RestartFraction*(t1-t0))
	var tighter, looser, other Rung
	hasLooser := true
	if run.Fixed != nil {
		if !(run.Step > 0) {
			return bad("a fixed-step run needs Step > 0")
		}
		if run.Fixed(run.Step) == nil {
			return bad("Fixed(%g) returned a nil method", run.Step)
		}
		tighter, looser = run, run
		tighter.Step, looser.Step = run.Step/2, run.Step*2
		other = run
		if run.Fixed(run.Step).Name() == RK4(run.Step).Name() {
			other.Fixed = func(h float64) Method { return GaussLegendre(2, h) }
		} else {
			other.Fixed = RK4
		}
	} else {
		if run.Method == nil {
			run.Method = DormandPrince54
		}
		if run.RelTol == 0 {
			run.RelTol = DefaultRelTol
		}
		if run.AbsTol == 0 {
			run.AbsTol = DefaultAbsTol
		}
		if run.RelTol < MinRunRelTol || run.RelTol >= 1 {
			return bad("RelTol = %g must lie in [%g, 1)", run.RelTol, MinRunRelTol)
		}
		tighter, looser = run, run
		tighter.RelTol, tighter.AbsTol = run.RelTol/runLadderFactor, run.AbsTol/runLadderFactor
		looser.RelTol, looser.AbsTol = run.RelTol*runLadderFactor, run.AbsTol*runLadderFactor
		hasLooser = looser.RelTol <= maxLooserRelTol
		other = run
		switch run.Method {
		case DormandPrince54, BogackiShampine32:
			other.Method = DormandPrince853
		default:
			other.Method = DormandPrince54
		}
		rt := math.Max(1e-14, math.Min(ReferenceRelTol, run.RelTol/1e4))
		l.Reference.RelTol, l.Reference.AbsTol = rt, rt
	}
	if run.Name == "" {
		run.Name = "your run, " + run.resolve(nil, 0).defaultName()
	}
	for _, r := range []*Rung{&tighter, &looser, &other} {
		r.Name = ""
	}
	tighter.Kind, looser.Kind, other.Kind = KindTolerance, KindTolerance, KindMethod
	l.Rungs = append(l.Rungs, run, tighter)
	if hasLooser {
		l.Rungs = append(l.Rungs, looser)
	}
	l.Rungs = append(l.Rungs, other)
	for _, b := range []int{40, 24} {
		p := run
		p.Name, p.Kind, p.Rounding = "", KindPrecision, Bits(b)
		l.Rungs = append(l.Rungs, p)
	}
	rs := run
	rs.Name, rs.Kind, rs.RestartAt, rs.Restart = "", KindRestart, at, Places(3)
	l.Rungs = append(l.Rungs, rs)
	return l, nil
}
