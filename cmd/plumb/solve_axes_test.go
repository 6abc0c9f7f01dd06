package main

import (
	"os"
	"path/filepath"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestSolveAxes: --axes X,Y draws the projection of the orbit on those two
// components (flows and maps), and is refused without --plot, with one
// name, or with a name the system does not have.
func TestSolveAxes(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "proj.svg")
	r := plumbRun(t, "solve", "--t1", "5", "--axes", "x,z", "--plot", path, "--quiet")
	require.Equalf(t, exitOK, r.code, "stderr %q", r.stderr)
	b, err := os.ReadFile(path)
	require.NoError(t, err)
	checkSVG(t, b)
	assert.Contains(t, string(b), "z against x", "the title names the projection")

	maps := filepath.Join(dir, "henon.svg")
	r = plumbRun(t, "solve", "--model", "henon", "--axes", "y,x", "--plot", maps, "--quiet")
	require.Equalf(t, exitOK, r.code, "stderr %q", r.stderr)
	b, err = os.ReadFile(maps)
	require.NoError(t, err)
	checkSVG(t, b)

	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--axes", "x,z"}, "give --plot FILE too"},
		{[]string{"--axes", "x", "--plot", filepath.Join(dir, "a.svg")}, "name two states"},
		{[]string{"--axes", "x,w", "--plot", filepath.Join(dir, "b.svg")}, `no state "w"`},
		{[]string{"--axes", "x,x", "--plot", filepath.Join(dir, "c.svg")}, "named twice"},
	} {
		r := plumbRun(t, append([]string{"solve", "--t1", "1"}, c.args...)...)
		assert.Equalf(t, exitUsage, r.code, "%v", c.args)
		assert.Containsf(t, r.stderr, c.want, "%v", c.args)
	}
}
