package integrate

import (
	"context"
	"fmt"
	"math"
	"sync"
	"sync/atomic"
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
	Evaluations int // calls of the vector field
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

// initialStep is the starting step of Hairer, Nørsett & Wanner (1993,
// Sect. II.4, the HINIT routine of DOPRI5). It uses one evaluation and the
// y1/f1 buffers as scratch.
func (st *Stepper) initialStep(order int) float64 {
	var d0, d1 float64
	for i := range st.y {
		sk := st.cfg.atol[i] + float64(st.cfg.rtol[i]*math.Abs(st.y[i]))
		a, b := st.y[i]/sk, st.f0[i]/sk
		d0 += float64(a * a)
		d1 += float64(b * b)
	}
	n := float64(st.n)
	d0, d1 = math.Sqrt(d0/n), math.Sqrt(d1/n)
	h0 := 1e-6
	if d0 >= 1e-10 && d1 >= 1e-10 {
		h0 = 0.01 * d0 / d1
	}
	h0 = math.Min(h0, st.cfg.hmax)
	for i := range st.y {
		st.y1[i] = st.y[i] + float64(st.dir*h0*st.f0[i])
	}
	st.p.F(st.t+float64(st.dir*h0), st.y1, st.f1)
	st.stats.Evaluations++
	var d2 float64
	for i := range st.y {
		sk := st.cfg.atol[i] + float64(st.cfg.rtol[i]*math.Abs(st.y[i]))
		a := (st.f1[i] - st.f0[i]) / sk
		d2 += float64(a * a)
	}
	d2 = math.Sqrt(d2/n) / h0
	if math.IsNaN(d2) || math.IsInf(d2, 0) {
		return h0 * 1e-3
	}
	der := math.Max(d2, d1)
	var h1 float64
	if der <= 1e-15 {
		h1 = math.Max(1e-6, h0*1e-3)
	} else if x := 0.01 / der; x > 0 {
		// (0.01/der)^(1/order) by the controller's own log2 and 2^x:
		// math.Pow is computed differently on amd64 and arm64 (assembly
		// or fused pure Go), and the first step would then differ in its
		// last bits from one architecture to the other, and with it the
		// whole run. A relative error of 4e-6 is nothing to a first guess.
		var lx float64
		if x < 0x1p-1022 { // subnormal: scale into the normal range first
			lx = log2Ctl(float64(x*0x1p54)) - 54
		} else {
			lx = log2Ctl(x)
		}
		h1 = exp2Ctl(lx / float64(order))
	}
	return math.Min(math.Min(100*h0, h1), st.cfg.hmax)
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

// stepFailer is implemented by schemes whose step can fail without a
// non-finite value (an implicit method whose iteration did not converge).
type stepFailer interface {
	stepErr() error
}

func (st *Stepper) accept(h float64, tNew float64) {
	// Keep the start of the step for dense output, then advance: rotate
	// the buffers (yPrev <- y <- y1 <- old yPrev) instead of copying.
	st.yPrev, st.y, st.y1 = st.y, st.y1, st.yPrev
	st.fPrev, st.f0, st.f1 = st.f0, st.f1, st.fPrev
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

func (st *Stepper) nextAdaptive() bool {
	c := st.cfg
	for {
		if st.stats.Accepted+st.stats.Rejected >= c.maxSteps {
			st.err = &StepError{T: st.t, H: st.h, Err: fmt.Errorf("%d steps: %w", c.maxSteps, ErrStepBudget)}
			return false
		}
		h := st.h
		if math.Abs(h) > c.hmax {
			h = st.dir * c.hmax
		}
		last := false
		if (st.t+float64(1.01*h)-st.t1)*st.dir >= 0 {
			h = st.t1 - st.t
			last = true
		}
		if math.Abs(h) < c.hmin && !last {
			// Below MinStep: try MinStep itself, and give up only when a
			// step of that size was rejected.
			if st.rejected && math.Abs(st.hTried) <= c.hmin {
				return st.underflow(h)
			}
			h = st.dir * c.hmin
			if (st.t+float64(1.01*h)-st.t1)*st.dir >= 0 {
				h = st.t1 - st.t
				last = true
			}
		}
		if 0.1*math.Abs(h) <= math.Abs(st.t)*epsRound || h == 0 {
			return st.underflow(h)
		}
		st.hTried = h
		// The error test works on x = err²: the squared norm comes straight
		// from the scheme when it offers it (no square root on the path from
		// one step to the next). pA = err^(-Alpha).
		var accepted, finite bool
		var x, pA, sBNext float64
		if st.sq != nil {
			e2, ev := st.sq.attemptSq(st.t, h, st.y, st.f0, st.y1, st.f1, c.rtol, c.atol)
			st.stats.Evaluations += ev
			finite = e2 <= math.MaxFloat64 // false for NaN and +Inf
			accepted = e2 <= 1
			if e2 >= 1e-8 && e2 < 0x1p65 {
				// powTable.pow2, written out: this is the critical path.
				x = e2
				ta, tb := st.tA, st.tB
				b := math.Float64bits(x)
				k := int(b>>52&0x7ff) - 1023 - ptKMin
				j := int(b>>(52-5)) & (ptJ - 1)
				m := math.Float64frombits(b&(1<<52-1) | 1023<<52)
				r := float64(m*ta.inv[j]) - 1
				q := 1 + float64(r*(float64(ta.c2*r)-ta.a))
				qb := 1 + float64(r*(float64(tb.c2*r)-tb.a))
				pA = float64(float64(ta.k[k]*ta.p[j]) * q)
				sBNext = float64(c.safety * float64(float64(tb.k[k]*tb.p[j])*qb))
			} else if finite {
				x = max(e2, errSqFloor)
				pA, sBNext = st.errPow(x, 0)
			}
		} else {
			err, ev := st.sc.attempt(st.t, h, st.y, st.f0, st.y1, st.f1, c.rtol, c.atol)
			st.stats.Evaluations += ev
			finite = err <= math.MaxFloat64
			accepted = err <= 1
			if finite && accepted && st.fsal && (firstNonFinite(st.y1) >= 0 || firstNonFinite(st.f1) >= 0) {
				finite = false
			}
			if finite {
				x = max(float64(err*err), errSqFloor) // +Inf for err > 1e154: errPow then uses err
				pA, sBNext = st.errPow(x, err)
			}
		}
		if !finite {
			st.nonFinite(st.t + h)
			st.stats.Rejected++
			st.rejected = true
			st.h = 0.25 * h
			continue
		}
		if !accepted {
			// Rejected: shrink by Safety·err^(-Alpha), at least MinFactor.
			fac := float64(c.safety * pA)
			if fac < c.facMin {
				fac = c.facMin
			}
			st.stats.Rejected++
			st.rejected = true
			st.lastNonFin = nil
			st.h = h * fac
			continue
		}
		if !st.fsal {
			st.p.F(st.t+h, st.y1, st.f1)
			st.stats.Evaluations++
			if firstNonFinite(st.y1) >= 0 || firstNonFinite(st.f1) >= 0 {
				st.nonFinite(st.t + h)
				st.stats.Rejected++
				st.rejected = true
				st.h = 0.25 * h
				continue
			}
		}
		// Accepted: PI control, h_new = h·Safety·err^(-Alpha)·errold^Beta,
		// with sB = Safety·errold^Beta kept from the previous step, so that
		// only err^(-Alpha) (a table look-up and a quadratic, see powTable)
		// lies between this step's error and the next step.
		//
		// A dead band (keep h when 0.5 <= err <= 1 and skip the power, as
		// Boost.Odeint and GSL do) was measured on Lorenz to t = 100 against
		// the error at t = 20: with polynomial log2/exp2 it saved 5% at tol
		// 1e-12, broke even at 1e-10 and lost 4% at 1e-8 (more rejections,
		// larger errors); with the table power below it saves nothing (same
		// time, 10-20% larger errors at 1e-8 and 1e-10). It is not used: the
		// controller stays that of Hairer & Wanner's DOPRI5.
		fac := float64(pA * st.sB)
		if fac > c.facMax {
			fac = c.facMax
		}
		if fac < c.facMin {
			fac = c.facMin
		}
		if st.rejected && fac > 1 {
			fac = 1
		}
		st.sB = sBNext // errold = max(err, 1e-4), as Hairer's FACOLD
		if st.cfg.stiffEvery >= 0 && !st.stats.Stiff {
			st.stiffTest(h)
		}
		tNew := st.t + h
		if last {
			tNew = st.t1
		}
		st.accept(h, tNew)
		st.rejected = false
		st.lastNonFin = nil
		st.h = h * fac
		if last {
			st.done = true
		}
		return true
	}
}

// underflow ends stepping with ErrStepUnderflow at step size h; when the
// rejections that shrank the step were non-finite values, the error also
// wraps the FieldError that says where and which component.
func (st *Stepper) underflow(h float64) bool {
	var cause error = ErrStepUnderflow
	if st.lastNonFin != nil && st.rejected {
		cause = fmt.Errorf("%w: %w", ErrStepUnderflow, st.lastNonFin)
	}
	st.err = &StepError{T: st.t, H: h, Err: cause}
	return false
}

// stiffTest runs Hairer's stiffness test on the step just attempted: every
// stiffEvery accepted steps, and at every step while suspicion lasts; 15
// positive tests set Stats.Stiff, 6 negative ones clear the suspicion.
func (st *Stepper) stiffTest(h float64) {
	if st.cfg.stiffEvery < 0 || st.stats.Stiff {
		return
	}
	st.sinceTest++
	if st.stiffCount == 0 && st.sinceTest < st.cfg.stiffEvery {
		return
	}
	st.sinceTest = 0
	hl, limit, ok := st.sc.stiffness(h, st.y1, st.f1)
	if !ok {
		return
	}
	if hl > limit {
		st.nonStiff = 0
		st.stiffCount++
		if st.stiffCount == 15 {
			st.stats.Stiff = true
			st.stats.StiffAt = st.t
		}
	} else if st.stiffCount > 0 {
		st.nonStiff++
		if st.nonStiff == 6 {
			st.stiffCount = 0
		}
	}
}

// nextFixed takes one step of a fixed-step method. Step k ends at
// t0 + k·h (by multiplication), the last one at t1.
func (st *Stepper) nextFixed() bool {
	if st.stats.Accepted >= st.cfg.maxSteps {
		st.err = &StepError{T: st.t, H: st.h, Err: fmt.Errorf("%d steps: %w", st.cfg.maxSteps, ErrStepBudget)}
		return false
	}
	hf := st.h
	tNew := st.t0 + float64(float64(st.stepIndex+1)*hf)
	last := false
	// The last step: within a few ulps of t1 (k·h may round short of it),
	// or within 1e-9 of a step (no sliver of a step at the end).
	if (tNew-st.t1)*st.dir >= -math.Max(float64(1e-9*math.Abs(hf)), float64(8*0x1p-52*math.Max(math.Abs(st.t0), math.Abs(st.t1)))) {
		tNew = st.t1
		last = true
	}
	h := tNew - st.t
	_, ev := st.sc.attempt(st.t, h, st.y, st.f0, st.y1, st.f1, st.cfg.rtol, st.cfg.atol)
	st.stats.Evaluations += ev
	if f, ok := st.sc.(stepFailer); ok {
		if cause := f.stepErr(); cause != nil {
			st.err = &StepError{T: st.t, H: h, Err: cause}
			return false
		}
	}
	if !st.sc.fsal() {
		st.p.F(tNew, st.y1, st.f1)
		st.stats.Evaluations++
	}
	if i := firstNonFinite(st.y1); i >= 0 {
		st.err = &StepError{T: st.t, H: h, Err: &FieldError{T: tNew, Index: i, Value: st.y1[i], What: "state"}}
		return false
	}
	if i := firstNonFinite(st.f1); i >= 0 {
		st.err = &StepError{T: st.t, H: h, Err: &FieldError{T: tNew, Index: i, Value: st.f1[i], What: "derivative"}}
		return false
	}
	st.accept(h, tNew)
	if last {
		st.done = true
	}
	return true
}

// errSqFloor bounds err² from below (err = 1e-10): an exact step (err = 0)
// must still give a finite factor, clamped to MaxFactor.
const errSqFloor = 1e-20

// errPow returns err^(-Alpha) and Safety·max(err, 1e-4)^Beta (the sB of
// the next step, should this one be accepted) from x = err² (x >=
// errSqFloor). Past the table (x >= 2^65, a rejected step with err >
// 2^32.5) it uses log2Ctl and exp2Ctl, of err when given (x may have
// overflowed), else of x.
func (st *Stepper) errPow(x, err float64) (pA, sB float64) {
	if x >= 1e-8 && x < 0x1p65 {
		pA, pB := st.tA.pow2(st.tB, x)
		return pA, float64(st.cfg.safety * pB)
	}
	if x < 1e-8 {
		return st.tA.pow(x), st.sB0
	}
	if err > 0 {
		return exp2Ctl(-float64(st.cfg.alpha * log2Ctl(err))), st.sB0
	}
	return exp2Ctl(-float64(float64(0.5*st.cfg.alpha) * log2Ctl(x))), st.sB0
}

// powTable evaluates x^(-a) for x in [2^ptKMin, 2^(ptKMax+1)), the
// step-size controller's power of the squared error norm, with a table
// look-up on the exponent and on the leading mantissa bits and a quadratic
// for the rest. Writing x = 2^k·c_j·(1+r), with c_j = 1 + (j+1/2)/32 the
// centre of the mantissa interval j and |r| < 1/65,
//
//	x^(-a) = 2^(-a·k) · c_j^(-a) · (1+r)^(-a),
//	(1+r)^(-a) ≈ 1 - a·r + a(a+1)/2·r²,
//
// whose truncation error |a(a+1)(a+2)/6|·|r|³ is below 1.2e-7 for the
// default Alpha = 0.17 (a = 0.085) and below 3.7e-6 for |a| <= 1 (checked
// against math.Pow in TestPowTable). On a cheap vector field (Lorenz, about
// 80 ns per step) this power sits on the critical path from one step to the
// next: the library's math.Log and math.Exp took a third of a step; this
// takes a few multiplications. The tables are filled at set-up with
// log2Prec and exp2Prec (IEEE arithmetic only), so the factor has the same
// bits on every architecture.
//
// References:
//
//	J.-M. Muller, Elementary Functions: Algorithms and Implementation, 3rd
//	  ed., Birkhäuser 2016 (table-based range reduction).
type powTable struct {
	a, c2  float64                      // a and a(a+1)/2
	k      [ptKMax - ptKMin + 1]float64 // 2^(-a·k)
	inv, p [ptJ]float64                 // 1/c_j and c_j^(-a)
}

const (
	ptKMin = -67 // 2^-67 < 1e-20 = errSqFloor
	ptKMax = 64
	ptJ    = 32 // mantissa intervals (5 leading bits)
)

func newPowTable(a float64) *powTable {
	t := &powTable{a: a, c2: float64(0.5 * float64(a*(a+1)))}
	for i := range t.k {
		t.k[i] = exp2Prec(-float64(a * float64(i+ptKMin)))
	}
	for j := range t.inv {
		c := 1 + float64((float64(j)+0.5)/ptJ)
		t.inv[j] = 1 / c
		t.p[j] = exp2Prec(-float64(a * log2Prec(c)))
	}
	return t
}

// Filling a powTable takes about 200 evaluations of exp2Prec, some 25 µs:
// 2-3% of a whole Lorenz run to t = 100 with DormandPrince853 at tol
// 1e-12. The tables are read-only once filled, so Steppers share them:
// sharedPowTable keeps the first powTableKeep exponents asked for (the
// defaults of the methods and a few of the caller's own) and builds the
// rest afresh. A table depends only on a, so sharing changes no result.
var (
	powTables     sync.Map // math.Float64bits(a) -> *powTable
	powTablesKept atomic.Int32
)

const powTableKeep = 32

func sharedPowTable(a float64) *powTable {
	key := math.Float64bits(a)
	if t, ok := powTables.Load(key); ok {
		return t.(*powTable)
	}
	t := newPowTable(a)
	if powTablesKept.Add(1) > powTableKeep {
		powTablesKept.Add(-1) // full: this one is not kept
		return t
	}
	if old, loaded := powTables.LoadOrStore(key, t); loaded {
		powTablesKept.Add(-1) // built at the same time elsewhere
		return old.(*powTable)
	}
	return t
}

// pow returns x^(-a) for a normal x in [2^ptKMin, 2^(ptKMax+1)).
func (t *powTable) pow(x float64) float64 {
	b := math.Float64bits(x)
	k := int(b>>52&0x7ff) - 1023 - ptKMin
	j := int(b>>(52-5)) & (ptJ - 1)
	m := math.Float64frombits(b&(1<<52-1) | 1023<<52) // in [1, 2)
	r := float64(m*t.inv[j]) - 1
	q := 1 + float64(r*(float64(t.c2*r)-t.a))
	return float64(float64(t.k[k]*t.p[j]) * q)
}

// pow2 returns x^(-t.a) and x^(-u.a) for the same x, sharing the range
// reduction (both tables have the same layout and mantissa centres).
func (t *powTable) pow2(u *powTable, x float64) (float64, float64) {
	b := math.Float64bits(x)
	k := int(b>>52&0x7ff) - 1023 - ptKMin
	j := int(b>>(52-5)) & (ptJ - 1)
	m := math.Float64frombits(b&(1<<52-1) | 1023<<52)
	r := float64(m*t.inv[j]) - 1
	q := 1 + float64(r*(float64(t.c2*r)-t.a))
	qu := 1 + float64(r*(float64(u.c2*r)-u.a))
	return float64(float64(t.k[k]*t.p[j]) * q), float64(float64(u.k[k]*u.p[j]) * qu)
}

// log2Prec returns log2(m) for m in [1, 2] to about 1e-16, from
// ln m = 2·atanh(s), s = (m-1)/(m+1) <= 1/3, summed to s^31. For set-up only.
func log2Prec(m float64) float64 {
	s := (m - 1) / (m + 1)
	z := float64(s * s)
	var p float64
	for i := 31; i >= 1; i -= 2 {
		p = float64(p*z) + 1/float64(i)
	}
	return float64(float64(2*math.Log2E*s) * p)
}

// exp2Prec returns 2^x for |x| <= 1000 to about 1e-16: 2^k by the exponent
// field and e^u, |u| <= ln(2)/2, by its Taylor series to u^20. For set-up only.
func exp2Prec(x float64) float64 {
	const shift = 0x1.8p52
	kf := (x + shift) - shift
	u := float64((x - kf) * math.Ln2)
	p := 1.0
	for i := 20; i >= 1; i-- {
		p = 1 + float64(float64(p*u)/float64(i))
	}
	return p * math.Float64frombits(uint64(int(kf)+1023)<<52)
}

// sqAttempter is implemented by schemes whose trial step can return the
// squared error norm err² (NaN when y1 or f1 holds a NaN or Inf): the
// stepper then needs no square root and no scan for non-finite values per
// step. attempt must return the square root of the same value.
type sqAttempter interface {
	attemptSq(t, h float64, y, f0, y1, f1, rtol, atol []float64) (errSq float64, evals int)
}

// epsRound is the unit roundoff used in the step-size underflow test.
const epsRound = 2.3e-16

// log2Ctl and exp2Ctl evaluate the controller's power where powTable's
// range ends (a rejected step with err > 2^32.5). They reduce the argument
// with bit manipulation and evaluate short polynomials (Estrin's scheme);
// products are rounded explicitly (float64(x*y)), so the result is the same
// on every architecture. Their errors, absolute below 2e-6 for log2Ctl on
// [1e-20, 1e300] and relative below 3.5e-6 for exp2Ctl on [-200, 200]
// (checked against math.Log2 and math.Exp2 in TestControllerExponents), put
// the step-size factor within 4e-6 (relative) of Safety·err^(-Alpha): far
// below what a heuristic factor with Safety = 0.9 needs. (They were the
// controller's main path before powTable, and replaced math.Log and
// math.Exp, which took about a third of a Lorenz step.)
//
// References:
//
//	J.-M. Muller, Elementary Functions: Algorithms and Implementation, 3rd
//	  ed., Birkhäuser 2016 (range reduction x = 2^k·m; the series
//	  ln m = 2·atanh((m-1)/(m+1)); 2^f = e^(f·ln 2) on |f| <= 1/2;
//	  Estrin's scheme).

// log2Ctl returns log2(x) for a positive, normal, finite x.
func log2Ctl(x float64) float64 {
	b := math.Float64bits(x)
	k := int(b>>52&0x7ff) - 1023
	m := math.Float64frombits(b&(1<<52-1) | 1023<<52) // x = 2^k·m, m in [1, 2)
	if m > math.Sqrt2 {
		m = 0.5 * m
		k++
	}
	// m in [1/√2, √2]: s = (m-1)/(m+1) has |s| <= 0.1716, z = s² <= 0.0295,
	// and ln m = 2s(1 + z/3 + z²/5) leaves a relative error below
	// z³/(7(1-z)) < 3.7e-6, so log2 m is off by less than 1.9e-6.
	s := (m - 1) / (m + 1)
	z := float64(s * s)
	p := (1 + float64(z*(1.0/3))) + float64(float64(z*z)*(1.0/5))
	return float64(k) + float64(float64(2*math.Log2E*s)*p)
}

// exp2Ctl returns 2^x for x in [-1000, 1000]; below it returns 0.
func exp2Ctl(x float64) float64 {
	if x < -1000 {
		return 0
	}
	if x > 1000 {
		return math.Inf(1)
	}
	// Round to the nearest integer k (adding and subtracting 1.5·2^52 is
	// exact IEEE rounding for |x| < 2^51); f = x - k is in [-1/2, 1/2].
	const shift = 0x1.8p52
	kf := (x + shift) - shift
	f := x - kf
	// 2^f = e^u, u = f·ln 2 in [-0.3466, 0.3466]; the Taylor polynomial of
	// degree 5 leaves a relative error below e^|u|·u⁶/6! < 3.4e-6.
	u := float64(f * math.Ln2)
	u2 := float64(u * u)
	lo := (1 + u) + float64(u2*(0.5+float64(u*(1.0/6))))
	hi := (1.0 / 24) + float64(u*(1.0/120))
	p := lo + float64(float64(u2*u2)*hi)
	// 2^k is a normal number for |k| <= 1000.
	return p * math.Float64frombits(uint64(int(kf)+1023)<<52)
}
