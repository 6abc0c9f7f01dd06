package embed_test

import (
	"context"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/embed"
)

// kBand is how far K may stray from its limit, 0 or 1: Gottwald &
// Melbourne (2009) show K within a few hundredths of its limit for series
// of a few thousand points (their Figs. 3–5, from memory); 0.1 leaves
// room for the median's spread.
const kBand = 0.1

// logisticPeriod3 returns n iterates of the logistic map at r = 3.83,
// inside the period-3 window (exact: the window opens at r = 1 + sqrt 8 ≈
// 3.8284, REFERENCES.md §1b), after a transient.
func logisticPeriod3(n int) []float64 {
	out := make([]float64, n)
	v := 0.3
	for i := 0; i < 1000; i++ {
		v = 3.83 * v * (1 - v)
	}
	for i := range out {
		v = 3.83 * v * (1 - v)
		out[i] = v
	}
	return out
}

func TestZeroOne(t *testing.T) {
	for _, c := range []struct {
		name   string
		x      []float64
		stride int
		want   float64
	}{
		// Chaotic: K near 1 (Gottwald & Melbourne 2004, 2009).
		{"henon", henonX(5000), 1, 1},
		// Lorenz x sampled every 0.16 time units (the mutual information's
		// first minimum): not oversampled.
		{"lorenz x strided", lorenzX(t, 40000, 0.01), lorenzLag, 1},
		// Regular: K near 0.
		{"sine", sine(5000, 37.3), 1, 0},
		{"logistic period 3", logisticPeriod3(5000), 1, 0},
		// An oversampled flow looks regular to the test (Gottwald &
		// Melbourne 2009, Sect. 5): the reason for Stride.
		{"lorenz x oversampled", lorenzX(t, 10000, 0.01), 1, 0},
	} {
		t.Run(c.name, func(t *testing.T) {
			z, err := embed.ZeroOneTest(context.Background(), c.x, &embed.ZeroOneSettings{Stride: c.stride, Seed: 1})
			require.NoError(t, err)
			assert.InDeltaf(t, c.want, z.K, kBand, "K = %g (quartiles %g, %g); want %g (Gottwald & Melbourne 2009)", z.K, z.KLow, z.KHigh, c.want)
		})
	}
}

func TestZeroOneBadInput(t *testing.T) {
	_, err := embed.ZeroOneTest(context.Background(), henonX(500), nil)
	assert.ErrorIs(t, err, embed.ErrTooShort)
	assert.ErrorContains(t, err, "want at least 1000")
	_, err = embed.ZeroOneTest(context.Background(), make([]float64, 2000), nil)
	assert.ErrorIs(t, err, embed.ErrConstant)
	_, err = embed.ZeroOneTest(context.Background(), henonX(2000), &embed.ZeroOneSettings{Stride: -1})
	assert.ErrorIs(t, err, embed.ErrSettings)
}
