package plumb

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/maps"
)

// TestCatalogMapsClosedForms checks the added built-in maps against closed
// forms of their fixed points, and the sine map against the universality
// of Feigenbaum's δ (Feigenbaum 1978: every one-hump map with a quadratic
// top has the same δ = 4.6692016...).
func TestCatalogMapsClosedForms(t *testing.T) {
	ctx := context.Background()
	// Polished roots and gonum's eigenvalues of a 2×2 matrix: a few ulps.
	const tol = 1e-12
	t.Run("ricker", func(t *testing.T) {
		sys, err := Model("ricker")
		require.NoError(t, err)
		require.NoError(t, sys.Set("r", 1.5))
		m, err := sys.Map()
		require.NoError(t, err)
		cs, err := maps.Cycles(ctx, m, 1, &maps.CycleSettings{Low: []float64{0}, High: []float64{5}})
		require.NoError(t, err)
		require.Len(t, cs, 2, "fixed points 0 and 1 (closed form: x = x·exp(r(1-x)))")
		assert.InDelta(t, 0, cs[0].Points[0][0], tol)
		assert.InDelta(t, math.Exp(1.5), cs[0].Multiplier, tol, "f'(0) = e^r (closed form)")
		assert.InDelta(t, 1, cs[1].Points[0][0], tol)
		assert.InDelta(t, 1-1.5, cs[1].Multiplier, tol, "f'(1) = 1 - r (closed form)")
		assert.True(t, cs[1].Stable)
	})
	t.Run("lozi", func(t *testing.T) {
		const a, b = 1.7, 0.5
		sys, err := Model("lozi")
		require.NoError(t, err)
		m, err := sys.Map()
		require.NoError(t, err)
		cs, err := maps.Cycles(ctx, m, 1, &maps.CycleSettings{Low: []float64{-3, -2}, High: []float64{3, 2}, Starts: 400})
		require.NoError(t, err)
		// x = 1/(1 + a - b) > 0 and x = 1/(1 - a - b) < 0, y = b·x (closed
		// form, one per linear piece).
		require.Len(t, cs, 2)
		xs := []float64{1 / (1 - a - b), 1 / (1 + a - b)}
		for i, c := range cs {
			assert.InDelta(t, xs[i], c.Points[0][0], tol, "fixed point x (closed form)")
			assert.InDelta(t, b*xs[i], c.Points[0][1], tol, "fixed point y = b·x (closed form)")
		}
		// At the positive one J = [[-a, 1], [b, 0]]: λ = (-a ± sqrt(a² + 4b))/2.
		l1, l2 := (-a-math.Sqrt(a*a+4*b))/2, (-a+math.Sqrt(a*a+4*b))/2
		ev := cs[1].Eigenvalues
		require.Len(t, ev, 2)
		assert.InDelta(t, l1, real(ev[0]), tol, "eigenvalue (closed form)")
		assert.InDelta(t, l2, real(ev[1]), tol, "eigenvalue (closed form)")
	})
	t.Run("sine", func(t *testing.T) {
		// δ from 11 levels: the truncation near 1e-7 (as for the logistic
		// map) and ulps of r, well inside 6 significant digits.
		const deltaTol = 5e-6
		sys, err := Model("sine")
		require.NoError(t, err)
		fam, err := sys.Family("r")
		require.NoError(t, err)
		c, err := maps.PeriodDoubling(ctx, fam, 0.5, [2]float64{0.5, 0.8}, 11)
		require.NoError(t, err)
		assert.InDelta(t, 0.5, c.Superstable[0], tol, "r sin(π/2) = 1/2 makes 1/2 a fixed point (closed form)")
		assert.InDelta(t, 4.669201609102990, c.LastDelta(), deltaTol, "δ is universal (Feigenbaum 1978; Briggs 1991)")
	})
}
