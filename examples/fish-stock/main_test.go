package main

import (
	"context"
	"io"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/maps"
)

// TestFishStock checks the study against closed forms. Harvesting a
// fraction h of Ricker recruits is the Ricker map with growth
// r' = r + ln(1 - h), up to a scaling of the stock (exact:
// (1-h)·e^(r(1-x)) = e^(r' - r x), and x = (r'/r)·y gives y·e^(r'(1-y))).
// So the steady catch settles where the fixed point's multiplier
// 1 - r' = -1, h = 1 - e^(2 - r) (closed form), and the period-3 window
// ends at h = 1 - e^(r3 - r), r3 the opening of the plain Ricker map's
// window (computed here independently with maps.Onset on the catalog's
// ricker).
func TestFishStock(t *testing.T) {
	const r = 3.3
	// 60 bisections of [0.1, 0.9] leave 0.8·2^-60; the multipliers are
	// exact to a few ulps.
	const settleTol = 1e-12
	// Two Newton solutions of a tangent bifurcation, each to about 1e-13.
	const windowTol = 1e-10
	out, err := run(io.Discard)
	require.NoError(t, err)
	assert.InDelta(t, 1-math.Exp(2-r), out.Settle, settleTol, "h = 1 - e^(2-r) (closed form by conjugacy)")

	h2, h4, h8 := out.Onsets[2], out.Onsets[4], out.Onsets[8]
	assert.True(t, out.Settle > h2 && h2 > h4 && h4 > h8 && h8 > out.ChaosBelow,
		"the cascade 1 -> 2 -> 4 -> 8 -> chaos as the harvest falls: %v %v %v %v %v", out.Settle, h2, h4, h8, out.ChaosBelow)

	ricker, err := plumb.Model("ricker")
	require.NoError(t, err)
	fam, err := ricker.Family("r")
	require.NoError(t, err)
	r3, _, err := maps.Onset(context.Background(), fam, 3, 3, 3.2, 40, &maps.CycleSettings{Low: []float64{0}, High: []float64{4}})
	require.NoError(t, err)
	assert.InDelta(t, 1-math.Exp(r3-r), out.Window3, windowTol, "the window's end maps to the plain Ricker map's opening (exact conjugacy)")

	found := false
	for _, w := range out.Windows {
		if w.Period == 3 {
			found = true
			// The scan's grid is 0.001 apart; the window's last scanned
			// value lies within a step of the exact end.
			assert.InDelta(t, out.Window3, w.To, 0.0015, "the scanned 3-window ends at the tangent bifurcation")
		}
	}
	assert.True(t, found, "a period-3 window inside the chaos")
}
