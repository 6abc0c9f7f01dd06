package embed_test

import (
	"context"
	"errors"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/embed"
)

// lorenzLag is the delay used for Lorenz x at dt = 0.01: 16 samples, the
// first minimum of the mutual information reported by Ruskeepää (2017) for
// a Lorenz series (REFERENCES.md §10), inside the 0.10–0.25 band.
const lorenzLag = 16

// TestMinimalDimension checks that false neighbours and Cao's E1 give the
// published minimal embedding dimensions.
func TestMinimalDimension(t *testing.T) {
	ctx := context.Background()
	for _, c := range []struct {
		name    string
		x       []float64
		lag     int
		want    int
		comment string
	}{
		// Kennel, Brown & Abarbanel 1992 (d_E = 2 for Hénon, REFERENCES.md §3b);
		// Cao 1997 (d0 = 2 for Hénon).
		{"henon", henonX(5000), 1, 2, "Kennel et al. 1992; Cao 1997"},
		// Kennel, Brown & Abarbanel 1992 (d_E = 3 for Lorenz, REFERENCES.md §3b).
		{"lorenz x", lorenzX(t, 10000, 0.01), lorenzLag, 3, "Kennel et al. 1992"},
	} {
		t.Run(c.name, func(t *testing.T) {
			f, err := embed.FalseNeighbours(ctx, c.x, c.lag, 5, &embed.FNNSettings{Theiler: c.lag})
			require.NoError(t, err)
			assert.Equalf(t, c.want, f.Dimension, "FNN dimension (fractions %v); want %d from %s", f.Fraction, c.want, c.comment)
			cao, err := embed.CaoDimension(ctx, c.x, c.lag, 5, c.lag)
			require.NoError(t, err)
			assert.Equalf(t, c.want, cao.Dimension, "Cao dimension (E1 %v); want %d from %s", cao.E1, c.want, c.comment)
			// Cao 1997: E2 departs from 1 for deterministic data.
			assert.Greaterf(t, cao.E2Spread, e2NoiseBand, "E2 %v stays near 1 for a deterministic series (Cao 1997)", cao.E2)
		})
	}
}

// e2NoiseBand is how far Cao's E2 may stray from 1 for white noise: with
// 5000 points each E* is a mean of thousands of terms with a relative
// standard error of about 1/sqrt(5000) ≈ 0.014, so a ratio stays within
// a few of those (0.05); deterministic series depart by far more (Cao
// 1997, Fig. 2 for Hénon: E2(1) ≈ 0, from memory).
const e2NoiseBand = 0.05

// TestCaoNoise checks that E2 stays near 1 at every dimension for white
// noise, and that neither method settles on a dimension for it (Cao 1997;
// Kennel et al. 1992, whose second criterion flags noise).
func TestCaoNoise(t *testing.T) {
	for _, seed := range []uint64{1, 2, 3} {
		x := whiteNoise(5000, seed)
		cao, err := embed.CaoDimension(context.Background(), x, 1, 6, 1)
		require.NoError(t, err)
		for d, e2 := range cao.E2 {
			assert.InDeltaf(t, 1, e2, e2NoiseBand, "seed %d: E2(%d) = %g for white noise; want 1 ± %g (Cao 1997)", seed, d+1, e2, e2NoiseBand)
		}
		f, err := embed.FalseNeighbours(context.Background(), x, 1, 6, nil)
		require.NoError(t, err)
		assert.Zerof(t, f.Dimension, "seed %d: FNN settled on dimension %d for white noise (fractions %v)", seed, f.Dimension, f.Fraction)
	}
}

func TestDimensionBadInput(t *testing.T) {
	ctx := context.Background()
	x := henonX(100)
	_, err := embed.FalseNeighbours(ctx, x, 30, 5, nil)
	assert.ErrorIsf(t, err, embed.ErrEmbedding, "lag 30 x dimension 6 beyond 100 values: %v", err)
	_, err = embed.CaoDimension(ctx, x, 40, 5, 0)
	assert.ErrorIs(t, err, embed.ErrEmbedding)
	_, err = embed.FalseNeighbours(ctx, x, 1, 0, nil)
	assert.ErrorIs(t, err, embed.ErrSettings)
	_, err = embed.FalseNeighbours(ctx, x, 1, 3, &embed.FNNSettings{RTol: math.NaN()})
	assert.ErrorIs(t, err, embed.ErrSettings)
	_, err = embed.FalseNeighbours(ctx, make([]float64, 100), 1, 3, nil)
	assert.ErrorIs(t, err, embed.ErrConstant)
	canceled, cancel := context.WithCancel(ctx)
	cancel()
	_, err = embed.CaoDimension(canceled, x, 1, 3, 0)
	assert.Truef(t, errors.Is(err, context.Canceled), "canceled: %v", err)
}
