package main

import (
	"bytes"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// The trace is the Lorenz system's x with 1 % sensor noise, so the
// analysis, made without knowing that, must find Lorenz's published
// values: lambda = 0.9056 and D2 = 2.055 ± 0.004 (Sprott, REFERENCES.md
// §1a and §2), within twice each estimate's own error bar, which must stay
// narrow enough (25 % and 0.15) for the check to be able to fail.
func TestVibrationTrace(t *testing.T) {
	var out bytes.Buffer
	r, err := run(&out)
	require.NoError(t, err)
	assert.Contains(t, out.String(), "not a safety assessment")
	require.NotNil(t, r.Rosenstein)
	require.True(t, r.Rosenstein.Found)
	assert.LessOrEqual(t, r.Rosenstein.LambdaErr, 0.25*0.9056)
	assert.InDeltaf(t, 0.9056, r.Rosenstein.Lambda, 2*r.Rosenstein.LambdaErr, "lambda = %g ± %g (Sprott: 0.9056)", r.Rosenstein.Lambda, r.Rosenstein.LambdaErr)
	require.NotNil(t, r.CorrDim)
	require.True(t, r.CorrDim.Found)
	assert.LessOrEqual(t, r.CorrDim.D2Err, 0.15)
	assert.InDeltaf(t, 2.055, r.CorrDim.D2, 0.004+2*r.CorrDim.D2Err, "D2 = %g ± %g (Sprott: 2.055 ± 0.004)", r.CorrDim.D2, r.CorrDim.D2Err)
	// Deterministic structure: forecasts beat the IAAFT surrogates
	// (Schreiber & Schmitz 1996) and K is near 1 (Gottwald & Melbourne 2009;
	// band 0.1 as in package embed's tests).
	require.NotNil(t, r.Surrogate)
	assert.True(t, r.Surrogate.Rejected)
	require.NotNil(t, r.ZeroOne)
	assert.InDelta(t, 1, r.ZeroOne.K, 0.1)
	// At least 3 coordinates to unfold Lorenz (Kennel et al. 1992); noise
	// may ask for more.
	assert.GreaterOrEqual(t, r.Dim, 3)
	require.NotNil(t, r.Forecast)
	assert.True(t, r.Forecast.Found)
	assert.Greater(t, r.Forecast.Horizon, 0.0)
}
