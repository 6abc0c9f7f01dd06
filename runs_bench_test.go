package plumb_test

import (
	"context"
	"math"
	"testing"

	"github.com/plumbdyn/plumb"
)

// fiveRuns is a reference and four runs of n rows of a time and three
// states, the others offset by a growing difference (0.01·e^{t/100}), all at
// the same times, so that no run is interpolated.
func fiveRuns(n int) []plumb.RecordedRun {
	runs := make([]plumb.RecordedRun, 5)
	effects := []plumb.RunEffect{"", plumb.VariesTolerance, plumb.VariesPrecision, plumb.VariesStart, plumb.VariesPlatform}
	labels := []string{"ref", "tol", "single", "nudged", "other machine"}
	for i := range runs {
		r := plumb.RecordedRun{Label: labels[i], Effect: effects[i], Reference: i == 0, Names: []string{"x", "y", "z"},
			T: make([]float64, n), Y: make([]float64, 3*n)}
		for k := range n {
			t := float64(k) * 0.001
			r.T[k] = t
			off := float64(i) * 1e-8 * math.Exp(t/100)
			r.Y[3*k] = 10*math.Cos(t) + off
			r.Y[3*k+1] = 10 * math.Sin(t)
			r.Y[3*k+2] = 20 - t/11
		}
		runs[i] = r
	}
	return runs
}

// BenchmarkTrustRuns audits five runs of 10^6 rows and three states (the
// reference and four others) on the reference's own times.
func BenchmarkTrustRuns(b *testing.B) {
	const rows = 1_000_000
	runs := fiveRuns(rows)
	b.ReportAllocs()
	// Bytes of the runs' float64 data (times and states), for MB/s.
	b.SetBytes(int64(len(runs) * rows * 4 * 8))
	for b.Loop() {
		rep, err := plumb.TrustRuns(context.Background(), runs, &plumb.RecordedSettings{Tol: 1})
		if err != nil || len(rep.Rungs) != 4 {
			b.Fatal(err)
		}
	}
}

// TestTrustRunsAllocations: comparing a row allocates nothing, so that the
// allocations of an audit do not grow with the rows (only the few slices
// per run: the run on the grid, its curve, the growth fit's points, which
// grow geometrically with the fit's range).
func TestTrustRunsAllocations(t *testing.T) {
	// A few more allocations for the growth-fit slices as they double
	// (measured: 22 more at 40000 rows than at 20000, over four runs), where
	// one per row would add 80000.
	const growth = 64
	allocs := func(rows int) float64 {
		runs := fiveRuns(rows)
		return testing.AllocsPerRun(3, func() {
			if _, err := plumb.TrustRuns(context.Background(), runs, &plumb.RecordedSettings{Tol: 1}); err != nil {
				t.Fatal(err)
			}
		})
	}
	small, large := allocs(20_000), allocs(40_000)
	t.Logf("%v allocations for 20000 rows, %v for 40000", small, large)
	if large-small > growth {
		t.Errorf("%v allocations for 20000 rows, %v for 40000: rows allocate", small, large)
	}
}
