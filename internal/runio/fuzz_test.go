package runio

import (
	"bytes"
	"math"
	"strings"
	"testing"
)

// checkRun asserts what every successful read promises.
func checkRun(t *testing.T, r *Run) {
	t.Helper()
	if r.Dim() == 0 || len(r.T) == 0 {
		t.Fatalf("empty run returned without error: %d columns, %d rows", r.Dim(), len(r.T))
	}
	if len(r.Y) != len(r.T)*r.Dim() || len(r.Periods) != r.Dim() || len(r.Scales) != r.Dim() {
		t.Fatalf("inconsistent lengths: %d values, %d rows, %d columns", len(r.Y), len(r.T), r.Dim())
	}
	for i, v := range r.T {
		if math.IsNaN(v) || math.IsInf(v, 0) || (i > 0 && !(v > r.T[i-1])) {
			t.Fatalf("bad time %v at row %d", v, i)
		}
	}
	for _, v := range r.Y {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			t.Fatalf("non-finite value %v", v)
		}
	}
}

func FuzzReadCSV(f *testing.F) {
	for _, s := range []string{
		"t,x,y\n0,1,2\n0.5,3,4\n",
		"\"time\", \"x\" ,y\r\n\r\n 0 , 1e0, \"2\"\r\n1,-3.5E-1,+4",
		"label,x,t,y\nabc,1,0,2\nxyz,3,1,4\n",
		"t,x\n0,NaN\n", "t,x\n0,1\n0,2\n", "t,x,y\n0,1\n", "t,\"a,b\"\n0,1\n", "t,,x\n", "",
	} {
		f.Add(s, "")
		f.Add(s, "t")
	}
	f.Fuzz(func(t *testing.T, in, tname string) {
		r, err := ReadCSV(strings.NewReader(in), Options{Time: tname})
		if err != nil {
			if _, ok := err.(*Error); !ok {
				t.Fatalf("error of type %T: %v", err, err)
			}
			return
		}
		checkRun(t, r)
		// parse(format(x)) == x
		var b bytes.Buffer
		if err := WriteCSV(&b, r); err != nil {
			t.Fatal(err)
		}
		back, err := ReadCSV(&b, Options{})
		if err != nil {
			t.Fatalf("reading back %q: %v", b.String(), err)
		}
		if back.TimeName != r.TimeName || !equalStrings(back.Names, r.Names) || !equalFloats(back.T, r.T) || !equalFloats(back.Y, r.Y) {
			t.Fatalf("round trip changed the run: %q", b.String())
		}
	})
}

func FuzzReadNPY(f *testing.F) {
	for _, major := range []byte{1, 2, 3} {
		for _, descr := range []string{"<f8", ">f4"} {
			for _, fortran := range []bool{false, true} {
				f.Add(makeNPY(npySpec{major: major, descr: descr, fortran: fortran, shape: "(3, 4)", rows: npyRows}), false)
			}
		}
	}
	f.Add(makeNPY(npySpec{major: 1, descr: "<f8", shape: "(3, 4)", rows: npyRows, cut: 3}), false)
	f.Add(makeNPY(npySpec{major: 1, descr: "<i8", shape: "(3, 4)"}), false)
	f.Add(npy1D([]float64{1, 2, 3}), true)
	f.Add([]byte("\x93NUMPY\x01\x00\x3c\x00{'descr': [('t', '<f8')], 'fortran_order': False, 'shape': (3,), }\n"), false)
	f.Fuzz(func(t *testing.T, in []byte, sep bool) {
		opt := Options{}
		if sep {
			// The input doubles as its own times file.
			opt.Times = bytes.NewReader(npy1D([]float64{0, 1, 2}))
		}
		r, err := ReadNPY(bytes.NewReader(in), opt)
		if err != nil {
			if _, ok := err.(*Error); !ok {
				t.Fatalf("error of type %T: %v", err, err)
			}
			return
		}
		checkRun(t, r)
		if sep {
			return
		}
		// parse(format(x)) == x: NPYWriter writes what ReadNPY read.
		var b bytes.Buffer
		nw, err := NewNPYWriter(&b, 1+r.Dim(), r.Len())
		if err != nil {
			t.Fatal(err)
		}
		row := make([]float64, 1+r.Dim())
		for i := range r.T {
			row[0] = r.T[i]
			copy(row[1:], r.Row(i))
			if err := nw.Row(row); err != nil {
				t.Fatal(err)
			}
		}
		if err := nw.Close(); err != nil {
			t.Fatal(err)
		}
		back, err := ReadNPY(&b, Options{})
		if err != nil {
			t.Fatalf("reading back: %v", err)
		}
		if !equalFloats(back.T, r.T) || !equalFloats(back.Y, r.Y) {
			t.Fatalf("round trip changed the run")
		}
	})
}

func FuzzReadJSONL(f *testing.F) {
	for _, s := range []string{
		"{\"t\": 0, \"y\": [1, 2]}\n{\"t\": 0.5, \"y\": [3, -4e-1]}\n",
		"{\"time\":0,\"x\":1,\"note\":\"start\",\"v\":2,\"meta\":{\"a\":[1,{\"b\":null}]}}\n\n{\"v\":4,\"x\":3,\"time\":1,\"flag\":true}\r\n",
		"{\"t\":0,\"\\u0078\":1}\n{\"t\":1,\"x\":2}\n",
		"{\"t\":0,\"x\":NaN}\n", "{\"t\":0,\"y\":[1,2]}\n{\"t\":1,\"y\":[1]}\n", "{\"t\":0,\"x\":1,\"x\":2}\n",
		"{\"t\":0,\"x\":1,\"m\":[[[]]],\"n\":{}}\n", "[1,2]\n", "{}\n",
	} {
		f.Add(s, "")
		f.Add(s, "time")
	}
	f.Fuzz(func(t *testing.T, in, tname string) {
		r, err := ReadJSONL(strings.NewReader(in), Options{Time: tname})
		if err != nil {
			if _, ok := err.(*Error); !ok {
				t.Fatalf("error of type %T: %v", err, err)
			}
			return
		}
		checkRun(t, r)
	})
}

func equalStrings(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

func equalFloats(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}
