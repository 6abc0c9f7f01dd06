package plumb

import (
	"bytes"
	"context"
	"encoding/json"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestTrustShadowFlow(t *testing.T) {
	// The demo audit with Shadow: the default DP5(4) run of Lorenz to t =
	// 50 is shadowed over the whole span, far closer than the tolerance at
	// which the runs part (lyap.TestShadowFlowLorenz holds the method to
	// its run's tolerance).
	sys, err := Model("lorenz")
	require.NoError(t, err)
	rep, err := sys.Trust(context.Background(), 50, &TrustSettings{Tol: 1, Shadow: true, NoExact: true, NoReversal: true})
	require.NoError(t, err)
	sh := rep.Shadow
	require.NotNil(t, sh)
	require.Empty(t, sh.Error)
	assert.True(t, sh.Whole, "glitch %+v", sh.Glitch)
	assert.InDelta(t, 50, sh.Until, 1e-9)
	assert.Less(t, sh.Distance, 1e-2, "a run at rtol 1e-6 is shadowed within 1e-2 (state units of order 10)")
	assert.Less(t, sh.StepErrorAfter, sh.StepErrorBefore)
	assert.Less(t, rep.TrustedUntil, 50.0, "the runs part pointwise before the end: the shadow says more than the horizon")
	var b bytes.Buffer
	require.NoError(t, rep.Write(&b))
	assert.Contains(t, b.String(), "shadow (of the model, not the real system): a true orbit stays within")
	js, err := json.Marshal(rep)
	require.NoError(t, err)
	assert.Contains(t, string(js), `"shadow":{"of":`)
	t.Logf("%+v", *sh)
}

func TestTrustShadowMap(t *testing.T) {
	sys, err := Model("henon")
	require.NoError(t, err)
	rep, err := sys.Trust(context.Background(), 5000, &TrustSettings{Tol: 0.1, Shadow: true})
	require.NoError(t, err)
	sh := rep.Shadow
	require.NotNil(t, sh)
	require.Empty(t, sh.Error)
	assert.True(t, sh.Whole)
	// Hammel, Yorke & Grebogi (1988): Hénon float64-like orbits shadowed
	// within about 1e-8 over 1e7 iterates (from memory, REFERENCES.md §6).
	assert.Less(t, sh.Distance, 1e-8)
	assert.Equal(t, 5000.0, sh.Until)
	off, err := sys.Trust(context.Background(), 5000, &TrustSettings{Tol: 0.1})
	require.NoError(t, err)
	assert.Nil(t, off.Shadow, "no shadow unless asked for")
}

func TestTrustShadowYourRun(t *testing.T) {
	// Your run, given as TrustSettings.Run or inside a ladder built around
	// it, is the run shadowed; three orders tighter than the default run,
	// it is shadowed closer.
	sys, err := Model("lorenz")
	require.NoError(t, err)
	run := integrate.Rung{Method: integrate.DormandPrince54, RelTol: 1e-9, AbsTol: 1e-9}
	rep, err := sys.Trust(context.Background(), 30, &TrustSettings{Tol: 1, Shadow: true, NoExact: true, NoReversal: true, Run: &run})
	require.NoError(t, err)
	require.NotNil(t, rep.Shadow)
	require.Empty(t, rep.Shadow.Error)
	assert.Contains(t, rep.Shadow.Of, "your run (Dormand–Prince 5(4) rtol 1e-09 atol 1e-09)")
	ladder, err := integrate.RunLadder(0, 30, run)
	require.NoError(t, err)
	viaLadder, err := sys.Trust(context.Background(), 30, &TrustSettings{Tol: 1, Shadow: true, NoExact: true, NoReversal: true, Ladder: &ladder})
	require.NoError(t, err)
	assert.Equal(t, rep.Shadow, viaLadder.Shadow, "the same run either way")
	def, err := sys.Trust(context.Background(), 30, &TrustSettings{Tol: 1, Shadow: true, NoExact: true, NoReversal: true})
	require.NoError(t, err)
	assert.Less(t, rep.Shadow.Distance, def.Shadow.Distance/10, "rtol 1e-9 against 1e-6")
}
