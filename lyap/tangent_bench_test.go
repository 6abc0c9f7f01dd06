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
	var tg, tc []float64
	var st Stats
	runGo := func() {
		c0 := cpuSeconds()
		sp, err := Exponents(context.Background(), p, 3, s)
		tg = append(tg, cpuSeconds()-c0)
		if err != nil {
			b.Fatal(err)
		}
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
	i := 0
	for b.Loop() {
		if i%2 == 0 {
			runGo()
			runC()
		} else {
			runC()
			runGo()
		}
		i++
	}
	b.ReportMetric(slices.Min(tg), "go-cpu-s")
	b.ReportMetric(float64(st.Evaluations), "evals/op")
	if len(tc) > 0 {
		ratios := make([]float64, len(tg))
		for j := range tg {
			ratios[j] = tg[j] / tc[j]
		}
		slices.Sort(ratios)
		b.ReportMetric(slices.Min(tc), "c-cpu-s")
		b.ReportMetric(slices.Min(tg)/slices.Min(tc), "go/c")
		b.ReportMetric(ratios[len(ratios)/2], "go/c-median")
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
