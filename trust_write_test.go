package plumb

import (
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// A long horizon's comparison grid (horizon/1000) can be too coarse to fit
// any growth law before the runs part; the report says so and names the
// spacing, and does not read the missing fit as a sign against chaos.
func TestWriteUndeterminedGrowth(t *testing.T) {
	rep := &Report{
		T0: 0, Horizon: 10000, Tol: 1, TolAbs: 1, Growth: "undetermined",
		Times:    []float64{0, 10, 20},
		Exponent: &ExponentEstimate{Value: 0.9, StdErr: 0.01, Source: "estimated"},
		Verdict:  NotTrusted, TrustedUntil: 18.26, Caution: Caution,
	}
	var b strings.Builder
	require.NoError(t, rep.Write(&b))
	out := b.String()
	assert.Contains(t, out, "the grid is every 10")
	assert.NotContains(t, out, "sees no exponential growth")
}
