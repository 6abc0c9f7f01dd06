package runio

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

var npyRows = [][]float64{{0, 1.5, -2, 3}, {0.25, 4, 5.5, -6}, {0.5, 7, 8, 9.25}}

func TestReadNPY(t *testing.T) {
	// Exact identity: every value below is a dyadic rational, exact in
	// float32 and float64, so each layout must give back the same bits.
	wantT := []float64{0, 0.25, 0.5}
	wantY := []float64{1.5, -2, 3, 4, 5.5, -6, 7, 8, 9.25}
	for _, major := range []byte{1, 2, 3} {
		for _, descr := range []string{"<f8", ">f8", "<f4", ">f4"} {
			for _, fortran := range []bool{false, true} {
				name := string('0'+major) + descr
				if fortran {
					name += "-fortran"
				}
				t.Run(name, func(t *testing.T) {
					b := makeNPY(npySpec{major: major, descr: descr, fortran: fortran, shape: "(3, 4)", rows: npyRows})
					r, err := ReadNPY(bytes.NewReader(b), Options{})
					require.NoError(t, err)
					assert.Equal(t, "0", r.TimeName)
					assert.Equal(t, []string{"1", "2", "3"}, r.Names)
					assert.Equal(t, wantT, r.T)
					assert.Equal(t, wantY, r.Y)
				})
			}
		}
	}
}

func TestReadNPYNamesAndTimes(t *testing.T) {
	b := makeNPY(npySpec{major: 1, descr: "<f8", shape: "(3, 4)", rows: npyRows})
	r, err := ReadNPY(bytes.NewReader(b), Options{Names: []string{"a", "b", "time", "c"}, Time: "time", Columns: []string{"c", "a"}})
	require.NoError(t, err)
	assert.Equal(t, "time", r.TimeName)
	assert.Equal(t, []float64{-2, 5.5, 8}, r.T)
	assert.Equal(t, []float64{3, 0, -6, 0.25, 9.25, 0.5}, r.Y)

	// Time by column index, with default names.
	r, err = ReadNPY(bytes.NewReader(makeNPY(npySpec{major: 1, descr: "<f8", shape: "(3, 4)",
		rows: [][]float64{{9, 0, 1, 2}, {9, 1, 1, 2}, {9, 2, 1, 2}}})), Options{Time: "1"})
	require.NoError(t, err)
	assert.Equal(t, []float64{0, 1, 2}, r.T)
	assert.Equal(t, []string{"0", "2", "3"}, r.Names)

	// Times from a separate 1-D array: every column is a state.
	r, err = ReadNPY(bytes.NewReader(b), Options{Times: bytes.NewReader(npy1D([]float64{10, 11, 12}))})
	require.NoError(t, err)
	assert.Equal(t, []float64{10, 11, 12}, r.T)
	assert.Equal(t, []string{"0", "1", "2", "3"}, r.Names)
	assert.Equal(t, npyRows[1], r.Row(1))
}

func TestOpenNPYFile(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "run.npy")
	tp := filepath.Join(dir, "times.npy")
	require.NoError(t, os.WriteFile(p, makeNPY(npySpec{major: 1, descr: "<f8", shape: "(3, 4)", rows: npyRows}), 0o600))
	require.NoError(t, os.WriteFile(tp, npy1D([]float64{1, 2, 3}), 0o600))
	r, err := Open(p, Options{TimesFile: tp})
	require.NoError(t, err)
	assert.Equal(t, p, r.Source)
	assert.Equal(t, []float64{1, 2, 3}, r.T)
	assert.Equal(t, 12, cap(r.Y), "a file's size proves the shape: one exact allocation")
}

func TestReadNPYErrors(t *testing.T) {
	good := makeNPY(npySpec{major: 1, descr: "<f8", shape: "(3, 4)", rows: npyRows})
	withNaN := [][]float64{{0, 1}, {1, 2}, {2, nan()}}
	tests := []struct {
		name string
		in   []byte
		opt  Options
		kind error
		msg  string
		row  int
		col  int
	}{
		{name: "int64", in: makeNPY(npySpec{major: 1, descr: "<i8", shape: "(3, 4)"}), kind: ErrUnsupported, msg: `dtype "<i8"`},
		{name: "float16", in: makeNPY(npySpec{major: 1, descr: "<f2", shape: "(3, 4)"}), kind: ErrUnsupported, msg: `"<f2"`},
		{name: "no byte order", in: makeNPY(npySpec{major: 1, descr: "|f8", shape: "(3, 4)"}), kind: ErrUnsupported},
		{name: "structured", in: []byte("\x93NUMPY\x01\x00\x3c\x00{'descr': [('t', '<f8')], 'fortran_order': False, 'shape': (3,), }\n"), kind: ErrUnsupported, msg: "structured"},
		{name: "3-D", in: makeNPY(npySpec{major: 1, descr: "<f8", shape: "(1, 1, 1)", rows: [][]float64{{0}}}), kind: ErrUnsupported, msg: "shape [1 1 1]"},
		{name: "1-D main", in: npy1D([]float64{1, 2}), kind: ErrUnsupported, msg: "want 2-D"},
		{name: "truncated body", in: good[:len(good)-5], kind: ErrTruncated, msg: "needs 96 bytes of data, found 91"},
		{name: "truncated fortran", in: makeNPY(npySpec{major: 2, descr: "<f8", fortran: true, shape: "(3, 4)", rows: npyRows, cut: 8}), kind: ErrTruncated, msg: "found 88"},
		{name: "extra bytes", in: makeNPY(npySpec{major: 1, descr: "<f8", shape: "(3, 4)", rows: npyRows, extra: 3}), kind: ErrSyntax, msg: "bytes after"},
		{name: "bad magic", in: []byte("NUMPY not really a file"), kind: ErrSyntax, msg: "magic"},
		{name: "short magic", in: []byte("\x93NUM"), kind: ErrTruncated},
		{name: "version 4", in: []byte("\x93NUMPY\x04\x00\x00\x00"), kind: ErrUnsupported, msg: "version 4.0"},
		{name: "header cut", in: good[:40], kind: ErrTruncated, msg: "header announces"},
		{name: "header not a dict", in: []byte("\x93NUMPY\x01\x00\x05\x00hello"), kind: ErrSyntax, msg: "does not start with {"},
		{name: "header key missing", in: []byte("\x93NUMPY\x01\x00\x1a\x00{'descr': '<f8', 'shape': ()}"[:10+0x1a]), kind: ErrSyntax},
		{name: "bad shape", in: makeNPY(npySpec{major: 1, descr: "<f8", shape: "(3, x)"}), kind: ErrSyntax, msg: "shape"},
		{name: "unknown key", in: []byte("\x93NUMPY\x01\x00\x0c\x00{'other': 1}"), kind: ErrSyntax, msg: "unknown key"},
		{name: "NaN", in: makeNPY(npySpec{major: 1, descr: "<f8", shape: "(3, 2)", rows: withNaN}), kind: ErrNumber, msg: "found NaN", row: 3, col: 2},
		{name: "NaN fortran", in: makeNPY(npySpec{major: 1, descr: ">f4", fortran: true, shape: "(3, 2)", rows: withNaN}), kind: ErrNumber, row: 3, col: 2},
		{name: "time falls", in: makeNPY(npySpec{major: 1, descr: "<f8", shape: "(3, 2)", rows: [][]float64{{0, 1}, {2, 1}, {1, 1}}}), kind: ErrTimeOrder, row: 3, col: 1},
		{name: "no rows", in: makeNPY(npySpec{major: 1, descr: "<f8", shape: "(0, 2)"}), kind: ErrEmpty},
		{name: "names count", in: good, opt: Options{Names: []string{"a"}}, kind: ErrOptions, msg: "1 names for 4 columns"},
		{name: "times length", in: good, opt: Options{Times: bytes.NewReader(npy1D([]float64{1, 2}))}, kind: ErrRagged, msg: "3 rows, the times array has 2"},
		{name: "times and time column", in: good, opt: Options{Time: "0", Times: bytes.NewReader(npy1D([]float64{1}))}, kind: ErrOptions},
		{name: "times 2-D", in: good, opt: Options{Times: bytes.NewReader(good)}, kind: ErrUnsupported, msg: "want 1-D"},
		{name: "too many columns", in: makeNPY(npySpec{major: 1, descr: "<f8", shape: "(1, 100000)"}), kind: ErrUnsupported, msg: "100000 columns"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			tc.opt.Source = "run.npy"
			_, err := ReadNPY(bytes.NewReader(tc.in), tc.opt)
			require.ErrorIs(t, err, tc.kind)
			var e *Error
			require.True(t, errors.As(err, &e))
			assert.True(t, strings.HasPrefix(e.File, "run.npy"))
			assert.Contains(t, err.Error(), tc.msg)
			assert.Equal(t, tc.row, e.Row, "row")
			assert.Equal(t, tc.col, e.Column, "column")
		})
	}
}

// A header announcing an absurd shape must not make the reader allocate
// for it, from a stream or from a file.
func TestReadNPYHugeShape(t *testing.T) {
	b := makeNPY(npySpec{major: 1, descr: "<f8", shape: "(1125899906842624, 65536)"})
	_, err := ReadNPY(bytes.NewReader(b), Options{})
	require.ErrorIs(t, err, ErrUnsupported)
	b = makeNPY(npySpec{major: 1, descr: "<f8", shape: "(1000000000000, 2)", rows: npyRows[:1]})
	_, err = ReadNPY(bytes.NewReader(b), Options{})
	require.ErrorIs(t, err, ErrTruncated)
	p := filepath.Join(t.TempDir(), "huge.npy")
	require.NoError(t, os.WriteFile(p, b, 0o600))
	_, err = Open(p, Options{})
	require.ErrorIs(t, err, ErrTruncated)
}
