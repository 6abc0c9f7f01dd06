package runio

import (
	"errors"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestReadCSV(t *testing.T) {
	tests := []struct {
		name  string
		in    string
		opt   Options
		tname string
		names []string
		T, Y  []float64
	}{
		{name: "defaults", in: "t,x,y\n0,1,2\n0.5,3,4\n",
			tname: "t", names: []string{"x", "y"}, T: []float64{0, 0.5}, Y: []float64{1, 2, 3, 4}},
		{name: "crlf, spaces, quotes, blank lines, no final newline",
			in:    "\"time\", \"x\" ,y\r\n\r\n 0 , 1e0, \"2\"\r\n1,-3.5E-1,+4",
			tname: "time", names: []string{"x", "y"}, T: []float64{0, 1}, Y: []float64{1, 2, -0.35, 4}},
		{name: "time by name, columns chosen, others unparsed", in: "label,x,t,y\nabc,1,0,2\nxyz,3,1,4\n",
			opt:   Options{Time: "t", Columns: []string{"y", "x"}},
			tname: "t", names: []string{"y", "x"}, T: []float64{0, 1}, Y: []float64{2, 1, 4, 3}},
		{name: "byte-order mark", in: "\xef\xbb\xbft,x\n0,1\n",
			tname: "t", names: []string{"x"}, T: []float64{0}, Y: []float64{1}},
		{name: "quoted header with a comma", in: "t,\"a,b\"\n0,1\n",
			tname: "t", names: []string{"a,b"}, T: []float64{0}, Y: []float64{1}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r, err := ReadCSV(strings.NewReader(tc.in), tc.opt)
			require.NoError(t, err)
			// Exact identity: decimal input parses to the nearest float64.
			assert.Equal(t, tc.tname, r.TimeName)
			assert.Equal(t, tc.names, r.Names)
			assert.Equal(t, tc.T, r.T)
			assert.Equal(t, tc.Y, r.Y)
			assert.Equal(t, len(tc.names), r.Dim())
		})
	}
}

func TestReadCSVPeriodsScales(t *testing.T) {
	r, err := ReadCSV(strings.NewReader("t,phi,w\n0,6.2,1\n1,0.1,2\n"),
		Options{Periods: map[string]float64{"phi": 6.25}, Scales: map[string]float64{"w": 10}})
	require.NoError(t, err)
	assert.Equal(t, []float64{6.25, 0}, r.Periods)
	assert.Equal(t, []float64{1, 10}, r.Scales)
	assert.Equal(t, []float64{6.2, 1, 0.1, 2}, r.Y, "angles stay as read")
}

func TestReadCSVErrors(t *testing.T) {
	tests := []struct {
		name   string
		in     string
		opt    Options
		kind   error
		line   int
		column int
		field  string
		msg    string
	}{
		{name: "text cell", in: "t,x\n0,1\n1,abc\n", kind: ErrNumber, line: 3, column: 2, field: "x", msg: `found "abc"`},
		{name: "NaN", in: "t,x\n0,NaN\n", kind: ErrNumber, line: 2, column: 2, field: "x", msg: `"NaN"`},
		{name: "Inf", in: "t,x\n0,1\n1,-Inf\n", kind: ErrNumber, line: 3, column: 2, msg: `"-Inf"`},
		{name: "overflow", in: "t,x\n0,1e999\n", kind: ErrNumber, line: 2, column: 2, msg: "1e999"},
		{name: "hex", in: "t,x\n0,0x1p3\n", kind: ErrNumber, line: 2, column: 2},
		{name: "empty cell", in: "t,x,y\n0,,2\n", kind: ErrNumber, line: 2, column: 2, field: "x", msg: "empty cell"},
		{name: "empty time", in: "t,x\n ,1\n", kind: ErrNumber, line: 2, column: 1, field: "t"},
		{name: "short row", in: "t,x,y\n0,1,2\n1,2\n", kind: ErrRagged, line: 3, msg: "2 cells, the header has 3"},
		{name: "long row", in: "t,x\n0,1,2\n", kind: ErrRagged, line: 2, msg: "3 cells"},
		{name: "time repeats", in: "t,x\n0,1\n0,2\n", kind: ErrTimeOrder, line: 3, column: 1, field: "t", msg: "0 after 0"},
		{name: "time falls", in: "x,t\n1,5\n2,4\n", opt: Options{Time: "t"}, kind: ErrTimeOrder, line: 3, column: 2},
		{name: "no rows", in: "t,x\n\n", kind: ErrEmpty, line: 1},
		{name: "nothing", in: "", kind: ErrEmpty},
		{name: "empty name", in: "t,,y\n0,1,2\n", kind: ErrSyntax, line: 1, column: 2},
		{name: "bad quotes", in: "t,\"x\n0,1\n", kind: ErrSyntax, line: 1, column: 2},
		{name: "duplicate name", in: "t,x,x\n0,1,2\n", kind: ErrColumn, line: 1, column: 3, field: "x"},
		{name: "missing time", in: "t,x\n0,1\n", opt: Options{Time: "time"}, kind: ErrColumn, line: 1, field: "time"},
		{name: "missing column", in: "t,x\n0,1\n", opt: Options{Columns: []string{"z"}}, kind: ErrColumn, line: 1, field: "z"},
		{name: "time chosen as state", in: "t,x\n0,1\n", opt: Options{Columns: []string{"t"}}, kind: ErrColumn, line: 1, column: 1, field: "t"},
		{name: "only a time", in: "t\n0\n", kind: ErrColumn, line: 1, msg: "no state columns"},
		{name: "period on unknown column", in: "t,x\n0,1\n", opt: Options{Periods: map[string]float64{"y": 1}}, kind: ErrColumn, field: "y"},
		{name: "negative period", in: "t,x\n0,1\n", opt: Options{Periods: map[string]float64{"x": -1}}, kind: ErrOptions, field: "x"},
		{name: "zero scale", in: "t,x\n0,1\n", opt: Options{Scales: map[string]float64{"x": 0}}, kind: ErrOptions, field: "x"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			tc.opt.Source = "run.csv"
			_, err := ReadCSV(strings.NewReader(tc.in), tc.opt)
			require.ErrorIs(t, err, tc.kind)
			var e *Error
			require.True(t, errors.As(err, &e))
			assert.Equal(t, "run.csv", e.File)
			assert.Equal(t, tc.line, e.Line, "line")
			assert.Equal(t, tc.column, e.Column, "column")
			if tc.field != "" {
				assert.Equal(t, tc.field, e.Field)
			}
			assert.Contains(t, err.Error(), tc.msg)
			assert.True(t, strings.HasPrefix(err.Error(), "runio: run.csv"), err.Error())
		})
	}
}

// A failure after the header keeps the rows read before it.
func TestReadCSVPartial(t *testing.T) {
	r, err := ReadCSV(strings.NewReader("t,x\n0,1\n1,2\n2,oops\n"), Options{})
	require.ErrorIs(t, err, ErrNumber)
	require.NotNil(t, r)
	assert.Equal(t, []float64{0, 1}, r.T)
	assert.Equal(t, []float64{1, 2}, r.Y)
}

// Lines longer than the read buffer are gathered whole.
func TestReadCSVLongLine(t *testing.T) {
	const cols = 20000 // > 64 KiB per line
	var b strings.Builder
	b.WriteString("t")
	for j := 0; j < cols; j++ {
		b.WriteString(",c")
		b.WriteString(strings.Repeat("x", 1) + string(rune('a'+j%26)) + itoa(j))
	}
	b.WriteString("\n0")
	for j := 0; j < cols; j++ {
		b.WriteString(",1.25")
	}
	b.WriteString("\n")
	r, err := ReadCSV(strings.NewReader(b.String()), Options{})
	require.NoError(t, err)
	require.Equal(t, cols, r.Dim())
	for _, v := range r.Y {
		require.Equal(t, 1.25, v)
	}
}
