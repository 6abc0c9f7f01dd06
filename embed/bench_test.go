package embed_test

import (
	"context"
	"fmt"
	"testing"

	"github.com/plumbdyn/plumb/embed"
)

// BenchmarkCorrelationDimension measures D2 of Hénon x (dimension 2) on
// 10^4 and 10^5 points with the default settings (2000 reference points):
// the tree costs O(n log n) to build and each reference's search O(log n +
// the pairs it finds), so the ratio of the two sizes' ns/op should stay near
// 10·log(10^5)/log(10^4) = 12.5 or below, never the 100 of the all-pairs loop.
func BenchmarkCorrelationDimension(b *testing.B) {
	for _, n := range []int{10_000, 100_000} {
		x := henonX(n)
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := embed.CorrelationDimension(context.Background(), x, 1, 2, nil); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/point")
		})
	}
}

// BenchmarkAnalyze measures the whole report (what plumb series computes)
// on 10^5 values of Lorenz x sampled every 0.01.
func BenchmarkAnalyze(b *testing.B) {
	x := lorenzX(b, 100_000, 0.01)
	s, err := embed.NewSeries(x, 0.01)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := embed.Analyze(context.Background(), s, nil); err != nil {
			b.Fatal(err)
		}
	}
}
