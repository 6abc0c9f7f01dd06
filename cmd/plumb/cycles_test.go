package main

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

var cyclesArgs = []string{"cycles", "--set", "r=3.83", "--period", "3", "--box", "x=0:1", "--forced-up-to", "6"}

// TestCyclesGolden: the logistic map inside its period-3 window has two
// 3-cycles (one attracting, one not: born together at r = 1 + √8) and,
// by Sharkovsky's theorem, cycles of every period up to 6.
func TestCyclesGolden(t *testing.T) {
	r := plumbRun(t, cyclesArgs...)
	require.Equalf(t, exitOK, r.code, "stderr %q", r.stderr)
	golden(t, "cycles_logistic.txt", r.stdout)
	golden(t, "cycles_logistic.stderr", r.stderr)
}

// TestCyclesJSON: the logistic map at r = 4 has 6 cycles of period 5
// (Möbius inversion of 2^5: (32 - 2)/5, exact), all unstable with
// |multiplier| = 2^5 (exact, by conjugacy to the tent map); the Hénon
// map's 2-cycle is found with two eigenvalues.
func TestCyclesJSON(t *testing.T) {
	const multTol = 1e-6 // the product of five f' at polished points
	r := plumbRun(t, "cycles", "--set", "r=4", "--period", "5", "--box", "x=0:1", "--format", "json", "--quiet")
	require.Equal(t, exitOK, r.code, r.stderr)
	var out cyclesJSON
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &out))
	require.Len(t, out.Cycles, 6)
	for _, c := range out.Cycles {
		assert.False(t, c.Stable)
		assert.InDelta(t, 32, math.Abs(*c.Multiplier), multTol)
		assert.Len(t, c.Points, 5)
	}
	r = plumbRun(t, "cycles", "--model", "henon", "--period", "2", "--format", "json", "--quiet")
	require.Equal(t, exitOK, r.code, r.stderr)
	out = cyclesJSON{}
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &out))
	require.Len(t, out.Cycles, 1, "the Hénon map at a = 1.4, b = 0.3 has one 2-cycle (closed form: a > 3(1-b)²/4)")
	assert.Len(t, out.Cycles[0].Eigenvalues, 2)
	assert.Nil(t, out.Cycles[0].Multiplier)
}

// TestCyclesCSVAndPlot: one CSV line per point; the cobweb and the 2-D
// pictures are drawn.
func TestCyclesCSVAndPlot(t *testing.T) {
	r := plumbRun(t, append(cyclesArgs, "--format", "csv", "--quiet")...)
	require.Equal(t, exitOK, r.code, r.stderr)
	rows, err := csv.NewReader(strings.NewReader(r.stdout)).ReadAll()
	require.NoError(t, err)
	assert.Equal(t, []string{"cycle", "index", "x", "modulus", "stable"}, rows[0])
	assert.Len(t, rows, 7, "header and 2 cycles of 3 points")
	dir := t.TempDir()
	for _, args := range [][]string{cyclesArgs, {"cycles", "--model", "henon", "--period", "2"}} {
		path := filepath.Join(dir, "c.png")
		r := plumbRun(t, append(args, "--plot", path, "--quiet")...)
		require.Equal(t, exitOK, r.code, r.stderr)
		b, err := os.ReadFile(path)
		require.NoError(t, err)
		checkPNG(t, b)
	}
}

// TestCyclesBadInput: usage errors exit 2 naming the flag.
func TestCyclesBadInput(t *testing.T) {
	for _, c := range []struct {
		name string
		args []string
		flag string
	}{
		{"period 0", []string{"--period", "0"}, "--period"},
		{"period too long", []string{"--period", "65"}, "--period"},
		{"box state", []string{"--box", "y=0:1"}, "--box"},
		{"box reversed", []string{"--box", "x=1:0"}, "--box"},
		{"forced 2-D", []string{"--model", "henon", "--forced-up-to", "4"}, "--forced-up-to"},
		{"forced big", []string{"--forced-up-to", "99"}, "--forced-up-to"},
		{"cells", []string{"--cells", "0"}, "--cells"},
		{"tol", []string{"--tol", "1"}, "--tol"},
		{"flow", []string{"--model", "lorenz"}, "--model"},
	} {
		t.Run(c.name, func(t *testing.T) {
			r := plumbRun(t, append([]string{"cycles"}, c.args...)...)
			if r.code != exitUsage || r.stdout != "" || !strings.Contains(r.stderr, c.flag) {
				t.Errorf("exit %d, stdout %q, stderr %q; want 2, nothing, a message naming %s", r.code, r.stdout, r.stderr, c.flag)
			}
		})
	}
}

// TestCyclesDefaultBoxNote: the default box is the orbit's range, which at
// r = 3.7 leaves out the logistic map's repelling fixed point x = 0 (exact:
// f(0) = 0 for every r); the table says so and names --box, and with
// --box x=0:1 both fixed points, 0 and 1 - 1/r (exact), are found.
func TestCyclesDefaultBoxNote(t *testing.T) {
	const pointTol = 1e-9 // polished fixed points, common practice
	r := plumbRun(t, "cycles", "--set", "r=3.7", "--quiet")
	require.Equal(t, exitOK, r.code, r.stderr)
	assert.Contains(t, r.stdout, "were not searched: give --box to widen it")
	assert.Contains(t, r.stdout, "1 cycle of least period 1")
	r = plumbRun(t, "cycles", "--set", "r=3.7", "--box", "x=0:1", "--format", "json", "--quiet")
	require.Equal(t, exitOK, r.code, r.stderr)
	var out cyclesJSON
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &out))
	require.Len(t, out.Cycles, 2)
	var xs []float64
	for _, c := range out.Cycles {
		xs = append(xs, c.Points[0][0])
	}
	sort.Float64s(xs)
	assert.InDeltaf(t, 0, xs[0], pointTol, "f(0) = 0 (exact identity)")
	assert.InDeltaf(t, 1-1/3.7, xs[1], pointTol, "x* = 1 - 1/r (exact identity)")
	r = plumbRun(t, "cycles", "--set", "r=3.7", "--box", "x=0:1", "--quiet")
	assert.NotContains(t, r.stdout, "were not searched")
}
