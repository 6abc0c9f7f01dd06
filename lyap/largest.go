package lyap

import (
	"context"
	"errors"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/detmath"
)

// Largest estimates the largest Lyapunov exponent of the flow p without a
// Jacobian, by the two-trajectory method of Benettin, Galgani & Strelcyn: a
// second trajectory starts at distance d0 = s.Separation from the first, the
// pair is integrated as one system of dimension 2n (so both see the same
// steps), and every renormalisation interval the second is pulled back to
// distance d0 along the current separation, accumulating ln(d/d0). The
// interval adapts so that d/d0 stays near s.MaxGrowth unless s.Interval fixes
// it; d0·MaxGrowth must stay small against the attractor for the separation
// to grow at the linear rate (with the defaults, about 1e-5 of the state's
// size).
//
// The result is a Spectrum with one exponent, its batch-means standard
// error and history, and Jacobian "two-trajectory". p.Jac is not used.
// Errors are those of Exponents; a separation that vanishes or stops being
// finite gives a GrowthError.
//
// Cost: per step, the method's evaluations of F on both trajectories. No
// allocation after set-up.
//
// References:
//
//	G. Benettin, L. Galgani, J.-M. Strelcyn, Kolmogorov entropy and
//	  numerical experiments, Phys. Rev. A 14 (1976) 2338–2345.
//	A. Wolf, J. B. Swift, H. L. Swinney, J. A. Vastano, Determining Lyapunov
//	  exponents from a time series, Physica D 16 (1985) 285–317.
func Largest(ctx context.Context, p integrate.Problem, s *Settings) (*Spectrum, error) {
	r, err := newTwoRun(p, s)
	if err != nil {
		return nil, err
	}
	if ctx == nil {
		ctx = context.Background()
	}
	func() {
		// A panic in the caller's field ends the run with a CallbackError
		// (one deferred recover per run).
		defer func() {
			if v := recover(); v != nil {
				r.err = fmt.Errorf("lyap: %w", integrate.Recovered(integrate.CallbackField, r.st.T(), v))
			}
		}()
		for r.step(ctx) {
		}
	}()
	sp := r.spectrum()
	return sp, needErrorBars(sp, r.err)
}

type twoRun struct {
	p      integrate.Problem
	cfg    *config
	n      int
	d0     float64
	st     *integrate.Stepper
	avg    *averager
	logs   []float64
	t0, t1 float64
	lastQR float64
	nextQR float64
	delta  float64
	rule   intervalRule
	evals  int
	qrs    int
	done   bool
	err    error
}

func newTwoRun(p integrate.Problem, s *Settings) (*twoRun, error) {
	if err := validateProblem(p); err != nil {
		return nil, err
	}
	p = p.Own() // workspaces of its own: p may be shared with other runs
	cfg, err := resolve(s)
	if err != nil {
		return nil, err
	}
	n := len(p.Y0)
	r := &twoRun{p: p, cfg: cfg, n: n, logs: make([]float64, 1), t0: p.T0}
	r.d0 = cfg.Separation
	if r.d0 == 0 {
		var x2 float64
		for _, v := range p.Y0 {
			x2 += float64(v * v)
		}
		r.d0 = 1e-8 * (1 + math.Sqrt(x2))
	}
	y0 := make([]float64, 2*n)
	copy(y0, p.Y0)
	e := r.d0 / math.Sqrt(float64(n))
	for i, v := range p.Y0 {
		y0[n+i] = v + e
	}
	r.avg = newAverager(cfg, 1, p.T0)
	r.t1 = r.avg.t1
	aug := integrate.Problem{F: r.field, T0: p.T0, Y0: y0}
	st, err := integrate.NewStepper(aug, r.t1, cfg.Method, &integrate.Settings{RelTol: cfg.RelTol, AbsTol: cfg.AbsTol, MaxSteps: cfg.MaxSteps})
	if err != nil {
		if errors.Is(err, integrate.ErrSettings) {
			return nil, &withSentinel{err, ErrSettings}
		}
		return nil, fmt.Errorf("lyap: %w", err)
	}
	r.st = st
	r.rule.target = cfg.maxGrowthLog
	r.lastQR, r.nextQR = p.T0, p.T0
	if cfg.Interval > 0 {
		r.nextQR = p.T0 + cfg.Interval
	}
	return r, nil
}

func (r *twoRun) field(t float64, y, dy []float64) {
	n := r.n
	r.evals += 2
	r.p.F(t, y[:n], dy[:n])
	r.p.F(t, y[n:], dy[n:])
}

func (r *twoRun) step(ctx context.Context) bool {
	if r.done {
		return false
	}
	st := r.st
	if !st.Next(ctx) {
		r.done = true
		if err := st.Err(); err != nil {
			r.err = wrapStepErr(err)
		}
		return false
	}
	t := st.T()
	last := st.Done()
	if last || t >= r.nextQR {
		if !r.renorm(t, last) {
			r.done = true
			return false
		}
	}
	if last {
		r.done = true
		return false
	}
	return true
}

// renorm pulls the second trajectory back to distance d0, writing the
// stepper's state and derivative in place as flowRun.reorth does.
func (r *twoRun) renorm(t float64, last bool) bool {
	n := r.n
	y := r.st.Y()
	var d2 float64
	for i := 0; i < n; i++ {
		e := y[n+i] - y[i]
		d2 += float64(e * e)
	}
	d := math.Sqrt(d2)
	if d == 0 || math.IsNaN(d) || math.IsInf(d, 0) {
		r.err = &GrowthError{T: t, Vector: 0, Value: d}
		return false
	}
	f := r.d0 / d
	for i := 0; i < n; i++ {
		y[n+i] = y[i] + float64(f*(y[n+i]-y[i]))
	}
	if err := r.st.SetState(y); err != nil {
		r.err = err
		return false
	}
	r.qrs++
	r.logs[0] = detmath.Log(d / r.d0)
	elapsed := t - r.lastQR
	r.lastQR = t
	_, stop := r.avg.observe(t, r.logs, last)
	if r.cfg.Interval > 0 {
		r.delta = r.cfg.Interval
	} else if elapsed > 0 {
		r.delta = r.rule.next(elapsed, math.Abs(r.logs[0]))
	}
	r.nextQR = r.avg.limit(r.lastQR + r.delta)
	if r.cfg.Progress != nil {
		r.cfg.Progress(t-r.t0, r.t1-r.t0)
	}
	return !stop
}

func (r *twoRun) spectrum() *Spectrum {
	sp := &Spectrum{Units: UnitsFlow, Kind: "flow", Dim: r.n, Method: r.cfg.Method.Name(), Jacobian: "two-trajectory"}
	r.avg.fill(sp, 1, r.lastQR)
	sp.Final = append([]float64(nil), r.st.Y()[:r.n]...)
	ist := r.st.Stats()
	sp.Stats = Stats{Steps: ist.Accepted, Rejected: ist.Rejected, Evaluations: r.evals, QR: r.qrs}
	return sp
}

// MapLargest estimates the largest Lyapunov exponent of the map m from x0,
// per iteration, by the two-trajectory method (see Largest): a second orbit
// starts at distance s.Separation, and every renormalisation interval
// (adaptive unless s.IntervalSteps fixes it) it is pulled back to that
// distance along the current separation, accumulating ln(d/d0). Only Next is
// used, so it serves maps without a Jacobian. s.Discard iterations are
// discarded, s.Iterations averaged.
//
// Errors are those of MapExponents (ErrNoJacobian excepted); a separation
// that vanishes or stops being finite gives a GrowthError with the partial
// Spectrum. No allocation after set-up.
//
// References:
//
//	G. Benettin, L. Galgani, J.-M. Strelcyn, Kolmogorov entropy and
//	  numerical experiments, Phys. Rev. A 14 (1976) 2338–2345.
func MapLargest(ctx context.Context, m Map, x0 []float64, s *Settings) (*Spectrum, error) {
	r, err := newMapTwoRun(m, x0, s)
	if err != nil {
		return nil, err
	}
	if ctx == nil {
		ctx = context.Background()
	}
	func() {
		// A panic in the caller's map ends the run with a CallbackError
		// (one deferred recover per run).
		defer func() {
			if v := recover(); v != nil {
				r.err = fmt.Errorf("lyap: %w", integrate.Recovered(integrate.CallbackMap, float64(r.it), v))
			}
		}()
		for r.step(ctx) {
		}
	}()
	sp := r.spectrum()
	return sp, needErrorBars(sp, r.err)
}

type mapTwoRun struct {
	m      Map
	cfg    *config
	n      int
	d0     float64
	x, x2  []float64
	tmp    []float64
	avg    *averager
	logs   []float64
	it     int
	total  int
	last   int
	nextQR int
	rule   intervalRule
	evals  int
	qrs    int
	done   bool
	err    error
}

func newMapTwoRun(m Map, x0 []float64, s *Settings) (*mapTwoRun, error) {
	if m == nil {
		return nil, fmt.Errorf("lyap: Map is nil: %w", ErrSystem)
	}
	n := m.Dim()
	if n <= 0 || len(x0) != n {
		return nil, fmt.Errorf("lyap: start has %d components, the map has %d: %w", len(x0), n, ErrDimension)
	}
	for i, v := range x0 {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("lyap: start component %d = %v: %w", i, v, ErrNonFinite)
		}
	}
	cfg, err := resolve(s)
	if err != nil {
		return nil, err
	}
	r := &mapTwoRun{m: m, cfg: cfg, n: n, logs: make([]float64, 1)}
	buf := make([]float64, 3*n)
	r.x, r.x2, r.tmp = buf[:n:n], buf[n:2*n:2*n], buf[2*n:]
	copy(r.x, x0)
	r.d0 = cfg.Separation
	if r.d0 == 0 {
		var x2 float64
		for _, v := range x0 {
			x2 += float64(v * v)
		}
		r.d0 = 1e-8 * (1 + math.Sqrt(x2))
	}
	e := r.d0 / math.Sqrt(float64(n))
	for i, v := range x0 {
		r.x2[i] = v + e
	}
	// The averager counts iterations as time.
	c := *cfg
	c.Transient, c.Duration = float64(cfg.Discard), float64(cfg.Iterations)
	r.avg = newAverager(&c, 1, 0)
	r.total = cfg.Discard + cfg.Iterations
	r.rule.target = cfg.maxGrowthLog
	r.nextQR = 1
	if cfg.IntervalSteps > 0 {
		r.nextQR = cfg.IntervalSteps
	}
	return r, nil
}

func (r *mapTwoRun) step(ctx context.Context) bool {
	if r.done {
		return false
	}
	if err := canceledAt(ctx, r.it); err != nil {
		r.err = err
		r.done = true
		return false
	}
	r.m.Next(r.x, r.tmp)
	r.x, r.tmp = r.tmp, r.x
	r.m.Next(r.x2, r.tmp)
	r.x2, r.tmp = r.tmp, r.x2
	r.evals += 2
	r.it++
	last := r.it >= r.total
	if last || r.it >= r.nextQR {
		if !r.renorm(last) {
			r.done = true
			return false
		}
	}
	if last {
		r.done = true
		return false
	}
	return true
}

func (r *mapTwoRun) renorm(last bool) bool {
	n := r.n
	var d2 float64
	for i := 0; i < n; i++ {
		e := r.x2[i] - r.x[i]
		d2 += float64(e * e)
	}
	d := math.Sqrt(d2)
	if d == 0 || math.IsNaN(d) || math.IsInf(d, 0) {
		r.err = &GrowthError{T: float64(r.it), Map: true, Vector: 0, Value: d}
		return false
	}
	f := r.d0 / d
	for i := 0; i < n; i++ {
		r.x2[i] = r.x[i] + float64(f*(r.x2[i]-r.x[i]))
	}
	r.qrs++
	r.logs[0] = detmath.Log(d / r.d0)
	elapsed := r.it - r.last
	r.last = r.it
	_, stop := r.avg.observe(float64(r.it), r.logs, last)
	delta := r.cfg.IntervalSteps
	if delta == 0 {
		delta = max(1, int(r.rule.next(float64(elapsed), math.Abs(r.logs[0]))))
	}
	next := r.avg.limit(float64(r.last + delta))
	r.nextQR = max(r.last+1, int(math.Ceil(next)))
	if r.cfg.Progress != nil {
		r.cfg.Progress(float64(r.it), float64(r.total))
	}
	return !stop
}

func (r *mapTwoRun) spectrum() *Spectrum {
	sp := &Spectrum{Units: UnitsMap, Kind: "map", Dim: r.n, Jacobian: "two-trajectory"}
	r.avg.fill(sp, 1, float64(r.last))
	sp.Final = append([]float64(nil), r.x...)
	sp.Stats = Stats{Steps: r.it, Evaluations: r.evals, QR: r.qrs}
	return sp
}
