package plumb

import (
	"context"
	"math"
	"os"
	"testing"

	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/detmath"
	"github.com/plumbdyn/plumb/lyap"
)

// lorenzLambda1 is the largest Lyapunov exponent of Lorenz (10, 28, 8/3),
// with the uncertainty of its last digit: J. C. Sprott, Common Chaotic
// Systems (1998, rev. 2004) and Chaos and Time-Series Analysis (2003),
// App. A.
const (
	lorenzLambda1    = 0.9056
	lorenzLambda1Err = 0.0001 // Sprott: "the least significant digit is only a best estimate"
)

// sigmas is how many standard errors an estimate may sit from the value it
// is checked against (common practice: 3σ for a seeded statistical check).
const sigmas = 3

// Lorenz: the finite-size exponent at small scales equals the largest
// Lyapunov exponent within its error, and near the attractor's size it
// falls towards 0 (the behaviour Aurell et al. 1997 report).
func TestEnsembleLorenzFiniteSize(t *testing.T) {
	sys, err := Model("lorenz")
	require.NoError(t, err)
	rep, err := Ensemble(context.Background(), sys, 40, &EnsembleSettings{Delta: 1e-8, Releases: 64, ReleaseEvery: 5, Seed: 1})
	require.NoError(t, err)
	require.Equal(t, "completed", rep.Status)
	require.NotNil(t, rep.SmallScale)
	// Sprott's value; tolerance: 3 standard errors of our estimate plus
	// the uncertainty of Sprott's last digit.
	require.InDeltaf(t, lorenzLambda1, *rep.SmallScale, sigmas**rep.SmallScaleStdErr+lorenzLambda1Err,
		"small-scale exponent %.4f ± %.4f vs λ1 = 0.9056 (Sprott 2003)", *rep.SmallScale, *rep.SmallScaleStdErr)
	require.Less(t, *rep.SmallScaleStdErr, 0.05, "64 releases over 8 decades of growth: a standard error below 5% of λ1")
	// The largest scale timed lies within a factor Ratio of the extent;
	// there the exponent has fallen well below λ1 (to under half of it:
	// Aurell et al. 1997 show λ(δ) dropping to 0 at the attractor's size).
	var top *ScaleExponent
	for i := range rep.Scales {
		if rep.Scales[i].Lambda != nil {
			top = &rep.Scales[i]
		}
	}
	require.NotNil(t, top)
	require.Greater(t, top.Delta*rep.Ratio*rep.Ratio, rep.Extent, "the top scale is near the extent")
	require.Lessf(t, *top.Lambda, lorenzLambda1/2, "λ(%.3g) = %.3f near the extent %.3g", top.Delta, *top.Lambda, rep.Extent)
	// The saturation level lies below the extent, and a tenth of it is the
	// default tolerance (exact identity of the defaults).
	require.Less(t, rep.Saturation, rep.Extent)
	require.Equal(t, rep.Saturation/10, rep.Tol)
}

// doublePendulumEnergy is the energy of the planar double pendulum of
// point masses on massless rods (from its Lagrangian; e.g. Shinbrot et
// al. 1992): kinetic energy of both masses plus their potential energy.
func doublePendulumEnergy(p, y []float64) float64 {
	m1, m2, l1, l2, g := p[0], p[1], p[2], p[3], p[4]
	t1, t2, w1, w2 := y[0], y[1], y[2], y[3]
	kin := 0.5*(m1+m2)*l1*l1*w1*w1 + 0.5*m2*l2*l2*w2*w2 + m2*l1*l2*w1*w2*detmath.Cos(t1-t2)
	return kin - (m1+m2)*g*l1*detmath.Cos(t1) - m2*g*l2*detmath.Cos(t2)
}

// The double pendulum's members keep their energy (an exact invariant) to
// the tolerance's order, and the time for a separation to grow from delta
// to tol grows as ln(1/delta) with slope 1/λ1 of the run's own spectrum.
func TestEnsembleDoublePendulum(t *testing.T) {
	if testing.Short() {
		t.Skip("three ensembles and a spectrum: a few seconds")
	}
	sys, err := Model("double-pendulum")
	require.NoError(t, err)
	params := []float64{1, 1, 1, 1, 9.81}
	for i, p := range sys.Params() {
		require.Equal(t, params[i], p.Value)
	}
	const rtol = 1e-9
	// energyTol: a relative energy error within 1e3 tolerances over 25 s
	// (the local error per step is rtol·|y|; some 10^4 steps add up as a
	// random walk, about 100·rtol, and the bound leaves a factor 10).
	const energyTol = 1e3 * rtol
	deltas := []float64{1e-3, 1e-5, 1e-7}
	var xs, ys, ses []float64
	for _, d := range deltas {
		rep, err := Ensemble(context.Background(), sys, 25, &EnsembleSettings{Delta: d, Tol: 0.1, Members: 6,
			Releases: 32, ReleaseEvery: 5, RelTol: rtol, AbsTol: rtol, Seed: 7})
		require.NoError(t, err)
		run := rep.Run
		for k := 0; k < run.Members; k++ {
			e0 := doublePendulumEnergy(params, run.Member(0, k))
			for j := range run.Samples {
				e := doublePendulumEnergy(params, run.Member(j, k))
				require.LessOrEqualf(t, math.Abs(e-e0), energyTol*math.Abs(e0), "member %d at t=%g (delta %g)", k, run.Samples[j].T, d)
			}
		}
		require.NotNil(t, rep.Predictability)
		require.Equal(t, 32, rep.PredictabilityPairs, "every pair grew to tol within the span")
		xs = append(xs, -math.Log(d))
		ys = append(ys, *rep.Predictability)
		ses = append(ses, *rep.PredictabilityStdErr)
	}
	// Least-squares slope of T against ln(1/delta), and its error from the
	// points' standard errors (the points are independent ensembles).
	var mx, my float64
	for i := range xs {
		mx += xs[i] / float64(len(xs))
		my += ys[i] / float64(len(xs))
	}
	var sxx, sxy, vs float64
	for i := range xs {
		sxx += (xs[i] - mx) * (xs[i] - mx)
		sxy += (xs[i] - mx) * (ys[i] - my)
	}
	for i := range xs {
		w := (xs[i] - mx) / sxx
		vs += w * w * ses[i] * ses[i]
	}
	slope, slopeSE := sxy/sxx, math.Sqrt(vs)
	// The run's own largest exponent (tangent-space spectrum, lyap).
	sp, err := lyap.Exponents(context.Background(), sys.Problem(), 1, &lyap.Settings{Duration: 500})
	require.NoError(t, err)
	l1, l1SE := sp.Exponents[0], sp.StdErr[0]
	inv, invSE := 1/l1, l1SE/(l1*l1)
	require.InDeltaf(t, inv, slope, sigmas*math.Hypot(slopeSE, invSE),
		"slope of the parting time %.4f ± %.4f vs 1/λ1 = %.4f ± %.4f", slope, slopeSE, inv, invSE)
	t.Logf("slope %.4f ± %.4f, 1/λ1 %.4f ± %.4f, points %v", slope, slopeSE, inv, invSE, ys)
	// Linear in ln(1/delta): each step of two decades adds about the same time.
	for i := 1; i+1 < len(ys); i++ {
		a, b := ys[i]-ys[i-1], ys[i+1]-ys[i]
		require.InDeltaf(t, a, b, sigmas*(ses[i-1]+2*ses[i]+ses[i+1]), "increments %.3f and %.3f", a, b)
	}
}

// Members are placed as asked: a ball at distance delta exactly (up to
// rounding), a line at k·delta along one component, reproducible from the
// seed; results do not depend on the number of workers.
func TestEnsembleStartsAndReproducible(t *testing.T) {
	sys, err := Model("lorenz")
	require.NoError(t, err)
	// roundTol: the perturbation is added to states of size ~1 and
	// measured back from the difference (a few ulps of 1 in the sum).
	const roundTol = 1e-15
	run := func(s EnsembleSettings) *EnsembleReport {
		rep, err := Ensemble(context.Background(), sys, 2, &s)
		require.NoError(t, err)
		return rep
	}
	base := EnsembleSettings{Delta: 1e-6, Members: 20, Releases: 4, ReleaseEvery: 0.5, Seed: 3, Tol: 0.01}
	ball := run(base)
	m := ensMetric{}
	for k := 1; k <= 20; k++ {
		require.InDelta(t, 1e-6, m.dist(ball.Run.Member(0, k), ball.Run.Member(0, 0)), roundTol)
	}
	line := base
	line.Spread, line.Along = SpreadLine, []string{"y"}
	lr := run(line)
	for k := 1; k <= 20; k++ {
		st := lr.Run.Member(0, k)
		require.InDelta(t, 1+float64(k)*1e-6, st[1], roundTol)
		require.Equal(t, 1.0, st[0])
		require.Equal(t, 1.0, st[2])
	}
	other := base
	other.Workers = 1
	one := run(other)
	other.Workers = 3
	three := run(other)
	for _, r := range []*EnsembleReport{one, three, run(base)} {
		require.Equal(t, ball.Run.Final, r.Run.Final)
		require.Equal(t, ball.MeanSpread, r.MeanSpread)
		require.Equal(t, ball.PartingTimes, r.PartingTimes)
	}
	seeded := base
	seeded.Seed = 4
	require.NotEqual(t, ball.Run.Member(0, 1), run(seeded).Run.Member(0, 1))
	// Curves: the spread and the largest pair start at the placement's
	// size, everything is within tol at t = 0.
	require.Equal(t, 1.0, ball.Within[0])
	require.LessOrEqual(t, ball.LargestPair[0], 2e-6+roundTol)
	require.Greater(t, ball.LargestPair[0], 1e-6)
}

// Bad settings get errors naming the field; a canceled run keeps what was
// done.
func TestEnsembleBadInput(t *testing.T) {
	sys, err := Model("lorenz")
	require.NoError(t, err)
	cases := []struct {
		name string
		t1   float64
		s    EnsembleSettings
		want string
	}{
		{"no delta", 10, EnsembleSettings{}, "Delta"},
		{"negative members", 10, EnsembleSettings{Delta: 1e-6, Members: -1}, "Members"},
		{"unknown component", 10, EnsembleSettings{Delta: 1e-6, Along: []string{"w"}}, "Along"},
		{"line of two", 10, EnsembleSettings{Delta: 1e-6, Spread: SpreadLine, Along: []string{"x", "y"}}, "Along"},
		{"ratio", 10, EnsembleSettings{Delta: 1e-6, Ratio: 1}, "Ratio"},
		{"no releases no tol", 10, EnsembleSettings{Delta: 1e-6, Releases: -1}, "Tol"},
		{"short start", 10, EnsembleSettings{Starts: [][]float64{{1, 1}}}, "Starts[0]"},
		{"every", 10, EnsembleSettings{Delta: 1e-6, Every: 20}, "Every"},
		{"span", -1, EnsembleSettings{Delta: 1e-6}, "t1"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			rep, err := Ensemble(context.Background(), sys, tc.t1, &tc.s)
			require.Error(t, err)
			require.Nil(t, rep)
			require.Contains(t, err.Error(), tc.want)
		})
	}
	m, err := Model("henon")
	require.NoError(t, err)
	_, err = Ensemble(context.Background(), m, 10, &EnsembleSettings{Delta: 1e-6})
	require.ErrorIs(t, err, ErrKind)

	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	rep, err := Ensemble(ctx, sys, 10, &EnsembleSettings{Delta: 1e-6, Releases: -1, Tol: 1})
	require.ErrorIs(t, err, context.Canceled)
	require.NotNil(t, rep)
	require.Equal(t, "canceled", rep.Status)
	require.NotNil(t, rep.Run)
	require.Equal(t, integrate.Canceled, rep.Run.Status)
}

// Members given by the caller: the control is the start, the scale to
// begin at is their largest distance from it.
func TestEnsembleGivenStarts(t *testing.T) {
	sys, err := Model("lorenz")
	require.NoError(t, err)
	rep, err := Ensemble(context.Background(), sys, 5, &EnsembleSettings{
		Starts: [][]float64{{1.001, 1, 1}, {1, 1.002, 1}}, Releases: 8, ReleaseEvery: 1, Tol: 1})
	require.NoError(t, err)
	require.Equal(t, 2, rep.Members)
	require.InDelta(t, 0.002, rep.Delta, 1e-15, "the largest distance from the start (exact up to rounding)")
	require.Equal(t, []float64{1.001, 1, 1}, rep.Run.Member(0, 1))
	require.Len(t, rep.PartingTimes, 2)
}

// System.BatchProblem: a system read from formulas runs on the compiled
// batch evaluator, a built-in on its own field; either way a one-member
// batch gives the bits of Solve on the System's Problem (exact identity:
// the batch evaluator repeats the tape's operations, the batch stepper
// Solve's).
func TestSystemBatchProblemBits(t *testing.T) {
	file, err := os.Open("examples/systems/lab-loop.json")
	require.NoError(t, err)
	defer file.Close()
	fromFile, err := LoadSystem(file)
	require.NoError(t, err)
	builtin, err := Model("lorenz")
	require.NoError(t, err)
	for _, sys := range []*System{fromFile, builtin} {
		s := integrate.Settings{RelTol: 1e-10, AbsTol: 1e-10, Every: 0.5}
		bp, err := sys.BatchProblem([][]float64{sys.Start()})
		require.NoError(t, err)
		got, err := integrate.SolveBatch(context.Background(), bp, 20, &integrate.BatchSettings{Settings: s, Workers: 2})
		require.NoError(t, err)
		s.DropSteps = true
		want, err := integrate.Solve(context.Background(), sys.Problem(), 20, integrate.DormandPrince54, &s)
		require.NoError(t, err)
		require.Equal(t, want.Stats.Accepted, got.Stats.Accepted, sys.Name)
		for j := range want.Samples {
			require.Equalf(t, want.Samples[j].Y, got.Samples[j].Y, "%s at t=%g", sys.Name, want.Samples[j].T)
		}
	}
	m, err := Model("henon")
	require.NoError(t, err)
	_, err = m.BatchProblem(nil)
	require.ErrorIs(t, err, ErrKind)
}

// The members' samples are bounded in memory, and the largest pair is
// left out (not estimated) past maxPairMembers.
func TestEnsembleLimits(t *testing.T) {
	sys, err := Model("lorenz")
	require.NoError(t, err)
	_, err = Ensemble(context.Background(), sys, 10, &EnsembleSettings{Delta: 1e-6, Members: 1_000_000, Every: 1e-4, Releases: -1, Tol: 1})
	require.ErrorIs(t, err, integrate.ErrSettings)
	require.Contains(t, err.Error(), "GB")
	rep, err := Ensemble(context.Background(), sys, 0.1, &EnsembleSettings{Delta: 1e-6, Members: maxPairMembers, Every: 0.05, Releases: -1, Tol: 1})
	require.NoError(t, err)
	require.Empty(t, rep.LargestPair)
	require.Len(t, rep.MeanSpread, 3)
}
