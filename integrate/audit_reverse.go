package integrate

import "math"

// Reversal is the reversibility check: the reference state at T integrated
// back to t0, and how far it lands from the start.
type Reversal struct {
	T float64 // turning time
	// Miss is the distance from the start after the return (wrapped on
	// periodic components); +Inf when the return failed.
	Miss float64
	// Reached is the time the backward run reached (t0 when it completed).
	Reached float64
	Stats   Stats
	// Err is why the backward run failed, or nil.
	Err error
}

// reverse integrates the reference state at grid point k back to t0 with
// the reference's method and tolerances.
func (a *auditor) reverse(ref resolvedRung, k int) *Reversal {
	T := a.times[k]
	rv := &Reversal{T: T, Miss: math.Inf(1)}
	bp := Problem{F: a.p.F, Jac: a.p.Jac, T0: T, Y0: a.refY[k], Split: a.p.Split}
	s := a.settings(ref, nil, true)
	// The way back may explode (a dissipative flow expands volumes in
	// reverse); bound it by twice the forward work to T.
	fwd := float64(a.refStats.Accepted) * (T - a.p.T0) / (a.t1 - a.p.T0)
	if budget := 2*int(fwd) + 1000; s.MaxSteps == 0 || s.MaxSteps > budget {
		s.MaxSteps = budget
	}
	sol, err := Solve(a.ctx, bp, a.p.T0, ref.m, s)
	rv.Reached = T
	if sol != nil {
		rv.Stats = sol.Stats
		rv.Reached = sol.End
	}
	if err != nil {
		rv.Err = err
		return rv
	}
	rv.Miss = a.dist(sol.Final, a.p.Y0)
	return rv
}
