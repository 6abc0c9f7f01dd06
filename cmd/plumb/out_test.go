package main

import (
	"context"
	"encoding/json"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// onlyFiles lists the names in dir, to check that no temporary file is
// left behind.
func onlyFiles(t *testing.T, dir string) []string {
	t.Helper()
	entries, err := os.ReadDir(dir)
	require.NoError(t, err)
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	return names
}

// A completed run with --out writes into the file exactly the bytes it
// writes on stdout without it, in every format, and leaves stdout empty
// and no temporary file behind.
func TestOutCompleted(t *testing.T) {
	for _, args := range [][]string{
		{"solve", "--t1", "1", "--format", "csv"},
		{"solve", "--t1", "1", "--format", "json"},
		{"solve", "--t1", "1"},
		{"scan", "--across", "r=3:4:5", "--keep", "8", "--format", "jsonl"},
		{"ensemble", "--t1", "1", "--members", "3", "--releases", "2", "--format", "jsonl"},
		{"models", "--format", "json"},
	} {
		t.Run(strings.Join(args, " "), func(t *testing.T) {
			plain := plumbRun(t, append(args, "--quiet")...)
			require.Equal(t, exitOK, plain.code, plain.stderr)
			dir := t.TempDir()
			name := filepath.Join(dir, "result.out")
			r := plumbRun(t, append(args, "--quiet", "--out", name)...)
			require.Equal(t, exitOK, r.code, r.stderr)
			assert.Empty(t, r.stdout, "with --out nothing goes to stdout")
			got, err := os.ReadFile(name)
			require.NoError(t, err)
			assert.Equal(t, plain.stdout, string(got))
			assert.Equal(t, []string{"result.out"}, onlyFiles(t, dir))
			st, err := os.Stat(name)
			require.NoError(t, err)
			assert.Equal(t, os.FileMode(0o644), st.Mode().Perm(), "a new file is an ordinary 0644 file")
		})
	}
}

// A file that --out replaces keeps its permissions.
func TestOutKeepsMode(t *testing.T) {
	name := filepath.Join(t.TempDir(), "kept.csv")
	require.NoError(t, os.WriteFile(name, []byte("previous\n"), 0o600))
	require.NoError(t, os.Chmod(name, 0o640))
	r := plumbRun(t, "solve", "--t1", "1", "--format", "csv", "--quiet", "--out", name)
	require.Equal(t, exitOK, r.code, r.stderr)
	st, err := os.Stat(name)
	require.NoError(t, err)
	assert.Equal(t, os.FileMode(0o640), st.Mode().Perm())
}

// A run that computes nothing (bad input found once the run began, a run
// canceled before it started) leaves the previous file as it was, byte for
// byte, and no temporary file.
func TestOutNothingComputed(t *testing.T) {
	canceled, cancel := context.WithCancel(context.Background())
	cancel()
	for _, c := range []struct {
		name string
		ctx  context.Context
		args []string
		code int
	}{
		{"missing system file", context.Background(), []string{"solve", "--file", "no-such-file.json"}, exitUsage},
		{"refused settings", context.Background(), []string{"spectrum", "--t1", "-5"}, exitUsage},
		{"canceled before the start", canceled, []string{"solve", "--file", "testdata/series_henon.csv"}, exitFailed},
	} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			name := filepath.Join(dir, "result.json")
			require.NoError(t, os.WriteFile(name, []byte("the previous result\n"), 0o644))
			r := plumbRunCtx(t, c.ctx, append(c.args, "--format", "json", "--out", name)...)
			require.Equal(t, c.code, r.code, r.stderr)
			got, err := os.ReadFile(name)
			require.NoError(t, err)
			assert.Equal(t, "the previous result\n", string(got))
			assert.Equal(t, []string{"result.json"}, onlyFiles(t, dir))
		})
	}
}

// A run that stops part way leaves its partial result in place, whole and
// marked as partial in every format (see resultWritten), and says so on
// stderr; the part is the same prefix stdout gets without --out.
func TestOutPartialMarked(t *testing.T) {
	for _, c := range []struct {
		format string
		args   []string
		// last checks the file's last line.
		last func(t *testing.T, line string)
	}{
		{"csv", []string{"solve", "--t1", "1", "--max-steps", "5"}, func(t *testing.T, line string) {
			assert.True(t, strings.HasPrefix(line, "# partial result: failed: integrating lorenz"), line)
		}},
		{"table", []string{"solve", "--t1", "1", "--max-steps", "5"}, func(t *testing.T, line string) {
			assert.True(t, strings.HasPrefix(line, "# partial result: failed: "), line)
		}},
		{"jsonl", []string{"ensemble", "--t1", "1", "--members", "3", "--releases", "2", "--max-steps", "5"}, func(t *testing.T, line string) {
			var rec struct {
				Status string  `json:"status"`
				Error  *string `json:"error"`
			}
			require.NoError(t, json.Unmarshal([]byte(line), &rec), line)
			assert.Equal(t, "failed", rec.Status)
			require.NotNil(t, rec.Error)
		}},
	} {
		t.Run(c.format, func(t *testing.T) {
			args := append(c.args, "--format", c.format, "--quiet")
			plain := plumbRun(t, args...)
			require.Equal(t, exitFailed, plain.code, plain.stderr)
			dir := t.TempDir()
			name := filepath.Join(dir, "part.out")
			require.NoError(t, os.WriteFile(name, []byte("previous\n"), 0o644))
			r := plumbRun(t, append(c.args, "--format", c.format, "--out", name)...)
			require.Equal(t, exitFailed, r.code, r.stderr)
			assert.Contains(t, r.stderr, "the partial result is in "+name)
			got, err := os.ReadFile(name)
			require.NoError(t, err)
			require.True(t, strings.HasPrefix(string(got), plain.stdout), "the file starts with what stdout gets")
			rest := strings.TrimSuffix(strings.TrimPrefix(string(got), plain.stdout), "\n")
			require.NotContains(t, rest, "\n", "one mark line after the result")
			c.last(t, rest)
			assert.Equal(t, []string{"part.out"}, onlyFiles(t, dir))
		})
	}
}

// A partial JSON result needs no mark of its own: its status and error say
// it, and the file holds one whole JSON object.
func TestOutPartialJSON(t *testing.T) {
	name := filepath.Join(t.TempDir(), "part.json")
	r := plumbRunCtx(t, &stepCtx{Context: context.Background(), n: 200}, "solve", "--t1", "5", "--format", "json", "--quiet", "--out", name)
	require.Equal(t, exitFailed, r.code, r.stderr)
	assert.Empty(t, r.stdout, "the partial result is the JSON; no error document follows it")
	raw, err := os.ReadFile(name)
	require.NoError(t, err)
	var doc struct {
		Status string  `json:"status"`
		Error  *string `json:"error"`
	}
	require.NoError(t, json.Unmarshal(raw, &doc))
	assert.Equal(t, "canceled", doc.Status)
	require.NotNil(t, doc.Error)
}

// A scan streamed as JSON Lines ends with its own status record; a partial
// one gets no second mark.
func TestOutPartialScanStream(t *testing.T) {
	name := filepath.Join(t.TempDir(), "scan.jsonl")
	r := plumbRunCtx(t, &stepCtx{Context: context.Background(), n: 40}, "scan", "--across", "r=3:4:400", "--keep", "8", "--format", "jsonl", "--quiet", "--out", name)
	require.Equal(t, exitFailed, r.code, r.stderr)
	raw, err := os.ReadFile(name)
	require.NoError(t, err)
	lines := strings.Split(strings.TrimSuffix(string(raw), "\n"), "\n")
	require.GreaterOrEqual(t, len(lines), 2, "the header and the status record at least")
	var last, before map[string]any
	require.NoError(t, json.Unmarshal([]byte(lines[len(lines)-1]), &last))
	require.NoError(t, json.Unmarshal([]byte(lines[len(lines)-2]), &before))
	assert.Equal(t, "canceled", last["status"])
	assert.NotContains(t, before, "status", "one status record, not two")
}

// Bad --out values are usage errors naming --out.
func TestOutRefused(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		name string
		args []string
		want string
	}{
		{"a folder", []string{"solve", "--out", dir}, "--out " + dir + ": is a folder"},
		{"no such folder", []string{"solve", "--out", filepath.Join(dir, "no", "such", "f.csv")}, "--out " + filepath.Join(dir, "no", "such", "f.csv")},
		{"the --plot file", []string{"solve", "--out", "a.svg", "--plot", "a.svg"}, "--out a.svg and --plot a.svg"},
	} {
		t.Run(c.name, func(t *testing.T) {
			r := plumbRun(t, c.args...)
			assert.Equal(t, exitUsage, r.code)
			assert.Contains(t, r.stderr, c.want)
		})
	}
	assert.Empty(t, onlyFiles(t, dir))
}

// A write that fails (a full disk) is remembered: the file is never
// committed, the target keeps its contents and the temporary file goes.
func TestOutFileFailedWrite(t *testing.T) {
	dir := t.TempDir()
	name := filepath.Join(dir, "r.csv")
	require.NoError(t, os.WriteFile(name, []byte("previous\n"), 0o644))
	o, err := createOut(name)
	require.NoError(t, err)
	_, err = o.Write([]byte("t,x\n0,1\n"))
	require.NoError(t, err)
	o.tmp.Close() // the next write fails, as on a full disk
	_, err = o.Write([]byte("1,2\n"))
	require.Error(t, err)
	_, err = o.Write([]byte("2,3\n"))
	require.Error(t, err, "a failed write is remembered")
	require.Error(t, o.commit(name))
	got, err := os.ReadFile(name)
	require.NoError(t, err)
	assert.Equal(t, "previous\n", string(got))
	assert.Equal(t, []string{"r.csv"}, onlyFiles(t, dir))
}

// A partial result in a format with no place for a mark (a binary array)
// goes beside the target as NAME.partial; the target keeps its contents.
func TestOutPartialAside(t *testing.T) {
	dir := t.TempDir()
	name := filepath.Join(dir, "r.bin")
	require.NoError(t, os.WriteFile(name, []byte("previous"), 0o644))
	o, err := createOut(name)
	require.NoError(t, err)
	var stderr strings.Builder
	cl := &call{cmd: solveCmd, sh: &shared{format: "binary", out: name}, stdout: o, stderr: &stderr, out: &outState{toFile: true}}
	_, err = o.Write([]byte("rows"))
	require.NoError(t, err)
	stop := context.Canceled
	require.NoError(t, cl.resultWritten(&outcome{err: stop}))
	assert.ErrorIs(t, cl.finishOut(o, stop), stop)
	got, err := os.ReadFile(name)
	require.NoError(t, err)
	assert.Equal(t, "previous", string(got))
	part, err := os.ReadFile(name + partialSuffix)
	require.NoError(t, err)
	assert.Equal(t, "rows", string(part))
	assert.Contains(t, stderr.String(), "the partial result is in "+name+partialSuffix)
}

// An --out file is an io.WriteSeeker: a writer that patches what it wrote
// first (a .npy header's row count) can seek back in it before the commit.
func TestOutFileSeeks(t *testing.T) {
	name := filepath.Join(t.TempDir(), "r.npy")
	o, err := createOut(name)
	require.NoError(t, err)
	var ws io.WriteSeeker = o
	_, err = ws.Write([]byte("rows=?;0123456789"))
	require.NoError(t, err)
	at, err := ws.Seek(5, io.SeekStart)
	require.NoError(t, err)
	require.Equal(t, int64(5), at)
	_, err = ws.Write([]byte("9"))
	require.NoError(t, err)
	_, err = ws.Seek(0, io.SeekEnd)
	require.NoError(t, err)
	_, err = ws.Write([]byte(";end"))
	require.NoError(t, err)
	require.NoError(t, o.commit(name))
	got, err := os.ReadFile(name)
	require.NoError(t, err)
	assert.Equal(t, "rows=9;0123456789;end", string(got))
}

// A command whose output marks itself (outcome.marked) gets no other mark,
// and its partial file goes in place in any format.
func TestOutPartialSelfMarked(t *testing.T) {
	dir := t.TempDir()
	name := filepath.Join(dir, "r.bin")
	o, err := createOut(name)
	require.NoError(t, err)
	var stderr strings.Builder
	cl := &call{cmd: solveCmd, sh: &shared{format: "binary", out: name}, stdout: o, stderr: &stderr, out: &outState{toFile: true}}
	_, err = o.Write([]byte("rows and their own status"))
	require.NoError(t, err)
	require.NoError(t, cl.resultWritten(&outcome{err: context.Canceled, marked: true}))
	assert.ErrorIs(t, cl.finishOut(o, context.Canceled), context.Canceled)
	got, err := os.ReadFile(name)
	require.NoError(t, err)
	assert.Equal(t, "rows and their own status", string(got))
	assert.Equal(t, []string{"r.bin"}, onlyFiles(t, dir))
}
