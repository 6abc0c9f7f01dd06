package plumb

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"runtime"
	"runtime/debug"
	"strings"
	"text/tabwriter"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
)

// Errors of Trust, usable with errors.Is.
var (
	// ErrHorizon reports a requested horizon that is not a positive, finite
	// time.
	ErrHorizon = errors.New("invalid horizon")
	// ErrTolerance reports a divergence tolerance that is not positive and
	// finite.
	ErrTolerance = errors.New("invalid tolerance")
)

// Caution is the statement every trust report carries.
const Caution = "A trust horizon is a statement about the numerical model and how it was computed, " +
	"not a safety certificate for the real system it describes. " +
	"Safety-critical use follows the field's own codes and licensed review."

// Verdict is the answer for the requested horizon.
type Verdict string

// Verdicts, from best to worst.
const (
	// TrustedWithMargin: every rung agrees with the reference up to the
	// requested horizon, and the largest divergence is at most a tenth of
	// the tolerance.
	TrustedWithMargin Verdict = "trusted_with_margin"
	// Trusted: every rung agrees up to the requested horizon, with less
	// than a decade to spare.
	Trusted Verdict = "trusted"
	// NotTrusted: some rung departs from the reference before the requested
	// horizon; the run is believed only up to Report.TrustedUntil.
	NotTrusted Verdict = "not_trusted"
	// Incomplete: the audit was canceled or its reference run failed; the
	// report holds what was done and answers nothing.
	Incomplete Verdict = "incomplete"
)

// marginFactor: a divergence at most tol/marginFactor over the whole horizon
// earns TrustedWithMargin (a decade, common practice).
const marginFactor = 10

// TrustSettings controls Trust. A nil *TrustSettings is invalid: the
// tolerance is the caller's statement of what difference matters.
type TrustSettings struct {
	// Tol is the divergence between runs the caller accepts, in the state's
	// units (or, with Relative, as a fraction of the reference run's
	// spread, the attractor's or orbit's size). Must be finite and > 0;
	// otherwise ErrTolerance.
	Tol float64
	// Relative makes Tol a fraction of the spread.
	Relative bool
	// Ladder is the set of runs compared; nil means
	// integrate.DefaultLadder over the audited span, or with Run the ladder
	// around it.
	Ladder *integrate.Ladder
	// Run, if not nil, is the caller's own run (method and tolerances, or a
	// fixed-step method and its step; see integrate.RunLadder, which
	// validates it): the audit is built around it, and the report's
	// TrustedUntil, verdict and YourRun speak of it. Set Run or Ladder, not
	// both (integrate.ErrSettings).
	Run *integrate.Rung
	// Periods gives, per component, the period of an angle (0 for the
	// others), for wrapped distances; see System.Periods. Nil: none.
	Periods []float64
	// States names the state components, for Distance and the report; nil
	// means "y[0]", "y[1]", ... (TrustSystem takes the system's names).
	// Otherwise its length must equal the state's (integrate.ErrDimension).
	States []string
	// Distance chooses the components compared and their scales; the zero
	// value is the Euclidean distance over every component. Errors:
	// *DistanceError, before any work.
	Distance Distance
	// Every is the spacing of the comparison grid; zero means horizon/1000.
	Every float64
	// Exponent controls the estimate of the largest Lyapunov exponent
	// (lyap.Exponents with k = 1); nil means lyap's defaults.
	Exponent *lyap.Settings
	// Lambda, when positive, is used as the largest Lyapunov exponent and
	// no estimate is made (Exponent is ignored).
	Lambda float64
	// NoReversal skips the reversibility check.
	NoReversal bool
	// MaxSteps bounds the attempted steps of every float64 run of the
	// audit (a rung's own Rung.MaxSteps overrides it); zero means
	// integrate.DefaultMaxSteps. Long horizons need more: the reference
	// run of Lorenz takes about 80 steps per time unit. Must be >= 0;
	// otherwise integrate.ErrSettings.
	MaxSteps int
	// Progress, if not nil, is called as work completes with the stage
	// ("audit" with runs done and total, then "exponent" with 0 and 1, and 1
	// and 1 when done). It must not block for long; the CLI draws its
	// progress bar from it.
	Progress func(stage string, done, total int)
}

// Report is the outcome of Trust. Its JSON form (snake_case fields) is the
// document `plumb trust --format json` writes; times are in the problem's
// time units, distances in the audit's distance (see Distance: the state's
// units unless scaled).
type Report struct {
	// T0 is the start and Horizon the requested span: the audit covers
	// [T0, T0+Horizon].
	T0      float64 `json:"t0"`
	Horizon float64 `json:"horizon"`
	// Tol is the tolerance as given, Relative whether it is a fraction of
	// Spread, TolAbs the absolute tolerance used.
	Tol      float64 `json:"tol"`
	Relative bool    `json:"relative"`
	TolAbs   float64 `json:"tol_abs"`
	// Spread is the reference run's root-mean-square distance from its
	// mean: the size of the attractor or orbit.
	Spread float64 `json:"spread"`
	// Distance is the distance every comparison used (tolerances, spread,
	// divergences, delta0, the reversibility miss).
	Distance DistanceReport `json:"distance"`

	// TrustedUntil is the time up to which every rung agrees with the
	// reference within TolAbs (T0+Horizon if all do). It answers nothing
	// when Verdict is Incomplete; plumb trust then writes it as null.
	TrustedUntil float64 `json:"trusted_until"`
	// LimitedBy is the effect of the rung that departs first: "tolerance",
	// "method", "precision" or "restart"; empty when none departs.
	LimitedBy string `json:"limited_by,omitempty"`
	// LimitingRung names that rung.
	LimitingRung string `json:"limiting_rung,omitempty"`
	// PredictedHorizon is the earliest horizon predicted from the largest
	// Lyapunov exponent, ln(tol/delta0)/lambda_1 after each rung's start; 0
	// when there is no prediction (no exponential growth, or no exponent).
	PredictedHorizon float64 `json:"predicted_horizon,omitempty"`
	// Verdict answers for T0+Horizon.
	Verdict Verdict `json:"verdict"`
	// TolUsed is the largest divergence of any rung up to TrustedUntil, as
	// a fraction of TolAbs.
	TolUsed float64 `json:"tol_used"`
	// Growth is how divergence grows across the rungs: "exponential",
	// "polynomial", "bounded" or "undetermined" (a vote of the rungs' fits,
	// see integrate.Growth).
	Growth string `json:"growth"`
	// Float64Horizon is the agreement horizon of float64 storage itself,
	// extrapolated from the precision rungs (0 when fewer than two of them
	// departed); Float64PerBit the fitted time units per bit.
	Float64Horizon float64 `json:"float64_horizon,omitempty"`
	Float64PerBit  float64 `json:"float64_per_bit,omitempty"`

	// Exponent is the largest Lyapunov exponent used, nil if none.
	Exponent *ExponentEstimate `json:"exponent,omitempty"`
	// ExponentError says why the estimate failed, if it did.
	ExponentError string `json:"exponent_error,omitempty"`

	// Reference is the tightest float64 run (ID TightestID, effect
	// "tightest"): with Exact nil the run every rung is compared with,
	// otherwise one more run compared with Exact, with its own curve and
	// horizon. Rungs are the others, with their curves on Times.
	Reference RungReport   `json:"tightest"`
	Rungs     []RungReport `json:"rungs"`
	Times     []float64    `json:"times"`
	// Failed counts the rungs whose run failed (see RungReport.Error).
	Failed int `json:"failed"`
	// YourRun is the audit of the caller's own run (TrustSettings.Run),
	// nil without one; TrustedUntil and Verdict then speak of that run.
	YourRun *YourRunReport `json:"your_run,omitempty"`
	// Exact is the multiprecision reference every rung was compared with
	// (TrustSystem), nil when they were compared with Reference.
	Exact *ExactReference `json:"exact_reference,omitempty"`
	// Reversal is the reversibility check, nil if skipped.
	Reversal *ReversalReport `json:"reversal,omitempty"`

	// Caution is the standing caution (see the Caution constant).
	Caution string `json:"caution"`
	// TimeUnit is the unit of t as a system file gives it ("" when none
	// is known); TrustSystem sets it, and Write shows it beside times.
	TimeUnit string `json:"time_unit,omitempty"`
	// Arch and Version record the architecture and the plumb build.
	Arch    string `json:"arch"`
	Version string `json:"plumb_version"`
}

// ExponentEstimate is the largest Lyapunov exponent with its standard error.
type ExponentEstimate struct {
	Value  float64 `json:"value"`
	StdErr float64 `json:"std_err"`
	// LyapunovTime is 1/Value (0 unless Value > 0).
	LyapunovTime float64 `json:"lyapunov_time,omitempty"`
	// Source is "estimated" (lyap.Exponents) or "given" (TrustSettings.Lambda).
	Source string `json:"source"`
}

// RungReport is one run of the ladder as reported.
type RungReport struct {
	// Name is the rung as people read it ("RK4 h=0.00166"); ID a stable
	// machine name, unique in the report and the same from run to run
	// ("method_rk4"; see TightestID), which the CSV output uses as its
	// column name.
	Name   string  `json:"name"`
	ID     string  `json:"id"`
	Effect string  `json:"effect"`
	Method string  `json:"method"`
	RelTol float64 `json:"rel_tol,omitempty"`
	AbsTol float64 `json:"abs_tol,omitempty"`
	// Step is the step size of a fixed-step method.
	Step float64 `json:"step,omitempty"`
	// Rounding is the emulated storage or the restart's rounding.
	Rounding  string  `json:"rounding,omitempty"`
	RestartAt float64 `json:"restart_at,omitempty"`
	// AgreesUntil is the agreement horizon; Departed whether the divergence
	// exceeded the tolerance (false: it agrees up to AgreesUntil, the end or
	// where a failed run stopped).
	AgreesUntil float64 `json:"agrees_until"`
	Departed    bool    `json:"departed"`
	// Delta0 is the a-priori size of the perturbation and Predicted the
	// horizon ln(tol/Delta0)/lambda_1 after the start (0: none).
	Delta0    float64 `json:"delta0,omitempty"`
	Predicted float64 `json:"predicted,omitempty"`
	// Growth is the law that fits the divergence best ("exponential",
	// "power law", "bounded", "unknown"), with both fits.
	Growth   string  `json:"growth"`
	Rate     float64 `json:"rate"`
	RateErr  float64 `json:"rate_err"`
	Power    float64 `json:"power"`
	PowerErr float64 `json:"power_err"`
	// Start is the index in Report.Times of Divergence[0].
	Start      int       `json:"start"`
	Divergence []float64 `json:"divergence"`
	// Evaluations and Steps are the run's work; Rejected counts the steps
	// its error control rejected (a kink of the field costs some: the
	// step that straddles it fails the error test and is retried shorter).
	Evaluations int `json:"evaluations"`
	Steps       int `json:"steps"`
	Rejected    int `json:"rejected_steps"`
	// Error is why the run failed, empty if it did not.
	Error string `json:"error,omitempty"`
}

// ReversalReport is the reversibility check: the reference state at T
// integrated back to T0.
type ReversalReport struct {
	T float64 `json:"t"`
	// Returned reports that the backward run reached T0; Miss is then the
	// distance from the start.
	Returned bool    `json:"returned"`
	Miss     float64 `json:"miss,omitempty"`
	// Reached is where the backward run ended.
	Reached float64 `json:"reached"`
	Error   string  `json:"error,omitempty"`
}

// Trust audits how far ahead a computed trajectory of problem can be
// believed: it re-runs the problem over [T0, T0+horizon] on every rung of a
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
func Trust(ctx context.Context, problem integrate.Problem, horizon float64, settings *TrustSettings) (*Report, error) {
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
	progress := func(stage string, done, total int) {
		if s.Progress != nil {
			s.Progress(stage, done, total)
		}
	}
	as.Progress = func(done, total int) { progress("audit", done, total) }

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
		progress("exponent", 0, 1)
		sp, err := lyap.Exponents(ctx, problem, 1, s.Exponent)
		progress("exponent", 1, 1)
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
		rep.LimitedBy = r.Rung.Kind.String()
		rep.LimitingRung = r.Rung.Name
	}
	if res.Tol > 0 {
		rep.TolUsed = res.MaxDivergence / res.Tol
	}
	end := rep.T0 + rep.Horizon
	rep.Verdict = verdictOf(len(res.Rungs), res.Failed, res.Trusted < end, rep.TolUsed)
	var vote growthVote
	for _, r := range rep.Rungs {
		vote.add(r.Growth)
	}
	rep.Growth = vote.law()
	if rep.Growth == "exponential" {
		for _, r := range res.Rungs {
			if r.Predicted > 0 && (rep.PredictedHorizon == 0 || r.Predicted < rep.PredictedHorizon) {
				rep.PredictedHorizon = r.Predicted
			}
		}
	} else {
		// Without exponential growth a Lyapunov prediction means nothing.
		for i := range rep.Rungs {
			rep.Rungs[i].Predicted = 0
		}
	}
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
// settings type named name (TrustSettings, MapTrustSettings).
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

// verdictOf is the verdict of an audit of rungs runs, failed of which
// failed: NotTrusted when none ran through or the agreement falls short of
// the horizon, else TrustedWithMargin or Trusted by the fraction tolUsed of
// the tolerance the divergence used.
func verdictOf(rungs, failed int, short bool, tolUsed float64) Verdict {
	switch {
	case rungs == 0 || failed == rungs || short:
		return NotTrusted
	case tolUsed <= 1.0/marginFactor:
		return TrustedWithMargin
	}
	return Trusted
}

// words is the verdict as the summaries write it.
func (v Verdict) words() string {
	switch v {
	case TrustedWithMargin:
		return "trusted with margin"
	case Trusted:
		return "trusted"
	case NotTrusted:
		return "not trusted"
	case Incomplete:
		return "incomplete (the audit did not finish)"
	}
	return ""
}

// growthVote counts the rungs' growth laws (RungReport.Growth). Its law is
// the one most rungs follow: "exponential", "polynomial", "bounded", or
// "undetermined" when no rung could be fitted. Ties between exponential
// and the others go to exponential (the cautious reading).
type growthVote struct{ exp, pow, bnd int }

func (v *growthVote) add(law string) {
	switch law {
	case integrate.GrowthExponential.String():
		v.exp++
	case integrate.GrowthPower.String():
		v.pow++
	case integrate.GrowthBounded.String():
		v.bnd++
	}
}

func (v growthVote) law() string {
	switch {
	case v.exp+v.pow+v.bnd == 0:
		return "undetermined"
	case v.exp >= v.pow && v.exp >= v.bnd:
		return "exponential"
	case v.pow >= v.bnd:
		return "polynomial"
	}
	return "bounded"
}

func rungReport(r integrate.RungResult) RungReport {
	g := r.Growth
	out := RungReport{
		Name: r.Rung.Name, Effect: r.Rung.Kind.String(), Method: r.Method,
		ID:          rungID(r.Rung.Kind, rungMethodName(r.Rung), r.Rung.RelTol, r.Rung.Rounding),
		AgreesUntil: r.Horizon, Departed: r.Departed,
		Delta0: clean(r.Delta0), Predicted: clean(r.Predicted),
		Growth: g.Kind.String(), Rate: clean(g.Rate), RateErr: clean(g.RateErr), Power: clean(g.Power), PowerErr: clean(g.PowerErr),
		Start: r.Start, Divergence: make([]float64, len(r.Divergence)),
		Evaluations: r.Stats.Evaluations, Steps: r.Stats.Accepted, Rejected: r.Stats.Rejected,
	}
	if r.Rung.Fixed != nil {
		out.Step = r.Rung.Step
	} else {
		out.RelTol, out.AbsTol = r.Rung.RelTol, r.Rung.AbsTol
	}
	switch r.Rung.Kind {
	case integrate.KindPrecision:
		out.Rounding = r.Rung.Rounding.String()
	case integrate.KindRestart:
		out.Rounding = r.Rung.Restart.String()
		out.RestartAt = r.Rung.RestartAt
	}
	for i, d := range r.Divergence {
		out.Divergence[i] = clean(d)
	}
	if r.Err != nil {
		out.Error = r.Err.Error()
	}
	return out
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// clean maps values JSON cannot hold: NaN to 0, ±Inf to ±MaxFloat64.
func clean(x float64) float64 {
	switch {
	case math.IsNaN(x):
		return 0
	case math.IsInf(x, 1):
		return math.MaxFloat64
	case math.IsInf(x, -1):
		return -math.MaxFloat64
	}
	return x
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

// Write writes the short human summary: a table of the rungs with their
// agreement horizons and predictions, the exponent, the trusted horizon and
// what limits it, the verdict and the caution.
func (rep *Report) Write(w io.Writer) error {
	var b strings.Builder
	u := "" // the time unit after a time, " s"
	if rep.TimeUnit != "" {
		u = " " + rep.TimeUnit
	}
	fmt.Fprintf(&b, "audit of t = %.4g .. %.4g%s at tolerance %s\n", rep.T0, rep.T0+rep.Horizon, u, tolPhrase(rep.Tol, rep.TolAbs, rep.Relative))
	fmt.Fprintf(&b, "distance: %s\n", rep.Distance)
	rows := rep.Rungs
	if ex := rep.Exact; ex != nil && ex.SetAside != "" {
		fmt.Fprintf(&b, "reference: %s (the multiprecision reference was set aside: %s)\n\n", rep.Reference.Name, ex.SetAside)
	} else if ex != nil {
		kinks := ""
		if ex.KinkRestarts > 0 {
			kinks = fmt.Sprintf(", restarted at %d kinks", ex.KinkRestarts)
		}
		if ex.Continued != "" {
			fmt.Fprintf(&b, "reference: %s in %s, %d digits (order %d) to t = %.4g, where every run from the start had departed from it, then in %s at %d digits, from which later restarts start (%d steps in all%s); every float64 run is compared with it\n\n",
				ex.Method, ex.Arithmetic, ex.Digits, ex.Order, ex.AccurateUntil, ex.Continued, ex.ContinuedDigits, ex.Steps, kinks)
		} else {
			fmt.Fprintf(&b, "reference: %s in %s, %d digits (order %d, %d steps%s); every float64 run is compared with it\n\n",
				ex.Method, ex.Arithmetic, ex.Digits, ex.Order, ex.Steps, kinks)
		}
		rows = append([]RungReport{rep.Reference}, rep.Rungs...)
	} else {
		fmt.Fprintf(&b, "reference: the tightest float64 run, %s\n\n", rep.Reference.Name)
	}
	table := make([]rungRow, len(rows))
	for i, r := range rows {
		table[i] = rungRow{
			name: r.Name, effect: r.Effect, until: fmt.Sprintf("%.4g", r.AgreesUntil),
			departed: r.Departed, failed: r.Error != "", predicted: r.Predicted,
			growth: growthCell(r.Growth, r.Rate, r.Power, "", "t"),
		}
	}
	if err := writeRungTable(&b, table); err != nil {
		return err
	}
	b.WriteByte('\n')
	switch {
	case rep.Exponent != nil && rep.Exponent.Source == "given":
		fmt.Fprintf(&b, "largest Lyapunov exponent (given): %.4g\n", rep.Exponent.Value)
	case rep.Exponent != nil:
		fmt.Fprintf(&b, "largest Lyapunov exponent: %.4g ± %.2g", rep.Exponent.Value, rep.Exponent.StdErr)
		switch {
		case rep.Growth == "undetermined":
			// Too few comparison points to fit any law: nothing is said
			// either way about chaos.
		case rep.Growth != "exponential":
			// A small positive finite-time estimate of a regular flow
			// (it decays like ln(T)/T) is no sign of chaos.
			b.WriteString(" (the ladder sees no exponential growth)")
		case rep.Exponent.LyapunovTime > 0:
			fmt.Fprintf(&b, " (Lyapunov time %.3g%s)", rep.Exponent.LyapunovTime, u)
		}
		b.WriteByte('\n')
	case rep.ExponentError != "":
		fmt.Fprintf(&b, "largest Lyapunov exponent: not estimated (%s)\n", rep.ExponentError)
	}
	switch rep.Growth {
	case "exponential":
		b.WriteString("divergence grows exponentially (the runs are chaotic)\n")
	case "polynomial":
		b.WriteString("divergence grows polynomially (a power law fits better than an exponential)\n")
	case "bounded":
		b.WriteString("divergence stays bounded\n")
	default:
		if len(rep.Times) > 1 {
			// On a long horizon the grid (horizon/1000) can be coarser
			// than the growth: the runs part between a few points.
			fmt.Fprintf(&b, "divergence growth undetermined (too few comparison points before the runs part: the grid is every %.3g%s; a shorter --horizon resolves it)\n", rep.Times[1]-rep.Times[0], u)
		} else {
			b.WriteString("divergence growth undetermined (too few points)\n")
		}
	}
	if rep.PredictedHorizon > 0 {
		fmt.Fprintf(&b, "predicted horizon ln(tol/delta0)/lambda%s: %.4g%s\n", rep.Distance.deltaNote(), rep.PredictedHorizon, u)
	}
	if rep.Float64Horizon > 0 {
		fmt.Fprintf(&b, "float64 storage itself (extrapolated from the precision rungs): agrees until about %.4g\n", rep.Float64Horizon)
	}
	if rv := rep.Reversal; rv != nil {
		if rv.Returned {
			fmt.Fprintf(&b, "reversibility: integrated to t = %.4g and back, the start is missed by %.3g\n", rv.T, rv.Miss)
		} else {
			fmt.Fprintf(&b, "reversibility: integrated to t = %.4g and back, the backward run stopped at t = %.4g (expected for a dissipative flow, which expands volumes backwards; no round-off estimate from it)\n", rv.T, rv.Reached)
		}
	}
	if rep.Failed > 0 {
		fmt.Fprintf(&b, "%d rung(s) failed; their curves end where they stopped\n", rep.Failed)
	}
	rep.writeYourRun(&b)
	switch {
	case rep.Verdict == Incomplete:
		b.WriteString("the audit did not finish: the table holds the rungs completed, and no trusted horizon is read off them\n")
	case rep.YourRun != nil:
	case rep.LimitedBy != "":
		fmt.Fprintf(&b, "trusted until t = %.4g%s, limited by %s (%s)\n", rep.TrustedUntil, u, rep.LimitedBy, rep.LimitingRung)
	default:
		fmt.Fprintf(&b, "trusted until t = %.4g%s: every rung agrees over the whole horizon\n", rep.TrustedUntil, u)
	}
	verdict := rep.Verdict.words()
	switch rep.Verdict {
	case NotTrusted:
		if rep.YourRun != nil {
			fmt.Fprintf(&b, "verdict for your run to t = %.4g%s: %s (it parts from the reference by more than the tolerance at t = %.4g%s)\n", rep.T0+rep.Horizon, u, verdict, rep.TrustedUntil, u)
			break
		}
		fmt.Fprintf(&b, "verdict for t = %.4g%s: %s (the runs part by more than the tolerance at t = %.4g%s)\n", rep.T0+rep.Horizon, u, verdict, rep.TrustedUntil, u)
	case Incomplete:
		fmt.Fprintf(&b, "verdict for t = %.4g%s: %s\n", rep.T0+rep.Horizon, u, verdict)
	default:
		fmt.Fprintf(&b, "verdict for t = %.4g%s: %s (largest divergence %.2g of the tolerance)\n", rep.T0+rep.Horizon, u, verdict, rep.TolUsed)
	}
	fmt.Fprintf(&b, "caution: %s\n", rep.Caution)
	_, err := io.WriteString(w, b.String())
	return err
}

// tolPhrase is the tolerance as the summaries write it: tol, or the
// fraction tol of the spread with the absolute tolerance tolAbs.
func tolPhrase(tol, tolAbs float64, relative bool) string {
	if relative {
		return fmt.Sprintf("%.3g of the spread (%.3g)", tol, tolAbs)
	}
	return fmt.Sprintf("%.3g", tol)
}

// rungRow is one row of a summary's table of rungs; until is the
// formatted agreement horizon.
type rungRow struct {
	name, effect, until string
	departed, failed    bool
	predicted           float64
	growth              string
}

// writeRungTable writes the table of rungs: "> " marks an agreement over
// the whole run, " (failed)" a run that stopped, "-" no prediction.
func writeRungTable(b *strings.Builder, rows []rungRow) error {
	tw := tabwriter.NewWriter(b, 0, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "rung\teffect\tagrees until\tpredicted\tgrowth\t")
	for _, r := range rows {
		until := r.until
		if !r.departed {
			until = "> " + until
		}
		if r.failed {
			until += " (failed)"
		}
		pred := "-"
		if r.predicted > 0 {
			pred = fmt.Sprintf("%.4g", r.predicted)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t\n", r.name, r.effect, until, pred, r.growth)
	}
	return tw.Flush()
}

// growthCell is a rung's growth law as its table cell: with the rate (in
// units of per, e.g. " per iterate") or with the power of the variable v.
func growthCell(law string, rate, power float64, per, v string) string {
	switch law {
	case integrate.GrowthExponential.String():
		return fmt.Sprintf("exponential, rate %.3g%s", rate, per)
	case integrate.GrowthPower.String():
		return fmt.Sprintf("power law, %s^%.2g", v, power)
	}
	return law
}
