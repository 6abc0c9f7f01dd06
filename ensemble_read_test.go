package plumb

import (
	"bytes"
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"
)

var lorenzStates = []string{"x", "y", "z"}

func TestReadMembers(t *testing.T) {
	cases := []struct {
		name, in   string
		want       [][]float64
		line, col  int
		whyContain string
	}{
		{name: "plain", in: "x,y,z\n1,2,3\n4,5,6\n", want: [][]float64{{1, 2, 3}, {4, 5, 6}}},
		{name: "reordered, comments, blanks, spaces", in: "# members\n\n z , x,y\n3, 1 ,2\n\n# end\n", want: [][]float64{{1, 2, 3}}},
		{name: "unknown name", in: "x,y,w\n", line: 1, col: 3, whyContain: `"w" is not a state`},
		{name: "twice", in: "x,y,x\n", line: 1, col: 3, whyContain: "named twice"},
		{name: "missing", in: "x,z\n1,2\n", line: 1, whyContain: "lacks y"},
		{name: "short row", in: "x,y,z\n1,2\n", line: 2, whyContain: "2 fields"},
		{name: "not a number", in: "x,y,z\n1,2,abc\n", line: 2, col: 3, whyContain: `"abc" is not a finite number`},
		{name: "NaN", in: "x,y,z\n1,NaN,3\n", line: 2, col: 2, whyContain: "not a finite"},
		{name: "Inf", in: "x,y,z\n1,2,-Inf\n", line: 2, col: 3, whyContain: "not a finite"},
		{name: "empty", in: "", line: 0, whyContain: "no header"},
		{name: "header only", in: "x,y,z\n", line: 1, whyContain: "no members"},
		{name: "long line", in: "x,y,z\n" + strings.Repeat("1", maxMembersLine+1), line: 2, whyContain: "longer than"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			got, err := ReadMembers(strings.NewReader(tc.in), lorenzStates)
			if tc.want != nil {
				require.NoError(t, err)
				require.Equal(t, tc.want, got)
				return
			}
			var fe *MembersFileError
			require.True(t, errors.As(err, &fe), "%v", err)
			require.ErrorIs(t, err, ErrMembersFile)
			require.Equal(t, tc.line, fe.Line)
			require.Equal(t, tc.col, fe.Column)
			require.Contains(t, fe.Why, tc.whyContain)
		})
	}
}

// parse(format(x)) == x, bit for bit (exact identity: shortest decimals).
func TestMembersRoundTrip(t *testing.T) {
	starts := [][]float64{{1, 2.5e-300, -0.1}, {math.Pi, math.SmallestNonzeroFloat64, -1e308}}
	var buf bytes.Buffer
	require.NoError(t, WriteMembers(&buf, lorenzStates, starts))
	got, err := ReadMembers(&buf, lorenzStates)
	require.NoError(t, err)
	require.Equal(t, starts, got)
	require.Error(t, WriteMembers(&buf, lorenzStates, [][]float64{{1}}))
}

// FuzzReadMembers: any input gives members or a MembersFileError, never a
// panic; what is read writes out and reads back the same.
func FuzzReadMembers(f *testing.F) {
	for _, s := range []string{"x,y,z\n1,2,3\n", "z,y,x\n# c\n1e-9, 2 ,-3\n\n4,5,6", "x,y\n", "x,y,z\n1,2,NaN\n", ",,\n,,\n", "x,x,x\n"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, in string) {
		got, err := ReadMembers(strings.NewReader(in), lorenzStates)
		if err != nil {
			var fe *MembersFileError
			if !errors.As(err, &fe) {
				t.Fatalf("error %v is not a MembersFileError", err)
			}
			return
		}
		var buf bytes.Buffer
		if err := WriteMembers(&buf, lorenzStates, got); err != nil {
			t.Fatal(err)
		}
		back, err := ReadMembers(&buf, lorenzStates)
		if err != nil {
			t.Fatalf("written members do not read back: %v", err)
		}
		for k := range got {
			for i := range got[k] {
				if math.Float64bits(got[k][i]) != math.Float64bits(back[k][i]) {
					t.Fatalf("member %d component %d: %v read back as %v", k, i, got[k][i], back[k][i])
				}
			}
		}
	})
}
