package plumb

import (
	"context"
	"os"
	"sync"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
	"github.com/stretchr/testify/require"
)

// One Problem from a System, handed to runs in four goroutines at once,
// gives each run the same bits as a run alone (exact identity of
// deterministic runs), and the race detector (CI runs this package with
// -race) sees no shared workspace: every entry point forks the compiled
// evaluators at set-up (integrate.Problem.Own).
func TestProblemSharedAcrossGoroutines(t *testing.T) {
	f, err := os.Open("examples/systems/lab-loop.json")
	require.NoError(t, err)
	file, err := LoadSystem(f)
	f.Close()
	require.NoError(t, err)
	lorenz, err := Model("lorenz")
	require.NoError(t, err)
	pendulum, err := Model("double-pendulum")
	require.NoError(t, err)

	const workers = 4
	for _, c := range []struct {
		name string
		sys  *System
	}{{"system file", file}, {"built-in", lorenz}, {"built-in with formulas' Jacobian", pendulum}} {
		t.Run(c.name, func(t *testing.T) {
			p := c.sys.Problem()
			solve := func() []float64 {
				sol, err := integrate.Solve(context.Background(), p, 5, nil, &integrate.Settings{RelTol: 1e-9, AbsTol: 1e-9})
				require.NoError(t, err)
				return sol.Final
			}
			spectrum := func() []float64 {
				sp, err := lyap.Exponents(context.Background(), p, 2, &lyap.Settings{Transient: 1, Duration: 5})
				require.NoError(t, err)
				return sp.Exponents
			}
			wantSol, wantSp := solve(), spectrum()
			var wg sync.WaitGroup
			gotSol, gotSp := make([][]float64, workers), make([][]float64, workers)
			for w := range workers {
				wg.Go(func() {
					gotSol[w] = solve()
					gotSp[w] = spectrum()
				})
			}
			wg.Wait()
			for w := range workers {
				require.Equalf(t, wantSol, gotSol[w], "worker %d: final state", w)
				require.Equalf(t, wantSp, gotSp[w], "worker %d: exponents", w)
			}
		})
	}
}

// BenchmarkProblemOwn is what every run of a System's Problem pays once at
// set-up for workspaces of its own (the step loop pays nothing).
func BenchmarkProblemOwn(b *testing.B) {
	f, err := os.Open("examples/systems/lab-loop.json")
	if err != nil {
		b.Fatal(err)
	}
	sys, err := LoadSystem(f)
	f.Close()
	if err != nil {
		b.Fatal(err)
	}
	p := sys.Problem()
	b.ReportAllocs()
	for b.Loop() {
		_ = p.Own()
	}
}
