package integrate

import (
	"context"
	"testing"
)

// BenchmarkLorenzSamples times a sampled solve of Lorenz over [0, 100]
// every 0.01 (10^4 samples, rtol = atol = 1e-10) kept by Solve against
// handed out by Stream: ns per sample and the bytes and allocations of a
// run (Solve's grow with the samples, Stream's do not).
func BenchmarkLorenzSamples(b *testing.B) {
	p := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	s := &Settings{RelTol: 1e-10, AbsTol: 1e-10, Every: 0.01, DropSteps: true}
	n := SampleCount(0, 100, s)
	b.Run("solve", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := Solve(context.Background(), p, 100, nil, s); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/sample")
	})
	b.Run("stream", func(b *testing.B) {
		sum := 0.0
		each := func(t float64, y []float64) error { sum += y[0]; return nil }
		b.ReportAllocs()
		for b.Loop() {
			if _, err := Stream(context.Background(), p, 100, nil, s, each); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(n), "ns/sample")
	})
}
