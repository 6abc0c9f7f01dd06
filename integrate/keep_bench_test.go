package integrate

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"slices"
	"syscall"
	"testing"
	"time"
)

// BenchmarkKeepVsDrop measures what keeping every step (the default, so that
// Solution.At answers anywhere) costs over Settings.DropSteps at equal
// steps: Lorenz, y0 = (1,1,1), [0, 100], rtol = atol = tol, with
// DormandPrince54 and DormandPrince853. Every iteration runs a block of
// keepDropBlock solves of each variant, the blocks in alternating order, so
// that both see the same machine load; a block, not a single solve,
// because the collector's work for the garbage of one solve runs during
// the next ones, and single solves in alternation billed much of keep's
// collections to drop (1.23-1.29 against 1.34-1.57 for blocks of 30 on
// DormandPrince54, measured in one session). Metrics, per solve:
// keep/drop (median of the per-iteration ratios), keep/drop-fastest (ratio
// of the fastest solves, the steadier figure on a busy machine), the same
// two in CPU time of the process (-cpu-median, -cpu-fastest: the GC's
// workers included, other programs' load excluded), the median
// ns per attempted step of each, and the keep variant's bytes per stored
// step. The two runs must do the same work and end on the same bits
// (DormandPrince853 builds no dense output during a solve that keeps its
// steps: Solution.At rebuilds a step when asked).
func BenchmarkKeepVsDrop(b *testing.B) {
	f := lorenzField()
	methods := []Method{DormandPrince54, DormandPrince853}
	for _, m := range methods {
		for _, tol := range []float64{1e-6, 1e-10} {
			b.Run(fmt.Sprintf("%s/tol=%g", benchMethodName(m), tol), func(b *testing.B) {
				p := Problem{F: f, Y0: []float64{1, 1, 1}}
				sKeep := &Settings{RelTol: tol, AbsTol: tol}
				sDrop := &Settings{RelTol: tol, AbsTol: tol, DropSteps: true}
				ctx := context.Background()
				var tk, td []float64
				var stats Stats
				var bytesKeep float64
				var ck, cd []float64 // process CPU time, GC workers included
				run := func(s *Settings) (*Solution, float64) {
					c0 := cpuNanos()
					t0 := time.Now()
					var sol *Solution
					for range keepDropBlock {
						var err error
						if sol, err = Solve(ctx, p, 100, m, s); err != nil {
							b.Fatal(err)
						}
					}
					d := float64(time.Since(t0).Nanoseconds()) / keepDropBlock
					c := (cpuNanos() - c0) / keepDropBlock
					if s.DropSteps {
						cd = append(cd, c)
					} else {
						ck = append(ck, c)
					}
					return sol, d
				}
				i := 0
				for b.Loop() {
					var k, d *Solution
					var dk, dd float64
					if i%2 == 0 {
						k, dk = run(sKeep)
						d, dd = run(sDrop)
					} else {
						d, dd = run(sDrop)
						k, dk = run(sKeep)
					}
					i++
					if k.Stats != d.Stats || !slices.Equal(k.Final, d.Final) {
						b.Fatalf("keep and drop differ: %+v %v against %+v %v", k.Stats, k.Final, d.Stats, d.Final)
					}
					stats = k.Stats
					tk = append(tk, dk)
					td = append(td, dd)
				}
				// Bytes per stored step, outside the timed loop.
				b.StopTimer()
				bytesKeep = allocBytes(func() { run(sKeep) }) / keepDropBlock / float64(stats.Accepted+1)
				b.StartTimer()
				ratios := make([]float64, len(tk))
				for j := range tk {
					ratios[j] = tk[j] / td[j]
				}
				steps := float64(stats.Accepted + stats.Rejected)
				b.ReportMetric(benchMedian(ratios), "keep/drop")
				b.ReportMetric(slices.Min(tk)/slices.Min(td), "keep/drop-fastest")
				b.ReportMetric(slices.Min(ck[:len(tk)])/slices.Min(cd), "keep/drop-cpu-fastest")
				b.ReportMetric(benchMedian(ck[:len(tk)])/benchMedian(cd), "keep/drop-cpu-median")
				b.ReportMetric(benchMedian(tk)/steps, "keep-ns/step")
				b.ReportMetric(benchMedian(td)/steps, "drop-ns/step")
				b.ReportMetric(bytesKeep, "keep-B/stored-step")
			})
		}
	}
}

// keepDropBlock is the number of solves BenchmarkKeepVsDrop times
// together.
const keepDropBlock = 10

// cpuNanos is the CPU time of the whole process (every thread, the GC's
// included), in nanoseconds.
func cpuNanos() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	return float64(ru.Utime.Nano() + ru.Stime.Nano())
}

// allocBytes is the bytes f allocates (one run, after one warm-up).
func allocBytes(f func()) float64 {
	f()
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	f()
	runtime.ReadMemStats(&after)
	return float64(after.TotalAlloc - before.TotalAlloc)
}

func benchMedian(xs []float64) float64 {
	s := slices.Clone(xs)
	slices.Sort(s)
	return s[len(s)/2]
}

func benchMethodName(m Method) string {
	switch m {
	case DormandPrince54:
		return "dp54"
	case DormandPrince853:
		return "dp853"
	}
	return m.Name()
}
