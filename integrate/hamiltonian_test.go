package integrate

import (
	"context"
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
)

// symKeplerForm is Kepler (H = |p|²/2 − 1/|q|) in the Hamiltonian form.
func symKeplerForm(mass []float64) HamiltonianProblem {
	return HamiltonianProblem{
		Q0: []float64{0.4, 0}, P0: []float64{0, 2},
		Mass: mass,
		DV: func(q, d []float64) {
			r2 := q[0]*q[0] + q[1]*q[1]
			r3 := r2 * math.Sqrt(r2)
			d[0], d[1] = q[0]/r3, q[1]/r3
		},
		Potential: func(q []float64) float64 { return -1 / math.Hypot(q[0], q[1]) },
		HessV: func(q []float64, d *mat.Dense) {
			r2 := q[0]*q[0] + q[1]*q[1]
			r := math.Sqrt(r2)
			r3, r5 := r2*r, r2*r2*r
			d.Set(0, 0, 1/r3-3*q[0]*q[0]/r5)
			d.Set(0, 1, -3*q[0]*q[1]/r5)
			d.Set(1, 0, -3*q[0]*q[1]/r5)
			d.Set(1, 1, 1/r3-3*q[1]*q[1]/r5)
		},
	}
}

func TestHamiltonianProblem(t *testing.T) {
	ctx := context.Background()
	p, err := symKeplerForm(nil).Problem()
	if err != nil {
		t.Fatal(err)
	}
	// The same vector field as the catalog's Kepler (Hairer, Lubich &
	// Wanner 2006, Ch. I), to rounding.
	ref := symModelProblem(t, "kepler")
	d1, d2 := make([]float64, 4), make([]float64, 4)
	for _, y := range [][]float64{{0.4, 0, 0, 2}, {0.3, -0.7, 1.1, 0.2}} {
		p.F(0, y, d1)
		ref.F(0, y, d2)
		if e := symMaxDiff(d1, d2); e > 1e-15 {
			t.Errorf("F(%v) = %v, catalog %v", y, d1, d2)
		}
	}
	// Energy H = −1/2 at the start (exact for e = 0.6).
	if e := HamiltonianProblem.Energy(symKeplerForm(nil))(p.Y0); math.Abs(e+0.5) > 1e-15 {
		t.Errorf("energy %.17g, want -0.5", e)
	}
	// Jacobian against gonum's central differences (reference library).
	y := []float64{0.3, -0.7, 1.1, 0.2}
	jac := mat.NewDense(4, 4, nil)
	p.Jac(0, y, jac)
	num := mat.NewDense(4, 4, nil)
	fd.Jacobian(num, func(dst, x []float64) { p.F(0, x, dst) }, y, &fd.JacobianSettings{Formula: fd.Central})
	// Central differences: error ~1e-7 relative for this curvature.
	if !mat.EqualApprox(jac, num, 1e-6) {
		t.Errorf("Jac = %v\nfd  = %v", mat.Formatted(jac), mat.Formatted(num))
	}
	// One period with Yoshida 6 returns to the start.
	sol, err := Solve(ctx, p, 2*math.Pi, Yoshida6(2*math.Pi/400), &Settings{DropSteps: true})
	if err != nil {
		t.Fatal(err)
	}
	if e := symMaxDiff(sol.Final, p.Y0); e > 1e-6 {
		t.Errorf("after one period |y − y0| = %.3g", e)
	}
	// Masses: m = 2 with p doubled is the same motion of q (q' = p/m).
	kf := symKeplerForm([]float64{2, 2})
	kf.P0 = []float64{0, 4}
	kf.DV = func(q, d []float64) { // V = −2/|q| so that q'' = −q/|q|³
		r2 := q[0]*q[0] + q[1]*q[1]
		r3 := r2 * math.Sqrt(r2)
		d[0], d[1] = 2*q[0]/r3, 2*q[1]/r3
	}
	pm, err := kf.Problem()
	if err != nil {
		t.Fatal(err)
	}
	sm, err := Solve(ctx, pm, 2*math.Pi, Yoshida6(2*math.Pi/400), &Settings{DropSteps: true})
	if err != nil {
		t.Fatal(err)
	}
	if e := symMaxDiff(sm.Final[:2], sol.Final[:2]); e > 1e-13 {
		t.Errorf("mass 2: q differs by %.3g", e)
	}
	// General form: H = (q² + p²)/2 + q²p²/2 (not separable), Gauss.
	g := HamiltonianProblem{Q0: []float64{1}, P0: []float64{0},
		Grad: func(q, p, dq, dp []float64) {
			dq[0] = q[0] + q[0]*p[0]*p[0]
			dp[0] = p[0] + q[0]*q[0]*p[0]
		},
		H: func(q, p []float64) float64 { return 0.5*(q[0]*q[0]+p[0]*p[0]) + 0.5*q[0]*q[0]*p[0]*p[0] },
	}
	pg, err := g.Problem()
	if err != nil {
		t.Fatal(err)
	}
	if pg.Split != nil {
		t.Error("general form has Split")
	}
	rep, err := EnergyAudit(ctx, pg, 100, func(h float64) Method { return GaussLegendre(2, h) }, 0.05, &EnergySettings{Energy: g.Energy()})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("non-separable, Gauss 2: energy error max %.3g, drift ratio %.3g", rep.MaxError, rep.DriftRatio)
	// Bounded energy error (symplectic, Hairer, Lubich & Wanner 2006, IX.8).
	if rep.DriftRatio > 2 {
		t.Errorf("energy drift ratio %.3g", rep.DriftRatio)
	}
	if _, err := Solve(ctx, pg, 1, Verlet(0.1), nil); !errors.Is(err, ErrMethod) {
		t.Errorf("Verlet on non-separable: %v", err)
	}
	// Bad input.
	for _, c := range []struct {
		name string
		hp   HamiltonianProblem
		want error
	}{
		{"empty", HamiltonianProblem{}, ErrDimension},
		{"lengths", HamiltonianProblem{Q0: []float64{1}, P0: []float64{1, 2}, DV: func(q, d []float64) {}}, ErrDimension},
		{"no gradient", HamiltonianProblem{Q0: []float64{1}, P0: []float64{1}}, ErrSettings},
		{"mass length", HamiltonianProblem{Q0: []float64{1}, P0: []float64{1}, Mass: []float64{1, 2}, DV: func(q, d []float64) {}}, ErrDimension},
		{"mass sign", HamiltonianProblem{Q0: []float64{1}, P0: []float64{1}, Mass: []float64{-1}, DV: func(q, d []float64) {}}, ErrSettings},
	} {
		if _, err := c.hp.Problem(); !errors.Is(err, c.want) {
			t.Errorf("%s: %v, want %v", c.name, err, c.want)
		}
	}
}
