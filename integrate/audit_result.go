package integrate

import (
	"math"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// RungResult is one rung's comparison with the reference.
type RungResult struct {
	// Rung is the rung with its defaults filled in (Name, Method,
	// tolerances, Step).
	Rung Rung
	// Method is the name of the method run (with its rounding).
	Method string
	// Start is the index in AuditResult.Times of Divergence[0]; it is 0
	// except for restart rungs.
	Start int
	// Divergence[i] is the distance from the reference at Times[Start+i]
	// (wrapped on periodic components). A failed run's curve ends where it
	// failed.
	Divergence []float64
	// Horizon is the agreement horizon: the first time the divergence
	// exceeds the tolerance. The grid brackets it; it is then located on
	// the continuous solutions, independent of the grid's spacing: the run
	// is repeated (the same steps, bit for bit) over the bracket and up to
	// maxScanIntervals grid intervals before it (back to where the
	// divergence was below tol/1000), its distance from the reference is
	// checked at each of its step boundaries there, and the first crossing
	// is bisected to a relative 1e-9 of the time. The run's side is its own
	// continuous extension (Solution.At's); the reference's side is the
	// reference run's continuous extension, or for Ladder.Exact the exact
	// states at the run's step boundaries (each step divided in eight) joined
	// by cubic Hermite interpolation with the field's derivatives. A run
	// that cannot be repeated over the window, or a method without a
	// continuous extension, keeps the log-linear interpolation between grid
	// points. When the divergence never exceeds the tolerance, Horizon is
	// the last time compared (t1, or where a failed run stopped) and
	// Departed is false.
	Horizon  float64
	Departed bool
	// Delta0 is the a-priori size of the rung's perturbation: the exact
	// rounding at a restart; half a unit of the emulated precision times the
	// reference's root-mean-square magnitude for precision rungs;
	// RelTol·magnitude + AbsTol for error-controlled methods; 0 (unknown)
	// for fixed-step methods.
	Delta0 float64
	// Predicted is the horizon predicted from the largest Lyapunov exponent
	// (see AuditResult.Predict), or 0 when there is no prediction (no
	// exponent, or Delta0 unknown).
	Predicted float64
	// Growth is the fitted growth law of the divergence.
	Growth Growth
	// Stats are the run's work counts.
	Stats Stats
	// Err is why the run failed, or nil; it wraps the solver's error.
	Err error
}

// AuditResult is the outcome of Audit.
type AuditResult struct {
	T0, T1 float64
	// Times is the common grid on which the runs are compared.
	Times []float64
	// Reference is the reference run's rung, method and work counts (its
	// Divergence is empty, unless Ladder.Exact is set: then it is the
	// reference run's divergence from the exact trajectory).
	Reference RungResult
	// Rungs are the compared runs in the ladder's order.
	Rungs []RungResult
	// Spread is the root-mean-square distance of the reference samples
	// from their mean (circular mean on periodic components): the size of
	// the attractor or orbit. Magnitude is the root-mean-square norm of the
	// reference samples. Both are in the audit's distance (observed
	// components divided by their scales, AuditSettings.Scales).
	Spread, Magnitude float64
	// Reach is the largest distance of a reference sample from that mean,
	// in the same distance: no two samples are farther apart than 2·Reach.
	Reach float64
	// Tol is the absolute divergence tolerance used (Tol·Spread with
	// Relative).
	Tol float64
	// Trusted is the earliest agreement horizon over the rungs that
	// departed (a failed run counts only if it departed before failing),
	// or T1 if none did. Limit is the index in Rungs of the rung that set
	// it, -1 if none departed. With a KindRun rung (the caller's own run)
	// Trusted is that rung's horizon (where it departed, or stopped) and
	// MaxDivergence its largest divergence up to there.
	Trusted float64
	Limit   int
	// MaxDivergence is the largest divergence of any rung on [T0, Trusted].
	MaxDivergence float64
	// Failed counts the rungs whose run failed.
	Failed int
	// Reversal is the reversibility check, nil unless requested.
	Reversal *Reversal
	// Roundoff is the extrapolation of the precision rungs to float64, nil
	// when fewer than two of them departed.
	Roundoff *RoundoffFit
}

// Predict sets the predicted horizons of the rungs and the predicted slope of
// the roundoff fit from the largest Lyapunov exponent lambda,
//
//	t_start + ln(tol/delta0)/lambda   (Boffetta et al. 2002, Sect. 2.1),
//
// with t_start the rung's start (the restart time for restart rungs) and
// delta0 its a-priori perturbation (RungResult.Delta0); a delta0 at or above
// the tolerance predicts t_start. A lambda <= 0 (or not finite) clears the
// predictions: without exponential growth the formula says nothing. Audit
// calls it with AuditSettings.Lambda; callers that estimate the exponent
// after the audit call it themselves.
func (res *AuditResult) Predict(lambda float64) {
	ok := lambda > 0 && !math.IsInf(lambda, 0)
	for i := range res.Rungs {
		r := &res.Rungs[i]
		r.Predicted = 0
		if !ok || !(r.Delta0 > 0) {
			continue
		}
		t0 := res.T0
		if r.Rung.Kind == KindRestart {
			t0 = r.Rung.RestartAt
		}
		r.Predicted = t0
		if r.Delta0 < res.Tol {
			r.Predicted = t0 + detmath.Log(res.Tol/r.Delta0)/lambda
		}
	}
	if res.Roundoff != nil {
		res.Roundoff.PredictedSlope = 0
		if ok {
			res.Roundoff.PredictedSlope = math.Ln2 / lambda
		}
	}
}
