package runio

import (
	"errors"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestReadJSONL(t *testing.T) {
	tests := []struct {
		name  string
		in    string
		opt   Options
		tname string
		names []string
		T, Y  []float64
	}{
		{name: "array shape", in: "{\"t\": 0, \"y\": [1, 2]}\n{\"t\": 0.5, \"y\": [3, -4e-1]}\n",
			tname: "t", names: []string{"y0", "y1"}, T: []float64{0, 0.5}, Y: []float64{1, 2, 3, -0.4}},
		{name: "array shape, named entries, chosen", in: "{\"y\": [1, 2, 3], \"t\": 0}\n{\"t\": 1, \"y\": [4, 5, 6]}\n",
			opt:   Options{Names: []string{"a", "b", "c"}, Columns: []string{"c", "a"}},
			tname: "t", names: []string{"c", "a"}, T: []float64{0, 1}, Y: []float64{3, 1, 6, 4}},
		{name: "named fields, other fields skipped", in: "{\"time\":0,\"x\":1,\"note\":\"start\",\"v\":2,\"meta\":{\"a\":[1,{\"b\":null}]}}\n\n{\"v\":4,\"x\":3,\"time\":1,\"note\":\"a \\\"quoted\\\" word\",\"flag\":true}\r\n",
			opt:   Options{Time: "time"},
			tname: "time", names: []string{"x", "v"}, T: []float64{0, 1}, Y: []float64{1, 2, 3, 4}},
		{name: "named fields, one of them a number named y", in: "{\"t\":0,\"x\":1,\"y\":2}\n{\"t\":1,\"x\":3,\"y\":4}\n",
			tname: "t", names: []string{"x", "y"}, T: []float64{0, 1}, Y: []float64{1, 2, 3, 4}},
		{name: "escaped key", in: "{\"t\":0,\"\\u0078\":1}\n{\"t\":1,\"x\":2}\n",
			tname: "t", names: []string{"x"}, T: []float64{0, 1}, Y: []float64{1, 2}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			r, err := ReadJSONL(strings.NewReader(tc.in), tc.opt)
			require.NoError(t, err)
			assert.Equal(t, tc.tname, r.TimeName)
			assert.Equal(t, tc.names, r.Names)
			assert.Equal(t, tc.T, r.T)
			assert.Equal(t, tc.Y, r.Y)
		})
	}
}

func TestReadJSONLErrors(t *testing.T) {
	tests := []struct {
		name  string
		in    string
		opt   Options
		kind  error
		line  int
		field string
		msg   string
	}{
		{name: "string value", in: "{\"t\":0,\"x\":1}\n{\"t\":1,\"x\":\"2\"}\n", kind: ErrNumber, line: 2, field: "x", msg: `expected a number, found "\"2\"}"`},
		{name: "NaN", in: "{\"t\":0,\"v\":2,\"x\":NaN}\n", kind: ErrNumber, line: 1, field: "x", msg: `found "NaN"`},
		{name: "only strings", in: "{\"t\":0,\"x\":\"a\"}\n", kind: ErrColumn, line: 1, msg: "no state columns"},
		{name: "NaN later", in: "{\"t\":0,\"x\":1}\n{\"t\":1,\"x\":NaN}\n", kind: ErrNumber, line: 2, field: "x", msg: `found "NaN"`},
		{name: "Infinity in y", in: "{\"t\":0,\"y\":[1,2]}\n{\"t\":1,\"y\":[1,-Infinity]}\n", kind: ErrNumber, line: 2, field: "y", msg: "entry 1"},
		{name: "overflow", in: "{\"t\":0,\"x\":1e400}\n", kind: ErrNumber, line: 1, field: "x"},
		{name: "null", in: "{\"t\":0,\"x\":1}\n{\"t\":1,\"x\":null}\n", kind: ErrNumber, line: 2, field: "x", msg: `"null"`},
		{name: "missing field", in: "{\"t\":0,\"x\":1,\"v\":2}\n{\"t\":1,\"x\":2}\n", kind: ErrNumber, line: 2, field: "v", msg: "field missing"},
		{name: "missing time", in: "{\"t\":0,\"x\":1}\n{\"x\":2}\n", kind: ErrNumber, line: 2, field: "t", msg: "time field missing"},
		{name: "no time on first line", in: "{\"x\":1}\n", kind: ErrColumn, line: 1, field: "t"},
		{name: "y too short", in: "{\"t\":0,\"y\":[1,2]}\n{\"t\":1,\"y\":[1]}\n", kind: ErrRagged, line: 2, field: "y", msg: "1 entries, the first line has 2"},
		{name: "y missing", in: "{\"t\":0,\"y\":[1,2]}\n{\"t\":1}\n", kind: ErrNumber, line: 2, field: "y"},
		{name: "time falls", in: "{\"t\":1,\"x\":1}\n{\"t\":0.5,\"x\":1}\n", kind: ErrTimeOrder, line: 2, field: "t", msg: "0.5 after 1"},
		{name: "field twice", in: "{\"t\":0,\"x\":1}\n{\"t\":1,\"x\":1,\"x\":2}\n", kind: ErrSyntax, line: 2, field: "x", msg: "twice"},
		{name: "field twice first line", in: "{\"t\":0,\"x\":1,\"x\":2}\n", kind: ErrSyntax, line: 1, field: "x"},
		{name: "not an object", in: "{\"t\":0,\"x\":1}\n[1,2]\n", kind: ErrSyntax, line: 2, msg: "expected a JSON object"},
		{name: "broken object", in: "{\"t\":0,\"x\":1\n", kind: ErrSyntax, line: 1, msg: "expected ',' or '}'"},
		{name: "text after", in: "{\"t\":0,\"x\":1} x\n", kind: ErrSyntax, line: 1, msg: "text after"},
		{name: "unterminated key", in: "{\"t\":0,\"x\n", kind: ErrSyntax, line: 1, msg: "unterminated"},
		{name: "bad skipped value", in: "{\"t\":0,\"x\":1,\"m\":{\"a\" 1}}\n", kind: ErrSyntax, line: 1, field: "m"},
		{name: "deep nesting", in: "{\"t\":0,\"x\":1,\"m\":" + strings.Repeat("[", 100) + strings.Repeat("]", 100) + "}\n", kind: ErrSyntax, line: 1, msg: "nested too deeply"},
		{name: "empty", in: "\n\n", kind: ErrEmpty},
		{name: "names count", in: "{\"t\":0,\"y\":[1,2]}\n", opt: Options{Names: []string{"a"}}, kind: ErrOptions, line: 1, field: "y"},
		{name: "missing column", in: "{\"t\":0,\"x\":1}\n", opt: Options{Columns: []string{"v"}}, kind: ErrColumn, line: 1, field: "v"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			tc.opt.Source = "run.jsonl"
			_, err := ReadJSONL(strings.NewReader(tc.in), tc.opt)
			require.ErrorIs(t, err, tc.kind)
			var e *Error
			require.True(t, errors.As(err, &e))
			assert.Equal(t, "run.jsonl", e.File)
			assert.Equal(t, tc.line, e.Line, "line")
			if tc.field != "" {
				assert.Equal(t, tc.field, e.Field)
			}
			assert.Contains(t, err.Error(), tc.msg)
		})
	}
}
