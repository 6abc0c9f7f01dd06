package plumb

import (
	"context"
	"os"
	"sync"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
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

// Own renews only the functions a System made: a caller who copies its
// Problem and puts in a field or Jacobian of its own has that one called,
// not a fresh copy of the System's (a silent swap would be a wrong answer).
func TestOwnKeepsReplacedFunctions(t *testing.T) {
	lorenz, err := Model("lorenz")
	require.NoError(t, err)
	faster, err := Model("lorenz")
	require.NoError(t, err)
	require.NoError(t, faster.Set("sigma", 12))

	p := lorenz.Problem()
	fieldCalls, jacCalls := 0, 0
	f, jac := p.F, p.Jac
	q := p
	q.F = func(t float64, y, dy []float64) { fieldCalls++; f(t, y, dy) }
	q.Jac = func(t float64, y []float64, dst *mat.Dense) { jacCalls++; jac(t, y, dst) }
	_, err = integrate.Solve(context.Background(), q, 1, nil, nil)
	require.NoError(t, err)
	require.Positive(t, fieldCalls, "the caller's field runs")
	_, err = lyap.Exponents(context.Background(), q, 3, &lyap.Settings{Transient: 0.5, Duration: 1})
	require.NoError(t, err)
	require.Positive(t, jacCalls, "the caller's Jacobian runs")

	// Another system's field put into this Problem is kept too: the runs
	// follow sigma = 12, as the field says (exact identity of the runs).
	r := p
	r.F = faster.Problem().F
	got, err := integrate.Solve(context.Background(), r, 1, nil, nil)
	require.NoError(t, err)
	want, err := integrate.Solve(context.Background(), faster.Problem(), 1, nil, nil)
	require.NoError(t, err)
	require.Equal(t, want.Final, got.Final)
}
