package main

import (
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
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
	for r, want := range map[float64]string{2: "2.00", 0.1: "0.10", 0.0046: "0.0046"} {
		if got := fmtRatio(r); got != want {
			t.Errorf("fmtRatio(%v) = %q, want %q", r, got, want)
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
	f.Add([]byte(`{"peer":"plumb","method":"dp54","problem":"arenstorf","tol":1e-6,"acc":3,"sec":0.001,"y_end":[1,0]}` + "\n" +
		`{"peer":"gsl","method":"rkck","problem":"l96-40","tol":1e-8,"acc":0,"rej":0,"sec":2e-3}` + "\n" +
		`{"peer":"plumb","method":"dp54-batch","problem":"many","tol":1e-10,"sec":1,"extra":{"ntraj":1000}}`))
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

// TestWriteMore: the Arenstorf error is the end state's largest distance
// from the start (exact identity: the orbit is periodic), and the
// equal-tolerance ratio of a plumb row is its time over the peer's.
func TestWriteMore(t *testing.T) {
	lines := []string{
		`{"peer":"plumb","method":"dp54","problem":"arenstorf","tol":1e-6,"acc":10,"rej":0,"sec":0.004,"y_end":[0.995,0,0,-2.00158510637908252240537862224]}`,
		`{"peer":"plumb","method":"dp54","problem":"l96-40","tol":1e-8,"acc":10,"rej":0,"sec":0.003}`,
		`{"peer":"plumb","method":"dp54","problem":"l96-40","tol":1e-8,"acc":10,"rej":0,"sec":0.002}`,
		`{"peer":"boost","method":"dopri5","problem":"l96-40","tol":1e-8,"acc":10,"rej":0,"sec":0.001}`,
	}
	p := filepath.Join(t.TempDir(), "samples.jsonl")
	if err := os.WriteFile(p, []byte(strings.Join(lines, "\n")), 0o600); err != nil {
		t.Fatal(err)
	}
	all, err := readSamples(p)
	if err != nil {
		t.Fatal(err)
	}
	var out strings.Builder
	if err := writeMore(&out, all); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{
		"| plumb dp54 | 1e-06 | 10 | 0 | 0 | 4.000 | 0% | 400000 | 1.0e-03 |",      // |0.995 - 0.994|
		"| plumb dp54 | 10 | 0 | 0 | 2.000 | 50% | 200000 | 2.00 (boost dopri5) |", // fastest round 2 ms over 1 ms
	} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("table lacks %q:\n%s", want, out.String())
		}
	}
}
