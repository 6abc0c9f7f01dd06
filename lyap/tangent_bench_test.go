package lyap

import (
	"context"
	"testing"
)

// BenchmarkLorenz96Spectrum times all 40 exponents of the built-in
// Lorenz-96 ring (its exact Jacobian, default tolerances) over a short run
// (transient 3, duration 30), the per-step cost of plumb spectrum --model
// lorenz96.
func BenchmarkLorenz96Spectrum(b *testing.B) {
	p := modelProblem(b, "lorenz96")
	s := &Settings{Duration: 30, Transient: 3}
	b.ReportAllocs()
	var steps int
	for b.Loop() {
		sp, err := Exponents(context.Background(), p, len(p.Y0), s)
		if err != nil && sp == nil {
			b.Fatal(err)
		}
		steps = sp.Stats.Steps
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(steps), "ns/step")
}
