package integrate

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/require"
)

// TestAuditReachCircle: the harmonic oscillator x' = y, y' = -x from (1, 0)
// runs on the unit circle, x = cos t, y = -sin t. Over whole periods its
// samples' mean is the centre to within the quadrature error of the
// sampling, so the largest distance of a sample from the mean, Reach, is
// the radius 1, and Spread (the root-mean-square distance) is 1 too (exact
// identity of the circle). Scaling both components by 4 divides both by 4.
func TestAuditReachCircle(t *testing.T) {
	p := Problem{
		F:  func(_ float64, y, dy []float64) { dy[0], dy[1] = y[1], -y[0] },
		Y0: []float64{1, 0},
	}
	lad := Ladder{
		Reference: Rung{Method: DormandPrince853, RelTol: 1e-12, AbsTol: 1e-12},
		Rungs:     []Rung{{Name: "tol 1e-6", Kind: KindTolerance, Method: DormandPrince54, RelTol: 1e-6, AbsTol: 1e-6}},
	}
	for _, scale := range []float64{1, 4} {
		res, err := Audit(context.Background(), p, 20*math.Pi, lad, &AuditSettings{Tol: 1, Lambda: 0, Scales: []float64{scale, scale}})
		require.NoError(t, err)
		// circleTol: the uniform grid over 10 whole periods holds both
		// ends, so the start (1, 0) counts twice and the mean sits 1/n off
		// the centre (n samples); Reach and Spread move by at most that.
		// The integration error (1e-12 per step) is far below.
		circleTol := 2 / float64(len(res.Times)) / scale
		require.InDeltaf(t, 1/scale, res.Reach, circleTol, "reach of the unit circle / scale %g (exact identity)", scale)
		require.InDeltaf(t, 1/scale, res.Spread, circleTol, "spread of the unit circle / scale %g (exact identity)", scale)
	}
}
