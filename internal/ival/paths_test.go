package ival_test

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/plumbdyn/plumb/internal/ival"
)

// TestBothPaths checks the 128-bit kernels and the float64 fast paths
// separately against the 300-bit reference at random points of each
// kernel's range: both must contain it; the kernels must be at most two
// float64 steps wide (128 bits leave only the final outward rounding),
// the fast paths at most 16 (their Horner evaluation rounds a few times;
// wider results are handed to the kernels anyway).
func TestBothPaths(t *testing.T) {
	rng := rand.New(rand.NewPCG(23, 24))
	ranges := map[string][2]float64{
		"Exp": {-745, 709}, "Log": {1e-300, 1e300}, "Sin": {-1e6, 1e6}, "Cos": {-1e6, 1e6},
		"Atan": {-1e10, 1e10}, "Sinh": {-700, 700}, "Cosh": {-700, 700}, "Tanh": {-39, 39},
	}
	refs := map[string]fn1{}
	for _, f := range fns1 {
		refs[f.name] = f
	}
	n := 300
	if testing.Short() {
		n = 50
	}
	for name, kern := range ival.Kernel128 {
		rg := ranges[name]
		for i := range n {
			x := rg[0] + (rg[1]-rg[0])*rng.Float64()
			if i%3 == 0 { // small arguments too, with their own relative accuracy
				x = math.Ldexp(rng.Float64(), -rng.IntN(60))
				if name == "Log" {
					x = 1 + x*(rng.Float64()-0.5)
				}
			}
			lo, hi, ok := reference(refs[name].ref, x)
			if !ok {
				continue
			}
			k := kern(x)
			if !bigIn(k, lo, hi) {
				t.Fatalf("128-bit %s(%v) = %v misses %s", name, x, k, lo.Text('g', 25))
			}
			if v, _ := lo.Float64(); math.Abs(v) > 0x1p-1020 && k.Hi > math.Nextafter(math.Nextafter(k.Lo, math.Inf(1)), math.Inf(1)) {
				t.Errorf("128-bit %s(%v) = %v wider than two steps", name, x, k)
			}
			fast, has := ival.Fast[name]
			if !has {
				continue
			}
			fr, ok := fast(x)
			if !ok {
				continue
			}
			if !bigIn(fr, lo, hi) {
				t.Fatalf("fast %s(%v) = %v misses %s", name, x, fr, lo.Text('g', 25))
			}
			w := fr.Lo
			for range 16 {
				w = math.Nextafter(w, math.Inf(1))
			}
			if v, _ := lo.Float64(); math.Abs(v) > 0x1p-1000 && fr.Hi > w {
				t.Errorf("fast %s(%v) = %v wider than 16 steps", name, x, fr)
			}
		}
	}
}
