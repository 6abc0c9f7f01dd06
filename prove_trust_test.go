package plumb

import (
	"context"
	"errors"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/enclose"
	"github.com/plumbdyn/plumb/integrate"
)

// TestTrustProve: System.Trust with Prove adds the enclosure of the
// audited start: for Lorenz from (1, 1, 1) over 20 time units it stays
// below 1e-3 over the whole span (package enclose measures 6.3e-7 at
// t = 20, TestLorenzEnclosure) and holds the 80-digit reference at t = 20
// (integrate/testdata/lorenz.json, mpmath).
func TestTrustProve(t *testing.T) {
	sys, err := Model("lorenz")
	require.NoError(t, err)
	require.NoError(t, sys.SetStart([]float64{1, 1, 1}))
	ladder := integrate.DefaultLadder(0, 20)
	ladder.Rungs = ladder.Rungs[:1]
	last := -1
	progress := func(stage Stage, done, total int) {
		if stage == StageProof {
			require.Equal(t, 1000, total)
			require.GreaterOrEqual(t, done, last, "the proof's progress never goes back")
			last = done
		}
	}
	rep, err := sys.Trust(context.Background(), 20, &TrustSettings{Tol: 1, Prove: 1e-3, NoExact: true, Ladder: &ladder, Progress: progress})
	require.NoError(t, err)
	assert.Equal(t, 1000, last, "the proof's progress ends at the whole span")
	p := rep.Proof
	require.NotNil(t, p)
	assert.Nil(t, p.Failure)
	assert.True(t, p.Whole)
	assert.Equal(t, 20.0, p.ProvenUntil)
	assert.Less(t, p.End.Width, 1e-3)
	assert.LessOrEqual(t, len(p.Times), proofPoints)
	assert.Equal(t, len(p.Times), len(p.Widths))
	assert.Equal(t, 20.0, p.Times[len(p.Times)-1])
	ref := loadLorenzRef(t)["20"]
	for i, v := range ref {
		f, _ := v.Float64()
		assert.Truef(t, p.End.Lo[i] <= f && f <= p.End.Hi[i], "component %d: reference %.17g (mpmath) outside [%.17g, %.17g]", i, f, p.End.Lo[i], p.End.Hi[i])
	}
	var b strings.Builder
	rep.writeProof(&b, "t = ", "")
	assert.Contains(t, b.String(), "lies in boxes narrower than 0.001 up to t = 20, the whole span")
	assert.Contains(t, b.String(), "not the runs audited beside it, and not the real system")
}

// TestProveMapAndRefusals: a map's proof counts iterates; bad widths,
// horizons and systems without formulas are refused before any work.
func TestProveMapAndRefusals(t *testing.T) {
	ctx := context.Background()
	henon, err := Model("henon")
	require.NoError(t, err)
	p, err := henon.Prove(ctx, 30, 1e-3)
	require.NoError(t, err)
	assert.Nil(t, p.Failure)
	assert.Equal(t, 30.0, p.ProvenUntil, "Hénon: below 1e-3 for 30 iterates (enclose.TestHenonEnclosure: 57 from another start)")
	assert.Contains(t, p.Method, "interval iteration")

	for _, tc := range []struct {
		name    string
		horizon float64
		tol     float64
		want    error
	}{
		{"zero tol", 10, 0, integrate.ErrSettings},
		{"negative tol", 10, -1, integrate.ErrSettings},
		{"fractional iterates", 10.5, 1e-3, ErrHorizon},
		{"zero horizon", 0, 1e-3, ErrHorizon},
	} {
		_, err := henon.Prove(ctx, tc.horizon, tc.tol)
		assert.ErrorIsf(t, err, tc.want, "%s", tc.name)
	}
	_, err = henon.Trust(ctx, 10, &TrustSettings{Tol: 0.1, Prove: -1})
	assert.ErrorIs(t, err, integrate.ErrSettings)
	var none *System
	_, err = none.Prove(ctx, 1, 1)
	assert.True(t, errors.Is(err, ErrNoSystem))
}

// TestProveKink: a system file whose formulas reach a corner stops the
// proof there with the function named.
func TestProveKink(t *testing.T) {
	src := `{"name": "drain", "kind": "flow", "variables": [{"name": "h", "start": 0.5, "rate": "-abs(h) - 1"}]}`
	sys, err := LoadSystem(strings.NewReader(src))
	require.NoError(t, err)
	p, err := sys.Prove(context.Background(), 2, 1e-3)
	require.NoError(t, err)
	require.NotNil(t, p.Failure)
	assert.Equal(t, enclose.FailKink, p.Failure.Kind)
	assert.Contains(t, p.Failure.Reason, "abs")
}
