package plumb

import (
	"context"
	"fmt"
	"math"
	"math/big"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/detmath"
	"github.com/plumbdyn/plumb/lyap"
)

// Precision rules of referenceRun.
const (
	// guardDigits are the decimal digits referenceRun adds beyond the digits
	// the error growth consumes and the digits wanted at the end. They
	// cover the accumulation of the local errors over the steps (N steps
	// add at most log10 N digits, 3 for a thousand steps, when they add up
	// coherently) and a finite-time stretching above e^(λ_1 T) (the
	// finite-time exponent fluctuates around λ_1); on Lorenz at T = 100 the
	// self-check of the tests measures what the margin leaves (common
	// practice: a few digits of margin, checked by a second run).
	guardDigits = 4
	// minReferenceDigits is the least working precision of referenceRun: 20
	// digits keep the reference error below float64 rounding (16 digits)
	// at every time, so that every float64 run's divergence from it is its
	// own and not the reference's.
	minReferenceDigits = 20
	// checkDrop is how many digits fewer the self-check run of referenceRun
	// carries: its difference from the main run estimates the check run's
	// error, 10^checkDrop times the main run's.
	checkDrop = 5
	// defaultReferenceDigits is the number of correct digits wanted at t1
	// (relative to max(1, |y0|_inf)) when referenceSettings.Tol is zero.
	defaultReferenceDigits = 20
)

// referenceSettings controls referenceRun. A nil *referenceSettings means the
// zero value: the exponent estimated, 20 correct digits wanted at t1, and
// the self-check run.
type referenceSettings struct {
	// Lambda is the largest Lyapunov exponent (per time unit) used to
	// choose the precision. Zero means estimated with lyap.Exponents (k = 1,
	// lyap's defaults); a negative value means no exponential growth (the
	// precision is then set by Tol alone). Must be finite.
	Lambda float64
	// Tol is the absolute error wanted at t1. Zero means
	// 10^-defaultReferenceDigits · max(1, |y0|_inf). Must be finite and >= 0.
	Tol float64
	// Digits, if positive, is the working precision in decimal digits,
	// overriding the rule from Lambda and Tol (and no exponent is
	// estimated). Must be in [0, 10000].
	Digits int
	// NoCheck skips the self-check run.
	NoCheck bool
	// MaxSteps bounds each run's steps; zero means integrate's default.
	MaxSteps int
}

// referenceResult is a multiprecision reference trajectory.
type referenceResult struct {
	// Times are the output times; States the states there at the working
	// precision, Float64 the same rounded to float64.
	Times   []float64
	States  [][]*big.Float
	Float64 [][]float64
	// Lambda is the exponent that set the precision (zero when
	// referenceSettings.Digits was given).
	Lambda float64
	// Digits is the working precision in decimal digits; Arithmetic
	// "double-double" (Digits <= integrate.MaxDDDigits) or "big.Float";
	// Prec the bits; Order the Taylor order; Stats the main run's work.
	Digits     int
	Arithmetic string
	Prec       uint
	Order      int
	Stats      integrate.TaylorStats
	// Check is the self-check, nil with NoCheck.
	Check *referenceCheck
}

// referenceCheck compares the reference with a second run checkDrop digits
// less precise (another order and step sequence).
type referenceCheck struct {
	Digits     int
	Arithmetic string
	Steps      int
	// Difference is the largest absolute component difference over the
	// output times; AtEnd the same at the last time.
	Difference, AtEnd float64
	// Error estimates the main run's error at the last time: AtEnd /
	// 10^checkDrop.
	Error float64
}

// referenceDigits returns the working precision referenceRun uses for a span
// T, largest exponent lambda and wanted absolute error tol at the end, for
// states of size scale:
//
//	D = ceil(lambda·T/ln 10 + log10(max(1, scale)/tol)) + guardDigits,
//
// and at least minReferenceDigits: lambda·T/ln 10 digits are consumed by
// the growth e^(lambda T) of the local errors, log10(scale/tol) are wanted
// at the end. The logarithms are summed, never 10^-D formed, so any D up
// to maxReferenceDigits comes out right.
//
// It refuses, with an error wrapping integrate.ErrSettings, input that
// gives no precision: a lambda, T or scale that is not finite, a negative
// T, a tol that is not finite and > 0, and a rule that asks for more than
// maxReferenceDigits digits (the span is then too long for any reference:
// shorten it, or accept a larger tol).
func referenceDigits(lambda, T, tol, scale float64) (int, error) {
	switch {
	case !finite(lambda):
		return 0, fmt.Errorf("plumb: referenceDigits lambda = %v: must be finite: %w", lambda, integrate.ErrSettings)
	case !finite(T) || T < 0:
		return 0, fmt.Errorf("plumb: referenceDigits span T = %v: must be finite and >= 0: %w", T, integrate.ErrSettings)
	case !(tol > 0) || math.IsInf(tol, 0):
		return 0, fmt.Errorf("plumb: referenceDigits tol = %v: must be finite and > 0: %w", tol, integrate.ErrSettings)
	case !finite(scale):
		return 0, fmt.Errorf("plumb: referenceDigits scale = %v: must be finite: %w", scale, integrate.ErrSettings)
	}
	d := float64((detmath.Log(math.Max(1, scale)) - detmath.Log(tol)) / math.Ln10)
	if lambda > 0 {
		d += float64(float64(lambda*T) / math.Ln10)
	}
	d = math.Ceil(d) + guardDigits
	if !(d <= maxReferenceDigits) {
		return 0, fmt.Errorf("plumb: a reference over T = %g at lambda = %g and tol = %g needs %.4g digits, more than %d: %w",
			T, lambda, tol, d, maxReferenceDigits, integrate.ErrSettings)
	}
	return max(minReferenceDigits, int(d)), nil
}

// maxReferenceDigits is the largest working precision of referenceRun and
// referenceDigits (referenceSettings.Digits' range).
const maxReferenceDigits = 10000

// referenceRun integrates a system's formulas from its start over [0, t1]
// with the adaptive Taylor method of integrate.SolveTaylor, at a working
// precision chosen so that the states at the output times (times, sorted,
// in [0, t1]; t1 is appended when missing) are correct to the tolerance
// despite the exponential growth of errors (see referenceDigits), in
// double-double when that precision fits (integrate.MaxDDDigits) and in
// big.Float beyond. A second run checkDrop digits less precise checks the
// result (referenceResult.Check).
//
// The model is the float64 model: formulas' numbers and parameters are
// their float64 values, computed on in higher precision, so the reference
// is the exact solution of the same equations the float64 runs solve.
//
// Errors: a system without vector-field formulas (ErrKind), bad times or
// settings (integrate.ErrSpan, integrate.ErrSettings) before any work; a
// failing exponent estimate; a failing run, with the partial result.
//
// References:
//
//	À. Jorba, M. Zou, A software package for the numerical integration of
//	  ODEs by means of high-order Taylor methods, Experimental Mathematics
//	  14 (2005) 99–117.
//	G. Boffetta, M. Cencini, M. Falcioni, A. Vulpiani, Predictability: a way
//	  to characterize complexity, Phys. Rep. 356 (2002) 367–474 (error
//	  growth e^(λ_1 t)).
func referenceRun(ctx context.Context, sys *System, t1 float64, times []float64, s *referenceSettings) (*referenceResult, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if sys == nil {
		return nil, fmt.Errorf("plumb: Reference of a nil system: %w", integrate.ErrSettings)
	}
	var set referenceSettings
	if s != nil {
		set = *s
	}
	sr, err := sys.series()
	if err != nil {
		return nil, err
	}
	if !(t1 > 0) || math.IsInf(t1, 0) {
		return nil, fmt.Errorf("plumb: Reference t1 = %v: must be positive and finite: %w", t1, integrate.ErrSpan)
	}
	switch {
	case math.IsNaN(set.Lambda) || math.IsInf(set.Lambda, 0):
		return nil, fmt.Errorf("plumb: referenceSettings.Lambda = %v: must be finite: %w", set.Lambda, integrate.ErrSettings)
	case !(set.Tol >= 0) || math.IsInf(set.Tol, 0):
		return nil, fmt.Errorf("plumb: referenceSettings.Tol = %v: must be finite and >= 0: %w", set.Tol, integrate.ErrSettings)
	case set.Digits < 0 || set.Digits > maxReferenceDigits:
		return nil, fmt.Errorf("plumb: referenceSettings.Digits = %d: must be in [0, 10000]: %w", set.Digits, integrate.ErrSettings)
	case set.MaxSteps < 0:
		return nil, fmt.Errorf("plumb: referenceSettings.MaxSteps = %d: must be >= 0: %w", set.MaxSteps, integrate.ErrSettings)
	}
	ts := append([]float64(nil), times...)
	for i, t := range ts {
		if math.IsNaN(t) || t < 0 || t > t1 || (i > 0 && t <= ts[i-1]) {
			return nil, fmt.Errorf("plumb: Reference time %d = %v: times must increase within [0, %v]: %w", i, t, t1, integrate.ErrSpan)
		}
	}
	if len(ts) == 0 || ts[len(ts)-1] != t1 {
		ts = append(ts, t1)
	}
	y0 := sys.Start()
	scale := 0.0
	for _, v := range y0 {
		scale = math.Max(scale, math.Abs(v))
	}
	res := &referenceResult{}
	digits := set.Digits
	if digits == 0 {
		lambda := set.Lambda
		if lambda == 0 {
			sp, err := lyap.Exponents(ctx, sys.Problem(), 1, nil)
			if err != nil {
				return nil, fmt.Errorf("plumb: Reference: estimating the largest exponent: %w", err)
			}
			lambda = sp.Exponents[0]
		}
		res.Lambda = lambda
		tol := set.Tol
		if tol == 0 {
			tol = detmath.Pow(10, -defaultReferenceDigits) * math.Max(1, scale)
		}
		if digits, err = referenceDigits(lambda, t1, tol, scale); err != nil {
			return nil, fmt.Errorf("plumb: Reference: %w", err)
		}
	}
	main, err := integrate.SolveTaylor(ctx, sr, 0, y0, ts, &integrate.TaylorSettings{Digits: digits, MaxSteps: set.MaxSteps})
	if main != nil {
		res.Times, res.States, res.Float64 = main.Times, main.States, main.Float64
		res.Digits, res.Arithmetic, res.Prec, res.Order, res.Stats = main.Digits, main.Arithmetic, main.Prec, main.Order, main.Stats
	}
	if err != nil {
		return res, fmt.Errorf("plumb: reference run at %d digits: %w", digits, err)
	}
	if set.NoCheck {
		return res, nil
	}
	cd := max(digits-checkDrop, 8)
	chk, err := integrate.SolveTaylor(ctx, sr, 0, y0, ts, &integrate.TaylorSettings{Digits: cd, MaxSteps: set.MaxSteps})
	if err != nil {
		return res, fmt.Errorf("plumb: reference check run at %d digits: %w", cd, err)
	}
	c := &referenceCheck{Digits: cd, Arithmetic: chk.Arithmetic, Steps: chk.Stats.Steps}
	d := new(big.Float).SetPrec(main.Prec)
	for k := range main.States {
		m := 0.0
		for i, v := range main.States[k] {
			f, _ := d.Sub(v, chk.States[k][i]).Float64()
			m = math.Max(m, math.Abs(f))
		}
		c.Difference = math.Max(c.Difference, m)
		c.AtEnd = m
	}
	c.Error = c.AtEnd / detmath.Pow(10, float64(digits-cd))
	res.Check = c
	return res, nil
}
