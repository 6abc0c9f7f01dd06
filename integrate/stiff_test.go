package integrate

import (
	"context"
	"errors"
	"testing"
)

// TestStiffnessVDPOL: Van der Pol with mu = 1000, y0 = (2, 0) on [0, 2000]
// is problem VDPOL of the Mazzia & Magherini IVP Test Set (2008), a stiff
// problem. Hairer's test (Hairer & Wanner 1996, Sect. IV.2: |h·λ| > 3.25 in
// 15 tests, one test every 1000 accepted steps while unsuspicious) must set
// Stats.Stiff long before t = 2000; the run is bounded by MaxSteps.
func TestStiffnessVDPOL(t *testing.T) {
	p, _ := flowProblem(t, "vanderpol", []float64{1000})
	// An explicit pair needs about |2·mu| / 3.3 steps per unit time on the
	// slow branch; 20000 steps reach t ≈ 30 at most, and the first test
	// at step 1000 starts the count of 15.
	const maxSteps = 20000
	sol, err := Solve(context.Background(), p, 2000, DormandPrince54, &Settings{RelTol: 1e-6, AbsTol: 1e-6, MaxSteps: maxSteps, DropSteps: true})
	if !errors.Is(err, ErrStepBudget) {
		t.Fatalf("err = %v, want the step budget to end the bounded run", err)
	}
	if sol == nil {
		t.Fatal("no partial solution")
	}
	st := sol.Stats
	t.Logf("stiff %v at t = %.4g after %d accepted, %d rejected steps; run ended at t = %.4g", st.Stiff, st.StiffAt, st.Accepted, st.Rejected, sol.End)
	if !st.Stiff {
		t.Fatalf("Stats.Stiff not set after %d steps (t = %g)", st.Accepted+st.Rejected, sol.End)
	}
	if st.StiffAt <= 0 || st.StiffAt > 100 {
		t.Errorf("StiffAt = %g, want well before t = 2000 (below 100)", st.StiffAt)
	}
}

// TestStiffnessArenstorf: the Arenstorf orbit is not stiff (its step size is
// limited by accuracy near the Moon, not by stability): testing at every
// step must never reach 15 positive tests.
func TestStiffnessArenstorf(t *testing.T) {
	p, m := flowProblem(t, "arenstorf", nil)
	for _, every := range []int{0, 1} {
		for _, tol := range []float64{1e-6, 1e-10} {
			sol, err := Solve(context.Background(), p, 3*m.Known["period"], DormandPrince54, &Settings{RelTol: tol, AbsTol: tol, StiffCheck: every, DropSteps: true})
			if err != nil {
				t.Fatal(err)
			}
			if sol.Stats.Stiff {
				t.Errorf("StiffCheck %d, tol %g: stiff at t = %g", every, tol, sol.Stats.StiffAt)
			}
		}
	}
}

// TestStiffnessOff: a negative StiffCheck disables the test.
func TestStiffnessOff(t *testing.T) {
	p, _ := flowProblem(t, "vanderpol", []float64{1000})
	sol, _ := Solve(context.Background(), p, 2000, DormandPrince54, &Settings{MaxSteps: 5000, StiffCheck: -1, DropSteps: true})
	if sol == nil || sol.Stats.Stiff {
		t.Errorf("stiffness flagged with the test disabled: %+v", sol)
	}
}
