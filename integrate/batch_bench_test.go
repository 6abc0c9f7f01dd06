package integrate

import (
	"context"
	"testing"
)

// BenchmarkBatchLorenz integrates 1000 nearby Lorenz members, y0 = (1 +
// k·1e-8, 1, 1), to t = 20 at rtol = atol = 1e-10 (the peers harness's
// many_bench problem), and reports the time per member per step:
// hand-written batch field on 1 and 2 workers, and the loop adapter over
// the catalog's plain field on 1 worker.
func BenchmarkBatchLorenz(b *testing.B) {
	starts := nearbyStarts(1000, 1e-8)
	cases := []struct {
		name    string
		p       BatchProblem
		workers int
	}{
		{"batchfield/workers=1", BatchProblem{F: lorenzBatch, Dim: 3, Starts: starts}, 1},
		{"batchfield/workers=2", BatchProblem{F: lorenzBatch, Dim: 3, Starts: starts}, 2},
		{"loop/workers=1", BatchProblem{Fork: Loop(lorenzField(), 3), Dim: 3, Starts: starts}, 1},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			s := &BatchSettings{Settings: Settings{RelTol: 1e-10, AbsTol: 1e-10}, Workers: c.workers}
			var steps int
			for b.Loop() {
				sol, err := SolveBatch(context.Background(), c.p, 20, s)
				if err != nil {
					b.Fatal(err)
				}
				steps = sol.Stats.Accepted + sol.Stats.Rejected
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(steps*len(starts)), "ns/member-step")
			b.ReportMetric(float64(steps), "steps")
		})
	}
}
