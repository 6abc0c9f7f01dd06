package embed_test

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/embed"
)

// TestForecastHenon checks that the analogue forecast error of the Hénon
// map grows at about the rate of its largest exponent while small: the
// error of a local forecast grows like exp(lambda h) (Farmer & Sidorowich
// 1987, from memory), lambda = 0.41922 (Sprott, REFERENCES.md §1b). The
// band 25 % covers the bias of 4-neighbour averaging at 2000 points.
func TestForecastHenon(t *testing.T) {
	const growthTol = 0.25
	s, err := embed.NewSeries(henonX(2000), 1)
	require.NoError(t, err)
	f, err := embed.Forecast(context.Background(), s, 1, 2, nil)
	require.NoError(t, err)
	require.True(t, f.Found)
	// growth rate from lead 1 to the last lead below the horizon
	h := f.HorizonSteps - 1
	rate := math.Log(f.Error[h]/f.Error[1]) / float64(h-1)
	assert.InDeltaf(t, henonLambda, rate, growthTol*henonLambda, "error growth %g per step over leads 1..%d; want lambda = %g (Sprott)", rate, h, henonLambda)
	assert.Lessf(t, f.Error[1], 0.05, "one-step error %g of a noise-free map", f.Error[1])
}

// TestForecastAR1: for x_i = 0.8 x_(i-1) + e_i the best one-step forecast
// leaves the error variance of e, (1 - 0.8²) of the series' variance, so no
// forecast does better than E(1) = 0.6 (exact identity); the analogues'
// error is at least that, less the sampling spread (0.05), and the
// horizon at half the spread is within the first step.
func TestForecastAR1(t *testing.T) {
	s, err := embed.NewSeries(ar1(4000, 9), 1)
	require.NoError(t, err)
	f, err := embed.Forecast(context.Background(), s, 1, 2, nil)
	require.NoError(t, err)
	assert.Greaterf(t, f.Error[1], 0.6-0.05, "one-step error %g below the best linear forecast's 0.6", f.Error[1])
	assert.True(t, f.Found)
	assert.LessOrEqual(t, f.Horizon, 1.0)
}

func TestForecastBadInput(t *testing.T) {
	s, err := embed.NewSeries(henonX(100), 1)
	require.NoError(t, err)
	_, err = embed.Forecast(context.Background(), s, 1, 2, &embed.ForecastSettings{Leads: 90})
	assert.ErrorIs(t, err, embed.ErrTooShort)
	_, err = embed.Forecast(context.Background(), s, 1, 2, &embed.ForecastSettings{Fraction: -1})
	assert.ErrorIs(t, err, embed.ErrSettings)
	_, err = embed.Forecast(context.Background(), s, 40, 4, nil)
	assert.ErrorIs(t, err, embed.ErrEmbedding)
}
