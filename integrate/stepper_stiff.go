package integrate

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
