package maps

import (
	"context"
	"testing"

	"github.com/plumbdyn/plumb/lyap"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

var _ lyap.ShadowableMap = (*Map)(nil)

func TestMapShadowed(t *testing.T) {
	// A *Map goes to lyap.ShadowMap as it is: the Hénon fixture's float64
	// orbit of 2000 iterates is shadowed, its one-step errors refined from
	// rounding (about 1e-16, common practice) to below lyap.ShadowTarget.
	m := henon()
	orbit, err := Orbit(context.Background(), m, []float64{0.1, 0.1}, 2000)
	require.NoError(t, err)
	sh, err := lyap.ShadowMap(context.Background(), m, orbit, nil)
	require.NoError(t, err)
	assert.Equal(t, 2000, sh.Shadowed)
	assert.Less(t, sh.StepErrorBefore, 1e-14)
	assert.LessOrEqual(t, sh.StepErrorAfter, 2*lyap.ShadowTarget)
	_, err = lyap.ShadowMap(context.Background(), &Map{n: 2, f: Funcs{Next: m.f.Next, Jacobian: m.f.Jacobian}}, orbit, nil)
	assert.ErrorContains(t, err, "no double-double form")
}
