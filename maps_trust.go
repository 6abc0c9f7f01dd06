package plumb

import (
	"context"
	"fmt"
	"io"
	"math"
	"runtime"
	"strings"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
	"github.com/plumbdyn/plumb/maps"
)

// ErrSteps reports an iteration count that TrustMap cannot audit.
var ErrSteps = maps.ErrSteps

// MaxMapSteps bounds the iterations TrustMap audits.
const MaxMapSteps = maps.MaxSteps

// MapCurvePoints bounds the points each divergence curve of a map audit keeps.
const MapCurvePoints = maps.CurvePoints

// MapRung is one run of a map audit.
type MapRung = maps.Rung

// DefaultMapRungs is maps.DefaultRungs.
func DefaultMapRungs(steps int) []MapRung { return maps.DefaultRungs(steps) }

// MapTrustSettings controls TrustMap. A nil *MapTrustSettings is invalid:
// the tolerance is the caller's statement of what difference matters.
type MapTrustSettings struct {
	// Tol is the distance between orbits the caller accepts, in the
	// state's units (Euclidean norm, angles wrapped by their period; see
	// Distance). Must be finite and > 0; otherwise ErrTolerance.
	Tol float64
	// Relative makes Tol a fraction of the reference orbit's spread (its
	// root-mean-square distance from its mean).
	Relative bool
	// Rungs are the runs compared with the reference; nil means
	// DefaultMapRungs(steps). An empty non-nil list is invalid
	// (integrate.ErrLadder), as is a rung of another kind or a restart
	// outside 1..steps-1.
	Rungs []MapRung
	// Exponent controls the estimate of the largest Lyapunov exponent
	// (lyap.MapExponents with k = 1 from the start); nil means lyap's
	// defaults.
	Exponent *lyap.Settings
	// Lambda, when positive, is used as the largest Lyapunov exponent (per
	// iteration) and no estimate is made. Must be finite and >= 0.
	Lambda float64
	// Distance chooses the components compared (by the system's state
	// names) and their scales; the zero value is the Euclidean distance
	// over every component. Errors: *DistanceError, before any work.
	Distance Distance
}

// MapReport is the outcome of TrustMap. Its JSON form (snake_case fields) is
// the document `plumb trust --format json` writes for a map; times are
// iterates, distances in the audit's distance (see Distance: the state's
// units unless scaled).
type MapReport struct {
	// Steps is the audited number of iterations (iterates 0..Steps).
	Steps int `json:"steps"`
	// Tol is the tolerance as given, Relative whether it is a fraction of
	// Spread, TolAbs the absolute tolerance used.
	Tol      float64 `json:"tol"`
	Relative bool    `json:"relative"`
	TolAbs   float64 `json:"tol_abs"`
	// Spread is the reference orbit's root-mean-square distance from its
	// mean, Magnitude its root-mean-square norm (the scale of a rounding),
	// both in the audit's distance (see Distance).
	Spread    float64 `json:"spread"`
	Magnitude float64 `json:"magnitude"`
	// Distance is the distance every comparison used.
	Distance DistanceReport `json:"distance"`
	// TrustedUntil is the last iterate up to which every rung agrees with
	// the reference within Tol (Steps if all do).
	TrustedUntil int `json:"trusted_until"`
	// LimitedBy is the effect of the rung that departs first ("precision"
	// or "restart"), LimitingRung its name; empty when none departs.
	LimitedBy    string `json:"limited_by,omitempty"`
	LimitingRung string `json:"limiting_rung,omitempty"`
	// PredictedHorizon is the earliest iterate predicted from the largest
	// Lyapunov exponent, start + ln(tol/delta0)/lambda_1; 0 without a
	// prediction.
	PredictedHorizon float64 `json:"predicted_horizon,omitempty"`
	// Verdict answers for iterate Steps.
	Verdict Verdict `json:"verdict"`
	// TolUsed is the largest divergence of any rung up to TrustedUntil,
	// as a fraction of Tol.
	TolUsed float64 `json:"tol_used"`
	// Growth is the law most rungs follow: "exponential", "polynomial",
	// "bounded" or "undetermined".
	Growth string `json:"growth"`
	// Exponent is the largest Lyapunov exponent used (per iteration), nil
	// if none; ExponentError says why the estimate failed.
	Exponent      *ExponentEstimate `json:"exponent,omitempty"`
	ExponentError string            `json:"exponent_error,omitempty"`
	// Stride is the number of iterates each point of the rungs' divergence
	// curves covers (the largest distance over them): 1 up to
	// MapCurvePoints iterates, then the smallest power of two that keeps
	// the curves within MapCurvePoints points.
	Stride int `json:"stride"`
	// Reference describes the double-double orbit; Rungs the others.
	Reference string          `json:"reference"`
	Rungs     []MapRungReport `json:"rungs"`
	// Failed counts the rungs that stopped early (see MapRungReport.Error).
	Failed int `json:"failed"`
	// Caution is the standing caution (see the Caution constant).
	Caution string `json:"caution"`
	// Arch and Version record the architecture and the plumb build.
	Arch    string `json:"arch"`
	Version string `json:"plumb_version"`
}

// MapRungReport is one rung of a map audit as reported.
type MapRungReport struct {
	// Name is the rung as people read it, ID a stable machine name
	// ("precision_24bit", "restart"), unique in the report, which the CSV
	// output uses as its column name.
	Name   string `json:"name"`
	ID     string `json:"id"`
	Effect string `json:"effect"`
	// Rounding is the emulated storage or the restart's rounding.
	Rounding  string `json:"rounding,omitempty"`
	RestartAt int    `json:"restart_at,omitempty"`
	// AgreesUntil is the last iterate within Tol; DepartsAt the first
	// beyond it (0 when Departed is false: it agrees up to AgreesUntil,
	// the end or where a failed run stopped).
	AgreesUntil int  `json:"agrees_until"`
	Departed    bool `json:"departed"`
	DepartsAt   int  `json:"departs_at,omitempty"`
	// Delta0 is the a-priori size of the perturbation (half a unit of the
	// rounding at the orbit's magnitude) and Predicted the iterate
	// start + ln(tol/Delta0)/lambda_1 (0: none).
	Delta0    float64 `json:"delta0"`
	Predicted float64 `json:"predicted,omitempty"`
	// Growth is the law that fits the divergence best ("exponential",
	// "power law", "bounded", "unknown"), with both fits; Rate is per
	// iteration.
	Growth   string  `json:"growth"`
	Rate     float64 `json:"rate"`
	RateErr  float64 `json:"rate_err"`
	Power    float64 `json:"power"`
	PowerErr float64 `json:"power_err"`
	// Start is the rung's first iterate. Divergence[k] is the largest
	// distance from the reference over the iterates i >= Start with
	// floor(i/Stride) = floor(Start/Stride) + k; with Stride 1 (audits of
	// up to MapCurvePoints iterates) that is the distance at iterate
	// Start+k.
	Start      int       `json:"start"`
	Stride     int       `json:"stride"`
	Divergence []float64 `json:"divergence"`
	// Error is why the run stopped early, empty if it did not.
	Error string `json:"error,omitempty"`
}

// TrustMap audits how many iterates of the map sys can be believed: it
// iterates sys from its start for steps iterations in double-double
// arithmetic (the reference, about 32 digits, System.DoubleDoubleEvaluator)
// and on every rung (float64, storage emulated at fewer bits, a restart
// from a rounded state), measures each rung's distance from the reference
// at every iterate, fits exponential and power-law growth, predicts the
// departure from the largest Lyapunov exponent (lyap.MapExponents) as
//
//	start + ln(tol/delta0)/lambda_1,
//
// and says up to which iterate all rungs agree within the tolerance, which
// rung limits it, and whether iterate steps is trusted. Periodic components
// are reduced to [0, period) after every iterate, in both arithmetics, and
// distances use the wrapped difference.
//
// Errors before any work (nil report): a system that is not a map or has
// no formulas (ErrKind), steps outside 1..MaxMapSteps (ErrSteps), a nil
// settings or a bad tolerance (ErrTolerance), a bad Lambda, rung or
// rounding (integrate.ErrSettings, integrate.ErrLadder). A reference orbit
// that leaves the finite numbers, or a canceled ctx, returns the partial
// report (Verdict Incomplete) with the error. A rung that leaves the
// finite numbers stops there and says so; a failed exponent estimate goes
// without predictions and says why in ExponentError.
//
// Cost: per iterate one double-double evaluation and one float64 map per
// rung (two double-double evaluations with Relative, whose spread is
// measured in a first pass); memory O(MapCurvePoints) per rung, whatever
// steps is: the reference and the rungs advance together and each curve
// keeps at most MapCurvePoints points (see MapRungReport.Stride).
//
// # Caution
//
// A trust horizon is a numerical statement about a model, not a safety
// certificate for the real system; safety-critical use follows the field's
// own codes and licensed review.
//
// References:
//
//	S. M. Hammel, J. A. Yorke, C. Grebogi, Numerical orbits of chaotic
//	  processes represent true orbits, Bull. AMS 19 (1988) 465–469 (with
//	  about 14 digits and doubling per iterate, prediction is lost after
//	  about 50 iterates).
//	G. Boffetta, M. Cencini, M. Falcioni, A. Vulpiani, Predictability: a way
//	  to characterize complexity, Phys. Rep. 356 (2002) 367–474, Sect. 2.1
//	  (the predicted horizon).
func TrustMap(ctx context.Context, sys *System, steps int, settings *MapTrustSettings) (*MapReport, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if sys == nil || sys.Kind() != KindMap {
		what := "nil"
		if sys != nil {
			what = sys.Name + " is a " + string(sys.Kind())
		}
		return nil, fmt.Errorf("plumb: TrustMap: %s, not a map: %w", what, ErrKind)
	}
	if steps < 1 || steps > MaxMapSteps {
		return nil, fmt.Errorf("plumb: TrustMap: steps = %d: must be 1 to %d: %w", steps, MaxMapSteps, ErrSteps)
	}
	if settings == nil {
		return nil, fmt.Errorf("plumb: MapTrustSettings is nil (Tol is required): %w", ErrTolerance)
	}
	s := *settings
	if err := checkTolLambda("MapTrustSettings", s.Tol, s.Lambda); err != nil {
		return nil, err
	}
	rungs := s.Rungs
	scales, err := s.Distance.PerComponent(sys.States)
	if err != nil {
		return nil, err
	}
	m, err := sys.Map()
	if err != nil {
		return nil, fmt.Errorf("plumb: TrustMap: %w", err)
	}
	x0 := sys.Start()
	rep := &MapReport{
		Steps: steps, Tol: s.Tol, Relative: s.Relative, TolAbs: s.Tol, Reference: "double-double (about 32 digits)",
		Rungs: []MapRungReport{}, Caution: Caution, Arch: runtime.GOARCH, Version: buildVersion(),
		Distance: newDistanceReport(sys.States, scales, sys.Periods()),
	}
	res, runErr := maps.Audit(ctx, m, x0, steps, &maps.AuditSettings{Tol: s.Tol, Relative: s.Relative, Rungs: rungs, Scales: scales})
	if res == nil {
		return nil, fmt.Errorf("plumb: TrustMap: %w", runErr)
	}
	if runErr == nil {
		lambda := s.Lambda
		if lambda > 0 {
			rep.Exponent = givenExponent(lambda)
		} else {
			sp, err := lyap.MapExponents(ctx, m, x0, 1, s.Exponent)
			if err != nil && ctx.Err() != nil {
				runErr = fmt.Errorf("plumb: TrustMap canceled during the exponent estimate: %w", err)
			}
			rep.Exponent, rep.ExponentError, lambda = estimatedExponent(sp, err)
		}
		res.Predict(lambda)
	}
	rep.fill(res)
	if runErr != nil {
		rep.Verdict = Incomplete
		return rep, runErr
	}
	return rep, nil
}

// fill copies the audit into the report and draws the conclusions.
func (rep *MapReport) fill(res *maps.AuditResult) {
	rep.TolAbs, rep.Spread, rep.Magnitude, rep.Stride = res.Tol, res.Spread, res.Magnitude, res.Stride
	rep.Rungs = make([]MapRungReport, len(res.Rungs))
	ids := make([]*string, len(res.Rungs))
	var vote growthVote
	for i, r := range res.Rungs {
		out := MapRungReport{
			Name: r.Rung.Name, Effect: r.Rung.Kind.String(), ID: rungID(r.Rung.Kind, "", 0, r.Rung.Storage),
			AgreesUntil: r.AgreesUntil, Departed: r.Departed, DepartsAt: r.DepartsAt,
			Delta0: r.Delta0, Predicted: r.Predicted, Growth: r.Growth.Kind.String(),
			Rate: finiteOr0(r.Growth.Rate), RateErr: finiteOr0(r.Growth.RateErr), Power: finiteOr0(r.Growth.Power), PowerErr: finiteOr0(r.Growth.PowerErr),
			Start: r.Start, Stride: res.Stride, Divergence: r.Divergence,
		}
		switch {
		case r.Rung.Kind == integrate.KindRestart:
			out.Rounding, out.RestartAt = r.Rung.Restart.String(), r.Rung.RestartAt
		case r.Rung.Storage.Kind != integrate.NoRounding:
			out.Rounding = r.Rung.Storage.String()
		default:
			out.Rounding = "float64"
		}
		if r.Err != nil {
			out.Error = r.Err.Error()
		}
		rep.Rungs[i] = out
		ids[i] = &rep.Rungs[i].ID
		vote.add(out.Growth)
	}
	uniqueIDs(ids, "")
	rep.TrustedUntil, rep.Failed = res.Trusted, res.Failed
	rep.TolUsed = res.MaxDivergence / rep.TolAbs
	rep.LimitedBy, rep.LimitingRung = "", ""
	if res.Limit >= 0 {
		rep.LimitedBy, rep.LimitingRung = rep.Rungs[res.Limit].Effect, rep.Rungs[res.Limit].Name
	}
	rep.Growth = vote.law()
	rep.PredictedHorizon = 0
	if rep.Growth == "exponential" {
		for _, r := range rep.Rungs {
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
	rep.Verdict = verdictOf(len(rep.Rungs), rep.Failed, rep.TrustedUntil < rep.Steps, rep.TolUsed)
}

func finiteOr0(v float64) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0
	}
	return v
}

// Write writes the report as a short readable summary: the rungs with
// their agreement horizons and predictions, the exponent, the trusted
// iterate and what limits it, the verdict and the caution.
func (rep *MapReport) Write(w io.Writer) error {
	var b strings.Builder
	fmt.Fprintf(&b, "audit of iterates 0 .. %d at tolerance %s\n", rep.Steps, tolPhrase(rep.Tol, rep.TolAbs, rep.Relative))
	fmt.Fprintf(&b, "distance: %s\n", rep.Distance)
	fmt.Fprintf(&b, "reference: %s\n\n", rep.Reference)
	table := make([]rungRow, len(rep.Rungs))
	for i, r := range rep.Rungs {
		table[i] = rungRow{
			name: r.Name, effect: r.Effect, until: fmt.Sprintf("%d", r.AgreesUntil),
			departed: r.Departed, failed: r.Error != "", predicted: r.Predicted,
			growth: growthCell(r.Growth, r.Rate, r.Power, " per iterate", "n"),
		}
	}
	if err := writeRungTable(&b, table); err != nil {
		return err
	}
	b.WriteByte('\n')
	switch {
	case rep.Exponent != nil && rep.Exponent.Source == "given":
		fmt.Fprintf(&b, "largest Lyapunov exponent (given): %.4g per iterate\n", rep.Exponent.Value)
	case rep.Exponent != nil:
		fmt.Fprintf(&b, "largest Lyapunov exponent: %.4g ± %.2g per iterate", rep.Exponent.Value, rep.Exponent.StdErr)
		if rep.Exponent.LyapunovTime > 0 && rep.Growth == "exponential" {
			fmt.Fprintf(&b, " (Lyapunov time %.3g iterates)", rep.Exponent.LyapunovTime)
		}
		b.WriteByte('\n')
	case rep.ExponentError != "":
		fmt.Fprintf(&b, "largest Lyapunov exponent: not estimated (%s)\n", rep.ExponentError)
	}
	switch rep.Growth {
	case "exponential":
		b.WriteString("divergence grows exponentially (the orbit is chaotic)\n")
	case "polynomial":
		b.WriteString("divergence grows polynomially (a power law fits better than an exponential)\n")
	case "bounded":
		b.WriteString("divergence stays bounded\n")
	default:
		b.WriteString("divergence growth undetermined (too few points, or no divergence at all)\n")
	}
	if rep.PredictedHorizon > 0 {
		fmt.Fprintf(&b, "predicted horizon ln(tol/delta0)/lambda%s: iterate %.4g\n", rep.Distance.deltaNote(), rep.PredictedHorizon)
	}
	if rep.Failed > 0 {
		fmt.Fprintf(&b, "%d rung(s) failed; their curves end where they stopped\n", rep.Failed)
	}
	switch {
	case rep.Verdict == Incomplete:
		b.WriteString("the audit did not finish: no trusted horizon is read off it\n")
	case rep.LimitedBy != "":
		fmt.Fprintf(&b, "trusted until iterate %d, limited by %s (%s)\n", rep.TrustedUntil, rep.LimitedBy, rep.LimitingRung)
	default:
		fmt.Fprintf(&b, "trusted until iterate %d: every rung agrees over the whole horizon\n", rep.TrustedUntil)
	}
	verdict := rep.Verdict.words()
	switch rep.Verdict {
	case NotTrusted:
		fmt.Fprintf(&b, "verdict for iterate %d: %s (the runs part by more than the tolerance at iterate %d)\n", rep.Steps, verdict, rep.TrustedUntil+1)
	case Incomplete:
		fmt.Fprintf(&b, "verdict for iterate %d: %s\n", rep.Steps, verdict)
	default:
		fmt.Fprintf(&b, "verdict for iterate %d: %s (largest divergence %.2g of the tolerance)\n", rep.Steps, verdict, rep.TolUsed)
	}
	fmt.Fprintf(&b, "caution: %s\n", rep.Caution)
	_, err := io.WriteString(w, b.String())
	return err
}
