package plumb

import (
	"math"

	"github.com/plumbdyn/plumb/integrate"
)

// Report is the outcome of an audit, of a flow or of a map. Its JSON form
// (snake_case fields) is the document `plumb trust --format json` writes;
// distances are in the audit's distance (see Distance: the state's units
// unless scaled). Times are in the problem's time unit (TimeUnit); for a
// map they are iterates: TimeUnit is "iterate", Steps the number of
// iterations, T0 is 0 and every time (Horizon, TrustedUntil, Times,
// AgreesUntil, Predicted, RestartAt) a count of iterates. Fields marked
// "map only" or "flow only" are zero (and absent from the JSON) for the
// other kind.
//
// Values JSON cannot hold follow one rule throughout: NaN becomes 0 and
// ±Inf becomes ±math.MaxFloat64.
type Report struct {
	// T0 is the start and Horizon the requested span: the audit covers
	// [T0, T0+Horizon].
	T0      float64 `json:"t0"`
	Horizon float64 `json:"horizon"`
	// Steps is the number of iterations of a map audit (map only; it
	// equals Horizon).
	Steps int `json:"steps,omitempty"`
	// Tol is the tolerance as given, Relative whether it is a fraction of
	// Spread, TolAbs the absolute tolerance used.
	Tol      float64 `json:"tol"`
	Relative bool    `json:"relative"`
	TolAbs   float64 `json:"tol_abs"`
	// Spread is the reference run's root-mean-square distance from its
	// mean: the size of the attractor or orbit.
	Spread float64 `json:"spread"`
	// Magnitude is the reference orbit's root-mean-square norm, the scale
	// of a rounding (map only).
	Magnitude float64 `json:"magnitude,omitempty"`
	// Distance is the distance every comparison used (tolerances, spread,
	// divergences, delta0, the reversibility miss).
	Distance DistanceReport `json:"distance"`

	// TrustedUntil is the time up to which every rung agrees with the
	// reference within TolAbs (T0+Horizon if all do). It answers nothing
	// when Verdict is Incomplete; plumb trust then writes it as null.
	TrustedUntil float64 `json:"trusted_until"`
	// LimitedBy is the effect of the rung that departs first: "tolerance",
	// "method", "precision" or "restart" (a map: "precision" or
	// "restart"); empty when none departs.
	LimitedBy integrate.RungKind `json:"limited_by,omitempty"`
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
	// Growth is how divergence grows across the rungs, the law most
	// rungs' fits follow (ties go to exponential, the cautious reading;
	// undetermined when no rung could be fitted; see integrate.Growth).
	Growth integrate.GrowthKind `json:"growth"`
	// Float64Horizon is the agreement horizon of float64 storage itself,
	// extrapolated from the precision rungs (0 when fewer than two of them
	// departed); Float64PerBit the fitted time units per bit (flow only).
	Float64Horizon float64 `json:"float64_horizon,omitempty"`
	Float64PerBit  float64 `json:"float64_per_bit,omitempty"`

	// Exponent is the largest Lyapunov exponent used, nil if none.
	Exponent *ExponentEstimate `json:"exponent,omitempty"`
	// ExponentError says why the estimate failed, if it did.
	ExponentError string `json:"exponent_error,omitempty"`

	// Reference is the tightest float64 run of a flow (ID TightestID,
	// effect "tightest"): with Exact nil the run every rung is compared
	// with, otherwise one more run compared with Exact, with its own curve
	// and horizon (flow only: a map's float64 orbit is a rung). Rungs are
	// the others, with their curves on Times.
	Reference RungReport   `json:"tightest,omitzero"`
	Rungs     []RungReport `json:"rungs"`
	Times     []float64    `json:"times"`
	// Stride is, for a map, the number of iterates each point of the
	// curves covers (the largest distance over them; Times are then every
	// Stride-th iterate): 1 up to maps.CurvePoints iterates, then the
	// smallest power of two that keeps the curves within that many points
	// (map only).
	Stride int `json:"stride,omitempty"`
	// Failed counts the rungs whose run failed (see RungReport.Error).
	Failed int `json:"failed"`
	// YourRun is the audit of the caller's own run (TrustSettings.Run),
	// nil without one; TrustedUntil and Verdict then speak of that run.
	YourRun *YourRunReport `json:"your_run,omitempty"`
	// Exact is the multiprecision reference every rung was compared with
	// (a flow's Taylor run, a map's double-double orbit), nil when they
	// were compared with Reference.
	Exact *ExactReference `json:"exact_reference,omitempty"`
	// Reversal is the reversibility check, nil if skipped.
	Reversal *ReversalReport `json:"reversal,omitempty"`
	// Shadow is the shadow of the audited run (TrustSettings.Shadow), nil
	// when not asked for.
	Shadow *ShadowReport `json:"shadow,omitempty"`
	// Proof is the validated enclosure of the audited trajectory
	// (TrustSettings.Prove), nil when not asked for.
	Proof *ProofReport `json:"proof,omitempty"`
	// reach is the reference run's largest distance from its mean
	// (integrate.AuditResult.Reach).
	reach float64
	// Recorded describes an audit of runs computed by another program
	// (TrustRuns): the compared span and grid, each run's source, and how
	// the exponent was estimated from the runs; nil otherwise.
	Recorded *RecordedReport `json:"recorded,omitempty"`

	// Caution is the standing caution (see the Caution constant).
	Caution string `json:"caution"`
	// TimeUnit is the unit of t as a system file gives it ("" when none
	// is known), "iterate" for a map; Write shows it beside times.
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
	// Source is "estimated" (lyap.Exponents, lyap.MapExponents) or
	// "given" (TrustSettings.Lambda).
	Source string `json:"source"`
}

// RungReport is one run of the ladder as reported.
type RungReport struct {
	// Name is the rung as people read it ("RK4 h=0.00166"); ID a stable
	// machine name, unique in the report and the same from run to run
	// ("method_rk4"; see TightestID), which the CSV output uses as its
	// column name.
	Name   string             `json:"name"`
	ID     string             `json:"id"`
	Effect integrate.RungKind `json:"effect"`
	// Method is the method of a flow's run (empty for a map).
	Method string  `json:"method,omitempty"`
	RelTol float64 `json:"rtol,omitempty"`
	AbsTol float64 `json:"atol,omitempty"`
	// Step is the step size of a fixed-step method.
	Step float64 `json:"step,omitempty"`
	// Rounding is the emulated storage or the restart's rounding.
	Rounding  string  `json:"rounding,omitempty"`
	RestartAt float64 `json:"restart_at,omitempty"`
	// AgreesUntil is the agreement horizon; Departed whether the divergence
	// exceeded the tolerance (false: it agrees up to AgreesUntil, the end or
	// where a failed run stopped). For a map AgreesUntil is the last
	// iterate within the tolerance and DepartsAt the first beyond it
	// (map only; 0 when the rung did not depart).
	AgreesUntil float64 `json:"agrees_until"`
	Departed    bool    `json:"departed"`
	DepartsAt   int     `json:"departs_at,omitempty"`
	// Delta0 is the a-priori size of the perturbation and Predicted the
	// horizon ln(tol/Delta0)/lambda_1 after the start (0: none).
	Delta0    float64 `json:"delta0,omitempty"`
	Predicted float64 `json:"predicted,omitempty"`
	// Growth is the law that fits the divergence best, with both fits
	// (Rate per unit time, per iterate for a map).
	Growth   integrate.GrowthKind `json:"growth"`
	Rate     float64              `json:"rate"`
	RateErr  float64              `json:"rate_err"`
	Power    float64              `json:"power"`
	PowerErr float64              `json:"power_err"`
	// Start is the index in Report.Times of Divergence[0] (for a map with
	// Stride > 1, the point whose iterates include RestartAt).
	Start      int       `json:"start"`
	Divergence []float64 `json:"divergence"`
	// Evaluations and Steps are the run's work (for a map, both the
	// iterates made); Rejected counts the steps its error control rejected
	// (a kink of the field costs some: the step that straddles it fails
	// the error test and is retried shorter).
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

func rungReport(r integrate.RungResult) RungReport {
	g := r.Growth
	out := RungReport{
		Name: r.Rung.Name, Effect: integrate.RungKind(r.Rung.Kind.String()), Method: r.Method,
		ID:          rungID(r.Rung.Kind, rungMethodName(r.Rung), r.Rung.RelTol, r.Rung.Rounding),
		AgreesUntil: r.Horizon, Departed: r.Departed,
		Delta0: clean(r.Delta0), Predicted: clean(r.Predicted),
		Growth: integrate.GrowthKind(g.Kind.String()), Rate: clean(g.Rate), RateErr: clean(g.RateErr), Power: clean(g.Power), PowerErr: clean(g.PowerErr),
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
