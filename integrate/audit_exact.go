package integrate

import (
	"fmt"
	"math"
)

// exact replaces the reference samples by the states of an exact
// trajectory at the same times, and sets the reference run's divergence
// from it on the grid.
func (a *auditor) exact(tr Trajectory, refSol *Solution, gridIdx []int, rr *RungResult) error {
	ys, err := tr(a.ctx, a.refT)
	if err != nil {
		return fmt.Errorf("exact trajectory: %w", err)
	}
	if len(ys) != len(a.refT) {
		return fmt.Errorf("exact trajectory gave %d states for %d times: %w", len(ys), len(a.refT), ErrDimension)
	}
	rr.Divergence = make([]float64, 0, len(a.times))
	for i, y := range ys {
		if len(y) != a.n {
			return fmt.Errorf("exact trajectory state %d has length %d, want %d: %w", i, len(y), a.n, ErrDimension)
		}
		for _, v := range y {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("exact trajectory state %d at t=%g: %w", i, a.refT[i], ErrNonFinite)
			}
		}
		if g := gridIdx[i]; g >= 0 {
			rr.Divergence = append(rr.Divergence, a.dist(refSol.Samples[i].Y, y))
			a.refY[g] = y
		}
		a.refS[i] = y
	}
	return nil
}
