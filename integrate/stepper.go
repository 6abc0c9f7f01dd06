package integrate

import (
	"context"
	"fmt"
	"math"
)

// Stepper integrates a problem one accepted step at a time, for callers that
// own their loop:
//
//	st, err := integrate.NewStepper(p, t1, integrate.DormandPrince54, nil)
//	if err != nil { ... }
//	for st.Next(ctx) {
//		t, y := st.T(), st.Y()
//		...
//	}
//	if err := st.Err(); err != nil { ... }
//
// The last step lands on t1 exactly. After set-up a Stepper does not allocate.
type Stepper struct {
	p      Problem
	m      Method
	sc     scheme
	cfg    *config
	n      int
	t0, t1 float64
	dir    float64

	t, h       float64 // current time and next step size to try (signed)
	tPrev      float64 // start of the last accepted step
	hLast      float64 // size of the last accepted step
	y, f0      []float64
	y1, f1     []float64
	yPrev      []float64
	fPrev      []float64
	coef       []float64 // dense output of the last accepted step
	denseReady bool
	// denseStale: the stage vectors the continuous extension of the last
	// step needs were overwritten (a failed Next, or SetState).
	denseStale bool
	tA, tB     *powTable   // x^(-alpha/2) and x^(beta/2), x = err²
	sB         float64     // Safety·errold^Beta
	sB0        float64     // Safety·(1e-4)^Beta, the start of sB
	rejected   bool        // the last attempt was rejected
	hTried     float64     // the step size of the last attempt
	fixed      bool        // m.fixedStep() > 0, cached off the per-step path
	fsal       bool        // sc.fsal(), cached
	sq         sqAttempter // sc, when it offers the squared norm
	stepIndex  int         // accepted steps, for fixed-step grids
	stiffCount int
	nonStiff   int
	sinceTest  int
	stats      Stats
	err        error
	done       bool
	started    bool
	lastNonFin *FieldError
	inProgress bool // Settings.Progress is running
}

// Stats counts the work of a solve. It holds counts only, so results are
// deterministic.
type Stats struct {
	// Evaluations counts the calls of the vector field during the solve
	// or the stepping. Calls made afterwards, by Solution.At rebuilding
	// steps, are counted by Solution.AtEvaluations.
	Evaluations int
	Accepted    int // accepted steps
	Rejected    int // rejected steps (error too large or non-finite)
	NonFinite   int // rejected steps whose estimate was NaN or Inf
	// Stiff reports that the stiffness test of the explicit pair fired
	// (15 positive tests, Hairer & Wanner 1996): the step size is limited by
	// stability, not accuracy, and an implicit method would be cheaper.
	Stiff bool
	// StiffAt is the time at which Stiff was first set.
	StiffAt float64
}

// NewStepper validates p, m and s for the span [p.T0, t1] and returns a
// Stepper positioned at (p.T0, p.Y0). A nil m means DormandPrince54; a nil s
// means defaults. It evaluates F once (twice for the automatic initial step);
// a panic in F there is returned as a *CallbackError.
func NewStepper(p Problem, t1 float64, m Method, s *Settings) (st *Stepper, err error) {
	defer func() {
		if v := recover(); v != nil {
			st, err = nil, Recovered(CallbackField, p.T0, v)
		}
	}()
	if m == nil {
		m = DormandPrince54
	}
	if err := p.validate(t1); err != nil {
		return nil, err
	}
	p = p.Own()
	n := len(p.Y0)
	cfg, err := resolve(s, n, p.T0, t1, m)
	if err != nil {
		return nil, err
	}
	if hf, span := m.fixedStep(), math.Abs(t1-p.T0); span > 0 && hf-span > math.Max(float64(1e-9*hf), float64(8*0x1p-52*math.Max(math.Abs(p.T0), math.Abs(t1)))) {
		// Clipping it would run one step of the span, not what was asked.
		// (A step within nextFixed's slack of the span is one whole step.)
		return nil, fmt.Errorf("integrate: %s step h = %v is longer than the span |t1 - t0| = %v (the run would be one step of %v): give a step at most the span: %w", m.Name(), hf, span, span, ErrSettings)
	}
	sc, err := m.newScheme(&p, n)
	if err != nil {
		return nil, err
	}
	st = &Stepper{p: p, m: m, sc: sc, cfg: cfg, n: n, t0: p.T0, t1: t1, dir: math.Copysign(1, t1-p.T0),
		fixed: m.fixedStep() > 0, fsal: sc.fsal()}
	st.sq, _ = sc.(sqAttempter)
	buf := make([]float64, 6*n+sc.denseSize()*n)
	st.y, st.f0, st.y1, st.f1, st.yPrev, st.fPrev = buf[:n:n], buf[n:2*n:2*n], buf[2*n:3*n:3*n], buf[3*n:4*n:4*n], buf[4*n:5*n:5*n], buf[5*n:6*n:6*n]
	st.coef = buf[6*n:]
	copy(st.y, p.Y0)
	st.t = p.T0
	st.tPrev = p.T0
	p.F(st.t, st.y, st.f0)
	st.stats.Evaluations++
	if i := firstNonFinite(st.f0); i >= 0 {
		return nil, fmt.Errorf("integrate: %w", &FieldError{T: st.t, Index: i, Value: st.f0[i], What: "derivative"})
	}
	st.tA = sharedPowTable(0.5 * cfg.alpha)        // err^(-alpha) = x^(-alpha/2)
	st.tB = sharedPowTable(-0.5 * cfg.beta)        // errold^beta = x^(beta/2)
	st.sB0 = float64(cfg.safety * st.tB.pow(1e-8)) // Hairer's FACOLD starts at 1e-4
	st.sB = st.sB0
	if hf := m.fixedStep(); hf > 0 {
		st.h = st.dir * hf
	} else {
		h := cfg.h0
		if h == 0 {
			h = st.initialStep(m.Order())
		}
		st.h = st.dir * math.Min(h, cfg.hmax)
	}
	return st, nil
}

// T returns the current time.
func (st *Stepper) T() float64 { return st.t }

// Y returns the current state. The slice is the Stepper's own: read it, do
// not modify or keep it.
func (st *Stepper) Y() []float64 { return st.y }

// DYDT returns F(T(), Y()). The slice is the Stepper's own.
func (st *Stepper) DYDT() []float64 { return st.f0 }

// H returns the size (signed) of the last accepted step.
func (st *Stepper) H() float64 { return st.hLast }

// Stats returns the work counts so far.
func (st *Stepper) Stats() Stats { return st.stats }

// Err returns the error that ended stepping, or nil.
func (st *Stepper) Err() error {
	if st == nil {
		return errNoStepper
	}
	return st.err
}

// Done reports whether t1 was reached.
func (st *Stepper) Done() bool { return st.done }

// Dense writes the continuous extension of the last accepted step at t into
// dst and returns it (dst is grown if short). It returns nil if t is outside
// the last step or no step was taken yet. For DormandPrince853 the first call
// after a step costs three extra evaluations.
func (st *Stepper) Dense(t float64, dst []float64) []float64 {
	if !st.started || st.hLast == 0 || st.denseStale {
		return nil
	}
	// theta maps the stored step [tPrev, t] onto [0, 1], as Solution.At
	// does, so both give the same bits.
	theta := (t - st.tPrev) / (st.t - st.tPrev)
	if !(theta >= 0 && theta <= 1) {
		return nil
	}
	st.prepareDense()
	if cap(dst) < st.n {
		dst = make([]float64, st.n)
	}
	dst = dst[:st.n]
	st.sc.interp(st.coef, theta, dst)
	return dst
}

func (st *Stepper) prepareDense() {
	if st.denseReady {
		return
	}
	st.stats.Evaluations += st.sc.dense(st.tPrev, st.hLast, st.yPrev, st.fPrev, st.y, st.f0, st.coef)
	st.denseReady = true
}

// Next takes one accepted step. It returns false at t1 or on error (see Err).
// It checks ctx once per call. A panic in a callback propagates (Solve
// recovers it); on a Stepper not made by NewStepper, Next returns false and
// Err an error wrapping ErrSettings.
func (st *Stepper) Next(ctx context.Context) bool {
	if st == nil {
		return false
	}
	if st.done || st.err != nil {
		return false
	}
	if st.cfg == nil {
		st.err = errNoStepper
		return false
	}
	if ctx != nil {
		// Watch ctx.Done (nil for a context that is never canceled): an
		// atomic load, where ctx.Err may take a lock.
		if done := ctx.Done(); done != nil {
			select {
			case <-done:
				st.err = fmt.Errorf("integrate: canceled at t=%g: %w", st.t, ctx.Err())
				return false
			default:
			}
		}
	}
	if !st.denseReady {
		// The attempts about to run overwrite the stage vectors; if none
		// is accepted, the last step's extension is gone.
		st.denseStale = true
	}
	if st.fixed {
		return st.nextFixed()
	}
	return st.nextAdaptive()
}

// SetState replaces the current state by y (len Dim) at the current time and
// evaluates F there, so that the next step starts from the new state; for
// codes that adjust the state between steps (a re-orthonormalised tangent
// basis, a renormalised perturbation, an impulse). y may be the slice Y
// returns, modified in place. Afterwards Dense returns nil until the next
// step. A wrong length is ErrDimension; a non-finite state or derivative
// is a FieldError.
func (st *Stepper) SetState(y []float64) error {
	if st == nil || st.cfg == nil {
		return errNoStepper
	}
	if len(y) != st.n {
		return fmt.Errorf("integrate: SetState: state has %d components, want %d: %w", len(y), st.n, ErrDimension)
	}
	if i := firstNonFinite(y); i >= 0 {
		return fmt.Errorf("integrate: SetState: %w", &FieldError{T: st.t, Index: i, Value: y[i], What: "state"})
	}
	copy(st.y, y)
	st.p.F(st.t, st.y, st.f0)
	st.stats.Evaluations++
	if i := firstNonFinite(st.f0); i >= 0 {
		return fmt.Errorf("integrate: SetState: %w", &FieldError{T: st.t, Index: i, Value: st.f0[i], What: "derivative"})
	}
	st.denseReady = false
	st.denseStale = true
	st.rejected = false
	st.lastNonFin = nil
	return nil
}

// copyRotateMax is the longest state accept copies instead of rotating
// (measured with BenchmarkKeepVsDrop on Lorenz, n = 3).
const copyRotateMax = 8

func (st *Stepper) accept(h float64, tNew float64) {
	// Keep the start of the step for dense output, then advance
	// (yPrev <- y <- y1). Short vectors are copied: that writes no
	// pointer, where rotating the six slices costs six write barriers
	// whenever the GC is marking, which a solve that keeps its steps
	// (and so allocates) meets often. Long ones are rotated.
	if n := st.n; n <= copyRotateMax {
		yPrev, y, y1 := st.yPrev[:n], st.y[:n], st.y1[:n]
		fPrev, f0, f1 := st.fPrev[:n], st.f0[:n], st.f1[:n]
		for i := range yPrev {
			yPrev[i], y[i] = y[i], y1[i]
			fPrev[i], f0[i] = f0[i], f1[i]
		}
	} else {
		st.yPrev, st.y, st.y1 = st.y, st.y1, st.yPrev
		st.fPrev, st.f0, st.f1 = st.f0, st.f1, st.fPrev
	}
	st.tPrev = st.t
	st.t = tNew
	st.hLast = h
	st.denseReady = false
	st.denseStale = false
	st.started = true
	st.stats.Accepted++
	st.stepIndex++
	if st.cfg.progress != nil {
		st.inProgress = true
		st.cfg.progress(st.t)
		st.inProgress = false
	}
}

// nonFinite records a non-finite candidate.
func (st *Stepper) nonFinite(tt float64) {
	st.stats.NonFinite++
	if i := firstNonFinite(st.y1); i >= 0 {
		st.lastNonFin = &FieldError{T: tt, Index: i, Value: st.y1[i], What: "state"}
	} else if i := firstNonFinite(st.f1); i >= 0 {
		st.lastNonFin = &FieldError{T: tt, Index: i, Value: st.f1[i], What: "derivative"}
	} else {
		// An intermediate stage was non-finite but y1 and F(t+h, y1) are
		// not: no single component to name.
		st.lastNonFin = &FieldError{T: tt, Index: -1, Value: math.NaN(), What: "error estimate"}
	}
}
