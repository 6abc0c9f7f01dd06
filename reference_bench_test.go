package plumb

import (
	"context"
	"testing"
)

// BenchmarkReferenceLorenz times Taylor reference runs of Lorenz to t = 20
// in double-double (31 digits) and in big.Float at 40 digits, reporting
// the steps and the time per step.
func BenchmarkReferenceLorenz(b *testing.B) {
	sys, err := Model("lorenz")
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range []struct {
		name   string
		digits int
	}{{"dd31", 31}, {"big40", 40}} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			steps := 0
			for b.Loop() {
				r, err := referenceRun(context.Background(), sys, 20, nil, &referenceSettings{Digits: c.digits, NoCheck: true})
				if err != nil {
					b.Fatal(err)
				}
				steps = r.Stats.Steps
			}
			b.ReportMetric(float64(steps), "steps")
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N*steps), "ns/step")
		})
	}
}

// BenchmarkSystemTrust compares the audit of Lorenz over 50 time units
// against the Taylor reference (System.Trust) with the plain audit
// (TrustProblem),
// with the exponent given so that both do the same other work.
func BenchmarkSystemTrust(b *testing.B) {
	sys, _ := Model("lorenz")
	s := &TrustSettings{Tol: 1e-3, Lambda: lorenzLambda}
	b.Run("taylor-reference", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := sys.Trust(context.Background(), 50, s); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("float64-reference", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			if _, err := TrustProblem(context.Background(), sys.Problem(), 50, s); err != nil {
				b.Fatal(err)
			}
		}
	})
}
