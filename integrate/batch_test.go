package integrate

import (
	"context"
	"errors"
	"math"
	"runtime"
	"testing"

	"github.com/stretchr/testify/require"
)

// lorenzBatch is the Lorenz field (sigma=10, rho=28, beta=8/3; Lorenz 1963)
// written for a batch, component-major, with the arithmetic of the
// catalog's hand-written field, so that its members get the bits of that
// field.
func lorenzBatch(t float64, m int, y, dydt []float64) {
	const sigma, rho, beta = 10.0, 28.0, 8.0 / 3
	x, yy, z := y[:m:m], y[m:2*m:2*m], y[2*m:3*m:3*m]
	dx, dy, dz := dydt[:m:m], dydt[m:2*m:2*m], dydt[2*m:3*m:3*m]
	for k := range x {
		dx[k] = float64(sigma * (yy[k] - x[k]))
		dy[k] = float64(x[k]*(rho-z[k])) - yy[k]
		dz[k] = float64(x[k]*yy[k]) - float64(beta*z[k])
	}
}

// nearbyStarts returns m Lorenz starts (1 + k·d, 1, 1).
func nearbyStarts(m int, d float64) [][]float64 {
	out := make([][]float64, m)
	for k := range out {
		out[k] = []float64{1 + float64(k)*d, 1, 1}
	}
	return out
}

func bitsEqual(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}

// A batch of one member takes Solve's steps: the same samples, final state
// and work counts, bit for bit (exact identity: the batch kernel repeats
// the scheme's operations).
func TestBatchOneMemberIsSolve(t *testing.T) {
	cases := []struct {
		name string
		s    Settings
		t1   float64
	}{
		{"defaults", Settings{Every: 0.5}, 20},
		{"tight", Settings{RelTol: 1e-10, AbsTol: 1e-10, Every: 0.25}, 20},
		{"backward", Settings{RelTol: 1e-8, AbsTol: 1e-8, Every: 0.1}, -0.5},
		{"times and max step", Settings{Times: []float64{0, 0.3, 1.7, 2.2, 5}, MaxStep: 0.05}, 5},
		{"per-component tolerances", Settings{RelTols: []float64{1e-7, 1e-9, 1e-8}, AbsTols: []float64{1e-9, 1e-8, 1e-10}, Every: 1}, 10},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			p := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
			s := tc.s
			s.DropSteps = true
			want, err := Solve(context.Background(), p, tc.t1, DormandPrince54, &s)
			require.NoError(t, err)
			for _, bp := range []BatchProblem{
				ProblemBatch(p, nil),
				{F: lorenzBatch, Dim: 3, Starts: [][]float64{{1, 1, 1}}},
			} {
				got, err := SolveBatch(context.Background(), bp, tc.t1, &BatchSettings{Settings: tc.s})
				require.NoError(t, err)
				require.Equal(t, want.Stats.Accepted, got.Stats.Accepted, "accepted steps")
				require.Equal(t, want.Stats.Rejected, got.Stats.Rejected, "rejected steps")
				require.Equal(t, want.Stats.Evaluations, got.Stats.Evaluations, "evaluations")
				require.Len(t, got.Samples, len(want.Samples))
				for j := range want.Samples {
					require.Equal(t, want.Samples[j].T, got.Samples[j].T)
					require.Truef(t, bitsEqual(want.Samples[j].Y, got.Samples[j].Y), "sample %d at t=%g: %v vs %v", j, want.Samples[j].T, got.Samples[j].Y, want.Samples[j].Y)
				}
				require.True(t, bitsEqual(want.Final, got.Final), "final state")
				require.Equal(t, want.End, got.End)
			}
		})
	}
}

// Members that start alike stay alike, bit for bit, and each member of a
// batch gets the bits of its own Solve when the batch's step sizes are
// forced to Solve's (a fixed step through MinStep = MaxStep): an exact
// identity of the kernel, member by member.
func TestBatchMembersIndependent(t *testing.T) {
	const m = 300 // three blocks
	starts := nearbyStarts(m, 1e-9)
	for k := 0; k < m; k += 3 {
		starts[k] = []float64{1, 1, 1}
	}
	s := &BatchSettings{Settings: Settings{RelTol: 1e-9, AbsTol: 1e-9, Every: 1}}
	sol, err := SolveBatch(context.Background(), BatchProblem{F: lorenzBatch, Dim: 3, Starts: starts}, 10, s)
	require.NoError(t, err)
	for j := range sol.Samples {
		for k := 3; k < m; k += 3 {
			require.Truef(t, bitsEqual(sol.Member(j, 0), sol.Member(j, k)), "identical members 0 and %d differ at t=%g", k, sol.Samples[j].T)
		}
	}
	// Fixed steps of 0.01 (MinStep = MaxStep; an error above 1 would end
	// the run, so the tolerance is loose): each member equals its own Solve.
	fs := Settings{RelTol: 1e-3, AbsTol: 1e-3, MinStep: 0.01, MaxStep: 0.01, InitialStep: 0.01, Every: 0.5}
	bsol, err := SolveBatch(context.Background(), BatchProblem{F: lorenzBatch, Dim: 3, Starts: starts}, 2, &BatchSettings{Settings: fs})
	require.NoError(t, err)
	for _, k := range []int{1, 128, 200, 299} {
		fs1 := fs
		fs1.DropSteps = true
		one, err := Solve(context.Background(), Problem{F: lorenzField(), Y0: starts[k]}, 2, DormandPrince54, &fs1)
		require.NoError(t, err)
		require.Equal(t, one.Stats.Accepted, bsol.Stats.Accepted)
		for j := range one.Samples {
			require.Truef(t, bitsEqual(one.Samples[j].Y, bsol.Member(j, k)), "member %d at t=%g", k, one.Samples[j].T)
		}
	}
}

// The number of workers changes no bit (exact identity: only a maximum is
// combined across goroutines).
func TestBatchWorkersBitIdentical(t *testing.T) {
	starts := nearbyStarts(1000, 1e-8)
	run := func(w int) *BatchSolution {
		sol, err := SolveBatch(context.Background(), BatchProblem{F: lorenzBatch, Dim: 3, Starts: starts}, 5,
			&BatchSettings{Settings: Settings{RelTol: 1e-10, AbsTol: 1e-10, Every: 0.5}, Workers: w})
		require.NoError(t, err)
		return sol
	}
	prev := runtime.GOMAXPROCS(1)
	one := run(0)
	runtime.GOMAXPROCS(2)
	two := run(0)
	runtime.GOMAXPROCS(prev)
	three := run(3)
	for _, o := range []*BatchSolution{two, three} {
		require.Equal(t, one.Stats, o.Stats)
		require.True(t, bitsEqual(one.Final, o.Final))
		for j := range one.Samples {
			require.True(t, bitsEqual(one.Samples[j].Y, o.Samples[j].Y))
		}
	}
}

// A step does not allocate, with one worker or several (common practice:
// testing.AllocsPerRun).
func TestBatchStepNoAlloc(t *testing.T) {
	for _, w := range []int{1, 2} {
		st, err := NewBatchStepper(BatchProblem{F: lorenzBatch, Dim: 3, Starts: nearbyStarts(400, 1e-8)}, 1e6,
			&BatchSettings{Settings: Settings{RelTol: 1e-10, AbsTol: 1e-10}, Workers: w})
		require.NoError(t, err)
		ctx := context.Background()
		dst := make([]float64, 3*400)
		allocs := testing.AllocsPerRun(100, func() {
			if !st.Next(ctx) {
				t.Fatal(st.Err())
			}
			st.Dense(st.T()-0.5*st.H(), dst)
		})
		st.Close()
		require.Zerof(t, allocs, "workers %d", w)
	}
}

// Canceling keeps the partial result: the samples up to the last step, the
// states there, and the context's error.
func TestBatchCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	s := &BatchSettings{Settings: Settings{Every: 0.1, Progress: func(tt float64) {
		if tt > 3 {
			cancel()
		}
	}}, Workers: 2}
	sol, err := SolveBatch(ctx, BatchProblem{F: lorenzBatch, Dim: 3, Starts: nearbyStarts(300, 1e-6)}, 20, s)
	require.ErrorIs(t, err, context.Canceled)
	require.NotNil(t, sol)
	require.Equal(t, Canceled, sol.Status)
	require.Greater(t, sol.End, 3.0)
	require.Less(t, sol.End, 20.0)
	require.Len(t, sol.Final, 900)
	require.NotEmpty(t, sol.Samples)
	require.LessOrEqual(t, sol.Samples[len(sol.Samples)-1].T, sol.End)
}

// Bad input gets an error naming what is wrong; a panicking field is
// recovered with the partial result.
func TestBatchBadInput(t *testing.T) {
	good := [][]float64{{1, 1, 1}}
	cases := []struct {
		name string
		p    BatchProblem
		s    *BatchSettings
		want error
	}{
		{"no field", BatchProblem{Dim: 3, Starts: good}, nil, ErrSettings},
		{"no members", BatchProblem{F: lorenzBatch, Dim: 3}, nil, ErrDimension},
		{"short start", BatchProblem{F: lorenzBatch, Dim: 3, Starts: [][]float64{{1, 1}}}, nil, ErrDimension},
		{"NaN start", BatchProblem{F: lorenzBatch, Dim: 3, Starts: [][]float64{{1, math.NaN(), 1}}}, nil, ErrNonFinite},
		{"crossings", BatchProblem{F: lorenzBatch, Dim: 3, Starts: good}, &BatchSettings{Settings: Settings{Crossings: []Crossing{{G: func(float64, []float64) float64 { return 0 }}}}}, ErrSettings},
		{"negative workers", BatchProblem{F: lorenzBatch, Dim: 3, Starts: good}, &BatchSettings{Workers: -1}, ErrSettings},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			sol, err := SolveBatch(context.Background(), tc.p, 1, tc.s)
			require.ErrorIs(t, err, tc.want)
			require.Nil(t, sol)
		})
	}
	calls := 0
	boom := func(t float64, m int, y, dydt []float64) {
		calls++
		if calls > 50 {
			panic("field broke")
		}
		lorenzBatch(t, m, y, dydt)
	}
	sol, err := SolveBatch(context.Background(), BatchProblem{F: boom, Dim: 3, Starts: good}, 10, &BatchSettings{Workers: 1})
	var ce *CallbackError
	require.True(t, errors.As(err, &ce), "%v", err)
	require.Equal(t, Failed, sol.Status)
	require.Len(t, sol.Final, 3)
	require.Greater(t, sol.End, 0.0)
}

// Dense output between steps equals Stepper.Dense for a one-member batch
// (exact identity of the continuous extension's arithmetic).
func TestBatchDenseIsStepperDense(t *testing.T) {
	p := Problem{F: lorenzField(), Y0: []float64{1, 1, 1}}
	st, err := NewStepper(p, 5, DormandPrince54, nil)
	require.NoError(t, err)
	bs, err := NewBatchStepper(ProblemBatch(p, nil), 5, nil)
	require.NoError(t, err)
	defer bs.Close()
	ctx := context.Background()
	for st.Next(ctx) {
		require.True(t, bs.Next(ctx))
		require.Equal(t, st.T(), bs.T())
		for _, th := range []float64{0.1, 0.5, 0.9} {
			tt := st.T() - th*st.H()
			require.True(t, bitsEqual(st.Dense(tt, nil), bs.Dense(tt, nil)))
		}
	}
	require.NoError(t, st.Err())
	require.False(t, bs.Next(ctx))
	require.NoError(t, bs.Err())
	require.True(t, bs.Done())
}
