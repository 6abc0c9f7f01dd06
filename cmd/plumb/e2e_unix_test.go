//go:build unix

package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// e2eSignalWait is how long a run computes before the signal: long enough
// to be past loading the system and into the integration on a loaded
// machine (the runs below take minutes to complete).
const e2eSignalWait = 1500 * time.Millisecond

// e2eExitBound bounds the time from the signal to the exit; it is
// generous for a shared machine (.ci/signals.sh prints the latency).
const e2eExitBound = 20 * time.Second

// buildPlumb builds the binary as a user does (CGO_ENABLED=0 go build) into
// a temporary folder.
func buildPlumb(t *testing.T) string {
	t.Helper()
	if testing.Short() {
		t.Skip("builds the binary; skipped with -short")
	}
	bin := filepath.Join(t.TempDir(), "plumb")
	cmd := exec.Command("go", "build", "-o", bin, ".")
	cmd.Env = append(os.Environ(), "CGO_ENABLED=0")
	out, err := cmd.CombinedOutput()
	require.NoError(t, err, "go build: %s", out)
	return bin
}

// runBin runs the binary in dir and returns its exit status and output.
func runBin(t *testing.T, bin, dir string, args ...string) (int, string, string) {
	t.Helper()
	cmd := exec.Command(bin, args...)
	cmd.Dir = dir
	var stdout, stderr bytes.Buffer
	cmd.Stdout, cmd.Stderr = &stdout, &stderr
	err := cmd.Run()
	var ee *exec.ExitError
	switch {
	case err == nil:
		return 0, stdout.String(), stderr.String()
	case errors.As(err, &ee):
		return ee.ExitCode(), stdout.String(), stderr.String()
	}
	t.Fatalf("running %s: %v", bin, err)
	return -1, "", ""
}

// TestEndToEnd runs the built binary as a user would: a bad system file and
// a bad flag (exit 2, the message names the file and place or the flag, and
// a JSON document with --format json), and Ctrl-C or SIGTERM in the middle
// of a run writing --out: the file in place is then either the previous one
// or the complete partial result, marked so, and no temporary file stays.
func TestEndToEnd(t *testing.T) {
	bin := buildPlumb(t)
	dir := t.TempDir()

	t.Run("bad system file", func(t *testing.T) {
		require.NoError(t, os.WriteFile(filepath.Join(dir, "loop.json"),
			[]byte("{\n  \"name\": \"loop\",\n  \"states\": [\n"), 0o644))
		code, stdout, stderr := runBin(t, bin, dir, "trust", "--file", "loop.json")
		assert.Equal(t, exitUsage, code)
		assert.Empty(t, stdout)
		assert.Contains(t, stderr, "plumb trust: --file loop.json: ")
		assert.Contains(t, stderr, "line ")
		code, stdout, _ = runBin(t, bin, dir, "trust", "--file", "loop.json", "--format", "json")
		assert.Equal(t, exitUsage, code)
		doc := errorDoc(t, stdout)
		assert.Equal(t, "refused", doc.Status)
		require.NotNil(t, doc.File)
		assert.Equal(t, "loop.json", *doc.File)
		assert.NotNil(t, doc.Line)
	})

	t.Run("bad flag", func(t *testing.T) {
		code, stdout, stderr := runBin(t, bin, dir, "solve", "--tl", "5")
		assert.Equal(t, exitUsage, code)
		assert.Empty(t, stdout)
		assert.Contains(t, stderr, "plumb solve: flag provided but not defined: --tl")
		code, stdout, _ = runBin(t, bin, dir, "solve", "--tl", "5", "--format", "json")
		assert.Equal(t, exitUsage, code)
		doc := errorDoc(t, stdout)
		require.NotNil(t, doc.Flag)
		assert.Equal(t, "--tl", *doc.Flag)
	})

	fifo := filepath.Join(dir, "waits.json")
	require.NoError(t, syscall.Mkfifo(fifo, 0o600))
	for _, c := range []struct {
		name   string
		sig    syscall.Signal
		format string
		args   []string
		// whole checks that the file holds a complete, marked partial
		// result; nil: the run computes nothing and the file must stay.
		whole func(t *testing.T, data []byte)
	}{
		{"solve csv SIGINT", syscall.SIGINT, "csv", []string{"solve", "--t1", "1e7", "--dt", "1", "--max-steps", "2000000000"}, wholeMarkedCSV},
		{"solve json SIGTERM", syscall.SIGTERM, "json", []string{"solve", "--t1", "1e7", "--dt", "1", "--max-steps", "2000000000"}, wholeCanceledJSON},
		{"trust json SIGINT", syscall.SIGINT, "json", []string{"trust", "--horizon", "5000", "--max-steps", "10000000"}, wholeCanceledJSON},
		// Waiting for a system file that never comes: nothing computed,
		// the previous file stays.
		{"solve waiting on a FIFO SIGINT", syscall.SIGINT, "csv", []string{"solve", "--file", fifo}, nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			sub := t.TempDir()
			name := filepath.Join(sub, "result."+c.format)
			const previous = "the previous result\n"
			require.NoError(t, os.WriteFile(name, []byte(previous), 0o644))
			cmd := exec.Command(bin, append(c.args, "--format", c.format, "--out", name, "--quiet")...)
			var stdout, stderr bytes.Buffer
			cmd.Stdout, cmd.Stderr = &stdout, &stderr
			require.NoError(t, cmd.Start())
			time.Sleep(e2eSignalWait)
			sent := time.Now()
			require.NoError(t, cmd.Process.Signal(c.sig))
			done := make(chan error, 1)
			go func() { done <- cmd.Wait() }()
			var err error
			select {
			case err = <-done:
			case <-time.After(e2eExitBound):
				cmd.Process.Kill()
				t.Fatalf("no exit within %v of the signal", e2eExitBound)
			}
			t.Logf("exit %v, %v after the signal", err, time.Since(sent).Round(time.Millisecond))
			var ee *exec.ExitError
			require.ErrorAs(t, err, &ee, "stderr: %s", stderr.String())
			assert.Equal(t, exitFailed, ee.ExitCode(), "stderr: %s", stderr.String())
			assert.Empty(t, stdout.String(), "results go to --out only")
			data, err := os.ReadFile(name)
			require.NoError(t, err)
			switch {
			case c.whole == nil:
				assert.Equal(t, previous, string(data), "a run that computed nothing leaves the file as it was")
			case string(data) != previous:
				c.whole(t, data)
			}
			assert.Equal(t, []string{filepath.Base(name)}, onlyFiles(t, sub), "no temporary file stays")
		})
	}
}

// wholeMarkedCSV: a header, rows of as many cells, and the mark of a
// canceled run as the last line.
func wholeMarkedCSV(t *testing.T, data []byte) {
	text := string(data)
	require.True(t, strings.HasSuffix(text, "\n"), "the file ends with a whole line")
	lines := strings.Split(strings.TrimSuffix(text, "\n"), "\n")
	require.GreaterOrEqual(t, len(lines), 3, "a header, at least one row and the mark")
	last := lines[len(lines)-1]
	assert.True(t, strings.HasPrefix(last, "# partial result: canceled: "), "last line %q", last)
	r := csv.NewReader(strings.NewReader(strings.Join(lines[:len(lines)-1], "\n")))
	recs, err := r.ReadAll() // fails on a row with another number of cells
	require.NoError(t, err)
	assert.Equal(t, []string{"t", "x", "y", "z"}, recs[0])
	t.Logf("%d rows, then %q", len(recs)-1, last)
}

// wholeCanceledJSON: one JSON object whose status says canceled.
func wholeCanceledJSON(t *testing.T, data []byte) {
	var doc struct {
		Status string  `json:"status"`
		Error  *string `json:"error"`
	}
	require.NoError(t, json.Unmarshal(data, &doc), "the file is one whole JSON object")
	assert.Equal(t, "canceled", doc.Status)
	require.NotNil(t, doc.Error)
	t.Logf("%d bytes, status %s", len(data), doc.Status)
}
