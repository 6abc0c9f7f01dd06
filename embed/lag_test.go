package embed_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/embed"
)

// TestMutualInfoLorenz checks the first minimum of the mutual information
// of Lorenz x at dt = 0.01 against the band 0.10–0.25 time units
// (REFERENCES.md §10: about 16 samples in Ruskeepää 2017, dt inferred).
func TestMutualInfoLorenz(t *testing.T) {
	const dt = 0.01
	mi, err := embed.AverageMutualInfo(lorenzX(t, 10000, dt), 0)
	require.NoError(t, err)
	lagT := float64(mi.FirstMin) * dt
	assert.GreaterOrEqualf(t, lagT, 0.10, "first minimum at %d samples (%g time units); band 0.10–0.25 (Ruskeepää 2017)", mi.FirstMin, lagT)
	assert.LessOrEqualf(t, lagT, 0.25, "first minimum at %d samples (%g time units); band 0.10–0.25 (Ruskeepää 2017)", mi.FirstMin, lagT)
	// Exact identity: I(0) is the entropy of the binned series, the
	// largest value the information can take.
	for l, v := range mi.Info {
		assert.LessOrEqualf(t, v, mi.Info[0]+1e-12, "I(%d) = %g above I(0) = %g", l, v, mi.Info[0])
	}
}

// TestMutualInfoIndependent checks that the information between
// independent values is near zero: for b bins and m pairs the plug-in
// estimate's bias is (b-1)²/(2m) nats (Roulston 1999, "Estimating the
// errors on measured entropy and mutual information", Physica D 125,
// 285–294), here 13²/20000 ≈ 0.008; the bound 0.02 leaves room for its
// spread.
func TestMutualInfoIndependent(t *testing.T) {
	const bound = 0.02
	mi, err := embed.AverageMutualInfo(whiteNoise(10000, 7), 10)
	require.NoError(t, err)
	for l := 1; l < len(mi.Info); l++ {
		assert.Lessf(t, mi.Info[l], bound, "I(%d) = %g for white noise; want < %g (Roulston 1999 bias)", l, mi.Info[l], bound)
	}
}

// TestAutocorrelationSine checks the estimator against the exact sum for
// a sine of period 50 samples over 80 whole periods (mean 0): R(l) =
// cos(2 pi l / 50) (n - l)/n, so the first zero is at l = ceil(12.5) = 13
// (exact identity) and 1/e is crossed at l = ceil(50 acos(1/e) / 2 pi) =
// ceil(9.52) = 10 (the factor (n-l)/n >= 0.997 moves neither).
func TestAutocorrelationSine(t *testing.T) {
	x := sine(4000, 50)
	ac, err := embed.Autocorrelate(x, 0)
	require.NoError(t, err)
	assert.Equal(t, 13, ac.FirstZero, "first zero of a sine of period 50 (exact: after a quarter period)")
	want := int(math.Ceil(50 * math.Acos(1/math.E) / (2 * math.Pi)))
	assert.Equalf(t, want, ac.EFold, "1/e lag of a sine of period 50")
}

func TestLagBadInput(t *testing.T) {
	_, err := embed.AverageMutualInfo([]float64{1, 2, 3}, 0)
	assert.ErrorIs(t, err, embed.ErrTooShort)
	_, err = embed.AverageMutualInfo(make([]float64, 100), 0)
	assert.ErrorIs(t, err, embed.ErrConstant)
	_, err = embed.Autocorrelate(make([]float64, 100), 0)
	assert.ErrorIs(t, err, embed.ErrConstant)
}
