package main

import (
	"io"
	"testing"

	"github.com/stretchr/testify/require"
)

func TestProvenLoop(t *testing.T) {
	got, err := run(io.Discard)
	require.NoError(t, err)
	// A box of width 2δ grows like 2δ·e^(lambda t) (lambda = 0.9056,
	// Sprott 2003), so it passes the accepted width near
	// ln(accept/2δ)/lambda ≈ 10.2 s; one orbit's stretching scatters about
	// that, common practice: a factor of two either way.
	require.Greater(t, got.Proven, 0.0)
	require.InDeltaf(t, 1, got.Proven/got.Predicted, 0.5, "proven %.3g s against predicted %.3g s (within a factor 2, common practice)", got.Proven, got.Predicted)
	require.NotEmpty(t, got.Stopped, "the enclosure blows up before t = 40")
}
