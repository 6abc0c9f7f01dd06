package main

import (
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

func TestParseAxis(t *testing.T) {
	for _, c := range []struct {
		name, in string
		want     axisSpec
		err      string
	}{
		{"plain", "r=2.8:4:600", axisSpec{"r", 2.8, 4, 600}, ""},
		{"one value", "r=3:3:1", axisSpec{"r", 3, 3, 1}, ""},
		{"spaces", " r = 1 : 2 : 3 ", axisSpec{"r", 1, 2, 3}, ""},
		{"no name", "=1:2:3", axisSpec{}, "want NAME=FROM:TO:N"},
		{"two parts", "r=1:2", axisSpec{}, "want FROM:TO:N"},
		{"bad count", "r=1:2:x", axisSpec{}, "N \"x\""},
		{"zero count", "r=1:2:0", axisSpec{}, "from 1 to"},
		{"reversed", "r=2:1:5", axisSpec{}, "must be below"},
		{"nan", "r=nan:1:5", axisSpec{}, "FROM"},
	} {
		t.Run(c.name, func(t *testing.T) {
			got, err := parseAxis(c.in)
			if c.err != "" {
				require.Error(t, err)
				assert.Contains(t, err.Error(), c.err)
				return
			}
			require.NoError(t, err)
			assert.Equal(t, c.want, got)
			back, err := parseAxis(got.String())
			require.NoError(t, err)
			assert.Equal(t, got, back, "parse(format(x)) == x")
		})
	}
	v := axisSpec{"r", 1, 2, 5}.values()
	assert.Equal(t, []float64{1, 1.25, 1.5, 1.75, 2}, v, "equal spacing, ends exact")
}

func TestParseBox(t *testing.T) {
	b, err := parseBox("x=0:1")
	require.NoError(t, err)
	assert.Equal(t, boxSpec{"x", 0, 1}, b)
	for _, bad := range []string{"x", "x=1", "x=1:0", "x=a:1", "=0:1"} {
		_, err := parseBox(bad)
		assert.Errorf(t, err, "%q", bad)
	}
}

// FuzzParseAxis: the parser never panics, and what it accepts formats and
// parses back to itself.
func FuzzParseAxis(f *testing.F) {
	for _, s := range []string{"r=2.8:4:600", "r=3:3:1", "a=-1e3:1e3:10", "x=:", "=", "r=1:2:3:4", "r=0x1p-3:1:2"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		a, err := parseAxis(s)
		if err != nil {
			return
		}
		back, err := parseAxis(a.String())
		if err != nil || back != a {
			t.Fatalf("%q -> %v -> %v, %v", s, a, back, err)
		}
		_, _ = parseBox(s)
	})
}
