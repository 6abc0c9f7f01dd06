package plumb

import (
	"context"
	"math"
	"strings"
	"sync"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/maps"
)

// TestFamilyMatchesSet: the family's map at r is the map of the system with
// r set (exact identity: the same code at the same parameters), from
// several goroutines at once, and the system itself is left as it was.
func TestFamilyMatchesSet(t *testing.T) {
	sys, err := Model("logistic")
	require.NoError(t, err)
	fam, err := sys.Family("r")
	require.NoError(t, err)
	require.NoError(t, sys.Set("r", 3.7))
	want, err := sys.Map()
	require.NoError(t, err)
	x, y := []float64{0.3}, []float64{0}
	want.Next(x, y)
	var wg sync.WaitGroup
	for range 4 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			m, err := fam([]float64{3.7})
			assert.NoError(t, err)
			got := []float64{0}
			m.Next([]float64{0.3}, got)
			assert.Equal(t, math.Float64bits(y[0]), math.Float64bits(got[0]))
		}()
	}
	wg.Wait()
	assert.Equal(t, 3.7, sys.Params()[0].Value)
	_, err = fam([]float64{math.NaN()})
	assert.ErrorIs(t, err, integrate.ErrNonFinite)
	_, err = fam(nil)
	assert.ErrorIs(t, err, integrate.ErrDimension)
	_, err = sys.Family("q")
	assert.ErrorIs(t, err, ErrUnknown)
	_, err = sys.Family("r", "r")
	assert.ErrorIs(t, err, integrate.ErrSettings)
	lorenz, err := Model("lorenz")
	require.NoError(t, err)
	_, err = lorenz.Family("rho")
	assert.ErrorIs(t, err, ErrKind)
}

// TestFamilyCascadeFromFormulas: a map from a system file runs the route
// to chaos like a built-in: the logistic map written as a formula gives
// R_2 = 3.4985616993277015 (REFERENCES.md §4, mpmath) and δ to 6 digits
// from 10 levels (Briggs 1991: 4.669201609...).
func TestFamilyCascadeFromFormulas(t *testing.T) {
	const rTol = 2e-15 // a few ulps: the formula map iterated in double-double
	const deltaTol = 5e-6
	sys, err := LoadSystem(strings.NewReader(`{"kind": "map", "parameters": [{"name": "r", "value": 3}],
		"variables": [{"name": "x", "start": 0.3, "next": "r*x*(1 - x)"}]}`))
	require.NoError(t, err)
	fam, err := sys.Family("r")
	require.NoError(t, err)
	c, err := maps.PeriodDoubling(context.Background(), fam, 0.5, [2]float64{2, 3.2}, 10)
	require.NoError(t, err)
	assert.InDelta(t, 3.4985616993277015, c.Superstable[2], rTol, "R_2 (REFERENCES.md §4)")
	assert.InDelta(t, 4.669201609102990, c.LastDelta(), deltaTol, "δ (Briggs 1991)")
}
