package integrate

import (
	"context"
	"fmt"
	"math"
	"math/big"

	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/internal/detmath"
)

// Series supplies the Taylor coefficients of the solution of y' = f(t, y)
// through a point, in double-double or in math/big.Float arithmetic: the
// coefficient provider of the multiprecision Taylor integrator
// (SolveTaylor). The integrator lives in integrate and knows nothing of
// formulas; package plumb implements Series from a System's formulas by
// Taylor-mode differentiation, so integrate does not depend on the formula
// compiler.
type Series interface {
	// Dim is the state dimension.
	Dim() int
	// DD returns a function that writes coefficient k of component i of
	// the solution through (t, y) into c[i][k], k = 0..order, in
	// double-double arithmetic. The function may keep a workspace and need
	// not be safe for concurrent use.
	DD(order int) (func(t dd.Float, y []dd.Float, c [][]dd.Float) error, error)
	// Big is DD in big.Float arithmetic at prec bits; the function sets
	// c[i][k] (allocated by the caller at prec bits).
	Big(order int, prec uint) (func(t *big.Float, y []*big.Float, c [][]*big.Float) error, error)
}

// MaxDDDigits is the largest working precision, in decimal digits, that
// SolveTaylor runs in double-double arithmetic; beyond it the run uses
// big.Float. Double-double carries 106 bits (32 digits); one digit is left
// for the rounding of the recurrences' sums.
const MaxDDDigits = 31

// TaylorSettings controls SolveTaylor. A nil *TaylorSettings means Digits =
// MaxDDDigits (double-double) and the default step budget.
type TaylorSettings struct {
	// Digits is the working precision in decimal digits and the local
	// error tolerance per step, eps = 10^-Digits relative to max(1,
	// |y|_inf). Zero means MaxDDDigits; up to MaxDDDigits runs in
	// double-double, above in big.Float at ceil(Digits·log2 10) + 32 bits
	// (32 guard bits). Must be in [0, 10000]; otherwise ErrSettings.
	Digits int
	// MaxSteps bounds the number of steps; zero means DefaultMaxSteps.
	// Must be >= 0.
	MaxSteps int
	// Start, if not nil, is the start state at full precision (for a start
	// float64 cannot hold, such as a decimal orbit start); y0 then gives
	// only its float64 values. Its length must be the dimension.
	Start []*big.Float
	// OutTimes, if not nil, gives the output times at full precision, one
	// per entry of times (which then give their float64 values, used for
	// ordering and reporting). The integration hits these exactly.
	OutTimes []*big.Float
}

// TaylorStats counts a Taylor run's work.
type TaylorStats struct {
	// Steps is the number of Taylor steps (each one series of Order).
	Steps int
	// MinStep and MaxStep are the smallest and largest step taken (the
	// last series, which only serves outputs, is not counted).
	MinStep, MaxStep float64
	// KinkRestarts counts the series restarted on a kink (see
	// KinkSeries): steps shortened to end on a zero of a switching
	// function.
	KinkRestarts int
}

// TaylorResult is the outcome of SolveTaylor.
type TaylorResult struct {
	// Times are the output times reached (all requested ones on success).
	Times []float64
	// States holds the state at each time at the working precision
	// (double-double runs give 106-bit values); Float64 the same rounded
	// to float64.
	States  [][]*big.Float
	Float64 [][]float64
	// Arithmetic is "double-double" or "big.Float".
	Arithmetic string
	// Digits is the working precision in decimal digits, Prec in bits
	// (106 for double-double), Order the series order.
	Digits int
	Prec   uint
	Order  int
	Stats  TaylorStats
}

// TaylorOrder returns the series order of SolveTaylor for a tolerance eps,
//
//	p = ceil(-ln(eps)/2) + 1,
//
// the choice of Jorba & Zou (2005, Sect. 3.2) that minimises the work per
// unit time for analytic fields (the step is then about ρ/e², ρ the radius
// of convergence of the solution's series).
//
// An eps that is not in (0, 1) (zero from an underflow, or a NaN) has no
// order: TaylorOrder returns 0 then, and callers with more digits than a
// float64 eps can hold (about 307) use TaylorOrderDigits.
func TaylorOrder(eps float64) int {
	if !(eps > 0 && eps < 1) {
		return 0
	}
	return int(math.Ceil(-detmath.Log(eps)/2)) + 1
}

// TaylorOrderDigits is TaylorOrder for eps = 10^-digits, computed from the
// logarithm so that it holds for any number of digits (10^-digits itself
// underflows float64 beyond about 323 digits): ceil(digits·ln 10/2) + 1,
// and 0 for digits < 1.
func TaylorOrderDigits(digits int) int {
	if digits < 1 {
		return 0
	}
	return int(math.Ceil(float64(float64(digits)*math.Ln10)/2)) + 1
}

// MaxTaylorOrder caps the series order of SolveTaylor (the coefficient
// providers of package plumb take orders up to 1000). Up to 867 digits the
// Jorba–Zou order is below it; beyond, the order stays at the cap and the
// step rule, which holds for any order, takes shorter steps: h scales as
// eps^(1/p), so at 10000 digits a step is about 10^-10 of the radius of
// convergence instead of e^-2 (slow, but correct).
const MaxTaylorOrder = 1000

// log2Of10 is log2(10) (a constant, where math.Log2 is computed differently
// on different architectures).
const log2Of10 = 3.32192809488736234787031942948939017586

// guardBitsTaylor are the bits beyond Digits·log2 10 of a big.Float run
// (common practice: they absorb the rounding of O(order²) sums per step).
const guardBitsTaylor = 32

// SolveTaylor integrates y' = f(t, y) from (t0, y0) with a Taylor method of
// adaptive step and order chosen from the tolerance, in double-double or
// big.Float arithmetic, and returns the states at the given output times
// (increasing, >= t0), each the value of the Taylor polynomial of the step
// that contains it, evaluated at that exact time (the steps themselves are
// not shortened). It is the multiprecision reference integrator of the audit.
//
// Order and step (Jorba & Zou 2005, Sect. 3.2): with eps = 10^-Digits and
// the scale s = max(1, |y|_inf) at the step's start, the order is
// p = TaylorOrder(eps) and the step
//
//	h = 0.9 · min_{j = p-1, p} (eps·s / |c_j|_inf)^(1/j),
//
// c_j the solution's coefficients; the two last coefficients guard against
// a series with vanishing odd or even terms. The local error is then about
// eps·s. The global error of a chaotic flow grows as e^(λ_1 t): choose
// Digits from the span (as plumb.System.Trust does for its reference).
//
// Kinks: when f is a KinkSeries, every step ends at the first zero within
// it of a kink's switching function, and the next series takes the branch
// of the side the solution moves into (see KinkSeries and the package
// overview); a kink it cannot pass ends the run with ErrKink.
//
// Errors: a nil Series, wrong dimensions (ErrDimension), output times that
// are not finite, not increasing or before t0 (ErrSpan), bad settings
// (ErrSettings), all before any work. After stepping began: a non-finite
// state (ErrNonFinite), a step that no longer advances t
// (ErrStepUnderflow), the step budget (ErrStepBudget), a kink it cannot
// pass (ErrKink), a failing Series or a canceled context; each comes with the partial result (the outputs
// reached) and as a *StepError.
//
// Cost: per step one series of order p, O(p²) operations per product in
// the field, plus Horner sums; at 40 digits on a three-dimensional
// quadratic field about p = 48.
//
// References:
//
//	À. Jorba, M. Zou, A software package for the numerical integration of
//	  ODEs by means of high-order Taylor methods, Experimental Mathematics
//	  14 (2005) 99–117.
//	R. E. Moore, Interval Analysis, Prentice-Hall, 1966 (Taylor series of
//	  solutions by recurrences).
func SolveTaylor(ctx context.Context, f Series, t0 float64, y0 []float64, times []float64, s *TaylorSettings) (*TaylorResult, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if f == nil {
		return nil, fmt.Errorf("integrate: SolveTaylor with a nil Series: %w", ErrSettings)
	}
	var set TaylorSettings
	if s != nil {
		set = *s
	}
	if set.Digits < 0 || set.Digits > 10000 {
		return nil, fmt.Errorf("integrate: TaylorSettings.Digits = %d: must be in [0, 10000]: %w", set.Digits, ErrSettings)
	}
	if set.MaxSteps < 0 {
		return nil, fmt.Errorf("integrate: TaylorSettings.MaxSteps = %d: must be >= 0: %w", set.MaxSteps, ErrSettings)
	}
	if set.Digits == 0 {
		set.Digits = MaxDDDigits
	}
	if set.MaxSteps == 0 {
		set.MaxSteps = DefaultMaxSteps
	}
	n := f.Dim()
	if n < 1 || len(y0) != n {
		return nil, fmt.Errorf("integrate: SolveTaylor with %d start values for dimension %d: %w", len(y0), n, ErrDimension)
	}
	if math.IsNaN(t0) || math.IsInf(t0, 0) {
		return nil, fmt.Errorf("integrate: SolveTaylor t0 = %v: %w", t0, ErrNonFinite)
	}
	for i, v := range y0 {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("integrate: SolveTaylor y0[%d] = %v: %w", i, v, ErrNonFinite)
		}
	}
	if set.Start != nil && len(set.Start) != n {
		return nil, fmt.Errorf("integrate: TaylorSettings.Start has length %d, dimension %d: %w", len(set.Start), n, ErrDimension)
	}
	if set.OutTimes != nil && len(set.OutTimes) != len(times) {
		return nil, fmt.Errorf("integrate: TaylorSettings.OutTimes has length %d, times %d: %w", len(set.OutTimes), len(times), ErrDimension)
	}
	for i, v := range set.Start {
		if v == nil || v.IsInf() {
			return nil, fmt.Errorf("integrate: TaylorSettings.Start[%d] = %v: %w", i, v, ErrNonFinite)
		}
	}
	for i, v := range set.OutTimes {
		if v == nil || v.IsInf() {
			return nil, fmt.Errorf("integrate: TaylorSettings.OutTimes[%d] = %v: %w", i, v, ErrNonFinite)
		}
	}
	if len(times) == 0 {
		return nil, fmt.Errorf("integrate: SolveTaylor needs at least one output time: %w", ErrSpan)
	}
	prev := t0
	for i, t := range times {
		if math.IsNaN(t) || math.IsInf(t, 0) || t < prev || (i > 0 && t == prev) {
			return nil, fmt.Errorf("integrate: SolveTaylor output time %d = %v: must be finite, >= t0 = %v and increasing: %w", i, t, t0, ErrSpan)
		}
		prev = t
	}
	// Past about 300 digits 10^-Digits is subnormal or zero in float64:
	// the step rule then works with ln eps alone (see stepSize).
	eps := detmath.Pow(10, -float64(set.Digits))
	order := TaylorOrder(eps)
	if !(eps > 0x1p-1000) {
		order = TaylorOrderDigits(set.Digits)
	}
	order = min(order, MaxTaylorOrder)
	r := &taylorRun{ctx: ctx, n: n, eps: eps, logEps: -float64(float64(set.Digits) * math.Ln10), order: order,
		times: times, maxSteps: set.MaxSteps, t0: t0, start: set.Start, outTimes: set.OutTimes}
	res := &TaylorResult{Digits: set.Digits, Order: r.order}
	r.res = res
	var err error
	if set.Digits <= MaxDDDigits {
		res.Arithmetic, res.Prec = "double-double", 106
		err = r.runDD(f, y0)
	} else {
		res.Arithmetic = "big.Float"
		res.Prec = uint(math.Ceil(float64(set.Digits)*log2Of10)) + guardBitsTaylor
		err = r.runBig(f, y0, res.Prec)
	}
	return res, err
}
