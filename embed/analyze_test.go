package embed_test

import (
	"context"
	"errors"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/embed"
)

func TestAnalyzeHenon(t *testing.T) {
	s, err := embed.NewSeries(henonX(4000), 1)
	require.NoError(t, err)
	r, err := embed.Analyze(context.Background(), s, &embed.Settings{Seed: 1})
	require.NoError(t, err)
	assert.Equal(t, 1, r.Lag, "a map decorrelates within one step: lag 1 (%s)", r.Choices.Lag)
	assert.Equal(t, 2, r.Dim, "Hénon's minimal embedding dimension 2 (Kennel et al. 1992; Cao 1997)")
	require.NotNil(t, r.CorrDim)
	// Sprott: D2 = 1.220 ± 0.036, with twice the estimate's error.
	assert.InDeltaf(t, 1.220, r.CorrDim.D2, 0.036+2*r.CorrDim.D2Err, "D2 = %g ± %g", r.CorrDim.D2, r.CorrDim.D2Err)
	require.NotNil(t, r.Rosenstein)
	assert.InDeltaf(t, henonLambda, r.Rosenstein.Lambda, henonRel*henonLambda, "Rosenstein lambda (Sprott 0.41922, ±5 %% as REFERENCES.md §3a)")
	require.NotNil(t, r.Surrogate)
	assert.True(t, r.Surrogate.Rejected, "Hénon forecasts beat IAAFT surrogates (Schreiber & Schmitz 1996)")
	require.NotNil(t, r.ZeroOne)
	assert.InDelta(t, 1, r.ZeroOne.K, kBand, "K near 1 for chaos (Gottwald & Melbourne 2009)")
	require.NotNil(t, r.Forecast)
	// The exponent's horizon and the data's agree within a factor 1.5:
	// both measure the same growth from the same start (Boffetta et al.
	// 2002); the analogue error grows faster than exp(lambda t) near
	// saturation, so the data's horizon is the shorter.
	assert.InDeltaf(t, 1, r.ExponentHorizon/r.Forecast.Horizon, 0.5, "exponent horizon %g, data horizon %g", r.ExponentHorizon, r.Forecast.Horizon)
	for _, n := range r.Notes {
		assert.NotContains(t, n, "noise", "a chaotic map called noise-like: %s", n)
	}
}

func TestAnalyzeNoise(t *testing.T) {
	s, err := embed.NewSeries(whiteNoise(3000, 4), 1)
	require.NoError(t, err)
	r, err := embed.Analyze(context.Background(), s, &embed.Settings{Seed: 1})
	require.NoError(t, err)
	notes := strings.Join(r.Notes, "\n")
	// Cao 1997: E2 near 1 for noise; Theiler et al. 1992: noise is its own
	// surrogate. The report must say both, not hand out an exponent.
	assert.Contains(t, notes, "cannot be told from noise")
	assert.Contains(t, notes, "does not reject")
	if r.Rosenstein != nil {
		assert.False(t, r.Rosenstein.Found && r.Rosenstein.Fit.Last-r.Rosenstein.Fit.First >= 5, "an exponent fitted to white noise")
	}
}

func TestAnalyzeBadInput(t *testing.T) {
	s, err := embed.NewSeries(henonX(3000), 1)
	require.NoError(t, err)
	_, err = embed.Analyze(context.Background(), s, &embed.Settings{Lag: -1})
	assert.ErrorIs(t, err, embed.ErrSettings)
	_, err = embed.Analyze(context.Background(), nil, nil)
	assert.ErrorIs(t, err, embed.ErrSettings)
	r, err := embed.Analyze(context.Background(), s, &embed.Settings{Lag: 400, Dim: 8})
	// lag 400 leaves room for few dimensions: the report says so
	require.NoError(t, err)
	assert.NotEmpty(t, r.Notes)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r, err = embed.Analyze(ctx, s, nil)
	assert.True(t, errors.Is(err, context.Canceled), "canceled: %v", err)
	require.NotNil(t, r, "the partial report comes with the error")
	assert.NotNil(t, r.Autocorrelation)
}

// TestAnalyzeTrend: for a linear ramp of n values the biased
// autocorrelation at lag l = a·n is 12·∫_0^(1-a) (u-1/2)(u+a-1/2) du
// (exact identity, continuous limit), 0.509 at a = 2000/12000 > 1/e; so
// over the 2000 lags computed it stays above 1/e, and the report must say
// that the stationarity the methods assume is missing.
func TestAnalyzeTrend(t *testing.T) {
	x := whiteNoise(12000, 8)
	for i := range x {
		x[i] = 0.001*float64(i) + 0.1*x[i]
	}
	s, err := embed.NewSeries(x, 1)
	require.NoError(t, err)
	r, err := embed.Analyze(context.Background(), s, &embed.Settings{Surrogates: -1, MaxDim: 2})
	require.NoError(t, err)
	require.Zero(t, r.Autocorrelation.EFold, "the ramp's autocorrelation fell below 1/e")
	assert.Contains(t, strings.Join(r.Notes, "\n"), "the series drifts")
	assert.Greater(t, r.Theiler, 1, "a window as long as the memory, not one sample")
}
