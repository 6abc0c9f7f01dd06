package maps

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
)

// DefaultPeriodTol is the default distance below which two iterates count as
// the same point when a period is detected, relative to 1 + |x| per
// component: well above the float64 rounding of an orbit that has settled
// on a cycle, well below the spacing of the cycle's points away from a
// bifurcation (common practice).
const DefaultPeriodTol = 1e-6

// AttractingPeriod iterates m from x0, discards the first discard iterates
// and returns the least period p in 1..maxPeriod with which the next keep
// iterates repeat (every pair of iterates p apart within tol, relative to
// 1 + |x| per component, angles compared on the circle; tol <= 0 means
// DefaultPeriodTol). It returns 0 when no period up to maxPeriod fits: a
// chaotic or quasi-periodic orbit, a longer cycle, or one not yet settled
// after the transient (near a bifurcation point convergence is slow). keep
// must be at least 2·maxPeriod so that every candidate is seen twice. Errors
// as for OrbitAfter, and integrate.ErrSettings for maxPeriod < 1 or keep <
// 2·maxPeriod.
func AttractingPeriod(ctx context.Context, m *Map, x0 []float64, discard, keep, maxPeriod int, tol float64) (int, error) {
	if maxPeriod < 1 || keep < 2*maxPeriod {
		return 0, fmt.Errorf("maps: period search up to %d in %d kept iterates: needs maxPeriod >= 1 and keep >= 2·maxPeriod: %w",
			maxPeriod, keep, integrate.ErrSettings)
	}
	orbit, err := OrbitAfter(ctx, m, x0, discard, keep)
	if err != nil {
		return 0, err
	}
	return periodOf(orbit, m.Dim(), maxPeriod, tol, m.periods), nil
}

// periodOf is the least p in 1..maxPeriod with which the n-dimensional
// iterates in orbit repeat within tol (see AttractingPeriod), or 0.
func periodOf(orbit []float64, n, maxPeriod int, tol float64, periods []float64) int {
	if tol <= 0 {
		tol = DefaultPeriodTol
	}
	k := len(orbit) / n
	for p := 1; p <= maxPeriod && 2*p <= k; p++ {
		if repeatsWith(orbit, n, p, tol, periods) {
			return p
		}
	}
	return 0
}

// repeatsWith reports whether every iterate of orbit matches the one p
// later within tol.
func repeatsWith(orbit []float64, n, p int, tol float64, periods []float64) bool {
	k := len(orbit) / n
	for i := 0; i+p < k; i++ {
		a, b := orbit[i*n:(i+1)*n], orbit[(i+p)*n:(i+p+1)*n]
		if !samePoint(a, b, tol, periods) {
			return false
		}
	}
	return true
}

// samePoint reports whether a and b agree within tol·(1 + |a_i|) in every
// component, angles compared on the circle.
func samePoint(a, b []float64, tol float64, periods []float64) bool {
	for i := range a {
		d := b[i] - a[i]
		if i < len(periods) {
			d = wrappedDiff(d, periods[i])
		}
		if !(math.Abs(d) <= tol*(1+math.Abs(a[i]))) {
			return false
		}
	}
	return true
}
