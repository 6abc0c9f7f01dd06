package plumb

import (
	"errors"
	"math"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/dd"
)

// TestTaylorStepper integrates the convection loop to t = 1 with an
// order-20 Taylor method and compares with Dormand–Prince at tight
// tolerances (two independent methods), and checks energy conservation
// on one Kepler orbit (exact invariant H = -1/2, Hairer, Lubich & Wanner
// 2006, ch. I).
func TestTaylorStepper(t *testing.T) {
	m, _ := Model("lorenz")
	ts, err := m.taylor(20)
	if err != nil {
		t.Fatal(err)
	}
	y := m.Start()
	const steps = 200
	for k := range steps {
		if err := ts.Step(float64(k)/steps, y, 1.0/steps, y); err != nil {
			t.Fatal(err)
		}
	}
	sol, err := integrate.Solve(t.Context(), m.Problem(), 1, nil, &integrate.Settings{RelTol: 1e-13, AbsTol: 1e-13})
	if err != nil {
		t.Fatal(err)
	}
	want := sol.At(1, nil)
	// Dormand–Prince at 1e-13 has a global error near 1e-11 on [0, 1]; the
	// Taylor method's truncation error is below 1e-15 per step: 1e-9.
	const tol = 1e-9
	for i := range y {
		if math.Abs(y[i]-want[i]) > tol*math.Max(1, math.Abs(want[i])) {
			t.Errorf("y(1)[%d]: Taylor %.15g, Dormand–Prince %.15g", i, y[i], want[i])
		}
	}
	k, _ := Model("kepler")
	kt, err := k.taylor(16)
	if err != nil {
		t.Fatal(err)
	}
	q := k.Start()
	h := k.Problem().Split.H
	const n = 2000 // 2π in 2000 steps
	for i := range n {
		kt.Step(float64(i)*2*math.Pi/n, q, 2*math.Pi/n, q)
	}
	// Order 16 with h = π/1000 near the pericentre (r = 0.4): energy error
	// below 1e-12 (rounding of 2000 steps dominates).
	if e := h(q[:2], q[2:]); math.Abs(e+0.5) > 1e-12 {
		t.Errorf("Kepler energy after one orbit = %.16g, want -0.5", e)
	}
	if _, err := (&System{kind: KindMap, form: &formulaSystem{}}).taylor(3); !errors.Is(err, ErrKind) {
		t.Errorf("Taylor of a map: %v", err)
	}
	if err := ts.Step(0, y[:2], 0.1, y); !errors.Is(err, integrate.ErrDimension) {
		t.Errorf("short state: %v", err)
	}
}

// TestTaylorDDStepper follows one Kepler orbit (e = 0.6) with an order-30
// double-double Taylor method: the energy is conserved and the orbit closes
// after the period T = 2π·a^(3/2), a = -1/(2E) (exact invariants and
// Kepler's third law; Hairer, Lubich & Wanner 2006, ch. I), far below
// float64 resolution. E is that of the float64 start (1.4e-16 from -1/2).
func TestTaylorDDStepper(t *testing.T) {
	k, _ := Model("kepler")
	ts, err := k.taylorDD(30)
	if err != nil {
		t.Fatal(err)
	}
	start := k.Start()
	y := make([]dd.Float, 4)
	for i, v := range start {
		y[i] = dd.Float{Hi: v}
	}
	energy := func(y []dd.Float) dd.Float {
		r := dd.Sqrt(dd.Add(dd.Mul(y[0], y[0]), dd.Mul(y[1], y[1])))
		kin := dd.MulFloat(dd.Add(dd.Mul(y[2], y[2]), dd.Mul(y[3], y[3])), 0.5)
		return dd.Sub(kin, dd.Div(dd.From(1), r))
	}
	e0 := energy(y)
	a := dd.Div(dd.From(1), dd.MulFloat(e0, -2))
	period := dd.Mul(dd.MulFloat(dd.Pi, 2), dd.Mul(a, dd.Sqrt(a)))
	const n = 1000
	h := dd.Div(period, dd.From(n))
	for i := range n {
		if err := ts.Step(dd.MulFloat(h, float64(i)), y, h, y); err != nil {
			t.Fatal(err)
		}
	}
	// Order 30, h = T/1000 near a pericentre at r = 0.4: truncation near
	// 1e-40 per step, so double-double rounding dominates: measured 2e-31
	// in energy and 5e-30 in position; the bounds 1e-29 and 1e-28 leave a
	// factor 20-50 for the shear of the orbit amplifying other roundings.
	t.Logf("energy drift %.3g, closure error %.3g", dd.Sub(energy(y), e0).Float64(),
		math.Hypot(dd.Sub(y[0], dd.Float{Hi: start[0]}).Float64(), dd.Sub(y[1], dd.Float{Hi: start[1]}).Float64()))
	if d := dd.Sub(energy(y), e0).Float64(); math.Abs(d) > 1e-29 {
		t.Errorf("energy after one orbit drifted by %g", d)
	}
	for i := range y {
		if d := dd.Sub(y[i], dd.Float{Hi: start[i]}).Float64(); math.Abs(d) > 1e-28 {
			t.Errorf("component %d after one period differs from the start by %g", i, d)
		}
	}
}
