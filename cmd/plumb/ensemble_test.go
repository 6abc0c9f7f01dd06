package main

import (
	"bufio"
	"context"
	"encoding/json"
	"image/gif"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb"
)

// The golden run: the convection demo, 4 members 1e-6 apart over 30 time
// units, 8 releases, reported every time unit.
var goldenEnsemble = []string{"ensemble", "--t1", "30", "--members", "4", "--releases", "8", "--dt", "1", "--ratio", "10"}

func TestEnsembleGolden(t *testing.T) {
	for _, tt := range []struct{ format, file string }{
		{"table", "ensemble_lorenz.txt"},
		{"csv", "ensemble_lorenz.csv"},
	} {
		t.Run(tt.format, func(t *testing.T) {
			r := plumbRun(t, append(goldenEnsemble, "--format", tt.format)...)
			require.Equal(t, exitOK, r.code, r.stderr)
			golden(t, tt.file, r.stdout)
			golden(t, "ensemble_lorenz.stderr", r.stderr)
		})
	}
}

// The CLI's JSON is the SDK's report, bit for bit (the CLI is a thin shell
// over plumb.Ensemble: exact identity).
func TestEnsembleMatchesSDK(t *testing.T) {
	r := plumbRun(t, append(goldenEnsemble, "--format", "json", "--quiet")...)
	require.Equal(t, exitOK, r.code, r.stderr)
	var out struct {
		Status   string               `json:"status"`
		Ensemble plumb.EnsembleReport `json:"ensemble"`
	}
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &out))
	sys, err := plumb.Model("lorenz")
	require.NoError(t, err)
	rep, err := plumb.Ensemble(context.Background(), sys, 30, &plumb.EnsembleSettings{Members: 4, Delta: 1e-6, Releases: 8,
		Every: 1, Ratio: 10, Seed: 1, RelTol: 1e-10, AbsTol: 1e-10, MaxSteps: 1_000_000})
	require.NoError(t, err)
	require.Equal(t, "completed", out.Status)
	require.Equal(t, rep.Times, out.Ensemble.Times)
	require.Equal(t, rep.MeanSpread, out.Ensemble.MeanSpread)
	require.Equal(t, rep.PartingTimes, out.Ensemble.PartingTimes)
	require.Equal(t, rep.Saturation, out.Ensemble.Saturation)
	require.Equal(t, rep.Scales, out.Ensemble.Scales)
}

// JSON Lines: one line per member, the control first, each line's states
// at the report times; the members' starts lie delta from the control's.
func TestEnsembleJSONLines(t *testing.T) {
	r := plumbRun(t, "ensemble", "--t1", "2", "--members", "5", "--releases", "0", "--tol", "1", "--dt", "0.5", "--format", "jsonl", "--quiet")
	require.Equal(t, exitOK, r.code, r.stderr)
	sc := bufio.NewScanner(strings.NewReader(r.stdout))
	sc.Buffer(nil, 1<<20)
	var lines []memberLine
	for sc.Scan() {
		var l memberLine
		require.NoError(t, json.Unmarshal(sc.Bytes(), &l))
		lines = append(lines, l)
	}
	require.Len(t, lines, 6)
	require.True(t, lines[0].Control)
	require.Equal(t, []float64{1, 1, 1}, lines[0].Start)
	for k, l := range lines {
		require.Equal(t, k, l.Member)
		require.Len(t, l.Y, 5)
		require.Equal(t, []float64{0, 0.5, 1, 1.5, 2}, l.T)
		if k > 0 {
			var s float64
			for i, v := range l.Start {
				s += (v - lines[0].Start[i]) * (v - lines[0].Start[i])
			}
			// 1e-6 apart, up to rounding of states of size 1 (common practice: a few ulps).
			require.InDelta(t, 1e-6, math.Sqrt(s), 1e-15)
		}
	}
}

// Bad flags are usage errors (exit 2) naming the flag.
func TestEnsembleUsage(t *testing.T) {
	cases := []struct {
		args []string
		flag string
	}{
		{[]string{"--members", "0"}, "--members"},
		{[]string{"--delta", "0"}, "--delta"},
		{[]string{"--spread", "cube"}, "--spread"},
		{[]string{"--along", "w"}, "--along"},
		{[]string{"--spread", "line", "--along", "x,y"}, "--along"},
		{[]string{"--releases", "0"}, "--releases"},
		{[]string{"--ratio", "1"}, "--ratio"},
		{[]string{"--view", "spread"}, "--view"},
		{[]string{"--plot", "x.png", "--view", "projection", "--axes", "x"}, "--axes"},
		{[]string{"--plot", "x.png", "--at", "50"}, "--at"},
		{[]string{"--rows", "scales"}, "--rows"},
		{[]string{"--observe", "q"}, "--observe"},
		{[]string{"--model", "henon"}, "--model"},
		{[]string{"--t1", "-1"}, "--t1"},
		{[]string{"--format", "xml"}, "--format"},
		{[]string{"--animate", "a.png"}, "--animate"},
		{[]string{"--axes", "x,z"}, "--axes"},
	}
	for _, c := range cases {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			r := plumbRun(t, append([]string{"ensemble"}, c.args...)...)
			require.Equal(t, exitUsage, r.code, r.stderr)
			require.Contains(t, r.stderr, c.flag)
			require.Empty(t, r.stdout)
		})
	}
}

// A canceled run writes whole JSON that says so, and exits 1.
func TestEnsembleCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r := plumbRunCtx(t, ctx, "ensemble", "--format", "json", "--quiet")
	require.Equal(t, exitFailed, r.code)
	var out ensembleJSON
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &out))
	require.Equal(t, "canceled", out.Status)
	require.NotEmpty(t, string(out.Error))
	require.Contains(t, r.stderr, "canceled")
}

// Every view draws a picture (PNG and SVG).
func TestEnsemblePlots(t *testing.T) {
	dir := t.TempDir()
	for _, v := range []struct{ view, file string }{
		{"members", "m.png"}, {"spread", "s.svg"}, {"projection", "p.png"},
	} {
		name := filepath.Join(dir, v.file)
		args := []string{"ensemble", "--t1", "20", "--members", "6", "--releases", "8", "--plot", name, "--view", v.view, "--quiet"}
		if v.view == "projection" {
			args = append(args, "--axes", "x,z", "--at", "5,15,20")
		}
		r := plumbRun(t, args...)
		require.Equal(t, exitOK, r.code, r.stderr)
		st, err := os.Stat(name)
		require.NoError(t, err)
		require.Greater(t, st.Size(), int64(1000))
	}
}

// --members-file: the members are the file's rows (the control is the
// start); a bad file is a usage error naming the flag, line and column.
func TestEnsembleMembersFile(t *testing.T) {
	dir := t.TempDir()
	good := filepath.Join(dir, "m.csv")
	require.NoError(t, os.WriteFile(good, []byte("z,x,y\n1,1.001,1\n1,1,1.002\n"), 0o644))
	r := plumbRun(t, "ensemble", "--members-file", good, "--t1", "2", "--releases", "0", "--tol", "1", "--dt", "1", "--format", "jsonl", "--quiet")
	require.Equal(t, exitOK, r.code, r.stderr)
	lines := strings.Split(strings.TrimSpace(r.stdout), "\n")
	require.Len(t, lines, 3)
	var l memberLine
	require.NoError(t, json.Unmarshal([]byte(lines[1]), &l))
	require.Equal(t, []float64{1.001, 1, 1}, l.Start)

	bad := filepath.Join(dir, "bad.csv")
	require.NoError(t, os.WriteFile(bad, []byte("x,y,z\n1,2\n"), 0o644))
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"--members-file", bad}, "line 2"},
		{[]string{"--members-file", filepath.Join(dir, "none.csv")}, "--members-file"},
		{[]string{"--members-file", good, "--members", "3"}, "--members"},
	} {
		r := plumbRun(t, append([]string{"ensemble"}, c.args...)...)
		require.Equal(t, exitUsage, r.code, r.stderr)
		require.Contains(t, r.stderr, c.want)
	}
}

// --animate writes a GIF within its bounds: at most 120 frames of at most
// 800x500 pixels, one per report time when there are fewer.
func TestEnsembleAnimate(t *testing.T) {
	name := filepath.Join(t.TempDir(), "a.gif")
	r := plumbRun(t, "ensemble", "--t1", "5", "--dt", "0.1", "--members", "3", "--releases", "0", "--tol", "1", "--animate", name, "--axes", "x,z", "--quiet")
	require.Equal(t, exitOK, r.code, r.stderr)
	f, err := os.Open(name)
	require.NoError(t, err)
	defer f.Close()
	g, err := gif.DecodeAll(f)
	require.NoError(t, err)
	require.Len(t, g.Image, 51) // 51 report times: 0, 0.1, ..., 5
	b := g.Image[0].Bounds()
	require.LessOrEqual(t, b.Dx(), 800)
	require.LessOrEqual(t, b.Dy(), 500)
}
