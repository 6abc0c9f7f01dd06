package embed_test

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/embed"
)

// maxD2Err is the largest error bar a D2 test accepts: wider and the
// check against the published value could not fail (common practice:
// a scaling region worth the name has local slopes within ±0.1).
const maxD2Err = 0.1

// TestCorrelationDimension checks D2 against published values, within
// the published uncertainty plus twice the estimate's own error bar.
func TestCorrelationDimension(t *testing.T) {
	for _, c := range []struct {
		name              string
		x                 []float64
		lag, dim, theiler int
		want, wantErr     float64
		source            string
	}{
		// Sprott, "Common Chaotic Systems" (REFERENCES.md §2): Hénon D2 =
		// 1.220 ± 0.036; Grassberger & Procaccia 1983 report 1.21 ± 0.01
		// from 15 000 points.
		{"henon", henonX(15000), 1, 2, 1, 1.220, 0.036, "Sprott 2004; Grassberger & Procaccia 1983"},
		// Sprott, Lorenz page (REFERENCES.md §2): D2 = 2.055 ± 0.004.
		{"lorenz x", lorenzX(t, 10000, 0.01), lorenzLag, 3, 100, 2.055, 0.004, "Sprott, Lorenz page"},
	} {
		t.Run(c.name, func(t *testing.T) {
			d, err := embed.CorrelationDimension(context.Background(), c.x, c.lag, c.dim, &embed.CorrSettings{Theiler: c.theiler})
			require.NoError(t, err)
			require.Truef(t, d.Found, "no scaling region; slopes %v", d.Slopes)
			assert.LessOrEqualf(t, d.D2Err, maxD2Err, "D2 = %g ± %g: error bar too wide to test", d.D2, d.D2Err)
			assert.InDeltaf(t, c.want, d.D2, c.wantErr+2*d.D2Err, "D2 = %g ± %g over radii %g..%g; want %g ± %g (%s)",
				d.D2, d.D2Err, d.Radii[d.Fit.First], d.Radii[d.Fit.Last], c.want, c.wantErr, c.source)
			// Exact identities: sums increase with r and lie in [0, 1].
			for k := 1; k < len(d.Sum); k++ {
				assert.GreaterOrEqual(t, d.Sum[k], d.Sum[k-1])
			}
			assert.LessOrEqual(t, d.Sum[len(d.Sum)-1], 1.0)
		})
	}
}

// TestCorrelationSumBruteForce compares the tree's pair counts with the
// all-pairs loop on a small series (the oracle of gonum's own kd-tree
// tests: brute force against the tree).
func TestCorrelationSumBruteForce(t *testing.T) {
	x := henonX(600)
	const lag, dim, theiler = 1, 3, 4
	d, err := embed.CorrelationDimension(context.Background(), x, lag, dim,
		&embed.CorrSettings{Theiler: theiler, References: 1 << 20, CoarseReferences: 1 << 20, Radii: 12, MinRadius: 0.01})
	require.NoError(t, err)
	e, err := embed.Embed(x, lag, dim)
	require.NoError(t, err)
	n := e.Len()
	var total int64
	count := make([]int64, len(d.Radii))
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			if i-j <= theiler && j-i <= theiler {
				continue
			}
			total++
			var m float64
			for k := 0; k < dim; k++ {
				m = max(m, math.Abs(e.Coord(i, k)-e.Coord(j, k)))
			}
			for r, rad := range d.Radii {
				if m <= rad {
					count[r]++
				}
			}
		}
	}
	assert.Equal(t, total, d.TotalPairs, "ordered pairs outside the Theiler window")
	assert.Equal(t, count, d.Pairs, "pairs within each radius: tree against brute force")
	// With 200 coarse references the full count stops at the cut; up to
	// there every pair is still counted.
	d2, err := embed.CorrelationDimension(context.Background(), x, lag, dim,
		&embed.CorrSettings{Theiler: theiler, References: 1 << 20, Radii: 12, MinRadius: 0.01, MaxSum: 0.01})
	require.NoError(t, err)
	require.Less(t, d2.Cut, len(d2.Radii)-1, "the two-pass count is exercised")
	assert.Equal(t, count[:d2.Cut+1], d2.Pairs[:d2.Cut+1], "pairs up to the cut: tree against brute force")
	assert.Equal(t, total, d2.TotalPairs)
	for k := 1; k < len(d2.Sum); k++ {
		assert.GreaterOrEqual(t, d2.Sum[k], d2.Sum[k-1], "sums increase across the cut")
	}
}

func TestCorrelationDimensionNoise(t *testing.T) {
	// White noise fills any embedding: D2 near the dimension (exact for an
	// i.i.d. series with a continuous density, away from the edges; the
	// tolerance 0.3 covers the finite-sample bias at 5000 points, as
	// measured here, and the edge effect of the Gaussian's tails).
	const tol = 0.3
	d, err := embed.CorrelationDimension(context.Background(), whiteNoise(5000, 3), 1, 3, nil)
	require.NoError(t, err)
	assert.InDeltaf(t, 3, d.D2, tol, "D2 of white noise in 3 dimensions: %g ± %g", d.D2, d.D2Err)
}

func TestCorrelationDimensionBadInput(t *testing.T) {
	ctx := context.Background()
	_, err := embed.CorrelationDimension(ctx, henonX(100), 30, 5, nil)
	assert.ErrorIs(t, err, embed.ErrEmbedding)
	_, err = embed.CorrelationDimension(ctx, henonX(100), 1, 2, &embed.CorrSettings{MinRadius: 0.9, MaxRadius: 0.5})
	assert.ErrorIs(t, err, embed.ErrSettings)
	_, err = embed.CorrelationDimension(ctx, make([]float64, 100), 1, 2, nil)
	assert.ErrorIs(t, err, embed.ErrConstant)
}
