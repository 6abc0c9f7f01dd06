package integrate

import (
	"fmt"
	"math"
)

// stepFailer is implemented by schemes whose step can fail without a
// non-finite value (an implicit method whose iteration did not converge).
type stepFailer interface {
	stepErr() error
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
