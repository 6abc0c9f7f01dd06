package integrate

import (
	"context"
	"slices"
	"testing"
	"time"
)

// BenchmarkLazyAtSweep measures what rebuilding DormandPrince54 and
// DormandPrince853 steps in At costs a caller who reads the whole solution: Lorenz, y0 = (1,1,1),
// [0, 100], rtol = atol = 1e-10, At at four times in every step (its start
// and three interior points), in increasing order. Every iteration solves
// and sweeps two ways, in alternating order: the default solve, whose At
// rebuilds each step (7 or 16 evaluations), and a solve with Times = {t1},
// which builds every step's extension while it runs (the eager path, 0 or
// 3 evaluations a step). Metrics: the median solve+sweep time of each, per
// kept step, and their ratio (median of the per-iteration ratios, and of
// the fastest runs). The two sweeps must give the same sum, bit for bit
// (TestLazyAtBits compares every value).
func BenchmarkLazyAtSweep(b *testing.B) {
	for _, lm := range lazyMethods {
		b.Run(lm.name, func(b *testing.B) { lazyAtSweep(b, lm.m) })
	}
}

func lazyAtSweep(b *testing.B, m Method) {
	p := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	sLazy := &Settings{RelTol: 1e-10, AbsTol: 1e-10}
	sEager := &Settings{RelTol: 1e-10, AbsTol: 1e-10, Times: []float64{100}}
	ctx := context.Background()
	var tl, te, ratios []float64
	var steps int
	var sumL, sumE float64
	run := func(s *Settings) (float64, float64) {
		t0 := time.Now()
		sol, err := Solve(ctx, p, 100, m, s)
		if err != nil {
			b.Fatal(err)
		}
		dst := make([]float64, 3)
		var sum float64
		for _, tt := range probeTimes(sol) {
			if sol.At(tt, dst) == nil {
				b.Fatalf("At(%v) = nil", tt)
			}
			sum += dst[0] + dst[1] + dst[2]
		}
		steps = len(sol.T) - 1
		return float64(time.Since(t0).Nanoseconds()), sum
	}
	i := 0
	for b.Loop() {
		var dl, de float64
		if i%2 == 0 {
			dl, sumL = run(sLazy)
			de, sumE = run(sEager)
		} else {
			de, sumE = run(sEager)
			dl, sumL = run(sLazy)
		}
		i++
		if sumL != sumE {
			b.Fatalf("the sweeps differ: %v against %v", sumL, sumE)
		}
		tl, te = append(tl, dl), append(te, de)
		ratios = append(ratios, dl/de)
	}
	b.ReportMetric(benchMedian(tl)/float64(steps), "lazy-ns/step")
	b.ReportMetric(benchMedian(te)/float64(steps), "eager-ns/step")
	b.ReportMetric(benchMedian(ratios), "lazy/eager")
	b.ReportMetric(slices.Min(tl)/slices.Min(te), "lazy/eager-fastest")
}
