package lyap

import (
	"context"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// lorenzRun is a DormandPrince54 run of Lorenz at rtol = atol = tol over
// [0, span], sampled every `every` time units: joints for ShadowFlow.
func lorenzRun(t *testing.T, tol, span, every float64) (times, states []float64) {
	p := modelProblem(t, "lorenz")
	sol, err := integrate.Solve(context.Background(), p, span, integrate.DormandPrince54,
		&integrate.Settings{RelTol: tol, AbsTol: tol, Every: every, DropSteps: true})
	require.NoError(t, err)
	for _, s := range sol.Samples {
		times = append(times, s.T)
		states = append(states, s.Y...)
	}
	return times, states
}

func TestShadowFlowLorenz(t *testing.T) {
	// A float64 Lorenz run of 50 time units is shadowed, and more closely
	// when its tolerance is tightened: the gaps between its joints and the
	// accurate flow shrink with the tolerance, and the shadow's distance
	// with them (the shadowing lemma's proportionality; common practice).
	// Coomes, Koçak & Palmer (1995) report shadows with time rescaling far
	// beyond the 10 time units without it (REFERENCES.md §6).
	const span, every = 50, 0.5
	var dist []float64
	for _, tol := range []float64{1e-6, 1e-9} {
		times, states := lorenzRun(t, tol, span, every)
		sh, err := ShadowFlow(context.Background(), modelProblem(t, "lorenz"), times, states, nil)
		require.NoError(t, err)
		require.Nil(t, sh.Glitch, "glitch %+v", sh.Glitch)
		assert.Equal(t, len(times)-1, sh.Shadowed)
		assert.InDelta(t, span, sh.Until, 1e-9)
		// The gaps must close far below the run's.
		assert.LessOrEqual(t, sh.StepErrorAfter, flowConverged*sh.StepErrorBefore+100*DefaultFlowShadowTol*50)
		// The clock drifts by far less than a segment (the time rescaling
		// takes up drift along the orbit, not a change of orbit).
		assert.Less(t, sh.TimeShift, 1e-3*every)
		assert.Greater(t, sh.Distance, 0.0)
		dist = append(dist, sh.Distance)
		t.Logf("lorenz tol %g: distance %.3g at joint %d, gaps %.3g -> %.3g, passes %d, time shift %.3g, amplification %.3g",
			tol, sh.Distance, sh.DistanceAt, sh.StepErrorBefore, sh.StepErrorAfter, sh.Passes, sh.TimeShift, sh.Amplification)
	}
	// Three orders tighter: the shadow must come at least ten times closer.
	assert.Less(t, dist[1], dist[0]/10, "distance shrinks with the tolerance")
	assert.Less(t, dist[0], 1e-2, "a small distance for a 1e-6 run")
}

func TestShadowFlowJump(t *testing.T) {
	times, states := lorenzRun(t, 1e-8, 10, 0.5)
	states[3*7] += 1 // joint 7 moved by one unit of x
	_, err := ShadowFlow(context.Background(), modelProblem(t, "lorenz"), times, states, nil)
	var je *JumpError
	require.ErrorAs(t, err, &je)
	assert.Equal(t, 7, je.Index)
	_, err = ShadowFlow(context.Background(), modelProblem(t, "lorenz"), times[:1], states[:3], nil)
	assert.ErrorIs(t, err, ErrDimension)
	_, err = ShadowFlow(context.Background(), modelProblem(t, "lorenz"), []float64{0, 0}, states[:6], nil)
	assert.ErrorIs(t, err, ErrSettings)
}
