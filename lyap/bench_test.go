package lyap

import (
	"context"
	"runtime"
	"testing"
)

// BenchmarkLorenzSpectrum measures a full Lorenz spectrum run to a standard
// error of 0.005 (on every exponent; lambda_1's is the largest), and
// reports the re-orthonormalisations per run, the time and the allocations
// per re-orthonormalisation interval (all stepping included; the allocations
// are the run's set-up spread over its intervals), and the estimate.
func BenchmarkLorenzSpectrum(b *testing.B) {
	p := modelProblem(b, "lorenz")
	s := &Settings{Duration: 20000, Transient: 50, Target: 0.005, Blocks: 400}
	b.ReportAllocs()
	var sp *Spectrum
	qr := 0
	var m0, m1 runtime.MemStats
	runtime.ReadMemStats(&m0)
	for b.Loop() {
		var err error
		sp, err = Exponents(context.Background(), p, 3, s)
		if err != nil {
			b.Fatal(err)
		}
		qr += sp.Stats.QR
	}
	runtime.ReadMemStats(&m1)
	if !sp.Converged {
		b.Fatalf("not converged: std_err %v", sp.StdErr)
	}
	b.ReportMetric(float64(sp.Stats.QR), "qr/op")
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(qr), "ns/qr")
	b.ReportMetric(float64(m1.Mallocs-m0.Mallocs)/float64(qr), "allocs/qr")
	b.ReportMetric(sp.Duration, "time-units/op")
	b.ReportMetric(sp.Exponents[0], "lambda1")
	b.ReportMetric(sp.StdErr[0], "stderr1")
}

// BenchmarkReorthonormalise measures one accepted step followed by a
// re-orthonormalisation (the interval fixed below the step size), per number
// of tangent vectors: allocs/op is the allocation count per
// re-orthonormalisation and must be 0.
func BenchmarkReorthonormalise(b *testing.B) {
	p := modelProblem(b, "lorenz")
	for _, k := range []int{1, 2, 3} {
		b.Run([]string{"", "k=1", "k=2", "k=3"}[k], func(b *testing.B) {
			r, err := newFlowRun(p, k, &Settings{Duration: 1e7, Transient: 1, Interval: 1e-9, Blocks: 1e5})
			if err != nil {
				b.Fatal(err)
			}
			ctx := context.Background()
			b.ReportAllocs()
			for b.Loop() {
				if !r.step(ctx) {
					b.Fatal(r.err)
				}
			}
		})
	}
}

// BenchmarkHenon measures map iterations with a re-orthonormalisation at
// every one.
func BenchmarkHenon(b *testing.B) {
	r, err := newMapRun(henon{1.4, 0.3}, []float64{0.1, 0.1}, 2, &Settings{Iterations: 1 << 40, IntervalSteps: 1, Blocks: 1e5})
	if err != nil {
		b.Fatal(err)
	}
	ctx := context.Background()
	b.ReportAllocs()
	for b.Loop() {
		if !r.step(ctx) {
			b.Fatal(r.err)
		}
	}
}
