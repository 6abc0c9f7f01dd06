package lyap

import (
	"bytes"
	"context"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"slices"
	"syscall"
	"testing"
	"time"

	"github.com/plumbdyn/plumb/internal/simd"
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

// BenchmarkLorenz96SpectrumWidths is BenchmarkLorenz96Spectrum with the
// integrator's AVX2 and SSE2 kernels (the same bits) alternating within
// every iteration, their order swapped from one iteration to the next. It
// reports avx2-ns/step and sse2-ns/step (fastest runs, wall time) and
// avx2/sse2 (median of the per-iteration ratios), and fails when the two
// take different steps. It skips, saying so, on a CPU without AVX2.
func BenchmarkLorenz96SpectrumWidths(b *testing.B) {
	if !simd.HasAVX2() {
		b.Skip("this CPU has no AVX2: there is only the SSE2 width to time")
	}
	p := modelProblem(b, "lorenz96")
	s := &Settings{Duration: 30, Transient: 3}
	var tw [2][]float64 // per step: SSE2, AVX2
	var stats [2]Stats
	run := func(avx bool) {
		simd.AVX2 = avx
		defer func() { simd.AVX2 = true }()
		t0 := time.Now()
		sp, err := Exponents(context.Background(), p, len(p.Y0), s)
		el := time.Since(t0)
		if err != nil && sp == nil {
			b.Fatal(err)
		}
		j := 0
		if avx {
			j = 1
		}
		stats[j] = sp.Stats
		tw[j] = append(tw[j], float64(el.Nanoseconds())/float64(sp.Stats.Steps))
	}
	i := 0
	for b.Loop() {
		run(i%2 == 0)
		run(i%2 != 0)
		i++
	}
	if stats[0] != stats[1] {
		b.Fatalf("the SSE2 kernels took %+v, the AVX2 kernels %+v", stats[0], stats[1])
	}
	r := make([]float64, len(tw[0]))
	for j := range r {
		r[j] = tw[1][j] / tw[0][j]
	}
	slices.Sort(r)
	b.ReportMetric(slices.Min(tw[1]), "avx2-ns/step")
	b.ReportMetric(slices.Min(tw[0]), "sse2-ns/step")
	b.ReportMetric(r[len(r)/2], "avx2/sse2")
}

// BenchmarkLorenzSpectrumC times all three Lorenz exponents over t = 1100
// (transient 100, then 1000 averaged) at rtol = atol = 1e-9, the run of the
// plain C Benettin loop benettin.c of the peers' harness (DP5(4), the
// variational equations written out, Gram–Schmidt every 0.1). When
// PLUMB_BENETTIN names that program built to time itself in CPU seconds
// (bench/run.sh builds it so), every iteration runs it too, in alternating
// order with the Go run, and the benchmark reports go/c, the ratio of the
// fastest runs, and go/c-median, the median of the per-iteration ratios.
// Times are CPU times (the machines it runs on are shared). The sub-benchmark
// jac evaluates the field, the Jacobian and the product apart (a Problem
// alone); fused passes the model's Tangent3 in Settings (the same bits).
// On a CPU with AVX2 the Go run takes the AVX2 kernels of the integrator
// (the default there), and every iteration also runs it with the SSE2
// kernels (same bits), the three runs in rotated order: sse2-cpu-s,
// sse2/c and sse2/c-median are those runs' figures, and avx2/sse2 the
// median of the per-iteration ratios of the two Go runs (with -tags
// purego both take the Go loops, and the ratio is near 1).
func BenchmarkLorenzSpectrumC(b *testing.B) {
	for _, fused := range []bool{false, true} {
		name := "jac"
		if fused {
			name = "fused"
		}
		b.Run(name, func(b *testing.B) { benchLorenzSpectrumC(b, fused) })
	}
}

func benchLorenzSpectrumC(b *testing.B, fused bool) {
	p := modelProblem(b, "lorenz")
	s := &Settings{Duration: 1000, Transient: 100, RelTol: 1e-9, AbsTol: 1e-9}
	if fused {
		s.Tangent3 = modelTangent3(b, "lorenz", nil)
	}
	cprog := os.Getenv("PLUMB_BENETTIN")
	both := simd.HasAVX2() // time the SSE2 kernels beside the default AVX2 ones
	var tg, ts, tc []float64
	var st, sts Stats
	runGo := func(sse2 bool) {
		if sse2 {
			simd.AVX2 = false
			defer func() { simd.AVX2 = true }()
		}
		c0 := cpuSeconds()
		sp, err := Exponents(context.Background(), p, 3, s)
		c := cpuSeconds() - c0
		if err != nil {
			b.Fatal(err)
		}
		if sse2 {
			ts, sts = append(ts, c), sp.Stats
			return
		}
		tg = append(tg, c)
		st = sp.Stats
	}
	runC := func() {
		if cprog == "" {
			return
		}
		out, err := exec.Command(cprog, "1").Output()
		if err != nil {
			b.Fatalf("%s: %v", cprog, err)
		}
		var rec struct {
			Sec float64 `json:"sec"`
		}
		if err := json.Unmarshal(bytes.TrimSpace(out), &rec); err != nil || rec.Sec <= 0 {
			b.Fatalf("%s printed %q: %v", cprog, out, err)
		}
		tc = append(tc, rec.Sec)
	}
	runs := []func(){func() { runGo(false) }, runC}
	if both {
		runs = append(runs, func() { runGo(true) })
	}
	i := 0
	for b.Loop() {
		for j := range runs {
			runs[(i+j)%len(runs)]()
		}
		i++
	}
	if both && sts != st {
		b.Fatalf("the SSE2 kernels took %+v, the AVX2 kernels %+v", sts, st)
	}
	median := func(num, den []float64) float64 {
		r := make([]float64, len(num))
		for j := range num {
			r[j] = num[j] / den[j]
		}
		slices.Sort(r)
		return r[len(r)/2]
	}
	b.ReportMetric(slices.Min(tg), "go-cpu-s")
	b.ReportMetric(float64(st.Evaluations), "evals/op")
	if both {
		b.ReportMetric(slices.Min(ts), "sse2-cpu-s")
		b.ReportMetric(median(tg, ts), "avx2/sse2")
	}
	if len(tc) > 0 {
		b.ReportMetric(slices.Min(tc), "c-cpu-s")
		b.ReportMetric(slices.Min(tg)/slices.Min(tc), "go/c")
		b.ReportMetric(median(tg, tc), "go/c-median")
		if both {
			b.ReportMetric(slices.Min(ts)/slices.Min(tc), "sse2/c")
			b.ReportMetric(median(ts, tc), "sse2/c-median")
		}
	}
}

// cpuSeconds is the CPU time of the whole process so far.
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	return float64(ru.Utime.Nano()+ru.Stime.Nano()) * 1e-9
}
