package integrate

import (
	"context"
	"errors"
	"math"
	"testing"
)

// TestSetState checks Stepper.SetState: the next step starts from the new
// state (exact solution of y' = -y from the replaced value), Dense is off
// until the next step, and bad input is an error that changes nothing.
func TestSetState(t *testing.T) {
	decay := Problem{F: func(_ float64, y, d []float64) { d[0] = -y[0]; d[1] = -2 * y[1] }, Y0: []float64{1, 1}}
	st, err := NewStepper(decay, 2, DormandPrince54, &Settings{RelTol: 1e-12, AbsTol: 1e-14})
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	for st.T() < 1 && st.Next(ctx) {
	}
	t1 := st.T()
	if st.Dense(t1, nil) == nil {
		t.Fatal("Dense at the last step's end is nil")
	}
	if err := st.SetState([]float64{3}); !errors.Is(err, ErrDimension) {
		t.Errorf("short state: err = %v, want ErrDimension", err)
	}
	var fe *FieldError
	if err := st.SetState([]float64{math.NaN(), 1}); !errors.As(err, &fe) || fe.Index != 0 {
		t.Errorf("NaN state: err = %v, want a FieldError for component 0", err)
	}
	// In place, through the slice Y returns.
	y := st.Y()
	y[0], y[1] = 5, -1
	if err := st.SetState(y); err != nil {
		t.Fatal(err)
	}
	if d := st.DYDT(); d[0] != -5 || d[1] != 2 {
		t.Errorf("DYDT after SetState = %v, want [-5 2] (F at the new state)", d)
	}
	if st.Dense(t1, nil) != nil {
		t.Error("Dense still answers after SetState")
	}
	for st.Next(ctx) {
	}
	if err := st.Err(); err != nil {
		t.Fatal(err)
	}
	// Exact: y(2) = y(t1)·exp(-(2 - t1)) per component (rates 1 and 2).
	const tol = 1e-10 // RelTol 1e-12 over one time unit, with room
	want := []float64{5 * math.Exp(-(2 - t1)), -math.Exp(-2 * (2 - t1))}
	for i, w := range want {
		if g := st.Y()[i]; math.Abs(g-w) > tol {
			t.Errorf("y[%d](2) = %.15g, want %.15g (exact), diff %.2g", i, g, w, g-w)
		}
	}
}

// TestDenseAfterFailedNext: a Next that fails has overwritten the stage
// vectors, so Dense answers nil rather than a value built from them.
func TestDenseAfterFailedNext(t *testing.T) {
	bad := false
	p := Problem{F: func(_ float64, y, d []float64) {
		d[0] = -y[0]
		if bad {
			d[0] = math.NaN()
		}
	}, Y0: []float64{1}}
	for _, m := range []Method{DormandPrince54, DormandPrince853} {
		bad = false
		st, err := NewStepper(p, 10, m, nil)
		if err != nil {
			t.Fatal(err)
		}
		if !st.Next(context.Background()) {
			t.Fatal(st.Err())
		}
		bad = true
		if st.Next(context.Background()) {
			t.Fatalf("%s: a step with a NaN field was accepted", m.Name())
		}
		if !errors.Is(st.Err(), ErrNonFinite) {
			t.Errorf("%s: err = %v, want ErrNonFinite", m.Name(), st.Err())
		}
		if d := st.Dense(st.T(), nil); d != nil {
			t.Errorf("%s: Dense after a failed Next = %v, want nil", m.Name(), d)
		}
	}
}

// TestFixedStepCount: a fixed-step run takes exactly the steps its span
// needs, also when k·h rounds a few ulps short of t1, and is not cut off by
// the default step budget.
func TestFixedStepCount(t *testing.T) {
	p := Problem{F: func(_ float64, y, d []float64) { d[0] = -y[0] }, Y0: []float64{1}}
	for _, c := range []struct {
		h, t1 float64
		steps int
	}{
		{4.0 / 741455, 4, 741455}, // N·h rounds short of t1 by a few ulps
		{1e-6, 1.5, 1500000},      // more than DefaultMaxSteps
		{0.1, 1, 10},              // the plain case
	} {
		sol, err := Solve(context.Background(), p, c.t1, Euler(c.h), &Settings{DropSteps: true})
		if err != nil {
			t.Fatalf("h=%g: %v", c.h, err)
		}
		if sol.Stats.Accepted != c.steps || sol.End != c.t1 {
			t.Errorf("h=%g to %g: %d steps ending at %v, want %d ending at t1 exactly", c.h, c.t1, sol.Stats.Accepted, sol.End, c.steps)
		}
	}
}
