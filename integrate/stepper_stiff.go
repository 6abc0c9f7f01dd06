package integrate

// stiffDue counts an accepted step toward Hairer's stiffness test and
// reports whether the test is due on it: every stiffEvery accepted steps,
// and at every step while suspicion lasts. It is short enough to be
// inlined, so that the steps between tests cost no call.
func (st *Stepper) stiffDue() bool {
	if st.cfg.stiffEvery < 0 || st.stats.Stiff {
		return false
	}
	st.sinceTest++
	return st.stiffCount > 0 || st.sinceTest >= st.cfg.stiffEvery
}

// stiffTest runs Hairer's stiffness test on the step just attempted (when
// stiffDue says so); 15 positive tests set Stats.Stiff, 6 negative ones
// clear the suspicion.
func (st *Stepper) stiffTest(h float64) {
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
