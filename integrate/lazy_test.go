package integrate

import (
	"context"
	"errors"
	"math/rand/v2"
	"sync"
	"sync/atomic"
	"testing"

	"github.com/plumbdyn/plumb/internal/detmath"
	"github.com/stretchr/testify/require"
)

// lazyMethods are the methods whose solves keep only their step sizes
// when nothing needs dense output during the solve. rebuild is what
// Solution.At spends to rebuild one step: F at the step's start, then for
// DormandPrince54 the 6 evaluations of the attempt (the last is F at its
// end), for DormandPrince853 11 for the attempt, F at its end and 3 for
// the extension; eager is what the eager path spends per kept step on the
// extension (exact counts of the code paths, see lazyDense).
var lazyMethods = []struct {
	name           string
	m              Method
	rebuild, eager int
}{
	{"dp54", DormandPrince54, 7, 0},
	{"dp853", DormandPrince853, 16, 3},
}

// forcedOscillator is a driven double-well oscillator, x” = -0.3x' + x -
// x³ + 0.5·cos(1.2t): a field that depends on t, so that a wrong time
// argument in a rebuilt step changes its bits.
func forcedOscillator() Func {
	return func(t float64, y, dy []float64) {
		x, v := y[0], y[1]
		dy[0] = v
		dy[1] = float64(-0.3*v) + x - float64(float64(x*x)*x) + float64(0.5*detmath.Cos(float64(1.2*t)))
	}
}

// eagerLazyPair solves p to t1 twice with method m and s: once as
// given (the lazy path: no grid, no crossings) and once with Times = {t1},
// which builds every kept step's extension during the solve (the eager
// path) without changing the steps.
func eagerLazyPair(t *testing.T, m Method, p Problem, t1 float64, s Settings) (lazy, eager *Solution) {
	t.Helper()
	ctx := context.Background()
	lazy, err := Solve(ctx, p, t1, m, &s)
	require.NoError(t, err)
	se := s
	se.Times = []float64{t1}
	eager, err = Solve(ctx, p, t1, m, &se)
	require.NoError(t, err)
	require.NotNil(t, lazy.lazy, "the solve without grid or crossings took the lazy path")
	require.Nil(t, eager.lazy, "the solve with a grid took the eager path")
	require.True(t, bitsEqual(lazy.T, eager.T) && bitsEqual(lazy.Y, eager.Y), "the two solves took different steps")
	return lazy, eager
}

// lorenz96 is Lorenz-96 with forcing f (Lorenz 1996): dx_i = (x_(i+1) -
// x_(i-2))·x_(i-1) - x_i + f, cyclic.
func lorenz96(f float64) Func {
	return func(_ float64, x, dx []float64) {
		m := len(x)
		for i := range x {
			dx[i] = float64((x[(i+1)%m]-x[(i+m-2)%m])*x[(i+m-1)%m]) - x[i] + f
		}
	}
}

// probeTimes returns, for every kept step, its start and three interior
// times, then End: increasing in the direction of time.
func probeTimes(sol *Solution) []float64 {
	var ts []float64
	for k := 0; k+1 < len(sol.T); k++ {
		a, b := sol.T[k], sol.T[k+1]
		ts = append(ts, a)
		for _, th := range []float64{1.0 / 3, 0.5, 0.97} {
			ts = append(ts, a+float64(th*(b-a)))
		}
	}
	return append(ts, sol.End)
}

// TestLazyAtBits: At on a DormandPrince54 or DormandPrince853 solution that
// rebuilds its steps
// when asked returns the bits of a solve that built the extension while it
// ran, at the start and inside every step (the first and the last
// included) and at End, forwards and backwards, for an autonomous and a
// time-dependent field, for a one-step solve and for one long enough to
// fill the doubling blocks of stored step sizes and two full ones (8128 +
// 2·4096 steps) (exact identity: the rebuild repeats the solve's
// operations). The solve itself makes the eager path's extension
// evaluations fewer per step (3 for DormandPrince853, none for
// DormandPrince54), and a sweep over increasing t rebuilds each step once.
func TestLazyAtBits(t *testing.T) {
	cases := []struct {
		name    string
		p       Problem
		t1      float64
		tol     float64
		atLeast int // steps the case must take
	}{
		{name: "lorenz forward", p: Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}, t1: 30, tol: 1e-9, atLeast: 500},
		{name: "lorenz backward", p: Problem{F: lorenzField(), T0: 2, Y0: []float64{-5.76, -2.84, 29.1}}, t1: 1.25, tol: 1e-10, atLeast: 50},
		{name: "forced forward", p: Problem{F: forcedOscillator(), T0: 0.7, Y0: []float64{0.1, 0}}, t1: 25.3, tol: 1e-9, atLeast: 80},
		{name: "forced backward", p: Problem{F: forcedOscillator(), T0: 3, Y0: []float64{1, -0.2}}, t1: -10.1, tol: 1e-8, atLeast: 50},
		{name: "one step", p: Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}, t1: 1e-3, tol: 1e-6, atLeast: 1},
		{name: "lorenz long", p: Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}, t1: 450, tol: 1e-10, atLeast: 17000},
		// 10 components: on amd64, DormandPrince54 takes its vector step.
		{name: "lorenz-96", p: Problem{F: lorenz96(8), Y0: []float64{8.01, 8, 8, 8, 8, 8, 8, 8, 8, 8}}, t1: 10, tol: 1e-9, atLeast: 200},
	}
	for _, lm := range lazyMethods {
		for _, c := range cases {
			t.Run(lm.name+" "+c.name, func(t *testing.T) {
				if testing.Short() && c.atLeast > 1000 {
					t.Skip("long solve")
				}
				lazyAtBits(t, lm.m, lm.rebuild, lm.eager, c.p, c.t1, c.tol, c.atLeast)
			})
		}
	}
}

func lazyAtBits(t *testing.T, m Method, rebuild, extra int, p Problem, t1, tol float64, atLeast int) {
	lazy, eager := eagerLazyPair(t, m, p, t1, Settings{RelTol: tol, AbsTol: tol})
	steps := len(lazy.T) - 1
	require.GreaterOrEqual(t, steps, atLeast)
	// The eager solve builds every kept step's extension.
	require.Equal(t, eager.Stats.Evaluations, lazy.Stats.Evaluations+extra*steps)
	require.Equal(t, eager.Stats.Accepted, lazy.Stats.Accepted)
	require.Equal(t, eager.Stats.Rejected, lazy.Stats.Rejected)
	var a, b []float64
	for _, tt := range probeTimes(lazy) {
		a = lazy.At(tt, a)
		b = eager.At(tt, b)
		if a == nil || b == nil || !bitsEqual(a, b) {
			t.Fatalf("t = %v: lazy At %v, eager At %v", tt, a, b)
		}
	}
	require.Equal(t, rebuild*steps, lazy.AtEvaluations(), "one rebuild per step in an increasing sweep")
	require.Zero(t, eager.AtEvaluations())
	require.NoError(t, lazy.AtErr())
}

// TestLazyAtStoppingCrossing: a solve that stops at a crossing builds its
// extension while it runs (the crossing is found on it); the same problem
// solved without the crossing takes the same steps up to there and
// rebuilds them in At, with the same bits at every probed time up to the
// stop (exact identity).
func TestLazyAtStoppingCrossing(t *testing.T) {
	for _, lm := range lazyMethods {
		t.Run(lm.name, func(t *testing.T) { lazyAtStoppingCrossing(t, lm.m) })
	}
}

func lazyAtStoppingCrossing(t *testing.T, m Method) {
	p := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	s := Settings{RelTol: 1e-10, AbsTol: 1e-10}
	lazy, err := Solve(context.Background(), p, 40, m, &s)
	require.NoError(t, err)
	sc := s
	sc.Crossings = []Crossing{{Name: "x=-15", G: func(_ float64, y []float64) float64 { return y[0] + 15 }, Sense: Falling, Stop: true}}
	stopped, err := Solve(context.Background(), p, 40, m, &sc)
	require.NoError(t, err)
	require.Equal(t, Stopped, stopped.Status)
	require.NotNil(t, lazy.lazy)
	require.Nil(t, stopped.lazy)
	k := len(stopped.T)
	require.Greater(t, k, 500)
	require.Less(t, k, len(lazy.T))
	require.True(t, bitsEqual(stopped.T, lazy.T[:k]) && bitsEqual(stopped.Y, lazy.Y[:k*3]), "steps differ before the stop")
	var a, b []float64
	n := 0
	for _, tt := range probeTimes(stopped) {
		if tt > stopped.End {
			continue
		}
		a = lazy.At(tt, a)
		b = stopped.At(tt, b)
		if a == nil || b == nil || !bitsEqual(a, b) {
			t.Fatalf("t = %v: lazy At %v, stopped solve's At %v", tt, a, b)
		}
		n++
	}
	require.Greater(t, n, 2000)
	require.Nil(t, stopped.At(stopped.End+float64(0.5*(stopped.T[k-1]-stopped.End)), nil), "the stopped solve answers beyond its end")
}

// TestLazyAtCache: the two steps used last are kept; a third replaces the
// one used less recently (exact counts of evaluations per rebuild).
func TestLazyAtCache(t *testing.T) {
	for _, lm := range lazyMethods {
		t.Run(lm.name, func(t *testing.T) { lazyAtCache(t, lm.m, lm.rebuild) })
	}
}

func lazyAtCache(t *testing.T, m Method, rebuildEvals int) {
	lazy, err := Solve(context.Background(), Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}, 5, m, &Settings{RelTol: 1e-9, AbsTol: 1e-9})
	require.NoError(t, err)
	mid := func(k int) float64 { return lazy.T[k] + float64(0.5*(lazy.T[k+1]-lazy.T[k])) }
	dst := make([]float64, 3)
	for _, c := range []struct {
		step  int
		total int // rebuilds so far
	}{{5, 1}, {9, 2}, {5, 2}, {9, 2}, {12, 3}, {9, 3}, {5, 4}, {12, 5}} {
		require.NotNil(t, lazy.At(mid(c.step), dst))
		require.Equal(t, c.total*rebuildEvals, lazy.AtEvaluations(), "after step %d", c.step)
	}
	// A step's own time is a stored state: no rebuild.
	require.NotNil(t, lazy.At(lazy.T[20], dst))
	require.Equal(t, 5*rebuildEvals, lazy.AtEvaluations())
}

// TestLazyAtAllocations: At with a long enough dst does not allocate, when
// it rebuilds a step or reuses it.
func TestLazyAtAllocations(t *testing.T) {
	for _, lm := range lazyMethods {
		t.Run(lm.name, func(t *testing.T) { lazyAtAllocations(t, lm.m, lm.rebuild) })
	}
}

func lazyAtAllocations(t *testing.T, m Method, rebuildEvals int) {
	lazy, err := Solve(context.Background(), Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}, 10, m, &Settings{RelTol: 1e-9, AbsTol: 1e-9})
	require.NoError(t, err)
	ts := probeTimes(lazy)
	dst := make([]float64, 3)
	allocs := testing.AllocsPerRun(5, func() {
		for _, tt := range ts {
			lazy.At(tt, dst)
		}
	})
	require.Zero(t, allocs)
	require.Greater(t, lazy.AtEvaluations(), 5*rebuildEvals*(len(lazy.T)-1), "the sweeps rebuilt the steps")
}

// TestLazyAtConcurrent: several goroutines calling At on one solution (and
// on a second solution of the same forkable problem, while a third solve
// of it runs) get the eager bits, and no Solution calls its field from two
// goroutines at once (a counter of calls in progress per field copy).
// Run under the race detector in CI.
func TestLazyAtConcurrent(t *testing.T) {
	for _, lm := range lazyMethods {
		t.Run(lm.name, func(t *testing.T) { lazyAtConcurrent(t, lm.m) })
	}
}

func lazyAtConcurrent(t *testing.T, m Method) {
	var overlap atomic.Bool
	p := Forkable(func() Problem {
		var inCall atomic.Int32
		scratch := make([]float64, 3) // a workspace, as compiled formulas keep
		lf := lorenzField()
		return Problem{Y0: []float64{1, 1, 1}, F: func(t float64, y, dy []float64) {
			if inCall.Add(1) > 1 {
				overlap.Store(true)
			}
			copy(scratch, y)
			lf(t, scratch, dy)
			inCall.Add(-1)
		}}
	})
	s := Settings{RelTol: 1e-9, AbsTol: 1e-9}
	lazy, eager := eagerLazyPair(t, m, p, 20, s)
	other, err := Solve(context.Background(), p, 20, m, &s)
	require.NoError(t, err)
	ts := probeTimes(eager)
	want := make([][]float64, len(ts))
	for i, tt := range ts {
		want[i] = eager.At(tt, nil)
	}
	const workers = 6
	var wg sync.WaitGroup
	errs := make(chan string, workers+1)
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			sol := lazy
			if w%3 == 2 {
				sol = other
			}
			r := rand.New(rand.NewPCG(uint64(w), 7))
			order := r.Perm(len(ts))
			if w%2 == 0 {
				for i := range order {
					order[i] = i // a sweep, sharing the cache with the others
				}
			}
			dst := make([]float64, 3)
			for _, i := range order {
				if got := sol.At(ts[i], dst); got == nil || !bitsEqual(got, want[i]) {
					errs <- "At differs under concurrent use"
					return
				}
			}
		}()
	}
	wg.Add(1)
	go func() {
		defer wg.Done()
		if _, err := Solve(context.Background(), p, 20, m, &s); err != nil {
			errs <- err.Error()
		}
	}()
	wg.Wait()
	close(errs)
	for e := range errs {
		t.Error(e)
	}
	require.False(t, overlap.Load(), "a field copy was called from two goroutines at once")
	require.NoError(t, lazy.AtErr())
}

// TestLazyAtFieldPanics: a field that panics while At rebuilds a step makes
// that At return nil and AtErr report the panic (the first one, at the
// step's start); the step is not kept, so a later call with a field that
// no longer panics answers with the eager bits.
func TestLazyAtFieldPanics(t *testing.T) {
	for _, lm := range lazyMethods {
		t.Run(lm.name, func(t *testing.T) { lazyAtFieldPanics(t, lm.m) })
	}
}

func lazyAtFieldPanics(t *testing.T, m Method) {
	var boom atomic.Bool
	lf := lorenzField()
	p := Problem{Y0: []float64{1, 1, 1}, F: func(t float64, y, dy []float64) {
		if boom.Load() {
			panic("field out of service")
		}
		lf(t, y, dy)
	}}
	lazy, eager := eagerLazyPair(t, m, p, 5, Settings{RelTol: 1e-9, AbsTol: 1e-9})
	k := 7
	tt := lazy.T[k] + float64(0.25*(lazy.T[k+1]-lazy.T[k]))
	boom.Store(true)
	require.Nil(t, lazy.At(tt, nil))
	require.Nil(t, lazy.At(lazy.T[k+2]+float64(0.5*(lazy.T[k+3]-lazy.T[k+2])), nil))
	err := lazy.AtErr()
	require.ErrorIs(t, err, ErrCallback)
	var ce *CallbackError
	require.ErrorAs(t, err, &ce)
	require.Equal(t, CallbackField, ce.Callback)
	require.Equal(t, lazy.T[k], ce.T, "the first panic is kept")
	// Stored states need no field.
	require.True(t, bitsEqual(lazy.At(lazy.T[k], nil), lazy.Y[3*k:3*k+3]))
	boom.Store(false)
	got := lazy.At(tt, nil)
	require.NotNil(t, got)
	require.True(t, bitsEqual(got, eager.At(tt, nil)))
}

// TestLazyAtFieldChanged: a field whose parameter changed after Solve no
// longer takes the solve's steps; At refuses (nil, ErrFieldChanged) rather
// than answer from other stages.
func TestLazyAtFieldChanged(t *testing.T) {
	for _, lm := range lazyMethods {
		t.Run(lm.name, func(t *testing.T) { lazyAtFieldChanged(t, lm.m) })
	}
}

func lazyAtFieldChanged(t *testing.T, m Method) {
	rho := 28.0
	p := Problem{Y0: []float64{1, 1, 1}, F: func(_ float64, y, dy []float64) {
		dy[0] = 10 * (y[1] - y[0])
		dy[1] = float64(y[0]*(rho-y[2])) - y[1]
		dy[2] = float64(y[0]*y[1]) - float64(8.0/3*y[2])
	}}
	lazy, err := Solve(context.Background(), p, 3, m, &Settings{RelTol: 1e-9, AbsTol: 1e-9})
	require.NoError(t, err)
	tt := lazy.T[10] + float64(0.5*(lazy.T[11]-lazy.T[10]))
	require.NotNil(t, lazy.At(tt, nil))
	rho = 28.5
	tt = lazy.T[20] + float64(0.5*(lazy.T[21]-lazy.T[20]))
	require.Nil(t, lazy.At(tt, nil))
	require.ErrorIs(t, lazy.AtErr(), ErrFieldChanged)
	require.False(t, errors.Is(lazy.AtErr(), ErrCallback))
}

// TestLazyAtOtherSolves: only DormandPrince54 and DormandPrince853 without
// grid or crossings rebuild steps; other methods, grids and DropSteps
// report no At evaluations.
func TestLazyAtOtherSolves(t *testing.T) {
	p := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	for _, c := range []struct {
		name string
		m    Method
		s    Settings
	}{
		{"bs32", BogackiShampine32, Settings{}},
		{"rk4", RK4(0.01), Settings{}},
		{"dp54 every", DormandPrince54, Settings{Every: 0.1}},
		{"dp853 every", DormandPrince853, Settings{Every: 0.1}},
		{"dp853 drop", DormandPrince853, Settings{DropSteps: true}},
	} {
		sol, err := Solve(context.Background(), p, 2, c.m, &c.s)
		require.NoError(t, err, c.name)
		require.Nil(t, sol.lazy, c.name)
		if !c.s.DropSteps {
			require.NotNil(t, sol.At(1.2345, nil), c.name)
		}
		require.Zero(t, sol.AtEvaluations(), c.name)
		require.NoError(t, sol.AtErr(), c.name)
	}
}
