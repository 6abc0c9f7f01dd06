package maps

import (
	"context"
	"errors"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/detmath"
)

// ErrSteps reports an iteration count that Audit cannot audit.
var ErrSteps = errors.New("invalid number of iterations")

// MaxSteps bounds the iterations Audit audits (its run time; memory does
// not grow with the horizon, see CurvePoints).
const MaxSteps = 10_000_000

// AuditSettings controls Audit, the map counterpart of
// integrate.AuditSettings. A nil *AuditSettings is invalid: the tolerance is
// the caller's statement of what difference matters.
type AuditSettings struct {
	// Tol is the distance between orbits the caller accepts (or, with
	// Relative, a fraction of the reference orbit's spread). Must be finite
	// and > 0; otherwise integrate.ErrSettings.
	Tol float64
	// Relative makes Tol a fraction of the reference orbit's spread (its
	// root-mean-square distance from its mean).
	Relative bool
	// Rungs are the runs compared with the reference; nil means
	// DefaultRungs(steps). An empty non-nil list is invalid
	// (integrate.ErrLadder), as is a rung of another kind or a restart
	// outside 1..steps-1.
	Rungs []Rung
	// Scales gives, per component, the scale its (wrapped) difference is
	// divided by before the Euclidean norm; a zero scale leaves the
	// component out. Nil: every component at scale 1. Otherwise of the
	// map's dimension (integrate.ErrDimension), finite, >= 0, and one > 0
	// (integrate.ErrSettings).
	Scales []float64
}

// RungResult is one rung of a map audit.
type RungResult struct {
	Rung Rung
	// Start is the rung's first iterate (RestartAt for a restart).
	Start int
	// AgreesUntil is the last iterate within the tolerance; DepartsAt the
	// first beyond it (0 when Departed is false: the rung agrees up to
	// AgreesUntil, the end or where it stopped).
	AgreesUntil, DepartsAt int
	Departed               bool
	// Delta0 is the a-priori size of the perturbation (half a unit of the
	// rounding at the orbit's magnitude) and Predicted the iterate
	// Start + ln(tol/Delta0)/lambda_1 (0 until Predict, or without one).
	Delta0, Predicted float64
	// Growth is the fit of the divergence's running maximum up to the
	// first iterate at or beyond the tolerance (integrate.FitGrowth), its
	// Rate per iterate; an envelope that stays within boundedFactor·Delta0
	// is bounded (rounding noise).
	Growth integrate.Growth
	// Divergence[k] is the largest distance from the reference over the
	// iterates i >= Start with floor(i/Stride) = floor(Start/Stride) + k.
	Divergence []float64
	// Iterates counts the iterates the rung made.
	Iterates int
	// Err is why the rung stopped early (a value that is not finite, or
	// the reference stopping), nil if it did not.
	Err error
}

// AuditResult is the outcome of Audit, the map counterpart of
// integrate.AuditResult.
type AuditResult struct {
	// Steps is the audited number of iterations (iterates 0..Steps);
	// Reached the last iterate the reference reached.
	Steps, Reached int
	// Tol is the absolute tolerance used (Tol·Spread with Relative).
	Tol float64
	// Spread is the reference orbit's root-mean-square distance from its
	// mean, Magnitude its root-mean-square norm (the scale of a rounding),
	// both in the audit's distance.
	Spread, Magnitude float64
	// Stride is the number of iterates each point of the curves covers: 1
	// up to CurvePoints iterates, then the smallest power of two that keeps
	// the curves within CurvePoints points.
	Stride int
	Rungs  []RungResult
	// Trusted is the last iterate up to which every rung agrees (Steps if
	// all do), Limit the index of the rung that sets it (-1: none), and
	// MaxDivergence the largest divergence of any rung up to it.
	Trusted, Limit int
	MaxDivergence  float64
	// Failed counts the rungs that stopped early.
	Failed int
}

// Audit audits how many iterates of the map m from x0 can be believed: it
// iterates m for steps iterations in double-double arithmetic (Funcs.NextDD,
// about 32 digits: the reference) and on every rung (float64, storage
// emulated at fewer bits, a restart from a rounded state), measures each
// rung's distance from the reference at every iterate, fits exponential and
// power-law growth, and says up to which iterate all rungs agree within the
// tolerance and which rung limits it. Periodic components are reduced to
// [0, period) after every iterate, in both arithmetics, and distances use
// the wrapped difference. Predict adds the predictions of a Lyapunov
// exponent.
//
// Errors before any work (nil result): a nil map or one without NextDD, x0
// of another length or not finite (integrate.ErrSettings,
// integrate.ErrDimension, integrate.ErrNonFinite), steps outside
// 1..MaxSteps (ErrSteps), nil settings, a bad tolerance or scale
// (integrate.ErrSettings), a bad rung (integrate.ErrLadder or a rounding's
// error). A reference orbit that leaves the finite numbers, or a canceled
// ctx, returns the partial result with the error. A rung that leaves the
// finite numbers stops there and says so in its Err.
//
// Cost: per iterate one double-double map and one float64 map per rung
// (two double-double maps with Relative, whose spread is measured in a
// first pass); memory O(CurvePoints) per rung, whatever steps is.
//
// References:
//
//	S. M. Hammel, J. A. Yorke, C. Grebogi, Numerical orbits of chaotic
//	  processes represent true orbits, Bull. AMS 19 (1988) 465–469 (with
//	  about 14 digits and doubling per iterate, prediction is lost after
//	  about 50 iterates).
func Audit(ctx context.Context, m *Map, x0 []float64, steps int, settings *AuditSettings) (*AuditResult, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if err := checkStart("Audit", m, x0); err != nil {
		return nil, err
	}
	n := m.Dim()
	switch {
	case m.f.NextDD == nil:
		return nil, fmt.Errorf("maps: Audit: the map has no double-double form (Funcs.NextDD) for the reference orbit: %w", integrate.ErrSettings)
	case steps < 1 || steps > MaxSteps:
		return nil, fmt.Errorf("maps: Audit: steps = %d: must be 1 to %d: %w", steps, MaxSteps, ErrSteps)
	case settings == nil:
		return nil, fmt.Errorf("maps: AuditSettings is nil (Tol is required): %w", integrate.ErrSettings)
	}
	s := *settings
	if !(s.Tol > 0) || math.IsInf(s.Tol, 0) {
		return nil, fmt.Errorf("maps: AuditSettings.Tol = %v: must be positive and finite: %w", s.Tol, integrate.ErrSettings)
	}
	if err := checkScales(s.Scales, n); err != nil {
		return nil, err
	}
	for i, v := range x0 {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("maps: Audit: start[%d] = %v: %w", i, v, integrate.ErrNonFinite)
		}
	}
	rungs := s.Rungs
	if rungs == nil {
		rungs = DefaultRungs(steps)
	}
	if len(rungs) == 0 {
		return nil, fmt.Errorf("maps: AuditSettings.Rungs is empty: nothing to compare with the reference: %w", integrate.ErrLadder)
	}
	for i, r := range rungs {
		if err := r.validate(steps); err != nil {
			return nil, fmt.Errorf("maps: AuditSettings.Rungs[%d] (%s): %w", i, r.Name, err)
		}
	}
	res := &AuditResult{Steps: steps, Tol: s.Tol, Limit: -1, Rungs: []RungResult{}}

	// The reference and the rungs advance together, so that nothing of
	// length steps is stored. A relative tolerance needs the reference's
	// spread first: a pass over the reference alone gives it.
	tol := s.Tol
	if s.Relative {
		pre := newLockstep(m, nil, x0, steps, math.Inf(1), s.Scales)
		preErr := pre.run(ctx)
		res.Magnitude, res.Spread = pre.size()
		res.Reached = pre.reached
		if preErr != nil {
			res.Trusted = 0
			return res, fmt.Errorf("maps: Audit: reference orbit stopped at iterate %d: %w", pre.reached, preErr)
		}
		tol = float64(s.Tol * res.Spread)
		res.Tol = tol
		if !(tol > 0) {
			return res, fmt.Errorf("maps: Audit: a relative tolerance needs an orbit with spread, and this one has none (a fixed point): %w", integrate.ErrSettings)
		}
	}
	a := newLockstep(m, rungs, x0, steps, tol, s.Scales)
	runErr := a.run(ctx)
	if !s.Relative || runErr != nil {
		res.Magnitude, res.Spread = a.size()
	}
	res.Reached, res.Stride = a.reached, a.stride
	for _, run := range a.runs {
		r := &run.out
		switch {
		case run.r.Kind == integrate.KindRestart:
			r.Delta0 = roundingUnit(run.r.Restart, res.Magnitude)
			if run.r.Restart.Kind == integrate.DecimalPlaces {
				// An absolute rounding per component, in the audit's distance.
				r.Delta0 *= integrate.AbsWeight(s.Scales)
			}
		case run.store.Kind != integrate.NoRounding:
			r.Delta0 = roundingUnit(run.store, res.Magnitude)
		default:
			r.Delta0 = roundingUnit(integrate.Bits(53), res.Magnitude)
		}
		run.finish()
		res.Rungs = append(res.Rungs, *r)
	}
	res.conclude(a.maxDiv)
	if runErr != nil {
		if ctx.Err() != nil {
			return res, fmt.Errorf("maps: Audit canceled at iterate %d: %w", a.reached, runErr)
		}
		return res, fmt.Errorf("maps: Audit: reference orbit stopped at iterate %d: %w", a.reached, runErr)
	}
	return res, nil
}

// checkScales validates AuditSettings.Scales for n components.
func checkScales(scales []float64, n int) error {
	if scales == nil {
		return nil
	}
	if len(scales) != n {
		return fmt.Errorf("maps: %d scales for %d components: %w", len(scales), n, integrate.ErrDimension)
	}
	any := false
	for i, v := range scales {
		if !(v >= 0) || math.IsInf(v, 0) {
			return fmt.Errorf("maps: AuditSettings.Scales[%d] = %v: must be finite and >= 0: %w", i, v, integrate.ErrSettings)
		}
		any = any || v > 0
	}
	if !any {
		return fmt.Errorf("maps: AuditSettings.Scales: every scale is 0, so no component is compared: %w", integrate.ErrSettings)
	}
	return nil
}

// conclude finds the trusted iterate, the limiting rung and the failures;
// maxDiv is the largest divergence of any rung up to the trusted iterate,
// which the lockstep iteration measured at full resolution.
func (res *AuditResult) conclude(maxDiv float64) {
	res.Trusted, res.Limit, res.Failed = res.Steps, -1, 0
	for i, r := range res.Rungs {
		if r.Err != nil {
			res.Failed++
		}
		if r.Departed && r.AgreesUntil < res.Trusted {
			res.Trusted, res.Limit = r.AgreesUntil, i
		}
		if !r.Departed && r.Err != nil && r.AgreesUntil < res.Trusted {
			// A run that stopped early vouches for nothing beyond it.
			res.Trusted, res.Limit = r.AgreesUntil, i
		}
	}
	res.MaxDivergence = maxDiv
}

// Predict sets every rung's predicted departure Start + ln(Tol/Delta0)/lambda
// for a largest Lyapunov exponent lambda per iteration (Start itself when
// Delta0 >= Tol); lambda <= 0 or not finite clears them.
func (res *AuditResult) Predict(lambda float64) {
	for i := range res.Rungs {
		r := &res.Rungs[i]
		r.Predicted = 0
		if !(lambda > 0) || math.IsInf(lambda, 0) {
			continue
		}
		r.Predicted = float64(r.Start)
		if r.Delta0 < res.Tol {
			r.Predicted += detmath.Log(res.Tol/r.Delta0) / lambda
		}
	}
}

// roundingUnit is half a unit in the last place that r keeps, at magnitude
// mag: 2^-p·mag for p bits, 5·10^-k·mag for k digits, 5·10^-(k+1) for k
// decimal places (the perturbation a rounding makes, common practice).
func roundingUnit(r integrate.Rounding, mag float64) float64 {
	if mag == 0 {
		mag = 1
	}
	switch r.Kind {
	case integrate.BinaryBits:
		return math.Ldexp(mag, -r.N)
	case integrate.SignificantDigits:
		return 5 * detmath.Pow(10, -float64(r.N)) * mag
	case integrate.DecimalPlaces:
		return 5 * detmath.Pow(10, -float64(r.N+1))
	}
	return 0
}
