package main

import (
	"io"
	"math"
	"testing"

	"github.com/stretchr/testify/require"
)

func TestPrintedRestart(t *testing.T) {
	got, err := run(io.Discard)
	require.NoError(t, err)
	// Exact identity: rounding each of three components to 3 decimals moves
	// each by at most 5e-4, so the state by at most sqrt(3)*5e-4.
	require.Greater(t, got.Delta0, 0.0, "the printed state differs from the computed one")
	require.LessOrEqualf(t, got.Delta0, math.Sqrt(3)*5e-4, "rounding to 3 places moves the state by at most sqrt(3)*0.0005")
	// The runs start at t=40 and are followed to t=60; a restart with a
	// 4e-4 difference must part inside that window (largest Lyapunov exponent
	// 0.9056, Viswanath 1998, gives ln(1/4e-4)/0.9056 ≈ 8.6 time units; one
	// restart scatters around that with the local growth rate, common practice:
	// a factor of two either way).
	require.Falsef(t, math.IsNaN(got.Parted), "the runs never parted by 1 before t = 60")
	wait, predicted := got.Parted-40, got.Predicted-40
	require.InDeltaf(t, 1, wait/predicted, 0.5, "measured parting %.3g against predicted %.3g (within a factor 2, common practice)", wait, predicted)
}
