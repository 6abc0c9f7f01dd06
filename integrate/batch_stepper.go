package integrate

import (
	"context"
	"fmt"
	"math"
	"runtime"
)

// BatchStepper advances the members of a BatchProblem in lockstep with
// Dormand–Prince 5(4), one accepted step per Next, with one step size for
// all: the step's error norm is the largest of the members' norms, so
// every member meets the tolerance. The controller is Solve's (the same
// PI controller, initial step and step-size limits), so a batch of one
// member takes the same steps as Solve with DormandPrince54 and gives the
// same bits.
//
// With more than one block of members (BatchBlock) and more than one
// worker, the blocks are shared among goroutines; only the largest error
// norm is combined across them, and a maximum does not depend on the
// order of combination, so results are bit-identical whatever the number
// of workers or GOMAXPROCS. Call Close when done with a BatchStepper that
// is not run to its end (Next returning false stops the goroutines too).
// After set-up, Next does not allocate.
type BatchStepper struct {
	p        BatchProblem
	cfg      *config
	n, m     int
	blocks   []*batchBlock
	sqrtInvN float64
	t0, t1   float64
	dir      float64

	t, h, tPrev, hLast float64
	hTried             float64
	rejected           bool
	denseReady         bool
	started, done      bool
	ctl                Stepper // the controller's tables (errPow): tA, tB, sB0, cfg
	sB                 float64
	stats              Stats
	err                error
	lastNonFin         error
	inProgress         bool // Settings.Progress is running

	workers []*batchWorker
	job     batchJob
	stepT   float64 // the job's time and step size
	stepH   float64
}

// batchJob is what the workers do next.
type batchJob int

const (
	jobAttempt batchJob = iota
	jobDense
	jobStop
)

// batchWorker runs jobs on its blocks in its own goroutine.
type batchWorker struct {
	blocks []*batchBlock
	start  chan batchJob
	done   chan any // nil, or a recovered panic value
}

// NewBatchStepper validates p and s for the span [p.T0, t1] and returns a
// BatchStepper positioned at the starts. A nil s means defaults. It
// evaluates the field twice per member (the rates at the start and the
// automatic initial step's probe); a panic there is returned as a
// *CallbackError.
func NewBatchStepper(p BatchProblem, t1 float64, s *BatchSettings) (st *BatchStepper, err error) {
	if err := p.validate(t1); err != nil {
		return nil, err
	}
	var bs BatchSettings
	if s != nil {
		bs = *s
	}
	if len(bs.Crossings) > 0 {
		return nil, settingErr("Crossings", len(bs.Crossings), "not supported by a batch")
	}
	if bs.Workers < 0 {
		return nil, fmt.Errorf("integrate: BatchSettings.Workers = %d, want >= 0: %w", bs.Workers, ErrSettings)
	}
	defer func() {
		if v := recover(); v != nil {
			st, err = nil, Recovered(CallbackField, p.T0, v)
		}
	}()
	n, m := p.Dim, len(p.Starts)
	cfg, err := resolve(&bs.Settings, n, p.T0, t1, DormandPrince54)
	if err != nil {
		return nil, err
	}
	sizes := blockSizes(m)
	nw := bs.Workers
	if nw == 0 {
		nw = runtime.GOMAXPROCS(0)
	}
	nw = max(1, min(nw, len(sizes)))
	st = &BatchStepper{p: p, cfg: cfg, n: n, m: m, sqrtInvN: math.Sqrt(1 / float64(n)),
		t0: p.T0, t1: t1, dir: math.Copysign(1, t1-p.T0), t: p.T0, tPrev: p.T0}
	// Worker w takes a contiguous run of blocks, each with the field of
	// that worker.
	first := 0
	for w := 0; w < nw; w++ {
		f := p.F
		if p.Fork != nil {
			f = p.Fork()
		}
		wk := &batchWorker{}
		lo, hi := w*len(sizes)/nw, (w+1)*len(sizes)/nw
		for _, sz := range sizes[lo:hi] {
			b := newBatchBlock(sz, n, first, f)
			for k := 0; k < sz; k++ {
				for i, v := range p.Starts[first+k] {
					b.y[i*sz+k] = v
				}
			}
			first += sz
			wk.blocks = append(wk.blocks, b)
			st.blocks = append(st.blocks, b)
		}
		st.workers = append(st.workers, wk)
	}
	for _, b := range st.blocks {
		b.f(st.t, b.m, b.y, b.f0)
		if k, i := firstNonFiniteBlock(b, b.f0); k >= 0 {
			return nil, fmt.Errorf("integrate: member %d: %w", k, &FieldError{T: st.t, Index: i, Value: b.f0[i*b.m+k-b.first], What: "derivative"})
		}
	}
	st.stats.Evaluations++
	st.ctl = Stepper{cfg: cfg, tA: sharedPowTable(0.5 * cfg.alpha), tB: sharedPowTable(-0.5 * cfg.beta)}
	st.ctl.sB0 = float64(cfg.safety * st.ctl.tB.pow(1e-8))
	st.sB = st.ctl.sB0
	h := cfg.h0
	if h == 0 {
		h = st.initialStep(DormandPrince54.Order())
	}
	st.h = st.dir * math.Min(h, cfg.hmax)
	if nw > 1 {
		for _, wk := range st.workers[1:] {
			wk.start, wk.done = make(chan batchJob, 1), make(chan any, 1)
			go wk.loop(st)
		}
	}
	return st, nil
}

// firstNonFiniteBlock returns the first member (its index in the batch) and
// component of v (a block's vector) that is NaN or Inf, or -1, -1.
func firstNonFiniteBlock(b *batchBlock, v []float64) (int, int) {
	for k := 0; k < b.m; k++ {
		for i := 0; i < b.n; i++ {
			x := v[i*b.m+k]
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return b.first + k, i
			}
		}
	}
	return -1, -1
}

// loop is a worker goroutine: it runs jobs until jobStop.
func (wk *batchWorker) loop(st *BatchStepper) {
	// The channels as they were when the goroutine started: Close clears
	// the fields.
	start, done := wk.start, wk.done
	for {
		j, ok := recvSpin(start)
		if !ok || j == jobStop {
			return
		}
		done <- wk.run(st, j)
	}
}

// run does job j on the worker's blocks and returns a recovered panic
// value, or nil.
func (wk *batchWorker) run(st *BatchStepper, j batchJob) (pv any) {
	defer func() {
		if v := recover(); v != nil {
			pv = v
		}
	}()
	for _, b := range wk.blocks {
		switch j {
		case jobAttempt:
			b.attempt(st.stepT, st.stepH, st.sqrtInvN, st.cfg.rtol, st.cfg.atol)
		case jobDense:
			b.dense(st.hLast)
		}
	}
	return nil
}

// do runs job j on every block: worker 0 on this goroutine, the others on
// theirs. A panic in any of them is re-raised here.
func (st *BatchStepper) do(j batchJob) {
	for _, wk := range st.workers[1:] {
		wk.start <- j
	}
	pv := st.workers[0].run(st, j)
	for _, wk := range st.workers[1:] {
		if v, _ := recvSpin(wk.done); v != nil && pv == nil {
			pv = v
		}
	}
	if pv != nil {
		panic(pv)
	}
}

// Close stops the worker goroutines. Next returning false has done it
// already; Close may be called more than once.
func (st *BatchStepper) Close() {
	if st == nil {
		return
	}
	for _, wk := range st.workers {
		if wk.start != nil {
			wk.start <- jobStop
			close(wk.start)
			wk.start = nil
		}
	}
}

// initialStep is Stepper.initialStep for a batch: the norms of
// Hairer, Nørsett & Wanner (1993, Sect. II.4) per member, one probe step
// for all (the smallest member's h0, since the field takes one time), and
// the smallest member's result. For one member it is Stepper's, bit for bit.
func (st *BatchStepper) initialStep(order int) float64 {
	cfg := st.cfg
	nf := float64(st.n)
	h0 := math.Inf(1)
	for _, b := range st.blocks {
		for k := 0; k < b.m; k++ {
			var d0, d1 float64
			for i := 0; i < st.n; i++ {
				j := i*b.m + k
				sk := cfg.atol[i] + float64(cfg.rtol[i]*math.Abs(b.y[j]))
				a, c := b.y[j]/sk, b.f0[j]/sk
				d0 += float64(a * a)
				d1 += float64(c * c)
			}
			d0, d1 = math.Sqrt(d0/nf), math.Sqrt(d1/nf)
			h := 1e-6
			if d0 >= 1e-10 && d1 >= 1e-10 {
				h = 0.01 * d0 / d1
			}
			b.sum[k] = d1 // kept for the second half
			h0 = math.Min(h0, h)
		}
	}
	h0 = math.Min(h0, cfg.hmax)
	best := math.Inf(1)
	for _, b := range st.blocks {
		for i := range b.y {
			b.y1[i] = b.y[i] + float64(st.dir*h0*b.f0[i])
		}
		b.f(st.t+float64(st.dir*h0), b.m, b.y1, b.f1)
		for k := 0; k < b.m; k++ {
			var d2 float64
			for i := 0; i < st.n; i++ {
				j := i*b.m + k
				sk := cfg.atol[i] + float64(cfg.rtol[i]*math.Abs(b.y[j]))
				a := (b.f1[j] - b.f0[j]) / sk
				d2 += float64(a * a)
			}
			d2 = math.Sqrt(d2/nf) / h0
			var h1 float64
			if math.IsNaN(d2) || math.IsInf(d2, 0) {
				best = math.Min(best, h0*1e-3)
				continue
			}
			der := math.Max(d2, b.sum[k])
			if der <= 1e-15 {
				h1 = math.Max(1e-6, h0*1e-3)
			} else if x := 0.01 / der; x > 0 {
				var lx float64
				if x < 0x1p-1022 {
					lx = log2Ctl(float64(x*0x1p54)) - 54
				} else {
					lx = log2Ctl(x)
				}
				h1 = exp2Ctl(lx / float64(order))
			}
			best = math.Min(best, math.Min(math.Min(100*h0, h1), cfg.hmax))
		}
	}
	st.stats.Evaluations++
	return best
}

// T returns the current time.
func (st *BatchStepper) T() float64 { return st.t }

// H returns the size (signed) of the last accepted step.
func (st *BatchStepper) H() float64 { return st.hLast }

// Members returns the number of members; Dim the dimension of one.
func (st *BatchStepper) Members() int { return st.m }

// Dim returns the state dimension of one member.
func (st *BatchStepper) Dim() int { return st.n }

// Stats returns the work counts so far. Evaluations counts calls of the
// field on the whole batch (each is one per member).
func (st *BatchStepper) Stats() Stats { return st.stats }

// Err returns the error that ended stepping, or nil.
func (st *BatchStepper) Err() error {
	if st == nil {
		return errNoStepper
	}
	return st.err
}

// Done reports whether t1 was reached.
func (st *BatchStepper) Done() bool { return st.done }

// State writes every member's current state into dst, member-major
// (member k's state at dst[k*Dim:(k+1)*Dim]); dst is grown if short.
func (st *BatchStepper) State(dst []float64) []float64 {
	if cap(dst) < st.n*st.m {
		dst = make([]float64, st.n*st.m)
	}
	dst = dst[:st.n*st.m]
	for _, b := range st.blocks {
		b.gather(dst)
	}
	return dst
}

// Dense writes every member's continuous extension of the last accepted
// step at t into dst, member-major, and returns it (dst is grown if short);
// nil if t is outside the last step or no step was taken. It gives the
// bits Stepper.Dense gives for one member.
func (st *BatchStepper) Dense(t float64, dst []float64) []float64 {
	if !st.started || st.hLast == 0 {
		return nil
	}
	theta := (t - st.tPrev) / (st.t - st.tPrev)
	if !(theta >= 0 && theta <= 1) {
		return nil
	}
	if cap(dst) < st.n*st.m {
		dst = make([]float64, st.n*st.m)
	}
	dst = dst[:st.n*st.m]
	st.denseAt(theta, dst)
	return dst
}

// denseAt builds the last step's extension once and evaluates it.
func (st *BatchStepper) denseAt(theta float64, dst []float64) {
	if !st.denseReady {
		st.do(jobDense)
		st.denseReady = true
	}
	for _, b := range st.blocks {
		b.interp(theta, dst)
	}
}

// Next takes one accepted step of all members. It returns false at t1 or
// on error (see Err), and then stops the worker goroutines. It checks ctx
// once per call. A panic in the field propagates.
func (st *BatchStepper) Next(ctx context.Context) bool {
	if st == nil || st.cfg == nil {
		return false
	}
	if st.done || st.err != nil {
		return false
	}
	if ctx != nil {
		if done := ctx.Done(); done != nil {
			select {
			case <-done:
				st.err = fmt.Errorf("integrate: canceled at t=%g: %w", st.t, ctx.Err())
				st.Close()
				return false
			default:
			}
		}
	}
	ok := st.next()
	if !ok {
		st.Close()
	}
	return ok
}

// next is Stepper.nextAdaptive on the batch's largest error norm.
func (st *BatchStepper) next() bool {
	c := st.cfg
	for {
		if st.stats.Accepted+st.stats.Rejected >= c.maxSteps {
			st.err = &StepError{T: st.t, H: st.h, Err: fmt.Errorf("%d steps: %w", c.maxSteps, ErrStepBudget)}
			return false
		}
		h, last, under := c.stepSize(st.t, st.t1, st.dir, st.h, st.hTried, st.rejected)
		if under {
			return st.underflow(h)
		}
		st.hTried = h
		st.stepT, st.stepH = st.t, h
		st.denseReady = false
		st.do(jobAttempt)
		st.stats.Evaluations += 6
		e2, bad := 0.0, (*batchBlock)(nil)
		for _, b := range st.blocks {
			if b.nonFin >= 0 && bad == nil {
				bad = b
			}
			if b.e2 > e2 {
				e2 = b.e2
			}
		}
		if bad != nil {
			st.nonFinite(bad, st.t+h)
			st.stats.NonFinite++
			st.stats.Rejected++
			st.rejected = true
			st.h = 0.25 * h
			continue
		}
		var pA, sBNext float64
		if e2 >= 1e-8 && e2 < 0x1p65 {
			var pB float64
			pA, pB = st.ctl.tA.pow2(st.ctl.tB, e2)
			sBNext = float64(c.safety * pB)
		} else {
			pA, sBNext = st.ctl.errPow(max(e2, errSqFloor), 0)
		}
		if e2 > 1 {
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
		st.sB = sBNext
		tNew := st.t + h
		if last {
			tNew = st.t1
		}
		for _, b := range st.blocks {
			b.accept()
		}
		st.tPrev, st.t, st.hLast = st.t, tNew, h
		st.started = true
		st.stats.Accepted++
		st.rejected = false
		st.lastNonFin = nil
		st.h = h * fac
		if last {
			st.done = true
		}
		if c.progress != nil {
			st.inProgress = true
			c.progress(st.t)
			st.inProgress = false
		}
		return true
	}
}

// nonFinite records where a rejected attempt's estimate was not finite.
func (st *BatchStepper) nonFinite(b *batchBlock, tt float64) {
	k := b.nonFin
	fe := &FieldError{T: tt, Index: -1, Value: math.NaN(), What: "error estimate"}
	for i := 0; i < b.n; i++ {
		if v := b.y1[i*b.m+k]; math.IsNaN(v) || math.IsInf(v, 0) {
			fe = &FieldError{T: tt, Index: i, Value: v, What: "state"}
			break
		}
		if v := b.f1[i*b.m+k]; math.IsNaN(v) || math.IsInf(v, 0) {
			fe = &FieldError{T: tt, Index: i, Value: v, What: "derivative"}
			break
		}
	}
	st.lastNonFin = fmt.Errorf("member %d: %w", b.first+k, fe)
}

// underflow ends stepping with ErrStepUnderflow, naming the member whose
// non-finite values shrank the step when that was the cause.
func (st *BatchStepper) underflow(h float64) bool {
	var cause error = ErrStepUnderflow
	if st.lastNonFin != nil && st.rejected {
		cause = fmt.Errorf("%w: %w", ErrStepUnderflow, st.lastNonFin)
	}
	st.err = &StepError{T: st.t, H: h, Err: cause}
	return false
}
