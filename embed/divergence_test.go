package embed_test

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/embed"
)

// henonLambda is the Hénon map's largest exponent, 0.41922 per iterate
// (Sprott, "Common Chaotic Systems", REFERENCES.md §1b); lorenzLambda
// Lorenz's, 0.9056 per time unit (same source).
const (
	henonLambda  = 0.41922
	lorenzLambda = 0.9056
	// henonRel is the ±5 % REFERENCES.md §3a advises for Rosenstein's
	// method on 500 Hénon points (his own estimate was 2.4 % low).
	henonRel = 0.05
	// maxLambdaRelErr bounds the error bar a Lorenz check accepts (25 %),
	// so that the check against the published value can fail.
	maxLambdaRelErr = 0.25
)

func TestLargestExponentFromData(t *testing.T) {
	ctx := context.Background()
	henon500, err := embed.NewSeries(henonX(500), 1)
	require.NoError(t, err)
	henon, err := embed.NewSeries(henonX(5000), 1)
	require.NoError(t, err)
	lorenz, err := embed.NewSeries(lorenzX(t, 10000, 0.01), 0.01)
	require.NoError(t, err)
	type method func(context.Context, *embed.Series, int, int, *embed.DivergenceSettings) (*embed.Divergence, error)
	for _, c := range []struct {
		name              string
		m                 method
		s                 *embed.Series
		lag, dim, theiler int
		want, tol         float64 // tol 0: use twice the estimate's error bar
		radius            float64 // Kantz's radius (0: default)
	}{
		// Rosenstein et al. 1993 (REFERENCES.md §3a): 500 Hénon points,
		// J = 1, m = 2; expected 0.418, ±5 %.
		{"rosenstein henon 500", embed.Rosenstein, henon500, 1, 2, 1, henonLambda, henonRel * henonLambda, 0},
		{"rosenstein henon 5000", embed.Rosenstein, henon, 1, 2, 1, henonLambda, henonRel * henonLambda, 0},
		{"kantz henon 5000", embed.Kantz, henon, 1, 2, 1, henonLambda, henonRel * henonLambda, 0},
		// Lorenz: lag 16 (the mutual information's first minimum), m = 5,
		// Theiler window 100 samples (about one loop around a lobe).
		{"rosenstein lorenz", embed.Rosenstein, lorenz, lorenzLag, 5, 100, lorenzLambda, 0, 0},
		// Kantz 1994: the slope must not depend on the radius once it is
		// small; 0.5 % of the range still leaves most references ~10
		// neighbours at 10^4 points.
		{"kantz lorenz", embed.Kantz, lorenz, lorenzLag, 5, 100, lorenzLambda, 0, 0.005},
	} {
		t.Run(c.name, func(t *testing.T) {
			d, err := c.m(ctx, c.s, c.lag, c.dim, &embed.DivergenceSettings{Theiler: c.theiler, Radius: c.radius})
			require.NoError(t, err)
			require.Truef(t, d.Found, "no linear region in %v", d.LogDist)
			tol := c.tol
			if tol == 0 {
				assert.LessOrEqualf(t, d.LambdaErr, maxLambdaRelErr*c.want, "error bar %g too wide to test", d.LambdaErr)
				tol = 2 * d.LambdaErr
			}
			assert.InDeltaf(t, c.want, d.Lambda, tol, "%s: lambda = %g ± %g over steps %d..%d; want %g (Sprott)",
				d.Method, d.Lambda, d.LambdaErr, d.Fit.First, d.Fit.Last, c.want)
		})
	}
}

func TestDivergenceNoise(t *testing.T) {
	// White noise has no linear rise: the nearest neighbour's distance
	// jumps to the typical distance in one step and stays (Rosenstein et
	// al. 1993, Sect. 4 on noise: from memory). Whatever is fitted, the
	// curve's plateau is reached at step 1 or 2.
	s, err := embed.NewSeries(whiteNoise(3000, 5), 1)
	require.NoError(t, err)
	d, err := embed.Rosenstein(context.Background(), s, 1, 3, nil)
	require.NoError(t, err)
	assert.Falsef(t, d.Found && d.Fit.Last-d.Fit.First >= 5, "a linear region %d..%d in white noise", d.Fit.First, d.Fit.Last)
}

func TestDivergenceBadInput(t *testing.T) {
	s, err := embed.NewSeries(henonX(100), 1)
	require.NoError(t, err)
	_, err = embed.Rosenstein(context.Background(), s, 1, 2, &embed.DivergenceSettings{Steps: 95})
	assert.ErrorIs(t, err, embed.ErrTooShort)
	_, err = embed.Kantz(context.Background(), s, 1, 2, &embed.DivergenceSettings{Radius: 2})
	assert.ErrorIs(t, err, embed.ErrSettings)
	_, err = embed.Rosenstein(context.Background(), nil, 1, 2, nil)
	assert.ErrorIs(t, err, embed.ErrSettings)
}

// TestKantzSameBits runs Kantz's method several times on one series: the
// neighbour search's tree takes gonum's random pivots, so each run builds a
// differently shaped tree; the curve must still be the same to the last bit
// (exact identity: the same sums in the same order).
func TestKantzSameBits(t *testing.T) {
	s, err := embed.NewSeries(henonX(2000), 1)
	require.NoError(t, err)
	first, err := embed.Kantz(context.Background(), s, 1, 2, nil)
	require.NoError(t, err)
	for run := 1; run < 6; run++ {
		d, err := embed.Kantz(context.Background(), s, 1, 2, nil)
		require.NoError(t, err)
		for k := range first.LogDist {
			a, b := first.LogDist[k], d.LogDist[k]
			if math.Float64bits(a) != math.Float64bits(b) {
				t.Fatalf("run %d: log distance at step %d is %v, first run %v", run, k, b, a)
			}
		}
	}
}
