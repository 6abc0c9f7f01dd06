package integrate

import (
	"context"
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestGaussTableau checks the exact identities of the Gauss tableaux:
// B(2s): Σ b_i c_i^(k−1) = 1/k, k ≤ 2s; C(s): Σ_j a_ij c_j^(k−1) = c_i^k/k,
// k ≤ s; and the symplecticity condition b_i a_ij + b_j a_ji = b_i b_j
// (Sanz-Serna 1988). Source: Butcher 1964 (collocation at the Gauss points),
// exact identities.
func TestGaussTableau(t *testing.T) {
	// The entries are computed from sqrt(3), sqrt(15) in float64: each
	// identity holds to a few ulps of its terms.
	const tol = 4e-16
	for s := 1; s <= 3; s++ {
		a, b, c := gaussTableau(s)
		for k := 1; k <= 2*s; k++ {
			var sum float64
			for i := range b {
				sum += b[i] * math.Pow(c[i], float64(k-1))
			}
			if d := math.Abs(sum - 1/float64(k)); d > tol {
				t.Errorf("s=%d B(%d): Σ b c^%d = %.17g, want 1/%d (diff %.2g)", s, k, k-1, sum, k, d)
			}
		}
		for i := 0; i < s; i++ {
			for k := 1; k <= s; k++ {
				var sum float64
				for j := 0; j < s; j++ {
					sum += a[i*s+j] * math.Pow(c[j], float64(k-1))
				}
				want := math.Pow(c[i], float64(k)) / float64(k)
				if d := math.Abs(sum - want); d > tol {
					t.Errorf("s=%d C(%d) row %d: %.17g, want %.17g (diff %.2g)", s, k, i, sum, want, d)
				}
			}
			for j := 0; j < s; j++ {
				if d := math.Abs(b[i]*a[i*s+j] + b[j]*a[j*s+i] - b[i]*b[j]); d > tol {
					t.Errorf("s=%d symplecticity (%d,%d): residual %.2g", s, i, j, d)
				}
			}
		}
	}
}

// TestGaussOrder measures the order 2s on the oscillator (exact rotation) and
// on Kepler e = 0.6 over one period (exact return to the start; Hairer,
// Lubich & Wanner 2006, Ch. I), with F only (Split removed).
func TestGaussOrder(t *testing.T) {
	ctx := context.Background()
	kep := symModelProblem(t, "kepler")
	kep.Split = nil
	osc := symOscillator()
	osc.Split = nil
	t1o := 1.5 * math.Pi
	exactO := []float64{1*math.Cos(t1o) + 0.5*math.Sin(t1o), 0.5*math.Cos(t1o) - 1*math.Sin(t1o)}
	for _, c := range []struct {
		name  string
		p     Problem
		t1    float64
		exact []float64
		n     [3]int // first number of steps, per s
	}{
		{"symOscillator", osc, t1o, exactO, [3]int{40, 10, 6}},
		{"kepler", kep, 2 * math.Pi, kep.Y0, [3]int{400, 200, 100}},
	} {
		for s := 1; s <= 3; s++ {
			var hs, es []float64
			for k := 0; k < 4; k++ {
				n := c.n[s-1] << k
				h := c.t1 / float64(n)
				sol, err := Solve(ctx, c.p, c.t1, GaussLegendre(s, h), &Settings{DropSteps: true})
				if err != nil {
					t.Fatalf("%s s=%d: %v", c.name, s, err)
				}
				hs = append(hs, h)
				es = append(es, symMaxDiff(sol.Final, c.exact))
			}
			got := symFitSlope(hs, es)
			t.Logf("%s s=%d: errors %.3g, fitted order %.3f", c.name, s, es, got)
			// Source: order 2s of s-stage Gauss collocation (Butcher 1964).
			if math.Abs(got-float64(2*s)) > symOrderSlack {
				t.Errorf("%s s=%d: fitted order %.3f, want %d ± %g", c.name, s, got, 2*s, symOrderSlack)
			}
		}
	}
}

// TestGaussFailure: the implicit midpoint rule on y' = y², y(0) = 1 with
// h = 2 needs Y = 1 + Y², which has no real root: the solve must fail with an
// error, never return a state.
func TestGaussFailure(t *testing.T) {
	p := Problem{F: func(_ float64, y, d []float64) { d[0] = y[0] * y[0] }, Y0: []float64{1}}
	sol, err := Solve(context.Background(), p, 2, GaussLegendre(1, 2), nil)
	if err == nil {
		t.Fatalf("no error; final state %v", sol.Final)
	}
	// Solve reports the scheme's own cause, not a non-finite state.
	if !errors.Is(err, ErrNoConvergence) {
		t.Errorf("Solve: err = %v, want ErrNoConvergence", err)
	}
	t.Logf("error: %v", err)
	// The scheme itself reports the cause.
	w := newGaussWork(1, &p, 1)
	f0 := []float64{1}
	y1 := make([]float64, 1)
	if _, err := w.solve(0, 2, []float64{1}, f0, y1); !errors.Is(err, ErrNoConvergence) {
		t.Errorf("solve: err = %v, want ErrNoConvergence", err)
	}
	// Bad stage counts and steps.
	for _, m := range []Method{GaussLegendre(0, 0.1), GaussLegendre(4, 0.1)} {
		if _, err := Solve(context.Background(), p, 1, m, nil); !errors.Is(err, ErrMethod) {
			t.Errorf("%s: err = %v, want ErrMethod", m.Name(), err)
		}
	}
	if _, err := Solve(context.Background(), p, 1, GaussLegendre(2, -1), nil); !errors.Is(err, ErrSettings) {
		t.Errorf("h = -1: err = %v, want ErrSettings", err)
	}
}

// TestGaussNewton: on y' = −100y with h = 0.1 the fixed-point map has
// contraction factor h·100·|A| = 5 > 1 and diverges; the Newton fallback
// must find the implicit midpoint value y1 = y0·(1 − 5)/(1 + 5) (exact
// identity for the linear test equation: the (1,1) Padé approximant), with
// the exact Jacobian and with forward differences.
func TestGaussNewton(t *testing.T) {
	f := func(_ float64, y, d []float64) { d[0] = -100 * y[0] }
	for _, withJac := range []bool{true, false} {
		p := Problem{F: f, Y0: []float64{1}}
		if withJac {
			p.Jac = func(_ float64, _ []float64, dst *mat.Dense) { dst.Set(0, 0, -100) }
		}
		sol, err := Solve(context.Background(), p, 0.3, GaussLegendre(1, 0.1), nil)
		if err != nil {
			t.Fatalf("jac=%v: %v", withJac, err)
		}
		want := math.Pow(-4.0/6, 3)
		// Newton converges to rounding for the exact Jacobian; with forward
		// differences the Jacobian is exact too (F is linear), up to
		// rounding of the difference quotient, and the iteration still
		// converges to rounding.
		if d := math.Abs(sol.Final[0] - want); d > 1e-14 {
			t.Errorf("jac=%v: y(0.3) = %.17g, want %.17g (diff %.2g)", withJac, sol.Final[0], want, d)
		}
	}
	// Gauss 3 on the same: the (3,3) Padé approximant of exp(−10) per step.
	p := Problem{F: f, Y0: []float64{1}}
	sol, err := Solve(context.Background(), p, 0.1, GaussLegendre(3, 0.1), nil)
	if err != nil {
		t.Fatal(err)
	}
	z := -10.0
	pade := (1 + z/2 + z*z/10 + z*z*z/120) / (1 - z/2 + z*z/10 - z*z*z/120)
	if d := math.Abs(sol.Final[0] - pade); d > 1e-14 {
		t.Errorf("Gauss 3: %.17g, want Padé (3,3) %.17g (diff %.2g)", sol.Final[0], pade, d)
	}
}
