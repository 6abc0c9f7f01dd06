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

// stepSafety shrinks the step of the Jorba–Zou rule (common practice: it
// keeps the first neglected term below eps when the last two coefficients
// underestimate the tail).
const stepSafety = 0.9

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
// Digits from the span (see plumb.Reference).
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

type taylorRun struct {
	ctx      context.Context
	n        int
	eps      float64
	logEps   float64 // ln eps, -Digits·ln 10 (eps itself underflows past ~300 digits)
	order    int
	times    []float64
	maxSteps int
	t0       float64
	start    []*big.Float
	outTimes []*big.Float
	res      *TaylorResult
}

// stepSize is the Jorba–Zou step from the inf-norm logarithms of the last
// two coefficients (lc[0] for order p-1, lc[1] for p; -Inf for a zero
// coefficient) and the state scale; +Inf when both vanish (a polynomial
// solution).
func (r *taylorRun) stepSize(lc [2]float64, scale float64) float64 {
	var le float64
	if es := float64(r.eps * scale); es > 0x1p-1000 {
		le = detmath.Log(es)
	} else {
		// eps·scale is subnormal or zero: sum the logarithms instead.
		le = r.logEps + detmath.Log(scale)
	}
	h := math.Inf(1)
	for i, j := range []int{r.order - 1, r.order} {
		if j < 1 || math.IsInf(lc[i], -1) {
			continue
		}
		h = math.Min(h, detmath.Exp((le-lc[i])/float64(j)))
	}
	return stepSafety * h
}

func (r *taylorRun) record(tout float64, y []*big.Float) {
	res := r.res
	res.Times = append(res.Times, tout)
	st := make([]*big.Float, r.n)
	f64 := make([]float64, r.n)
	for i, v := range y {
		st[i] = new(big.Float).Copy(v)
		f64[i], _ = v.Float64()
	}
	res.States = append(res.States, st)
	res.Float64 = append(res.Float64, f64)
}

func (r *taylorRun) stats(h float64) {
	st := &r.res.Stats
	if st.MinStep == 0 || h < st.MinStep {
		st.MinStep = h
	}
	if h > st.MaxStep {
		st.MaxStep = h
	}
}

func (r *taylorRun) fail(t, h float64, err error) error {
	return &StepError{T: t, H: h, Err: err}
}

// runDD integrates in double-double.
func (r *taylorRun) runDD(f Series, y0 []float64) error {
	var coef func(t dd.Float, y []dd.Float, c [][]dd.Float) error
	var jet KinkJetDD
	var err error
	ks, kinked := f.(KinkSeries)
	kinked = kinked && len(ks.Kinks()) > 0
	if kinked {
		jet, err = ks.KinkDD(r.order)
		if jet != nil {
			coef = jet.Coef
		}
	} else {
		coef, err = f.DD(r.order)
	}
	if err != nil {
		return fmt.Errorf("integrate: Taylor series of order %d: %w", r.order, err)
	}
	n, p := r.n, r.order
	c := make([][]dd.Float, n)
	for i := range c {
		c[i] = make([]dd.Float, p+1)
	}
	y := make([]dd.Float, n)
	for i, v := range y0 {
		y[i] = dd.From(v)
		if r.start != nil {
			y[i] = dd.FromBig(r.start[i])
		}
	}
	yn := make([]dd.Float, n)
	bigY := make([]*big.Float, n)
	emit := func(tout float64) {
		for i, v := range yn {
			bigY[i] = v.Big().SetPrec(106)
		}
		r.record(tout, bigY)
	}
	t := dd.From(r.t0)
	k := 0
	// horner sets yn to the step's polynomial at the time at.
	horner := func(at dd.Float) error {
		hd := dd.Sub(at, t)
		for i := range n {
			var s dd.Float
			for j := p; j >= 0; j-- {
				s = dd.Add(dd.Mul(s, hd), c[i][j])
			}
			if !s.IsFinite() {
				return r.fail(t.Float64(), hd.Float64(), fmt.Errorf("component %d: %w", i, ErrNonFinite))
			}
			yn[i] = s
		}
		return nil
	}
	stepOf := func() (float64, float64) {
		scale := 1.0
		lc := [2]float64{math.Inf(-1), math.Inf(-1)}
		for i := range n {
			scale = math.Max(scale, math.Abs(y[i].Hi))
			for q, j := range []int{p - 1, p} {
				if a := math.Abs(c[i][j].Hi); a > 0 {
					lc[q] = math.Max(lc[q], detmath.Log(a))
				}
			}
		}
		return r.stepSize(lc, scale), scale
	}
	var kt *kinkTrack
	if kinked {
		kt = newKinkTrack(ks.Kinks(), kinkJetOfDD(jet, p, func() error { return coef(t, y, c) }, stepOf), p, r.eps, kinkPrecDD)
	}
	for k < len(r.times) && r.times[k] == r.t0 {
		copy(yn, y)
		emit(r.t0)
		k++
	}
	for k < len(r.times) {
		if err := r.ctx.Err(); err != nil {
			return fmt.Errorf("integrate: canceled at t=%g: %w", t.Float64(), err)
		}
		if r.res.Stats.Steps >= r.maxSteps {
			return r.fail(t.Float64(), 0, fmt.Errorf("%d steps: %w", r.maxSteps, ErrStepBudget))
		}
		var h float64
		var land *big.Float
		if kt == nil {
			if err := coef(t, y, c); err != nil {
				return r.fail(t.Float64(), 0, err)
			}
			h, _ = stepOf()
		} else {
			if land, h, err = r.kinkStep(kt, t.Float64()); err != nil {
				return err
			}
		}
		// Outputs inside the step are the Taylor polynomial's values there
		// (the series is as accurate inside the step as at its end).
		for k < len(r.times) && r.times[k]-t.Float64() <= h {
			toutDD := dd.From(r.times[k])
			if r.outTimes != nil {
				toutDD = dd.FromBig(r.outTimes[k])
			}
			if err := horner(toutDD); err != nil {
				return err
			}
			emit(r.times[k])
			k++
		}
		r.res.Stats.Steps++
		if k == len(r.times) {
			break
		}
		hd := dd.From(h)
		if land != nil {
			hd = dd.FromBig(land)
			if !(h > 0) || dd.Add(t, hd) == t {
				continue // a kink at the point itself: restart here
			}
		}
		if !(h > 0) || dd.Add(t, hd) == t {
			return r.fail(t.Float64(), h, ErrStepUnderflow)
		}
		r.stats(h)
		tn := dd.Add(t, hd)
		if err := horner(tn); err != nil {
			return err
		}
		t = tn
		copy(y, yn)
	}
	return nil
}

// runBig integrates in big.Float at prec bits.
func (r *taylorRun) runBig(f Series, y0 []float64, prec uint) (err error) {
	var tf, h float64
	defer func() {
		// Inf - Inf in the Horner sums (big.Float has no NaN).
		if v := recover(); v != nil {
			if _, ok := v.(big.ErrNaN); !ok {
				panic(v)
			}
			err = r.fail(tf, h, ErrNonFinite)
		}
	}()
	var coef func(t *big.Float, y []*big.Float, c [][]*big.Float) error
	var jet KinkJetBig
	ks, kinked := f.(KinkSeries)
	kinked = kinked && len(ks.Kinks()) > 0
	if kinked {
		jet, err = ks.KinkBig(r.order, prec)
		if jet != nil {
			coef = jet.Coef
		}
	} else {
		coef, err = f.Big(r.order, prec)
	}
	if err != nil {
		return fmt.Errorf("integrate: Taylor series of order %d at %d bits: %w", r.order, prec, err)
	}
	n, p := r.n, r.order
	nf := func() *big.Float { return new(big.Float).SetPrec(prec) }
	c := make([][]*big.Float, n)
	for i := range c {
		c[i] = make([]*big.Float, p+1)
		for j := range c[i] {
			c[i][j] = nf()
		}
	}
	y := make([]*big.Float, n)
	for i, v := range y0 {
		y[i] = nf().SetFloat64(v)
		if r.start != nil {
			y[i].Set(r.start[i])
		}
	}
	t := nf().SetFloat64(r.t0)
	hb, s, sm, tout, tn, dt := nf(), nf(), nf(), nf(), nf(), nf()
	yn := make([]*big.Float, n)
	for i := range yn {
		yn[i] = nf()
	}
	horner := func(at *big.Float) error {
		dt.Sub(at, t)
		for i := range n {
			// Horner with two values in turn: big.Float's Mul allocates
			// when the result aliases an operand.
			s.SetInt64(0)
			for j := p; j >= 0; j-- {
				sm.Mul(s, dt)
				s.Add(sm, c[i][j])
			}
			if s.IsInf() {
				return r.fail(tf, h, fmt.Errorf("component %d: %w", i, ErrNonFinite))
			}
			yn[i].Set(s)
		}
		return nil
	}
	stepOf := func() (float64, float64) {
		scale := 1.0
		lc := [2]float64{math.Inf(-1), math.Inf(-1)}
		for i := range n {
			yf, _ := y[i].Float64()
			scale = math.Max(scale, math.Abs(yf))
			for q, j := range []int{p - 1, p} {
				lc[q] = math.Max(lc[q], logAbs(c[i][j]))
			}
		}
		return r.stepSize(lc, scale), scale
	}
	var kt *kinkTrack
	if kinked {
		kt = newKinkTrack(ks.Kinks(), kinkJetOfBig(jet, p, prec, func() error { return coef(t, y, c) }, stepOf), p, r.eps, prec)
	}
	k := 0
	for k < len(r.times) && r.times[k] == r.t0 {
		r.record(r.t0, y)
		k++
	}
	for k < len(r.times) {
		tf, _ = t.Float64()
		if err := r.ctx.Err(); err != nil {
			return fmt.Errorf("integrate: canceled at t=%g: %w", tf, err)
		}
		if r.res.Stats.Steps >= r.maxSteps {
			return r.fail(tf, 0, fmt.Errorf("%d steps: %w", r.maxSteps, ErrStepBudget))
		}
		var land *big.Float
		if kt == nil {
			if err := coef(t, y, c); err != nil {
				return r.fail(tf, 0, err)
			}
			h, _ = stepOf()
		} else {
			if land, h, err = r.kinkStep(kt, tf); err != nil {
				return err
			}
		}
		for k < len(r.times) && r.times[k]-tf <= h {
			tout.SetFloat64(r.times[k])
			if r.outTimes != nil {
				tout.Set(r.outTimes[k])
			}
			if err := horner(tout); err != nil {
				return err
			}
			r.record(r.times[k], yn)
			k++
		}
		r.res.Stats.Steps++
		if k == len(r.times) {
			break
		}
		hb.SetFloat64(h)
		if land != nil {
			hb.Set(land)
			if !(h > 0) || s.Add(t, hb).Cmp(t) == 0 {
				continue // a kink at the point itself: restart here
			}
		}
		if !(h > 0) || math.IsInf(h, 0) || s.Add(t, hb).Cmp(t) == 0 {
			return r.fail(tf, h, ErrStepUnderflow)
		}
		r.stats(h)
		tn.Add(t, hb)
		if err := horner(tn); err != nil {
			return err
		}
		t.Set(tn)
		for i := range y {
			y[i].Set(yn[i])
		}
	}
	return nil
}

// logAbs returns ln|x| for a big.Float of any exponent (-Inf for 0).
func logAbs(x *big.Float) float64 {
	if x.Sign() == 0 {
		return math.Inf(-1)
	}
	if x.IsInf() {
		return math.Inf(1)
	}
	var m big.Float
	e := x.MantExp(&m)
	mf, _ := m.Float64()
	return detmath.Log(math.Abs(mf)) + float64(float64(e)*math.Ln2)
}
