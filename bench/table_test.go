package main

import (
	"io"
	"math"
	"os"
	"path/filepath"
	"testing"
)

// TestTimeAt: on a power law sec = c·err^-p the log-log interpolation is
// exact (identity), at a tolerance's own error it returns that time, and an
// error outside the measured ones gives NaN.
func TestTimeAt(t *testing.T) {
	// rounding of the log/exp round trip, a few ulps
	const tolRel = 1e-12
	law := func(e float64) float64 { return 2e-3 * math.Pow(e, -0.2) }
	var c []point
	for _, e := range []float64{1e-1, 1e-3, 1e-5, 1e-7} {
		c = append(c, point{err20: e, sec: law(e)})
	}
	for _, e := range []float64{1e-1, 3e-2, 1e-3, 2e-6, 1e-7} {
		if got, want := timeAt(c, e), law(e); math.Abs(got-want) > tolRel*want {
			t.Errorf("timeAt(%g) = %v, want %v", e, got, want)
		}
	}
	for _, e := range []float64{1, 1e-9, math.NaN()} {
		if got := timeAt(c, e); !math.IsNaN(got) {
			t.Errorf("timeAt(%g) = %v, want NaN (outside the curve)", e, got)
		}
	}
}

// FuzzTable: any samples file gives a table or an error naming the line,
// never a panic.
func FuzzTable(f *testing.F) {
	f.Add([]byte(`{"rep":1,"peer":"plumb","method":"dp54","problem":"lorenz","tol":1e-6,"acc":10,"rej":1,"nfev":66,"sec":0.001,"inner":3,"t_end":100,"y_end":[1,2,3],"mids":{"10":[1,2,3],"20":[4,5,6]}}`))
	f.Add([]byte(`{"peer":"gsl","method":"rkck","problem":"lorenz","tol":1e-8,"acc":0,"rej":0,"sec":1e-3}` + "\n" + `{"peer":"gsl"`))
	f.Add([]byte("\n\n{}\n[1,2]\n"))
	ref, err := filepath.Abs("../integrate/testdata/lorenz.json")
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		p := filepath.Join(t.TempDir(), "samples.jsonl")
		if err := os.WriteFile(p, data, 0o600); err != nil {
			t.Fatal(err)
		}
		_ = writeTable(io.Discard, p, ref)
	})
}
