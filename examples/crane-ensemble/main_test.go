package main

import (
	"bytes"
	"testing"

	"github.com/stretchr/testify/require"
)

func TestCraneEnsemble(t *testing.T) {
	var out bytes.Buffer
	res, err := run(&out)
	require.NoError(t, err)
	require.Len(t, res, 2)
	require.Contains(t, out.String(), "not the real system")
	for _, r := range res {
		run := r.report.Run
		// Exact identity of the line spread: release k starts k mm further
		// along the load's arc, theta2 = start + k·(1 mm)/(3 m) (up to the
		// rounding of the sum, a few ulps of 2.443 rad).
		const roundTol = 1e-15
		for k := 1; k < run.Members; k++ {
			require.InDelta(t, 2.443+float64(k)*release/loadRope, run.Member(0, k)[1], roundTol)
			require.Equal(t, 1.745, run.Member(0, k)[0])
		}
		// Every release parts from the first within the span (the scenario
		// is chosen so; the assertion fails if the model stops being chaotic).
		for k, p := range r.parting {
			require.NotNilf(t, p, "release +%d mm at rtol %g", k+1, r.rtol)
			require.Greater(t, *p, 0.0)
			require.Less(t, *p, span)
		}
	}
	// What the text says follows from the numbers (exact identity).
	gap, first := partingGap(res[0].parting, res[1].parting)
	if gap >= 0 && gap <= 0.05*first {
		require.Contains(t, out.String(), "not the integrator, limits the forecast")
	} else {
		require.Contains(t, out.String(), "changes the answer")
	}
}
