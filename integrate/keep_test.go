package integrate

import (
	"context"
	"math"
	"runtime/debug"
	"slices"
	"testing"
)

// TestKeptStepsAreStepperDense: a Solution's At inside every kept step
// returns the bits of Stepper.Dense on the same step (exact identity: the
// solution keeps the compact part of the same continuous extension, or
// without a grid takes the step again and builds it, by the same
// operations), over enough steps to fill several storage
// blocks, for DormandPrince54 and DormandPrince853. With a sampling grid
// (every 0.05), the records of steps with samples are cut from the full
// extension the samples needed, the others formed directly: both must
// give the same bits.
func TestKeptStepsAreStepperDense(t *testing.T) {
	p := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	for _, c := range []struct {
		m     Method
		every float64
	}{{DormandPrince54, 0}, {DormandPrince853, 0}, {DormandPrince54, 0.05}, {DormandPrince853, 0.05}} {
		m := c.m
		s := &Settings{RelTol: 1e-10, AbsTol: 1e-10, Every: c.every}
		t1 := 60.0
		if m == DormandPrince853 {
			t1 = 200 // fewer, longer steps
		}
		sol, err := Solve(context.Background(), p, t1, m, s)
		if err != nil {
			t.Fatal(err)
		}
		c := sol.coef
		if full := c.first*(1<<c.grow-1) + 2*c.block; len(sol.T) < full {
			t.Fatalf("%s: %d steps kept, want more than the %d of the doubling blocks and two full ones", m.Name(), len(sol.T), full)
		}
		st, err := NewStepper(p, t1, m, &Settings{RelTol: 1e-10, AbsTol: 1e-10})
		if err != nil {
			t.Fatal(err)
		}
		var a, b []float64
		k := 0
		for st.Next(context.Background()) {
			k++
			if st.T() != sol.T[k] {
				t.Fatalf("%s: step %d ends at %v, kept %v", m.Name(), k, st.T(), sol.T[k])
			}
			for _, theta := range []float64{0.25, 0.5, 0.9} {
				tt := sol.T[k-1] + float64(theta*(sol.T[k]-sol.T[k-1]))
				a = sol.At(tt, a)
				b = st.Dense(tt, b)
				for i := range a {
					if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
						t.Fatalf("%s: step %d, t = %v: At %v, Stepper.Dense %v", m.Name(), k, tt, a, b)
					}
				}
			}
		}
		if k+1 != len(sol.T) {
			t.Fatalf("%s: stepper took %d steps, solution kept %d", m.Name(), k, len(sol.T)-1)
		}
	}
}

// TestKeepAllocations: keeping steps allocates per block of steps, not per
// step: four times the steps cost at most a handful more allocations
// (blocks double up to 4096 records, common practice for amortised
// growth).
//
// The collector is paused while counting: a collection empties the pool of
// staging blocks, and the next solve then allocates them afresh, a count
// that depends on when collections happen, not on the code measured.
func TestKeepAllocations(t *testing.T) {
	defer debug.SetGCPercent(debug.SetGCPercent(-1))
	p := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	s := &Settings{RelTol: 1e-8, AbsTol: 1e-8}
	allocs := func(t1 float64) (float64, int) {
		var steps int
		a := testing.AllocsPerRun(3, func() {
			sol, err := Solve(context.Background(), p, t1, nil, s)
			if err != nil {
				t.Fatal(err)
			}
			steps = len(sol.T)
		})
		return a, steps
	}
	a1, n1 := allocs(20)
	a4, n4 := allocs(80)
	// 4x the steps: each of the three stores adds at most
	// log2(4) + (n4 - n1)/4096 + 1 blocks.
	extra := 3 * (2 + float64(n4-n1)/4096 + 1)
	if n4 < 3*n1 || a4-a1 > extra {
		t.Errorf("%d steps: %v allocations; %d steps: %v (at most %v more allowed)", n1, a1, n4, a4, extra)
	}
}

// TestStagingReuse: the times and states a Solve stages come from blocks
// that earlier solves released, and are copied into T and Y: a solution's
// T and Y do not change when later solves reuse those blocks, and a solve
// that runs on reused blocks (holding another run's values) gives the same
// bits as the first (exact identity: every slot is written before it is
// read).
func TestStagingReuse(t *testing.T) {
	ctx := context.Background()
	s := &Settings{RelTol: 1e-10, AbsTol: 1e-10}
	pa := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	pb := Problem{F: lorenzField(), Y0: []float64{-3, 2, 30}}
	first, err := Solve(ctx, pa, 40, DormandPrince54, s)
	if err != nil {
		t.Fatal(err)
	}
	tt, yy := slices.Clone(first.T), slices.Clone(first.Y)
	for range 3 {
		if _, err := Solve(ctx, pb, 40, DormandPrince54, s); err != nil {
			t.Fatal(err)
		}
	}
	again, err := Solve(ctx, pa, 40, DormandPrince54, s)
	if err != nil {
		t.Fatal(err)
	}
	if !bitsEqual(first.T, tt) || !bitsEqual(first.Y, yy) {
		t.Fatal("a solution's T or Y changed when later solves ran")
	}
	if !bitsEqual(again.T, tt) || !bitsEqual(again.Y, yy) {
		t.Fatal("a solve on reused staging blocks differs from the first")
	}
}
