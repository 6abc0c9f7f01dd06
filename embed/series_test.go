package embed_test

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/embed"
)

func TestSeriesChecks(t *testing.T) {
	good := henonX(100)
	nan := append([]float64(nil), good...)
	nan[37] = math.NaN()
	for _, c := range []struct {
		name   string
		values []float64
		dt     float64
		want   error
		says   string
	}{
		{"ok", good, 1, nil, ""},
		{"too short", good[:5], 1, embed.ErrTooShort, "5 values"},
		{"constant", make([]float64, 50), 1, embed.ErrConstant, "all 50 values equal 0"},
		{"nan", nan, 1, embed.ErrNonFinite, "value 37"},
		{"bad dt", good, 0, embed.ErrSettings, "dt = 0"},
		{"inf dt", good, math.Inf(1), embed.ErrSettings, "dt = +Inf"},
	} {
		t.Run(c.name, func(t *testing.T) {
			s, err := embed.NewSeries(c.values, c.dt)
			if c.want == nil {
				require.NoError(t, err)
				assert.Equal(t, len(c.values), s.Len())
				return
			}
			assert.ErrorIs(t, err, c.want)
			assert.ErrorContains(t, err, c.says)
		})
	}
}

func TestFromTimes(t *testing.T) {
	x := henonX(100)
	ts := make([]float64, 100)
	for i := range ts {
		ts[i] = 0.5 + 0.25*float64(i)
	}
	s, err := embed.FromTimes(ts, x)
	require.NoError(t, err)
	assert.Equal(t, 0.25, s.Dt, "mean step of a grid of step 0.25 (exact in binary)")
	gap := append([]float64(nil), ts...)
	for i := 60; i < len(gap); i++ {
		gap[i] += 0.25
	}
	_, err = embed.FromTimes(gap, x)
	assert.ErrorIs(t, err, embed.ErrNonUniform)
	assert.ErrorContains(t, err, "value 60")
}

func TestEmbedView(t *testing.T) {
	x := []float64{0, 1, 2, 3, 4, 5, 6, 7, 8, 9}
	e, err := embed.Embed(x, 2, 3)
	require.NoError(t, err)
	assert.Equal(t, 6, e.Len(), "10 - (3-1)*2 points (exact)")
	assert.Equal(t, []float64{3, 5, 7}, e.At(3, nil))
	x[5] = 50 // a view: the change shows
	assert.Equal(t, 50.0, e.Coord(3, 1))
	_, err = embed.Embed(x, 5, 3)
	assert.ErrorIs(t, err, embed.ErrEmbedding)
	assert.ErrorContains(t, err, "lag 5 x (dimension 3 - 1) spans 10 samples of a series of 10")
	_, err = embed.Embed(x, 0, 3)
	assert.ErrorIs(t, err, embed.ErrSettings)
	_, err = embed.Embed(x, math.MaxInt/2, 4)
	assert.ErrorIs(t, err, embed.ErrEmbedding, "overflowing span")
}
