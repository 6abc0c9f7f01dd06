package maps

import (
	"context"
	"testing"
	"time"
)

// BenchmarkScanDiagram: an orbit diagram of the logistic map, 2000
// parameters × 1000 kept iterates (after 1000 discarded), on one worker and
// on two, interleaved within every iteration so that both see the same
// load on a shared machine. It reports each variant's fastest diagram
// (ms/diagram-1, ms/diagram-2) and the ratio of the two
// (speedup-fastest: 2 cores give at most 2), the steadier figure when the
// machine is busy. Run with -cpu 2 or more.
func BenchmarkScanDiagram(b *testing.B) {
	axes := [][]float64{linspace(2.8, 4, 2000)}
	fastest := [3]time.Duration{}
	points := 0
	b.ReportAllocs()
	for b.Loop() {
		for _, w := range []int{1, 2} {
			set := &ScanSettings{Discard: 1000, Keep: 1000, Workers: w}
			points = 0
			start := time.Now()
			if err := Scan(context.Background(), logisticFamily, axes, []float64{0.3}, set, func(r ScanRow) error {
				points += len(r.Values)
				return nil
			}); err != nil {
				b.Fatal(err)
			}
			if d := time.Since(start); fastest[w] == 0 || d < fastest[w] {
				fastest[w] = d
			}
		}
	}
	b.ReportMetric(float64(fastest[1].Microseconds())/1e3, "ms/diagram-1")
	b.ReportMetric(float64(fastest[2].Microseconds())/1e3, "ms/diagram-2")
	b.ReportMetric(float64(fastest[1])/float64(fastest[2]), "speedup-fastest")
	b.ReportMetric(float64(points), "points")
}
