package embed_test

import (
	"errors"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/embed"
)

// csvOf writes values as a CSV with a header "t,x" and times i*dt.
func csvOf(values []float64, dt float64) string {
	var b strings.Builder
	b.WriteString("t,x\n")
	for i, v := range values {
		b.WriteString(strconv.FormatFloat(float64(i)*dt, 'g', -1, 64))
		b.WriteByte(',')
		b.WriteString(strconv.FormatFloat(v, 'g', -1, 64))
		b.WriteByte('\n')
	}
	return b.String()
}

func TestReadColumn(t *testing.T) {
	x := henonX(40)
	good := csvOf(x, 0.5)
	for _, c := range []struct {
		name string
		in   string
		opt  embed.ReadOptions
		want error
		says string
	}{
		{"by name", good, embed.ReadOptions{Column: "x", Time: "t"}, nil, ""},
		{"by number", good, embed.ReadOptions{Column: "2", Time: "1"}, nil, ""},
		{"default last column", good, embed.ReadOptions{Dt: 0.5}, nil, ""},
		{"unknown column", good, embed.ReadOptions{Column: "y"}, embed.ErrColumn, `line 1: no such column: column "y" (header: "t", "x")`},
		{"text cell", strings.Replace(good, "\n1,", "\n1,abc", 1)[:0] + "t,x\n0,1\n0.5,abc\n", embed.ReadOptions{Column: "x"}, embed.ErrSyntax, `line 3, column 2: syntax error: "abc"`},
		{"gap", "t,x\n0,1\n0.5,\n1,2\n", embed.ReadOptions{Column: "x"}, embed.ErrSyntax, "line 3, column 2: syntax error: empty cell (a gap in the series)"},
		{"nan", "t,x\n0,1\n0.5,NaN\n", embed.ReadOptions{Column: "x"}, embed.ErrNonFinite, "line 3, column 2: non-finite value"},
		{"huge", "x\n1e400\n", embed.ReadOptions{}, embed.ErrNonFinite, "line 2, column 1"},
		{"short row", "t,x\n0,1\n0.5\n", embed.ReadOptions{Column: "x"}, embed.ErrSyntax, "line 3: syntax error: 1 cells, want at least 2"},
		{"too short", "x\n1\n2\n3\n", embed.ReadOptions{}, embed.ErrTooShort, "3 values"},
		{"constant", "x\n" + strings.Repeat("4\n", 30), embed.ReadOptions{}, embed.ErrConstant, "all 30 values equal 4"},
		{"gap in time", strings.Replace(good, "\n5,", "\n5.5,", 1), embed.ReadOptions{Column: "x", Time: "t"}, embed.ErrNonUniform, "value 10"},
		{"empty", "", embed.ReadOptions{}, embed.ErrTooShort, "no data"},
		{"both dt and time", good, embed.ReadOptions{Time: "t", Dt: 1}, embed.ErrSettings, "not both"},
	} {
		t.Run(c.name, func(t *testing.T) {
			s, err := embed.ReadColumn(strings.NewReader(c.in), c.opt)
			if c.want == nil {
				require.NoError(t, err)
				assert.Equal(t, x, s.Values, "values read back to the same bits")
				assert.Equal(t, 0.5, s.Dt)
				return
			}
			require.ErrorIs(t, err, c.want)
			assert.ErrorContains(t, err, c.says)
		})
	}
}

// FuzzReadColumn: nothing in the input makes the reader panic, every
// error is an *InputError or a settings error, and every value read is
// finite and read back from its shortest decimal to the same bits.
func FuzzReadColumn(f *testing.F) {
	f.Add("t,x\n0,1\n1,2\n", "x", "t")
	f.Add("x\n1\n2\n3\n4\n5\n6\n7\n8\n9\n10\n11\n12\n13\n14\n15\n16\n17\n", "", "")
	f.Add(csvOf(henonX(20), 1), "2", "1")
	f.Add("\"a\",\"b\"\n1,2\n,3\n", "b", "")
	f.Add("#c\n\n1,2,3\n", "3", "1")
	f.Fuzz(func(t *testing.T, in, col, tcol string) {
		s, err := embed.ReadColumn(strings.NewReader(in), embed.ReadOptions{Column: col, Time: tcol})
		if err != nil {
			var ie *embed.InputError
			if !errors.As(err, &ie) && !errors.Is(err, embed.ErrSettings) {
				t.Fatalf("error without a position: %v", err)
			}
			return
		}
		back, err := embed.ReadColumn(strings.NewReader(csvOf(s.Values, s.Dt)), embed.ReadOptions{Column: "x"})
		if err != nil {
			t.Fatalf("reading back: %v", err)
		}
		if len(back.Values) != len(s.Values) {
			t.Fatalf("read back %d values, want %d", len(back.Values), len(s.Values))
		}
		for i := range s.Values {
			if back.Values[i] != s.Values[i] {
				t.Fatalf("value %d: %v read back as %v", i, s.Values[i], back.Values[i])
			}
		}
	})
}
