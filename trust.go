package plumb

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"runtime/debug"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
	"github.com/plumbdyn/plumb/maps"
)

// Stage names the part of an audit that TrustSettings.Progress reports on.
type Stage string

// Stages of an audit.
const (
	// StageAudit: the runs of the ladder (or the orbits of a map).
	StageAudit Stage = "audit"
	// StageExponent: the estimate of the largest Lyapunov exponent.
	StageExponent Stage = "exponent"
	// StageProof: the validated enclosure (TrustSettings.Prove), with
	// thousandths of the span enclosed out of 1000.
	StageProof Stage = "proof"
)

// Caution is the statement every trust report carries.
const Caution = "A trust horizon is a statement about the numerical model and how it was computed, " +
	"not a safety certificate for the real system it describes. " +
	"Safety-critical use follows the field's own codes and licensed review."

// TrustSettings controls System.Trust and TrustProblem. A nil
// *TrustSettings is invalid: the tolerance is the caller's statement of
// what difference matters. Fields marked "flow only" must be zero for a
// map, those marked "map only" nil for a flow.
type TrustSettings struct {
	// Tol is the divergence between runs the caller accepts, in the state's
	// units (or, with Relative, as a fraction of the reference run's
	// spread, the attractor's or orbit's size). Must be finite and > 0;
	// otherwise ErrTolerance.
	Tol float64
	// Relative makes Tol a fraction of the spread.
	Relative bool
	// Ladder is the set of runs compared (flow only); nil means
	// integrate.DefaultLadder over the audited span, or with Run the ladder
	// around it.
	Ladder *integrate.Ladder
	// Run, if not nil, is the caller's own run (flow only: a method and
	// tolerances, or a fixed-step method and its step; see integrate.RunLadder, which
	// validates it): the audit is built around it, and the report's
	// TrustedUntil, verdict and YourRun speak of it. Set Run or Ladder, not
	// both (integrate.ErrSettings).
	Run *integrate.Rung
	// Periods gives, per component, the period of an angle (0 for the
	// others), for wrapped distances (TrustProblem only: System.Trust takes
	// the system's). Nil: none.
	Periods []float64
	// States names the state components, for Distance and the report
	// (TrustProblem only: System.Trust takes the system's); nil means
	// "y[0]", "y[1]", ....
	// Otherwise its length must equal the state's (integrate.ErrDimension).
	States []string
	// Distance chooses the components compared and their scales; the zero
	// value is the Euclidean distance over every component. Errors:
	// *DistanceError, before any work.
	Distance Distance
	// Every is the spacing of the comparison grid (flow only); zero means
	// horizon/1000.
	Every float64
	// Exponent controls the estimate of the largest Lyapunov exponent
	// (lyap.Exponents, for a map lyap.MapExponents, with k = 1); nil means
	// lyap's defaults.
	Exponent *lyap.Settings
	// Lambda, when positive, is used as the largest Lyapunov exponent (per
	// unit time, for a map per iterate) and no estimate is made (Exponent
	// is ignored). Must be finite and >= 0.
	Lambda float64
	// NoReversal skips the reversibility check (a map has none).
	NoReversal bool
	// NoExact compares the runs of a flow with the tightest float64 run
	// instead of the multiprecision Taylor reference System.Trust makes
	// for a system with formulas (a map always has its double-double
	// orbit).
	NoExact bool
	// MapRungs are the orbits a map's audit compares with the
	// double-double orbit (map only); nil means maps.DefaultRungs of the
	// horizon. An empty non-nil list is invalid (integrate.ErrLadder), as
	// is a rung of another kind or a restart outside the horizon.
	MapRungs []maps.Rung
	// MaxSteps bounds the attempted steps of every float64 run of the
	// audit (flow only) (a rung's own Rung.MaxSteps overrides it); zero means
	// integrate.DefaultMaxSteps. Long horizons need more: the reference
	// run of Lorenz takes about 80 steps per time unit. Must be >= 0;
	// otherwise integrate.ErrSettings.
	MaxSteps int
	// Shadow (System.Trust only) also looks for a true orbit near the
	// audited run (a map's float64 orbit; a flow's run, TrustSettings.Run
	// or Dormand–Prince 5(4) at Solve's tolerances) and reports how close
	// and for how long in Report.Shadow.
	Shadow bool
	// Prove (System.Trust only, systems with formulas: every built-in
	// model that has them and every system file) also encloses the
	// audited trajectory in intervals (package enclose: Lohner's method)
	// over the horizon and reports in Report.Proof the width against
	// time, where it stays below Prove (a width in state units, the
	// proven horizon) and where and why it stops. Zero: no proof. Must
	// be positive and finite, and the system must have formulas;
	// otherwise integrate.ErrSettings.
	Prove float64
	// Progress, if not nil, is called as work completes with the stage
	// (StageAudit with runs done and total, StageExponent with 0 and 1,
	// and 1 and 1 when done; the two may come in either order; then,
	// with Prove, StageProof). It must
	// not block for long; the CLI draws its progress bar from it.
	Progress func(stage Stage, done, total int)
}

// TrustProblem audits how far ahead a computed trajectory of a raw problem
// can be believed (System.Trust does it for a system, with a better
// reference): it re-runs the problem over [T0, T0+horizon] on every rung of a
// ladder of numerical choices (tolerances, methods, emulated precisions,
// restarts from rounded states), compares each run with the tightest one,
// estimates the largest Lyapunov exponent, and says up to which time all
// runs agree within the tolerance, which effect limits that time, and
// whether the requested horizon is trusted.
//
// Errors: horizon <= 0 or not finite (ErrHorizon), a nil settings or a
// tolerance <= 0 (ErrTolerance), and the errors of integrate.Audit (a ladder
// without a rung besides the reference: integrate.ErrLadder) before any
// work, with a nil Report. If the reference run or the context fails after
// work began, the partial Report comes with the error. A failing exponent
// estimate does not fail the audit: the report goes without predictions
// and says why in ExponentError.
//
// # Caution
//
// A trust horizon is a numerical statement about a model, not a safety
// certificate for the real system; safety-critical use follows the field's
// own codes and licensed review.
//
// References:
//
//	G. Boffetta, M. Cencini, M. Falcioni, A. Vulpiani, Predictability: a way
//	  to characterize complexity, Phys. Rep. 356 (2002) 367–474 (the
//	  predicted horizon ln(tol/delta0)/lambda_1).
func TrustProblem(ctx context.Context, problem integrate.Problem, horizon float64, settings *TrustSettings) (*Report, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if !(horizon > 0) || math.IsInf(horizon, 0) {
		return nil, fmt.Errorf("plumb: horizon = %v: must be a positive, finite time: %w", horizon, ErrHorizon)
	}
	if settings == nil {
		return nil, fmt.Errorf("plumb: TrustSettings is nil (Tol is required): %w", ErrTolerance)
	}
	s := *settings
	if err := checkTolLambda("TrustSettings", s.Tol, s.Lambda); err != nil {
		return nil, err
	}
	names, err := stateNames("TrustSettings.States", s.States, len(problem.Y0))
	if err != nil {
		return nil, err
	}
	scales, err := s.Distance.PerComponent(names)
	if err != nil {
		return nil, err
	}
	if s.MaxSteps < 0 {
		return nil, fmt.Errorf("plumb: TrustSettings.MaxSteps = %d: must be >= 0: %w", s.MaxSteps, integrate.ErrSettings)
	}
	if s.MapRungs != nil {
		return nil, fmt.Errorf("plumb: TrustSettings.MapRungs: a problem is a flow, audited with Ladder: %w", integrate.ErrSettings)
	}
	t1 := problem.T0 + horizon
	ladder, err := trustLadder(&s, problem.T0, t1)
	if err != nil {
		return nil, err
	}
	rep := &Report{
		T0: problem.T0, Horizon: horizon, Tol: s.Tol, Relative: s.Relative,
		Caution: Caution, Arch: runtime.GOARCH, Version: buildVersion(),
		Distance: newDistanceReport(names, scales, s.Periods),
	}
	as := &integrate.AuditSettings{
		Tol: s.Tol, Relative: s.Relative, Every: s.Every, Periods: s.Periods, Scales: scales, Reverse: !s.NoReversal,
		MaxSteps: s.MaxSteps,
	}
	progress := func(stage Stage, done, total int) {
		if s.Progress != nil {
			s.Progress(stage, done, total)
		}
	}
	as.Progress = func(done, total int) { progress(StageAudit, done, total) }

	// The audit first: it validates its input before any work, so bad input
	// costs nothing. The exponent then sets predictions beside the measured
	// horizons.
	res, err := integrate.Audit(ctx, problem, t1, ladder, as)
	if res == nil {
		return nil, fmt.Errorf("plumb: trust: %w", err)
	}
	if err != nil {
		rep.fill(res)
		rep.Verdict = Incomplete
		return rep, fmt.Errorf("plumb: trust: %w", err)
	}
	lambda := s.Lambda
	if lambda > 0 {
		rep.Exponent = givenExponent(lambda)
	} else {
		progress(StageExponent, 0, 1)
		sp, err := lyap.Exponents(ctx, problem, 1, s.Exponent)
		progress(StageExponent, 1, 1)
		if err != nil && ctx.Err() != nil {
			rep.fill(res)
			rep.Verdict = Incomplete
			return rep, fmt.Errorf("plumb: trust canceled during the exponent estimate: %w", err)
		}
		rep.Exponent, rep.ExponentError, lambda = estimatedExponent(sp, err)
	}
	res.Predict(lambda)
	rep.fill(res)
	return rep, nil
}

// fill copies the audit into the report and draws the conclusions.
func (rep *Report) fill(res *integrate.AuditResult) {
	rep.TolAbs = res.Tol
	rep.Spread = res.Spread
	rep.reach = res.Reach
	rep.Times = res.Times
	rep.Reference = rungReport(res.Reference)
	rep.Reference.Effect = TightestID
	rep.Failed = res.Failed
	rep.Rungs = make([]RungReport, len(res.Rungs))
	ids := make([]*string, len(res.Rungs))
	for i, r := range res.Rungs {
		rep.Rungs[i] = rungReport(r)
		ids[i] = &rep.Rungs[i].ID
	}
	uniqueIDs(ids, TightestID)
	rep.TrustedUntil = res.Trusted
	rep.YourRun = yourRun(res, rep.Rungs)
	if res.Limit >= 0 {
		r := res.Rungs[res.Limit]
		rep.LimitedBy = integrate.RungKind(r.Rung.Kind.String())
		rep.LimitingRung = r.Rung.Name
	}
	if res.Tol > 0 {
		rep.TolUsed = res.MaxDivergence / res.Tol
	}
	rep.conclude()
	if rf := res.Roundoff; rf != nil && finite(rf.Float64Horizon) {
		rep.Float64Horizon, rep.Float64PerBit = rf.Float64Horizon, rf.Slope
	}
	if rv := res.Reversal; rv != nil {
		rr := &ReversalReport{T: rv.T, Reached: rv.Reached}
		if rv.Err == nil && finite(rv.Miss) {
			rr.Returned, rr.Miss = true, rv.Miss
		}
		if rv.Err != nil {
			rr.Error = rv.Err.Error()
		}
		rep.Reversal = rr
	}
}

// checkTolLambda validates the tolerance and the given exponent of the
// settings type named name (TrustSettings).
func checkTolLambda(name string, tol, lambda float64) error {
	if !(tol > 0) || math.IsInf(tol, 0) {
		return fmt.Errorf("plumb: %s.Tol = %v: must be positive and finite: %w", name, tol, ErrTolerance)
	}
	if math.IsNaN(lambda) || math.IsInf(lambda, 0) || lambda < 0 {
		return fmt.Errorf("plumb: %s.Lambda = %v: must be finite and >= 0: %w", name, lambda, integrate.ErrSettings)
	}
	return nil
}

// givenExponent is the report of an exponent lambda > 0 the caller gave.
func givenExponent(lambda float64) *ExponentEstimate {
	return &ExponentEstimate{Value: lambda, LyapunovTime: clean(1 / lambda), Source: "given"}
}

// estimatedExponent reads the estimate (sp, err) of the largest exponent:
// the report of a finite estimate (nil if there is none), why the estimate
// failed ("" if it did not), and the exponent to predict with (the
// estimate if it is positive, else 0).
func estimatedExponent(sp *lyap.Spectrum, err error) (e *ExponentEstimate, why string, lambda float64) {
	switch {
	case err != nil:
		return nil, err.Error(), 0
	case sp == nil || len(sp.Exponents) != 1 || !finite(sp.Exponents[0]):
		return nil, "", 0
	}
	e = &ExponentEstimate{Value: sp.Exponents[0], Source: "estimated"}
	if len(sp.StdErr) == 1 && finite(sp.StdErr[0]) {
		e.StdErr = sp.StdErr[0]
	}
	if e.Value > 0 {
		e.LyapunovTime = clean(1 / e.Value)
		lambda = e.Value
	}
	return e, "", lambda
}

// buildVersion is the module version of the running build ("(devel)" for a
// local build).
func buildVersion() string {
	if bi, ok := debug.ReadBuildInfo(); ok {
		for _, d := range bi.Deps {
			if d.Path == "github.com/plumbdyn/plumb" {
				return d.Version
			}
		}
		if bi.Main.Path == "github.com/plumbdyn/plumb" {
			return bi.Main.Version
		}
	}
	return "(devel)"
}
