package lyap

import (
	"context"
	"math"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
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

// traceSumTol bounds the exponent sum's miss of the trace: the segments
// are integrated at 1e-13, so their log-determinants err by about 1e-12
// each, 1e-10 over a hundred of them per 50 time units; 1e-8 leaves room.
const traceSumTol = 1e-8

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
		// One expanding direction (Lorenz: 0.9056, 0, −14.57; Sprott,
		// REFERENCES.md §1a), and the exponents of the chain's tangent maps
		// sum to the constant trace −(σ+1+β) (Liouville; exact identity, up
		// to the segments' 1e-13 integration).
		assert.Equal(t, 1, sh.Unstable)
		assert.InDelta(t, -(10 + 1 + 8.0/3), sh.Exponents[0]+sh.Exponents[1]+sh.Exponents[2], traceSumTol)
		assert.Greater(t, sh.MinAngle, DefaultMinAngle)
		dist = append(dist, sh.Distance)
		t.Logf("lorenz tol %g: distance %.3g at joint %d, gaps %.3g -> %.3g, passes %d, time shift %.3g, amplification %.3g, exponents %.4g, min angle %.3g at joint %d",
			tol, sh.Distance, sh.DistanceAt, sh.StepErrorBefore, sh.StepErrorAfter, sh.Passes, sh.TimeShift, sh.Amplification, sh.Exponents, sh.MinAngle, sh.MinAngleAt)
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

func TestShadowFlowNearTangency(t *testing.T) {
	// The chain's smallest split angle made the threshold: the shadow must
	// stop before that joint, and name its time and angle.
	times, states := lorenzRun(t, 1e-8, 20, 0.5)
	p := modelProblem(t, "lorenz")
	full, err := ShadowFlow(context.Background(), p, times, states, nil)
	require.NoError(t, err)
	require.Nil(t, full.Glitch)
	sh, err := ShadowFlow(context.Background(), p, times, states, &FlowShadowSettings{MinAngle: full.MinAngle * 1.0001})
	require.NoError(t, err)
	require.NotNil(t, sh.Glitch)
	assert.Equal(t, full.MinAngleAt, sh.Glitch.Index)
	assert.Equal(t, times[full.MinAngleAt], sh.Glitch.Time)
	assert.InEpsilon(t, full.MinAngle, sh.Glitch.Angle, 1e-6)
	assert.Less(t, sh.Shadowed, full.MinAngleAt)
	assert.Contains(t, sh.Glitch.Reason, "near-tangency")
	t.Logf("min angle %.3g at joint %d (t = %g); glitch: shadowed %d", full.MinAngle, full.MinAngleAt, times[full.MinAngleAt], sh.Shadowed)
}

func TestShadowFlowRefusesTimeDependence(t *testing.T) {
	// A forced oscillator x'' = −x + cos t: the time rescaling would move
	// the forcing, so the shadow refuses it.
	p := integrate.Problem{
		F: func(t float64, y, dy []float64) { dy[0], dy[1] = y[1], -y[0]+math.Cos(t) },
		Jac: func(_ float64, _ []float64, dst *mat.Dense) {
			dst.Set(0, 0, 0)
			dst.Set(0, 1, 1)
			dst.Set(1, 0, -1)
			dst.Set(1, 1, 0)
		},
		Y0: []float64{1, 0},
	}
	_, err := ShadowFlow(context.Background(), p, []float64{0, 1, 2}, []float64{1, 0, 1, 0, 1, 0}, nil)
	assert.ErrorIs(t, err, ErrSystem)
	assert.ErrorContains(t, err, "depends on time")
}
