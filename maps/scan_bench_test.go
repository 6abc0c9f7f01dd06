package maps

import (
	"context"
	"testing"
)

// BenchmarkScanDiagram: an orbit diagram of the logistic map, 2000
// parameters × 1000 kept iterates (after 1000 discarded), on one worker and
// on two; the ratio of the two is the parallel speed-up (run with
// -cpu 2 or more for the second to use two cores).
func BenchmarkScanDiagram(b *testing.B) {
	axes := [][]float64{linspace(2.8, 4, 2000)}
	for _, w := range []int{1, 2} {
		b.Run(map[int]string{1: "workers=1", 2: "workers=2"}[w], func(b *testing.B) {
			b.ReportAllocs()
			set := &ScanSettings{Discard: 1000, Keep: 1000, Workers: w}
			points := 0
			for b.Loop() {
				points = 0
				if err := Scan(context.Background(), logisticFamily, axes, []float64{0.3}, set, func(r ScanRow) error {
					points += len(r.Values)
					return nil
				}); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/2000, "ns/parameter")
			b.ReportMetric(float64(points), "points")
		})
	}
}
