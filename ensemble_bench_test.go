package plumb

import (
	"context"
	"os"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
)

// lorenzBatchField is the Lorenz field (Lorenz 1963, sigma=10, rho=28,
// beta=8/3) written by hand for a batch, component-major.
func lorenzBatchField(_ float64, m int, y, dydt []float64) {
	const sigma, rho, beta = 10.0, 28.0, 8.0 / 3
	x, yy, z := y[:m:m], y[m:2*m:2*m], y[2*m:3*m:3*m]
	dx, dy, dz := dydt[:m:m], dydt[m:2*m:2*m], dydt[2*m:3*m:3*m]
	for k := range x {
		dx[k] = float64(sigma * (yy[k] - x[k]))
		dy[k] = float64(x[k]*(rho-z[k])) - yy[k]
		dz[k] = float64(x[k]*yy[k]) - float64(beta*z[k])
	}
}

// BenchmarkEnsembleLorenz integrates 1000 Lorenz members, y0 = (1 + k·1e-8,
// 1, 1), to t = 20 at rtol = atol = 1e-10 (the peers harness's many_bench
// problem) and reports the time per member per step: the formula system
// (examples/systems/lab-loop.json, the Lorenz equations) on the batch
// evaluator, the hand-written batch field, and the built-in's plain field
// through the loop adapter; on 1 and 2 workers.
func BenchmarkEnsembleLorenz(b *testing.B) {
	f, err := os.Open("examples/systems/lab-loop.json")
	if err != nil {
		b.Fatal(err)
	}
	formula, err := LoadSystem(f)
	f.Close()
	if err != nil {
		b.Fatal(err)
	}
	builtin, err := Model("lorenz")
	if err != nil {
		b.Fatal(err)
	}
	starts := make([][]float64, 1000)
	for k := range starts {
		starts[k] = []float64{1 + float64(k)*1e-8, 1, 1}
	}
	fp, err := formula.BatchProblem(starts)
	if err != nil {
		b.Fatal(err)
	}
	lp, err := builtin.BatchProblem(starts)
	if err != nil {
		b.Fatal(err)
	}
	hand := integrate.BatchProblem{F: lorenzBatchField, Dim: 3, Starts: starts}
	for _, c := range []struct {
		name string
		p    integrate.BatchProblem
	}{{"formula", fp}, {"hand", hand}, {"loop", lp}} {
		for _, w := range []int{1, 2} {
			b.Run(c.name+"/workers="+string(rune('0'+w)), func(b *testing.B) {
				s := &integrate.BatchSettings{Settings: integrate.Settings{RelTol: 1e-10, AbsTol: 1e-10}, Workers: w}
				var steps int
				for b.Loop() {
					sol, err := integrate.SolveBatch(context.Background(), c.p, 20, s)
					if err != nil {
						b.Fatal(err)
					}
					steps = sol.Stats.Accepted + sol.Stats.Rejected
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(steps*len(starts)), "ns/member-step")
			})
		}
	}
}
