package enclose

import (
	"context"
	"testing"
)

// BenchmarkLorenzEnclosure encloses Lorenz from (1, 1, 1) to t = 20 with
// Lohner's method (order 20) and reports the width at t = 20 (nano-width: in units
// of 1e-9) and the steps taken.
func BenchmarkLorenzEnclosure(b *testing.B) {
	b.ReportAllocs()
	f := lorenzFormulas()
	var res *Result
	for b.Loop() {
		var err error
		res, err = Flow(context.Background(), f, 0, []float64{1, 1, 1}, 20, nil)
		if err != nil || res.Failure != nil {
			b.Fatal(err, res.Failure)
		}
	}
	b.ReportMetric(res.Steps[len(res.Steps)-1].Width*1e9, "nano-width")
	b.ReportMetric(float64(len(res.Steps)-1), "steps")
}
