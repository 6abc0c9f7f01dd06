package lyap

import (
	"context"
	"math"
	"testing"
)

// TestSpectrumBounds: the derived measures of a spectrum and whether they
// are the system's or lower bounds. The exponents are published values;
// the bounds follow from the ordering lambda_1 >= ... >= lambda_n (exact
// identity): exponents not estimated are no larger than the smallest one
// held.
func TestSpectrumBounds(t *testing.T) {
	for _, c := range []struct {
		name   string
		sp     Spectrum
		ky     float64
		kyB    Bound
		h      float64
		hB     Bound
		ltime  float64 // 0: none
		derive bool
	}{
		// REFERENCES.md §1a, Sprott: Lorenz 0.9056, 0, -14.5723, D_KY 2.06215;
		// entropy 0.9056 by Pesin's identity (§1c); Lyapunov time 1.104 (§1a).
		{"lorenz full", Spectrum{Dim: 3, Exponents: []float64{0.9056, 0, -14.5723}}, 2.062145, BoundExact, 0.9056, BoundExact, 1 / 0.9056, true},
		// The same, first exponent only: every partial sum >= 0, so D = k = 1
		// and lambda_2 (not estimated) decides how far above 1; the entropy
		// misses any further positive exponent.
		{"lorenz k=1", Spectrum{Dim: 3, Exponents: []float64{0.9056}}, 1, BoundLower, 0.9056, BoundLower, 1 / 0.9056, true},
		// First two: lambda_2 = 0 ends the positive ones, so the entropy is
		// the system's; the dimension still waits for lambda_3.
		{"lorenz k=2", Spectrum{Dim: 3, Exponents: []float64{0.9056, 0}}, 2, BoundLower, 0.9056, BoundExact, 1 / 0.9056, true},
		// REFERENCES.md §1a: Hénon 0.41922, -1.62319, D_KY 1.25827.
		{"henon full", Spectrum{Dim: 2, Exponents: []float64{0.41922, -1.62319}}, 1.258269, BoundExact, 0.41922, BoundExact, 1 / 0.41922, true},
		{"henon k=1", Spectrum{Dim: 2, Exponents: []float64{0.41922}}, 1, BoundLower, 0.41922, BoundLower, 1 / 0.41922, true},
		// A partial spectrum whose partial sum turns negative within the
		// exponents held: the dimension is fixed by them (exact).
		{"contracting k=2 of 3", Spectrum{Dim: 3, Exponents: []float64{0.5, -2}}, 1.25, BoundExact, 0.5, BoundExact, 2, true},
		// A stable cycle: no positive exponent, no Lyapunov time.
		{"stable", Spectrum{Dim: 2, Exponents: []float64{-0.1, -2}}, 0, BoundExact, 0, BoundExact, 0, true},
		// Dim unknown (a Spectrum built by hand): taken as partial.
		{"dim unknown", Spectrum{Exponents: []float64{0.9056}}, 1, BoundLower, 0.9056, BoundLower, 1 / 0.9056, true},
		{"empty", Spectrum{Dim: 3}, 0, "", 0, "", 0, false},
		{"NaN", Spectrum{Dim: 2, Exponents: []float64{math.NaN(), -1}}, 0, "", 0, "", 0, false},
		{"Inf", Spectrum{Dim: 2, Exponents: []float64{math.Inf(1), -1}}, 0, "", 0, "", 0, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			ky, kyB, ok := c.sp.KaplanYorke()
			if ok != c.derive || kyB != c.kyB || (ok && !same(ky, c.ky)) {
				t.Errorf("KaplanYorke() = %v, %q, %v; want %v, %q, %v", ky, kyB, ok, c.ky, c.kyB, c.derive)
			}
			h, hB, ok := c.sp.Entropy()
			if ok != c.derive || hB != c.hB || (ok && !same(h, c.h)) {
				t.Errorf("Entropy() = %v, %q, %v; want %v, %q, %v", h, hB, ok, c.h, c.hB, c.derive)
			}
			lt, ok := c.sp.LyapunovTime()
			if ok != (c.ltime > 0) || (ok && !same(lt, c.ltime)) {
				t.Errorf("LyapunovTime() = %v, %v; want %v", lt, ok, c.ltime)
			}
		})
	}
}

// TestSpectrumTop: the index of the largest exponent, whatever the order.
func TestSpectrumTop(t *testing.T) {
	for _, c := range []struct {
		name string
		e    []float64
		want int
	}{
		{"sorted", []float64{0.9, 0, -14}, 0},
		{"unsorted", []float64{0, 0.9, -14}, 1},
		{"none", nil, -1},
		{"NaN", []float64{0.9, math.NaN()}, -1},
	} {
		sp := &Spectrum{Exponents: c.e}
		if got := sp.Top(); got != c.want {
			t.Errorf("%s: Top() = %d, want %d", c.name, got, c.want)
		}
	}
	var nilSp *Spectrum
	if got := nilSp.Top(); got != -1 {
		t.Errorf("nil spectrum: Top() = %d, want -1", got)
	}
}

// TestBeyondNoise: the rule lambda > NoiseFactor·stderr and lambda >
// NoiseFactor·ln(D)/D with D > 1, checked on both sides of each threshold
// (exact identity of the rule; the thresholds are worked out beside each
// case).
func TestBeyondNoise(t *testing.T) {
	for _, c := range []struct {
		name string
		e    []float64
		se   []float64
		d    float64
		want bool
	}{
		// 2·0.01 = 0.02 and 2·ln(1000)/1000 = 0.0138 are both below 0.9056.
		{"lorenz lambda_1", []float64{0.9056, 0, -14.5}, []float64{0.01, 0.01, 0.05}, 1000, true},
		// 2·0.5 = 1 > 0.9056: within two standard errors of zero.
		{"wide error bar", []float64{0.9056}, []float64{0.5}, 1000, false},
		// 2·0.001 = 0.002 < 0.01, but 2·ln(1000)/1000 = 0.0138 > 0.01: what
		// the linear shear of a regular orbit leaves after D = 1000.
		{"shear-sized", []float64{0.01}, []float64{0.001}, 1000, false},
		// The same exponent after D = 1e4: 2·ln(1e4)/1e4 = 0.00184 < 0.01.
		{"shear-sized, longer run", []float64{0.01}, []float64{0.001}, 1e4, true},
		// D <= 1: ln(D)/D says nothing, so no verdict of chaos.
		{"run of one unit", []float64{5}, []float64{0.1}, 1, false},
		{"no standard errors", []float64{0.9056}, nil, 1000, false},
		{"negative", []float64{-0.5}, []float64{0.01}, 1000, false},
		// The largest value counts, not the first position.
		{"largest not first", []float64{0, 0.9056}, []float64{0.01, 0.01}, 1000, true},
	} {
		sp := &Spectrum{Dim: len(c.e), Exponents: c.e, StdErr: c.se, Duration: c.d}
		if got := sp.BeyondNoise(); got != c.want {
			t.Errorf("%s: BeyondNoise() = %v, want %v", c.name, got, c.want)
		}
	}
}

// TestSpectrumDim: every estimator records the state dimension, so that a
// partial spectrum's bounds come out lower (Hénon, k = 1 of 2; Lorenz,
// k = 1 of 3; both estimators of the largest exponent).
func TestSpectrumDim(t *testing.T) {
	ctx := context.Background()
	hen := henon{1.4, 0.3}
	x0 := []float64{0.1, 0.1}
	lor := modelProblem(t, "lorenz")
	short := &Settings{Iterations: 2000, Discard: 100, Duration: 20}
	cases := []struct {
		name string
		run  func() (*Spectrum, error)
		dim  int
	}{
		{"MapExponents", func() (*Spectrum, error) { return MapExponents(ctx, hen, x0, 1, short) }, 2},
		{"MapLargest", func() (*Spectrum, error) { return MapLargest(ctx, hen, x0, short) }, 2},
		{"Exponents", func() (*Spectrum, error) { return Exponents(ctx, lor, 1, short) }, 3},
		{"Largest", func() (*Spectrum, error) { return Largest(ctx, lor, short) }, 3},
	}
	for _, c := range cases {
		sp, err := c.run()
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if sp.Dim != c.dim {
			t.Errorf("%s: Dim = %d, want %d", c.name, sp.Dim, c.dim)
		}
		// One positive exponent of a chaotic system (REFERENCES.md §1a:
		// Hénon 0.419, Lorenz 0.906): D = 1 and the entropy can only grow
		// with the next exponent.
		if _, b, ok := sp.KaplanYorke(); !ok || b != BoundLower {
			t.Errorf("%s: Kaplan–Yorke bound %q (ok %v), want lower", c.name, b, ok)
		}
		if _, b, ok := sp.Entropy(); !ok || b != BoundLower {
			t.Errorf("%s: entropy bound %q (ok %v), want lower", c.name, b, ok)
		}
	}
}
