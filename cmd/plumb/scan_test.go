package main

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// scanArgs is a small orbit diagram of the logistic map.
var scanArgs = []string{"scan", "--across", "r=2.8:4:25", "--keep", "200", "--discard", "2000"}

// TestScanGolden: the small scan's table is deterministic (a golden file).
func TestScanGolden(t *testing.T) {
	r := plumbRun(t, scanArgs...)
	require.Equalf(t, exitOK, r.code, "stderr %q", r.stderr)
	golden(t, "scan_logistic.txt", r.stdout)
	golden(t, "scan_logistic.stderr", r.stderr)
}

// TestScanJSON: the JSON rows carry what the table shows; the closed forms
// hold at r = 2.8 (a fixed point, λ = ln|2-r|) and r = 3.2 (a 2-cycle, λ =
// ½ ln|4+2r-r²|) (REFERENCES.md, logistic rows); and jsonl gives the same
// rows one per line between a header and a status line.
func TestScanJSON(t *testing.T) {
	const closedTol = 1e-9 // 2000 transient iterates settle these cycles to rounding
	r := plumbRun(t, append(scanArgs, "--format", "json", "--quiet")...)
	require.Equal(t, exitOK, r.code, r.stderr)
	var out scanJSON
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &out))
	require.Len(t, out.Rows, 25)
	assert.Equal(t, "golden-arch", out.Arch)
	assert.Equal(t, 1, out.Rows[0].Period)
	assert.InDelta(t, math.Log(0.8), *out.Rows[0].Exponent, closedTol, "λ = ln|2-r| at r = 2.8 (closed form)")
	assert.Equal(t, 2, out.Rows[8].Period, "r = 3.2")
	assert.InDelta(t, 0.5*math.Log(math.Abs(4+2*3.2-3.2*3.2)), *out.Rows[8].Exponent, closedTol, "λ at r = 3.2 (closed form)")

	r = plumbRun(t, append(scanArgs, "--format", "jsonl", "--quiet")...)
	require.Equal(t, exitOK, r.code, r.stderr)
	sc := bufio.NewScanner(strings.NewReader(r.stdout))
	sc.Buffer(nil, 1<<24)
	var lines []string
	for sc.Scan() {
		lines = append(lines, sc.Text())
	}
	require.Len(t, lines, 27, "header, 25 rows, status")
	var head map[string]json.RawMessage
	require.NoError(t, json.Unmarshal([]byte(lines[0]), &head))
	assert.Contains(t, head, "settings")
	assert.NotContains(t, head, "rows")
	for i, l := range lines[1:26] {
		var row scanRowJSON
		require.NoError(t, json.Unmarshal([]byte(l), &row))
		assert.Equal(t, out.Rows[i], row, "jsonl row %d equals the json row", i)
	}
	assert.JSONEq(t, `{"status": "completed", "error": null}`, lines[26])
}

// TestScanCSVAndPlot: CSV has one line per point of the diagram; --plot
// writes a PNG and an SVG.
func TestScanCSVAndPlot(t *testing.T) {
	r := plumbRun(t, append(scanArgs, "--format", "csv", "--quiet")...)
	require.Equal(t, exitOK, r.code, r.stderr)
	rows, err := csv.NewReader(strings.NewReader(r.stdout)).ReadAll()
	require.NoError(t, err)
	assert.Equal(t, []string{"r", "x", "period", "exponent"}, rows[0])
	assert.Greater(t, len(rows), 25)
	dir := t.TempDir()
	for _, name := range []string{"d.png", "d.svg"} {
		path := filepath.Join(dir, name)
		r := plumbRun(t, append(scanArgs, "--plot", path, "--quiet")...)
		require.Equal(t, exitOK, r.code, r.stderr)
		b, err := os.ReadFile(path)
		require.NoError(t, err)
		if strings.HasSuffix(name, ".svg") {
			checkSVG(t, b)
		} else {
			checkPNG(t, b)
		}
	}
}

// TestScanGridAndWorkers: a two-parameter grid of the Hénon map, the same
// bytes with one worker and with three.
func TestScanGridAndWorkers(t *testing.T) {
	args := []string{"scan", "--model", "henon", "--across", "a=1:1.4:4", "--across", "b=0.2:0.3:3", "--keep", "100", "--format", "json", "--quiet"}
	one := plumbRun(t, append(args, "--workers", "1")...)
	three := plumbRun(t, append(args, "--workers", "3")...)
	require.Equal(t, exitOK, one.code, one.stderr)
	assert.Equal(t, one.stdout, three.stdout, "rows identical whatever the workers (exact identity)")
	var out scanJSON
	require.NoError(t, json.Unmarshal([]byte(one.stdout), &out))
	require.Len(t, out.Rows, 12)
	assert.Equal(t, []float64{1, 0.25}, out.Rows[1].Params, "the last axis varies fastest")
}

// TestScanBadInput: usage errors exit 2 naming the flag.
func TestScanBadInput(t *testing.T) {
	for _, c := range []struct {
		name string
		args []string
		flag string
	}{
		{"no across", []string{}, "--across"},
		{"three axes", []string{"--across", "r=1:2:2", "--across", "r=1:2:2", "--across", "r=1:2:2"}, "--across"},
		{"unknown parameter", []string{"--across", "q=1:2:3"}, "--across"},
		{"bad axis", []string{"--across", "r=2:1:3"}, "--across"},
		{"flow", []string{"--model", "lorenz", "--across", "rho=1:2:3"}, "--model"},
		{"keep small", []string{"--across", "r=3:4:3", "--keep", "10", "--max-period", "64"}, "--max-period"},
		{"component", []string{"--across", "r=3:4:3", "--component", "y"}, "--component"},
		{"negative workers", []string{"--across", "r=3:4:3", "--workers", "-1"}, "--workers"},
		{"plot grid", []string{"--model", "henon", "--across", "a=1:2:2", "--across", "b=0.1:0.2:2", "--plot", "x.png"}, "--plot"},
		{"format", []string{"--across", "r=3:4:3", "--format", "xml"}, "--format"},
	} {
		t.Run(c.name, func(t *testing.T) {
			r := plumbRun(t, append([]string{"scan"}, c.args...)...)
			if r.code != exitUsage || r.stdout != "" || !strings.Contains(r.stderr, c.flag) {
				t.Errorf("exit %d, stdout %q, stderr %q; want 2, nothing, a message naming %s", r.code, r.stdout, r.stderr, c.flag)
			}
		})
	}
}
