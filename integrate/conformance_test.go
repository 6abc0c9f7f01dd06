package integrate_test

import (
	"context"
	"math"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/testode"
)

// TestConformance runs the shared conformance suite for every method. The
// claimed orders are those of the published methods (see each method's
// References); the evaluation counts follow from their tableaus.
func TestConformance(t *testing.T) {
	for _, tc := range []struct {
		name string
		m    integrate.Method
		c    testode.Case
	}{
		{"DormandPrince54", integrate.DormandPrince54, testode.Case{
			Order: 5, DenseOrder: 4, StageEvals: 6, StiffTest: true}},
		{"DormandPrince853", integrate.DormandPrince853, testode.Case{
			Order: 8, DenseOrder: 7, StageEvals: 11, AcceptEvals: 1, DenseEvals: 3, StiffTest: true}},
		{"BogackiShampine32", integrate.BogackiShampine32, testode.Case{
			Order: 3, DenseOrder: 3, StageEvals: 3}},
		{"RK4", integrate.RK4(1e-3), testode.Case{
			Order: 4, DenseOrder: 3, WithStep: integrate.RK4, Step: 1e-3, StageEvals: 3, AcceptEvals: 1}},
		{"Euler", integrate.Euler(1e-4), testode.Case{
			Order: 1, DenseOrder: 1, WithStep: integrate.Euler, Step: 1e-4, StageEvals: 0, AcceptEvals: 1}},
	} {
		t.Run(tc.name, func(t *testing.T) { testode.Run(t, tc.m, tc.c) })
	}
}

// TestEulerLorenzHalving shows that the global error of Euler on the Lorenz
// system at t = 1 halves when the step halves (order 1). The reference is
// DormandPrince853 at tolerance 1e-13, whose own error is below 1e-10 (it
// is within 2e-10 of the 80-digit reference at t = 10, see
// TestLorenzDP853Reference) while Euler's is above 1e-3.
func TestEulerLorenzHalving(t *testing.T) {
	const t1 = 1.0
	p := methodsLorenz()
	ref, err := integrate.Solve(context.Background(), p, t1, integrate.DormandPrince853,
		&integrate.Settings{RelTol: 1e-13, AbsTol: 1e-13, DropSteps: true})
	if err != nil {
		t.Fatal(err)
	}
	var prev float64
	var hs, errs []float64
	for k := 0; k < 5; k++ {
		h := 1e-3 / math.Pow(2, float64(k))
		sol, err := integrate.Solve(context.Background(), p, t1, integrate.Euler(h), &integrate.Settings{DropSteps: true})
		if err != nil {
			t.Fatal(err)
		}
		e := maxAbsDiff(sol.Final, ref.Final)
		ratio := math.NaN()
		if k > 0 {
			ratio = prev / e
		}
		t.Logf("Euler h=%.4g: err@1 = %.4g, ratio to the previous h %.4f", h, e, ratio)
		// Ratio 2 is order 1 exactly (exact identity for e = C·h); the
		// O(h²) term bends it by a few percent at these steps.
		if k > 0 && math.Abs(ratio-2) > 0.15 {
			t.Errorf("h=%g: error ratio %.4f, want 2 ± 0.15", h, ratio)
		}
		prev = e
		hs, errs = append(hs, h), append(errs, e)
	}
	var sx, sy, sxx, sxy float64
	for i := range hs {
		lx, ly := math.Log(hs[i]), math.Log(errs[i])
		sx, sy, sxx, sxy = sx+lx, sy+ly, sxx+lx*lx, sxy+lx*ly
	}
	n := float64(len(hs))
	slope := (n*sxy - sx*sy) / (n*sxx - sx*sx)
	t.Logf("Euler on Lorenz: fitted order %.4f over 4 halvings", slope)
	if math.Abs(slope-1) > 0.2 {
		t.Errorf("fitted order %.4f, want 1 ± 0.2", slope)
	}
}
