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

// logisticFamily is the logistic map as a family in r.
func logisticFamily(p []float64) (*Map, error) { return logistic(p[0]), nil }

// linspace returns n values from a to b, ends included.
func linspace(a, b float64, n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = a + (b-a)*float64(i)/float64(n-1)
	}
	return out
}

func collect(t *testing.T, fam Family, axes [][]float64, x0 []float64, s *ScanSettings) []ScanRow {
	t.Helper()
	var rows []ScanRow
	require.NoError(t, Scan(context.Background(), fam, axes, x0, s, func(r ScanRow) error {
		rows = append(rows, r)
		return nil
	}))
	return rows
}

// TestScanExponentMatchesPeriod: across the logistic map's r in [2.8, 4],
// the exponent is negative exactly where the scan finds a finite period
// and positive where it finds none (a stable cycle contracts, chaos
// stretches: May 1976), away from the bifurcation points, where the
// exponent crosses zero and convergence is slow. "Away" is |λ| > awayTol.
func TestScanExponentMatchesPeriod(t *testing.T) {
	// Within 0.02 of zero an orbit may still be settling after the
	// transient (convergence goes like e^(λ n)): 4000 iterates at
	// λ = -0.005 leave a factor e^-20 only (common practice).
	const awayTol = 0.02
	rows := collect(t, logisticFamily, [][]float64{linspace(2.8, 4, 601)}, []float64{0.3},
		&ScanSettings{Discard: 4000, Keep: 1000})
	require.Len(t, rows, 601)
	periodic, chaotic := 0, 0
	for i, r := range rows {
		require.Equal(t, i, r.Index)
		require.False(t, r.Escaped)
		if math.Abs(r.Exponent) <= awayTol {
			continue
		}
		if r.Period > 0 {
			periodic++
			assert.Lessf(t, r.Exponent, 0.0, "r = %v: period %d with exponent %v", r.Params[0], r.Period, r.Exponent)
			assert.Lenf(t, r.Values, r.Period, "r = %v: a cycle of period p has p distinct values", r.Params[0])
		} else {
			chaotic++
			assert.Greaterf(t, r.Exponent, 0.0, "r = %v: no period with exponent %v", r.Params[0], r.Exponent)
		}
	}
	assert.Greater(t, periodic, 200, "most of [2.8, 3.57] is periodic (May 1976)")
	assert.Greater(t, chaotic, 150, "most of [3.57, 4] is chaotic (May 1976)")
	// Closed forms (REFERENCES.md, logistic rows): λ = ln|2-r| on the fixed
	// point, ½ ln|4+2r-r²| on the 2-cycle; the kept iterates sit on the
	// cycle to rounding after 4000 transient iterates at these r.
	const closedTol = 1e-9
	for _, c := range []struct {
		i    int
		want float64
	}{{0, math.Log(math.Abs(2 - 2.8))}, {200, 0.5 * math.Log(math.Abs(4+2*3.2-3.2*3.2))}} {
		r := rows[c.i]
		assert.InDeltaf(t, c.want, r.Exponent, closedTol, "r = %v: closed-form exponent", r.Params[0])
	}
	assert.Equal(t, 1, rows[0].Period, "r = 2.8: the fixed point 1 - 1/r is stable (closed form: |2-r| < 1)")
	assert.Equal(t, 2, rows[200].Period, "r = 3.2: the 2-cycle is stable (closed form)")
	assert.InDelta(t, math.Log(2), rows[600].Exponent, 0.02, "r = 4: λ = ln 2 (exact; 1000 iterates give about 2 %)")
}

// TestScanWorkersBitIdentical: the rows do not depend on the number of
// workers (exact identity: each row depends only on its parameters).
func TestScanWorkersBitIdentical(t *testing.T) {
	axes := [][]float64{linspace(3.4, 4, 97)}
	var ref []ScanRow
	for _, w := range []int{1, 2, 3, 8} {
		rows := collect(t, logisticFamily, axes, []float64{0.3}, &ScanSettings{Discard: 300, Keep: 200, Workers: w})
		if ref == nil {
			ref = rows
			continue
		}
		require.Equal(t, len(ref), len(rows))
		for i := range rows {
			assert.Equalf(t, math.Float64bits(ref[i].Exponent), math.Float64bits(rows[i].Exponent), "workers %d, row %d", w, i)
			assert.Equal(t, ref[i].Values, rows[i].Values)
			assert.Equal(t, ref[i].Period, rows[i].Period)
		}
	}
}

// TestScanGrid: a two-axis scan is row-major with the last axis fastest,
// and both parameters reach the map (here r = p0 + p1).
func TestScanGrid(t *testing.T) {
	fam := func(p []float64) (*Map, error) { return logistic(p[0] + p[1]), nil }
	rows := collect(t, fam, [][]float64{{2.5, 3}, {0, 0.2, 0.4}}, []float64{0.3}, &ScanSettings{Keep: 100})
	require.Len(t, rows, 6)
	assert.Equal(t, []float64{2.5, 0}, rows[0].Params)
	assert.Equal(t, []float64{2.5, 0.2}, rows[1].Params)
	assert.Equal(t, []float64{3, 0}, rows[3].Params)
	assert.Equal(t, 1, rows[0].Period, "r = 2.5: stable fixed point (closed form)")
	assert.Equal(t, 2, rows[4].Period, "r = 3.2: stable 2-cycle (closed form)")
}

// TestScanEscapeAndErrors: an escaping orbit is a row, not an error; bad
// input is refused; an emit error stops the scan.
func TestScanEscapeAndErrors(t *testing.T) {
	rows := collect(t, logisticFamily, [][]float64{{4.5}}, []float64{0.3}, nil)
	require.Len(t, rows, 1)
	assert.True(t, rows[0].Escaped, "r = 4.5 sends 0.5 to 1.125 > 1 and then to -∞ (exact)")
	ctx := context.Background()
	nop := func(ScanRow) error { return nil }
	assert.ErrorIs(t, Scan(ctx, logisticFamily, nil, []float64{0.3}, nil, nop), integrate.ErrSettings)
	assert.ErrorIs(t, Scan(ctx, logisticFamily, [][]float64{{}}, []float64{0.3}, nil, nop), integrate.ErrSettings)
	assert.ErrorIs(t, Scan(ctx, logisticFamily, [][]float64{{math.NaN()}}, []float64{0.3}, nil, nop), integrate.ErrNonFinite)
	assert.ErrorIs(t, Scan(ctx, logisticFamily, [][]float64{{3}}, []float64{0.3, 1}, nil, nop), integrate.ErrDimension)
	var se *integrate.SettingError
	require.True(t, errors.As(Scan(ctx, logisticFamily, [][]float64{{3}}, []float64{0.3}, &ScanSettings{Keep: 10, MaxPeriod: 6}, nop), &se))
	assert.Equal(t, "MaxPeriod", se.Field)
	stop := errors.New("stop")
	n := 0
	err := Scan(ctx, logisticFamily, [][]float64{linspace(3, 4, 200)}, []float64{0.3}, &ScanSettings{Keep: 10, MaxPeriod: 5}, func(ScanRow) error {
		n++
		if n == 3 {
			return stop
		}
		return nil
	})
	assert.ErrorIs(t, err, stop)
	assert.Equal(t, 3, n)
}

// TestScanRowAllocs: the per-iterate work of a row does not allocate: a row
// of 5000 kept iterates allocates as often as one of 50 (its output only).
func TestScanRowAllocs(t *testing.T) {
	m := logistic(3.9)
	count := func(keep int) float64 {
		set := (ScanSettings{Keep: keep, Discard: keep}).WithDefaults()
		sw := newScanWork(1, &set)
		return testing.AllocsPerRun(20, func() { sw.row(context.Background(), m, []float64{0.3}, 0, []float64{3.9}) })
	}
	assert.Equal(t, count(50), count(5000))
}

// TestScanCanceled: a canceled scan returns the context's error and emits
// no row it did not finish.
func TestScanCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	n := 0
	err := Scan(ctx, logisticFamily, [][]float64{linspace(3, 4, 50)}, []float64{0.3}, &ScanSettings{Keep: 200000}, func(ScanRow) error {
		n++
		return nil
	})
	assert.ErrorIs(t, err, context.Canceled)
	assert.Equal(t, 0, n)
}
