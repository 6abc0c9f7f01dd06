package lyap

import (
	"math"
	"testing"
)

// derivedTol: the derived values in REFERENCES.md are printed to 6 or 7
// significant digits.
const derivedTol = 5e-6

func same(a, b float64) bool {
	if math.IsNaN(a) || math.IsNaN(b) {
		return math.IsNaN(a) && math.IsNaN(b)
	}
	if math.IsInf(a, 0) || math.IsInf(b, 0) {
		return a == b
	}
	return math.Abs(a-b) <= derivedTol*math.Max(1, math.Abs(b))
}

func TestKaplanYorke(t *testing.T) {
	for _, c := range []struct {
		name string
		e    []float64
		want float64
	}{
		// REFERENCES.md §1c: 2 + 0.9056/14.5723 = 2.062145 (derived from Sprott).
		{"lorenz", []float64{0.9056, 0, -14.5723}, 2.062145},
		// §1c: 1 + 0.41922/1.62319 = 1.258269.
		{"henon", []float64{0.41922, -1.62319}, 1.258269},
		{"unsorted input", []float64{-14.5723, 0.9056, 0}, 2.062145},
		{"empty", nil, 0},
		{"stable", []float64{-0.1, -2}, 0},                // Special case: lambda_1 < 0
		{"volume preserving", []float64{0.5, 0, -0.5}, 3}, // every partial sum >= 0
		{"NaN", []float64{0.5, math.NaN()}, math.NaN()},   // Special case
		{"limit cycle", []float64{0, -1, -2}, 1},          // j = 1, sum 0: D = 1 exactly
		{"logistic r=4", []float64{math.Ln2}, 1},          // §1b: D_KY = 1
	} {
		if got := KaplanYorke(c.e); !same(got, c.want) {
			t.Errorf("%s: KaplanYorke(%v) = %v, want %v", c.name, c.e, got, c.want)
		}
	}
	in := []float64{-1, 2}
	KaplanYorke(in)
	if in[0] != -1 {
		t.Errorf("input modified: %v", in)
	}
}

func TestEntropy(t *testing.T) {
	for _, c := range []struct {
		e    []float64
		want float64
	}{
		{[]float64{0.9056, 0, -14.5723}, 0.9056}, // Pesin identity (REFERENCES.md §1c)
		{[]float64{0.3, 0.2, -1}, 0.5},
		{nil, 0},
		{[]float64{-1}, 0},
		{[]float64{1, math.NaN()}, math.NaN()},
		{[]float64{1, math.Inf(1)}, math.Inf(1)},
	} {
		if got := Entropy(c.e); !same(got, c.want) {
			t.Errorf("Entropy(%v) = %v, want %v", c.e, got, c.want)
		}
	}
}

func TestLyapunovTimeAndHorizon(t *testing.T) {
	// REFERENCES.md §7: 1/0.9056 = 1.104 (printed to 4 digits).
	if got := LyapunovTime(0.9056); math.Abs(got-1.104) > 5e-4 {
		t.Errorf("LyapunovTime(0.9056) = %v, want 1.104", got)
	}
	for _, c := range []struct {
		lambda, x float64
		want      float64
	}{{0, 0, math.Inf(1)}, {-1, 0, math.Inf(1)}, {math.Inf(1), 0, 0}, {math.NaN(), 0, math.NaN()}, {2, 0, 0.5}} {
		if got := LyapunovTime(c.lambda); !same(got, c.want) {
			t.Errorf("LyapunovTime(%v) = %v, want %v", c.lambda, got, c.want)
		}
	}
	// REFERENCES.md §7 worked example: delta0 = 5e-4, tol = 1 gives
	// 1.104·ln 2000 ≈ 8.4; tol = 10 gives ≈ 10.9 (printed to 2–3 digits).
	if got := Horizon(0.9056, 5e-4, 1); math.Abs(got-8.4) > 0.05 {
		t.Errorf("Horizon(0.9056, 5e-4, 1) = %v, want 8.4", got)
	}
	if got := Horizon(0.9056, 5e-4, 10); math.Abs(got-10.9) > 0.05 {
		t.Errorf("Horizon(0.9056, 5e-4, 10) = %v, want 10.9", got)
	}
	for _, c := range []struct {
		lambda, d0, tol float64
		want            float64
	}{
		{1, 1, 1, 0},                      // already at tolerance
		{1, 2, 1, 0},                      // beyond it
		{0, 1e-3, 1, math.Inf(1)},         // no growth
		{-1, 1e-3, 1, math.Inf(1)},        // contraction
		{1, 0, 1, math.Inf(1)},            // exact start
		{1, -1, 1, math.NaN()},            // negative error
		{1, 1e-3, 0, math.NaN()},          // no tolerance
		{math.NaN(), 1e-3, 1, math.NaN()}, // NaN
		{1, 1e-3, math.E * 1e-3, 1},       // ln e / 1
	} {
		if got := Horizon(c.lambda, c.d0, c.tol); !same(got, c.want) {
			t.Errorf("Horizon(%v, %v, %v) = %v, want %v", c.lambda, c.d0, c.tol, got, c.want)
		}
	}
}
