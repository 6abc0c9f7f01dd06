package maps

import (
	"context"
	"errors"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/integrate"
)

// TestScanRangeEqualsScan: the rows of ScanRange over any block are the
// whole scan's rows of those indices, bit for bit (an exact identity: a
// row depends on its parameters alone), on a 2-D grid and with more
// workers than rows.
func TestScanRangeEqualsScan(t *testing.T) {
	axes := [][]float64{linspace(3.4, 4, 7), linspace(0.2, 0.7, 3)}
	fam := func(p []float64) (*Map, error) { return logistic(p[0]), nil }
	set := &ScanSettings{Discard: 300, Keep: 64, Workers: 3}
	whole := collect(t, fam, axes, []float64{0.3}, set)
	require.Len(t, whole, 21)
	for _, r := range [][2]int{{0, 21}, {0, 5}, {5, 6}, {6, 21}, {20, 21}, {4, 4}} {
		var got []ScanRow
		require.NoError(t, ScanRange(context.Background(), fam, axes, []float64{0.3}, set, r[0], r[1], func(row ScanRow) error {
			got = append(got, row)
			return nil
		}))
		require.Lenf(t, got, r[1]-r[0], "rows %v", r)
		for k, row := range got {
			w := whole[r[0]+k]
			assert.Equal(t, w.Index, row.Index)
			assert.Equal(t, w.Params, row.Params)
			assert.Equal(t, w.Values, row.Values)
			assert.Equal(t, w.Period, row.Period)
			assert.Equal(t, math.Float64bits(w.Exponent), math.Float64bits(row.Exponent), "row %d", w.Index)
		}
	}
	for _, bad := range [][2]int{{-1, 3}, {4, 3}, {0, 22}} {
		err := ScanRange(context.Background(), fam, axes, []float64{0.3}, set, bad[0], bad[1], func(ScanRow) error { return nil })
		assert.Truef(t, errors.Is(err, integrate.ErrSettings), "rows %v: %v", bad, err)
	}
}
