package plumb

import (
	"context"
	"fmt"
	"runtime"

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
func TrustMap(ctx context.Context, sys *System, steps int, settings *MapTrustSettings) (*Report, error) {
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
	rep := &Report{
		Horizon: float64(steps), Steps: steps, Tol: s.Tol, Relative: s.Relative, TolAbs: s.Tol,
		Rungs: []RungReport{}, Caution: Caution, Arch: runtime.GOARCH, Version: buildVersion(),
		Distance: newDistanceReport(sys.States, scales, sys.Periods()), TimeUnit: IterateUnit,
		Exact: &ExactReference{Method: "the map iterated", Arithmetic: "double-double", Digits: ddDigits, Steps: steps, AccurateUntil: float64(steps)},
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
	rep.fillMap(res)
	if runErr != nil {
		rep.Verdict = Incomplete
		return rep, runErr
	}
	return rep, nil
}
