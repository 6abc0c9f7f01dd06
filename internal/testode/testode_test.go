package testode

import (
	"math"
	"testing"
)

// TestKeplerExact checks the oracle of the suite against the invariants of
// the two-body problem (exact identities, Hairer, Lubich & Wanner 2006,
// Ch. I): energy H = |p|²/2 − 1/|q| = −1/2, angular momentum
// q1 p2 − q2 p1 = √(1 − e²), the initial state at t = 0, and q' = p by a
// central difference.
func TestKeplerExact(t *testing.T) {
	// invTol: each invariant is a few operations on values accurate to a
	// few ulps (Newton's method is run to |ΔE| < 1e-17).
	const invTol = 1e-14
	// fdTol: a central difference with step 1e-6 has truncation error
	// |q'''|·1e-12/6 (|q'''| reaches ~200 at the pericentre of e = 0.9)
	// and rounding ~2e-16/1e-6; 1e-9 covers both.
	const fdTol, fdStep = 1e-9, 1e-6
	for _, e := range []float64{0, 0.2, 0.5, 0.9} {
		y0 := KeplerExact(e, 0, nil)
		if d := maxDiff(y0, Kepler(e).Y0); d > invTol {
			t.Errorf("e=%v: exact(0) = %v, Y0 = %v", e, y0, Kepler(e).Y0)
		}
		for _, tt := range []float64{0.1, 1, 2.5, 3.3, 6, 17.9, -4} {
			y := KeplerExact(e, tt, nil)
			r := math.Hypot(y[0], y[1])
			H := 0.5*(y[2]*y[2]+y[3]*y[3]) - 1/r
			L := y[0]*y[3] - y[1]*y[2]
			if math.Abs(H+0.5) > invTol || math.Abs(L-math.Sqrt(1-e*e)) > invTol {
				t.Errorf("e=%v t=%v: H = %.17g (want -0.5), L = %.17g (want %.17g)", e, tt, H, L, math.Sqrt(1-e*e))
			}
			ta, tb := tt+fdStep, tt-fdStep // the spacing actually used is ta - tb
			a, b := KeplerExact(e, ta, nil), KeplerExact(e, tb, nil)
			for i := 0; i < 2; i++ {
				if d := (a[i]-b[i])/(ta-tb) - y[2+i]; math.Abs(d) > fdTol {
					t.Errorf("e=%v t=%v: dq%d/dt - p%d = %.3g", e, tt, i+1, i+1, d)
				}
			}
		}
	}
}
