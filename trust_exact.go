package plumb

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/detmath"
	"github.com/plumbdyn/plumb/lyap"
)

// refTolFraction is how far below the audit's tolerance the reference of
// System.Trust is made accurate at the end of the span (common practice: a
// reference a thousand times more accurate than the differences it
// judges).
const refTolFraction = 1e-3

// trustSystem is System.Trust for a flow with formulas, with a multiprecision
// reference: every rung of the ladder is compared with a Taylor reference
// trajectory (see referenceRun) accurate to refTolFraction·Tol at the end of
// the span (in the audit's distance: the absolute accuracy is that times
// the smallest observed scale, see Distance) and at least
// minReferenceDigits digits throughout, instead of with the tightest
// float64 run; that run becomes one more comparison
// (Report.Reference gets a divergence curve and its agreement horizon).
// The precision follows referenceDigits from the largest exponent
// (TrustSettings.Lambda, or the estimate TrustProblem would make, made first),
// the horizon and Tol (a relative Tol is taken as absolute there, which is
// conservative for a spread above 1); at most integrate.MaxDDDigits digits
// run in double-double, more in big.Float. The reference runs at the
// audit's comparison times, without its self-check (see referenceRun for a
// checked run); Report.Exact describes it. A Ladder's own Exact is
// replaced.
//
// A long audit of a chaotic system, whose full-span reference would need
// more than integrate.MaxDDDigits digits, first runs the plain audit
// against the float64 reference run (cheap), which says when the last run
// from the start departs, t_last. The reference is then made accurate only
// to t0 + 1.5·(t_last - t0) + 3/λ and continued in double-double at
// minReferenceDigits digits from its full-precision state there. That
// audit stands when it confirms that every run was judged where the
// reference was accurate: the tightest float64 run and the rungs from the
// start departed before that time, and each restart rung restarted after it
// and departed within the span over which the continuation follows the
// solution through its own state. Its agreement horizons are then those a
// full-span reference gives (every departure was judged against a
// reference within refTolFraction·Tol of the solution); otherwise the
// full-span reference is made. ExactReference.AccurateUntil says which.
// When no run of that plain audit departs or fails and the tolerance
// exceeds twice the tightest run's reach (the largest distance of its
// sampled states from their mean, integrate.AuditResult.Reach), no two
// states where the runs went are a tolerance apart and the reference would
// decide nothing: the plain audit stands, with ExactReference.SetAside
// saying why (an audit to t = 900 at Tol 1000 on Lorenz would otherwise make
// a 357-digit big.Float reference over the whole span, minutes of work).
// A restart rung after AccurateUntil restarts from the continuation's state,
// a point of a trajectory of the model that follows the solution through
// it over the span judged, not from the solution from the start (which no
// float64 run follows by then): its agreement horizon measures the same
// local sensitivity at another point of the attractor.
// For Lorenz at its published parameters and Tol 1 this takes an audit to
// t = 300 from 126 digits in big.Float (35 s here) to 29 in double-double
// (0.3 s), with the same agreement horizons.
//
// When the exponent estimate fails (not by cancellation), trustSystem
// falls back to TrustProblem against the float64 reference run, whose report
// says why in ExponentError.
//
// Errors: those of TrustProblem, and ErrKind for a system without vector-field
// formulas.
//
// References: see TrustProblem and reference.
// shorten false always makes the reference accurate over the whole span.
func trustSystem(ctx context.Context, sys *System, horizon float64, settings *TrustSettings, shorten bool) (*Report, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if sys == nil {
		return nil, fmt.Errorf("plumb: trust of a nil system: %w", integrate.ErrSettings)
	}
	sr, err := sys.series()
	if err != nil {
		return nil, err
	}
	problem := sys.Problem()
	if settings != nil && settings.States == nil {
		// The system's names, for Distance and the report, on every path
		// (the fallbacks to Trust too).
		named := *settings
		named.States = sys.States
		settings = &named
	}
	if settings == nil || !(settings.Tol > 0) || math.IsInf(settings.Tol, 0) ||
		!(horizon > 0) || math.IsInf(horizon, 0) || !(settings.Lambda >= 0) || math.IsInf(settings.Lambda, 0) ||
		settings.MaxSteps < 0 {
		return TrustProblem(ctx, problem, horizon, settings) // its validation and errors
	}
	s := *settings
	names, err := stateNames("TrustSettings.States", s.States, len(problem.Y0))
	if err != nil {
		return nil, err
	}
	scales, err := s.Distance.PerComponent(names)
	if err != nil {
		return nil, err
	}
	// The reference must be accurate to refTolFraction·Tol in the audit's
	// distance: a component scaled by s counts an absolute error e as e/s,
	// so the absolute accuracy asked for is that times the smallest
	// observed scale.
	refTol := refTolFraction * s.Tol * minScale(scales)
	ladder, err := trustLadder(&s, problem.T0, problem.T0+horizon)
	if err != nil {
		return nil, err // before any work
	}
	s.Run = nil // built into the ladder, which the audits below are given
	var est *ExponentEstimate
	if s.Lambda == 0 {
		sp, err := lyap.Exponents(ctx, problem, 1, s.Exponent)
		if err != nil {
			if ctx.Err() != nil {
				// Canceled: the plain audit returns its (empty)
				// incomplete report and the context's error.
				return TrustProblem(ctx, problem, horizon, settings)
			}
			// Without an exponent there is no precision rule: the plain
			// audit, which reports why the estimate failed.
			return TrustProblem(ctx, problem, horizon, settings)
		}
		est = &ExponentEstimate{Value: sp.Exponents[0], Source: "estimated"}
		if len(sp.StdErr) == 1 && finite(sp.StdErr[0]) {
			est.StdErr = sp.StdErr[0]
		}
		if !(est.Value > 0) {
			est.Value = 0
		}
		s.Lambda = est.Value
		if s.Progress != nil {
			s.Progress(StageExponent, 1, 1)
		}
	}
	scale := 0.0
	for _, v := range problem.Y0 {
		scale = math.Max(scale, math.Abs(v))
	}
	// A span too long for any full-span reference (more than
	// maxReferenceDigits digits) may still be audited with the shortened
	// one below; digitsErr says why the full-span one cannot be made.
	digits, digitsErr := referenceDigits(s.Lambda, horizon, refTol, scale)
	if digitsErr != nil {
		digits = maxReferenceDigits + 1
	}
	end := problem.T0 + horizon
	audit := func(d int, until float64) (*Report, error) {
		var ex *ExactReference
		lad := ladder
		lad.Exact = exactTrajectory(sr, problem, d, until, s.Lambda, &ex)
		ss := s
		ss.Ladder = &lad
		rep, err := TrustProblem(ctx, problem, horizon, &ss)
		if errors.Is(err, integrate.ErrKink) && ctx.Err() == nil {
			rep, err = setAside(ctx, problem, horizon, ss, ex, err)
		}
		if rep != nil {
			if rep.Exact == nil {
				rep.Exact = ex
			}
			if est != nil && rep.Exponent != nil {
				rep.Exponent.Source, rep.Exponent.StdErr = est.Source, est.StdErr
			}
		}
		return rep, err
	}
	if shorten && digits > integrate.MaxDDDigits && s.Lambda > 0 {
		// A long audit of a chaotic system: the reference only has to be
		// accurate while some run still agrees with it. The plain audit
		// (float64 reference, cheap) says when the last run departs; the
		// multiprecision reference is then made accurate until a margin
		// past that, and continued in double-double. When the audit
		// against it confirms that every run, the tightest float64 one
		// included, departed before that time, its agreement horizons are
		// those a reference accurate over the whole span would give
		// (each departure was judged against a reference within
		// refTolFraction·Tol); otherwise the full-span reference is made.
		pre := s
		pre.Progress = nil
		lad := ladder
		lad.Exact = nil
		pre.Ladder = &lad
		first, err := TrustProblem(ctx, problem, horizon, &pre)
		if err != nil && ctx.Err() != nil {
			return first, err
		}
		if err == nil && beyondReach(first) {
			// No run parted from the tightest by Tol, and Tol exceeds
			// the widest separation of the tightest run's own states:
			// the multiprecision reference would decide nothing, and
			// over a long span it costs minutes.
			first.Exact = &ExactReference{
				Method: "Taylor (Jorba–Zou order and step)", Lambda: s.Lambda, Digits: digits,
				SetAside: fmt.Sprintf("the tolerance %.4g exceeds %.4g, twice the largest distance of the tightest run's sampled states from their mean: runs that stay where it went cannot part by the tolerance, so the %s-digit reference was not made", first.TolAbs, 2*first.reach, digitWord(digits)),
			}
			if est != nil && first.Exponent != nil {
				first.Exponent.Source, first.Exponent.StdErr = est.Source, est.StdErr
			}
			return first, nil
		}
		if last, ok := lastDeparture(first); err == nil && ok {
			until := problem.T0 + float64(spanMargin*(last-problem.T0)) + spanLyapunovTimes/s.Lambda
			if d, derr := referenceDigits(s.Lambda, until-problem.T0, refTol, scale); derr == nil && until < end && d < digits {
				rep, err := audit(d, until)
				if (err != nil && ctx.Err() != nil) || (rep != nil && rep.Exact != nil && rep.Exact.SetAside != "") {
					return rep, err
				}
				local := localSpan(s.Lambda, refTol, scale)
				if err == nil && spanCovers(rep, until, local) {
					return rep, nil
				}
			}
		}
	}
	if digitsErr != nil {
		return nil, fmt.Errorf("plumb: trust: no multiprecision reference covers this audit (compare with the float64 reference instead, TrustSettings.NoExact): %w", digitsErr)
	}
	return audit(digits, end)
}

// spanMargin and spanLyapunovTimes set how far past the last departure of
// the plain audit System.Trust keeps its reference accurate: to
// t0 + spanMargin·(t_last - t0) + spanLyapunovTimes/λ (common practice:
// a margin of half the span plus a few e-foldings; the audit against the
// reference confirms it, see System.Trust).
const (
	spanMargin        = 1.5
	spanLyapunovTimes = 3
)

// beyondReach reports whether no run of the plain audit rep failed or
// departed and its tolerance exceeds twice the tightest run's reach (the
// largest distance of its samples from their mean): two states of that
// run are never a tolerance apart.
func beyondReach(rep *Report) bool {
	if rep == nil || rep.Failed > 0 || rep.Reference.Error != "" || !(rep.TolAbs > 2*rep.reach) {
		return false
	}
	for _, r := range rep.Rungs {
		if r.Departed || r.Error != "" {
			return false
		}
	}
	return true
}

// digitWord is n as digits, or "more than maxReferenceDigits" when n is
// past the supported range.
func digitWord(n int) string {
	if n > maxReferenceDigits {
		return fmt.Sprintf("more than %d", maxReferenceDigits)
	}
	return fmt.Sprint(n)
}

// lastDeparture returns the latest agreement horizon of the report's rungs
// that start at t0 (restart rungs are judged apart, see spanCovers), and
// false when one of them never departed (a run that failed after it
// departed counts with its horizon).
func lastDeparture(rep *Report) (float64, bool) {
	if rep == nil {
		return 0, false
	}
	last, found := math.Inf(-1), false
	for _, r := range rep.Rungs {
		if r.Effect == "restart" {
			continue
		}
		// A run that departed before it failed (a step budget spent
		// long after) has its horizon all the same.
		if !r.Departed {
			return 0, false
		}
		last, found = math.Max(last, r.AgreesUntil), true
	}
	return last, found
}

// localSpan is how long the double-double continuation of System.Trust's
// reference stays within tol of the solution through its own state at any
// time: minReferenceDigits digits of local accuracy, less those wanted,
// consumed at λ/ln 10 digits per time unit, and divided by spanMargin.
func localSpan(lambda, tol, scale float64) float64 {
	d := float64(minReferenceDigits) - float64(detmath.Log(math.Max(1, scale)/tol)/math.Ln10)
	return math.Max(0, float64(d*math.Ln10)/lambda) / spanMargin
}

// spanCovers reports whether every run of the audit was judged where its
// reference was accurate: the reference run and the rungs from t0 departed
// before until (where the reference is accurate to refTolFraction·Tol), and
// each restart rung either departed before until or restarted at or after
// it and departed within local of its restart (the continuation follows
// the solution through its own state that long).
func spanCovers(rep *Report, until, local float64) bool {
	if rep == nil || rep.Exact == nil {
		return false
	}
	for _, r := range append([]RungReport{rep.Reference}, rep.Rungs...) {
		if !r.Departed {
			return false
		}
		if r.AgreesUntil < until {
			continue
		}
		if r.Effect != "restart" || r.RestartAt < until || r.AgreesUntil-r.RestartAt >= local {
			return false
		}
	}
	return true
}

// exactTrajectory is the reference of System.Trust: the Taylor method at
// digits until the time until, and from there (when it comes before the
// last output time) in double-double at minReferenceDigits, started from
// the full-precision state at until. *ex describes the run once it is made.
func exactTrajectory(sr integrate.Series, problem integrate.Problem, digits int, until, lambda float64, ex **ExactReference) integrate.Trajectory {
	return func(ctx context.Context, times []float64) ([][]float64, error) {
		if len(times) == 0 {
			return nil, nil
		}
		head, accurate := times, times[len(times)-1]
		k := sort.SearchFloat64s(times, until)
		if k < len(times) {
			head, accurate = append(append([]float64(nil), times[:k]...), until), until
		}
		// The audit asks again, for the times at which it locates the
		// horizons; *ex describes the first run, over the whole span.
		describe := *ex == nil
		r, err := integrate.SolveTaylor(ctx, sr, problem.T0, problem.Y0, head, &integrate.TaylorSettings{Digits: digits})
		if r != nil && describe {
			*ex = &ExactReference{Method: "Taylor (Jorba–Zou order and step)", Arithmetic: r.Arithmetic,
				Digits: r.Digits, Order: r.Order, Steps: r.Stats.Steps, Lambda: lambda, AccurateUntil: accurate,
				KinkRestarts: r.Stats.KinkRestarts}
		}
		if err != nil {
			return nil, fmt.Errorf("plumb: reference run at %d digits: %w", digits, err)
		}
		if k == len(times) {
			return r.Float64, nil
		}
		out := r.Float64[:k:k]
		rest := times[k:]
		if rest[0] == until {
			out = append(out, r.Float64[k])
			rest = rest[1:]
		}
		if len(rest) == 0 {
			return out, nil
		}
		tail, err := integrate.SolveTaylor(ctx, sr, until, r.Float64[k], rest, &integrate.TaylorSettings{Digits: minReferenceDigits, Start: r.States[k]})
		if tail != nil && describe {
			(*ex).Continued = tail.Arithmetic
			(*ex).ContinuedDigits = tail.Digits
			(*ex).Steps += tail.Stats.Steps
			(*ex).KinkRestarts += tail.Stats.KinkRestarts
		}
		if err != nil {
			return nil, fmt.Errorf("plumb: reference run continued at %d digits from t=%g: %w", minReferenceDigits, until, err)
		}
		return append(out, tail.Float64...), nil
	}
}
