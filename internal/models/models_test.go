package models

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
)

// TestJacobians compares every hand-written Jacobian with gonum's central
// finite differences (reference library: gonum diff/fd) at random points.
func TestJacobians(t *testing.T) {
	// Central differences have error O(h²·f''') ~ 1e-7 relative with fd's
	// default step; 1e-6 leaves room for the curvature of these fields.
	const tol = 1e-6
	rng := rand.New(rand.NewPCG(1, 2))
	for _, name := range Names() {
		m, _ := Lookup(name)
		if m.Jac == nil {
			continue
		}
		n := len(m.Y0)
		f := m.Field(m.Defaults())
		jf := m.Jac(m.Defaults())
		for trial := 0; trial < 5; trial++ {
			x := make([]float64, n)
			for i := range x {
				x[i] = m.Y0[i] + rng.NormFloat64()
			}
			got := mat.NewDense(n, n, nil)
			jf(0, x, got)
			want := mat.NewDense(n, n, nil)
			fd.Jacobian(want, func(dst, y []float64) { f(0, y, dst) }, x, &fd.JacobianSettings{Formula: fd.Central})
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					g, w := got.At(i, j), want.At(i, j)
					if math.Abs(g-w) > tol*math.Max(1, math.Abs(w)) {
						t.Errorf("%s: J[%d][%d] = %g, finite differences %g (diff %g)", name, i, j, g, w, g-w)
					}
				}
			}
		}
	}
}

// TestSeparableMatchesField checks that the Hamiltonian parts agree with the
// vector field: q' = dT/dp, p' = -dV/dq (exact identity of Hamilton's equations).
func TestSeparableMatchesField(t *testing.T) {
	for _, name := range Names() {
		m, _ := Lookup(name)
		if m.Separable == nil {
			continue
		}
		n := len(m.Y0) / 2
		parts := m.Separable(m.Defaults())
		d := make([]float64, 2*n)
		m.Field(m.Defaults())(0, m.Y0, d)
		dt, dv := make([]float64, n), make([]float64, n)
		parts.DT(m.Y0[n:], dt)
		parts.DV(m.Y0[:n], dv)
		for i := 0; i < n; i++ {
			if math.Abs(d[i]-dt[i]) > 1e-15 || math.Abs(d[n+i]+dv[i]) > 1e-15 {
				t.Errorf("%s: component %d: field (%g, %g), parts (%g, %g)", name, i, d[i], d[n+i], dt[i], -dv[i])
			}
		}
		if e, ok := m.Known["energy"]; ok {
			if h := parts.H(m.Y0[:n], m.Y0[n:]); math.Abs(h-e) > 1e-15 {
				t.Errorf("%s: H(y0) = %.17g, want %.17g (exact, from the start's construction)", name, h, e)
			}
		}
	}
}

func TestCatalog(t *testing.T) {
	want := []string{"arenstorf", "circle", "double-pendulum", "gauss", "henon", "henon-heiles", "ikeda", "kepler", "logistic", "lorenz", "lorenz96", "lozi", "ricker", "rossler", "sine", "standard", "tent", "vanderpol"}
	got := Names()
	if len(got) != len(want) {
		t.Fatalf("Names() = %v, want %v", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("Names() = %v, want %v", got, want)
		}
	}
	if _, err := Lookup("nope"); err == nil {
		t.Error("Lookup(nope) gave no error")
	}
	for _, name := range got {
		m, _ := Lookup(name)
		if m.Source == "" || m.Field == nil {
			t.Errorf("%s: missing source or field", name)
		}
	}
}
