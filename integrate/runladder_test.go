package integrate

import (
	"context"
	"errors"
	"math"
	"testing"
)

// TestRunLadder checks the ladder built around a caller's run: the run
// itself, tolerances a factor 100 either side, another method at the same
// tolerances, two precisions and a restart (the documented layout).
func TestRunLadder(t *testing.T) {
	l, err := RunLadder(0, 50, Rung{Method: DormandPrince853, RelTol: 1e-9})
	if err != nil {
		t.Fatal(err)
	}
	type want struct {
		kind   RungKind
		method Method
		rtol   float64
	}
	// AbsTol left zero is Solve's DefaultAbsTol (1e-9), scaled alike.
	wants := []want{
		{KindRun, DormandPrince853, 1e-9},
		{KindTolerance, DormandPrince853, 1e-11},
		{KindTolerance, DormandPrince853, 1e-7},
		{KindMethod, DormandPrince54, 1e-9},
		{KindPrecision, DormandPrince853, 1e-9},
		{KindPrecision, DormandPrince853, 1e-9},
		{KindRestart, DormandPrince853, 1e-9},
	}
	if len(l.Rungs) != len(wants) {
		t.Fatalf("%d rungs, want %d", len(l.Rungs), len(wants))
	}
	for i, w := range wants {
		r := l.Rungs[i]
		// Tolerances are products by 100 of the run's: compare to a
		// relative 1e-15 (rounding of one product).
		if r.Kind != w.kind || r.Method != w.method || math.Abs(r.RelTol-w.rtol) > 1e-15*w.rtol {
			t.Errorf("rung %d: kind %v, method %v, rtol %g; want %v, %v, %g", i, r.Kind, r.Method, r.RelTol, w.kind, w.method, w.rtol)
		}
	}
	if got := l.Rungs[1].AbsTol; math.Abs(got-DefaultAbsTol/100) > 1e-15*DefaultAbsTol {
		t.Errorf("tighter AbsTol %g, want DefaultAbsTol/100", got)
	}
	if l.Rungs[6].RestartAt != 40 || l.Rungs[4].Rounding != Bits(40) || l.Rungs[5].Rounding != Bits(24) {
		t.Errorf("restart at %g, roundings %v %v", l.Rungs[6].RestartAt, l.Rungs[4].Rounding, l.Rungs[5].Rounding)
	}
	// The reference is tighter than the tighter rung by 100: 1e-13.
	if l.Reference.RelTol != 1e-13 || l.Reference.Method != DormandPrince853 {
		t.Errorf("reference %v at %g, want DormandPrince853 at 1e-13", l.Reference.Method, l.Reference.RelTol)
	}

	// A fixed-step run: half and twice the step; Gauss–Legendre 2 for RK4.
	f, err := RunLadder(0, 50, Rung{Fixed: RK4, Step: 0.01})
	if err != nil {
		t.Fatal(err)
	}
	if f.Rungs[1].Step != 0.005 || f.Rungs[2].Step != 0.02 || f.Rungs[3].Fixed(0.01).Name() != GaussLegendre(2, 0.01).Name() {
		t.Errorf("fixed-step ladder: steps %g %g, method %s", f.Rungs[1].Step, f.Rungs[2].Step, f.Rungs[3].Fixed(0.01).Name())
	}
	// A loose run has no looser rung past 1e-2.
	if lo, err := RunLadder(0, 50, Rung{RelTol: 1e-3}); err != nil || len(lo.Rungs) != len(wants)-1 {
		t.Errorf("RelTol 1e-3: %d rungs (%v), want the looser one left out", len(lo.Rungs), err)
	}
}

// TestRunLadderBadInput: every refusal wraps ErrLadder.
func TestRunLadderBadInput(t *testing.T) {
	for _, c := range []struct {
		name   string
		t0, t1 float64
		r      Rung
	}{
		{"empty span", 1, 1, Rung{}},
		{"infinite span", 0, math.Inf(1), Rung{}},
		{"kind", 0, 1, Rung{Kind: KindMethod}},
		{"rtol too tight", 0, 1, Rung{RelTol: 1e-14}},
		{"rtol one", 0, 1, Rung{RelTol: 1}},
		{"rtol NaN", 0, 1, Rung{RelTol: math.NaN()}},
		{"atol negative", 0, 1, Rung{AbsTol: -1}},
		{"fixed without step", 0, 1, Rung{Fixed: RK4}},
		{"step Inf", 0, 1, Rung{Fixed: RK4, Step: math.Inf(1)}},
	} {
		if _, err := RunLadder(c.t0, c.t1, c.r); !errors.Is(err, ErrLadder) {
			t.Errorf("%s: err = %v, want ErrLadder", c.name, err)
		}
	}
	// Two runs of the caller's in one ladder.
	l, _ := RunLadder(0, 10, Rung{})
	l.Rungs = append(l.Rungs, l.Rungs[0])
	if _, err := Audit(context.Background(), catalogProblem(t, "lorenz"), 10, l, &AuditSettings{Tol: 1}); !errors.Is(err, ErrLadder) {
		t.Errorf("two runs: err = %v, want ErrLadder", err)
	}
}

// TestAuditYourRun: with a rung of kind run, the trusted horizon is that
// run's own horizon (by definition), not the earliest of the ladder.
func TestAuditYourRun(t *testing.T) {
	l, err := RunLadder(0, 40, Rung{Method: DormandPrince853, RelTol: 1e-9})
	if err != nil {
		t.Fatal(err)
	}
	res, err := Audit(context.Background(), catalogProblem(t, "lorenz"), 40, l, &AuditSettings{Tol: 1})
	if err != nil {
		t.Fatal(err)
	}
	own := res.Rungs[0]
	if own.Rung.Kind != KindRun || !own.Departed || res.Limit != 0 || res.Trusted != own.Horizon {
		t.Fatalf("run rung %v departed %v at %g; trusted %g by rung %d", own.Rung.Kind, own.Departed, own.Horizon, res.Trusted, res.Limit)
	}
	earliest := math.Inf(1)
	for _, r := range res.Rungs {
		earliest = math.Min(earliest, r.Horizon)
	}
	if !(earliest < res.Trusted) {
		t.Errorf("the looser rung (%g) should depart before the run (%g), or the check says nothing", earliest, res.Trusted)
	}
}
