package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// errorDoc decodes stdout as exactly one errorJSON document, refusing
// unknown fields.
func errorDoc(t *testing.T, stdout string) errorJSON {
	t.Helper()
	dec := json.NewDecoder(strings.NewReader(stdout))
	dec.DisallowUnknownFields()
	var doc errorJSON
	require.NoError(t, dec.Decode(&doc), "stdout: %q", stdout)
	require.False(t, dec.More(), "one JSON object on stdout, got more: %q", stdout)
	return doc
}

// With --format json an error that leaves no result is a JSON document on
// stdout, for bad flags, bad values, bad system files and runs that stop
// before computing anything, in every command; the exit status is as
// without it and stderr keeps the plain message.
func TestJSONErrors(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.json")
	require.NoError(t, os.WriteFile(bad, []byte(`{"name": "loop", "kind": "flow", "states": [{"name": "x", "start": 1}],
 "rates": {"x": "-x +* 2"}}`), 0o644))
	canceled, cancel := context.WithCancel(context.Background())
	cancel()
	str := func(s string) *string { return &s }
	for _, c := range []struct {
		name   string
		ctx    context.Context
		args   []string
		code   int
		status string
		flag   *string
		file   *string
	}{
		{"unknown flag before --format", nil, []string{"solve", "--bogus", "--format", "json"}, exitUsage, "refused", str("--bogus"), nil},
		{"bad value", nil, []string{"spectrum", "--format=json", "--rtol", "-1"}, exitUsage, "refused", str("--rtol"), nil},
		{"bad system file", nil, []string{"trust", "--file", bad, "--format", "json"}, exitUsage, "refused", str("--file"), str(bad)},
		{"missing system file", nil, []string{"solve", "--file", filepath.Join(dir, "none.json"), "--format", "json"}, exitUsage, "refused", str("--file"), nil},
		{"unknown model", nil, []string{"ensemble", "--model", "nosuch", "--format", "json"}, exitUsage, "refused", str("--model"), nil},
		{"format not written", nil, []string{"series", "--format", "json", "--plot", "x.gif", "testdata/series_henon.csv"}, exitUsage, "refused", str("--plot"), nil},
		{"scan without --across", nil, []string{"scan", "--format", "json"}, exitUsage, "refused", str("--across"), nil},
		{"cycles bad period", nil, []string{"cycles", "--period", "-1", "--format", "json"}, exitUsage, "refused", str("--period"), nil},
		{"models unknown", nil, []string{"models", "--model", "nosuch", "--format", "json"}, exitUsage, "refused", str("--model"), nil},
		{"version stray argument", nil, []string{"version", "--format", "json", "extra"}, exitUsage, "refused", nil, nil},
		{"canceled before the start", canceled, []string{"solve", "--file", bad, "--format", "json"}, exitFailed, "canceled", str("--file"), nil},
		{"unknown command", nil, []string{"solver", "--format", "json"}, exitUsage, "refused", nil, nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			ctx := c.ctx
			if ctx == nil {
				ctx = context.Background()
			}
			r := plumbRunCtx(t, ctx, c.args...)
			require.Equal(t, c.code, r.code, r.stderr)
			doc := errorDoc(t, r.stdout)
			assert.Equal(t, c.args[0], doc.Command)
			assert.Equal(t, c.status, doc.Status)
			assert.Equal(t, c.code, doc.ExitStatus)
			assert.Equal(t, c.flag, doc.Flag, "flag of %q", doc.Error)
			assert.Equal(t, c.file, doc.File)
			require.NotEmpty(t, doc.Error)
			assert.Contains(t, r.stderr, doc.Error, "stderr keeps the plain message")
			// The same command line without --format json writes nothing
			// on stdout and exits alike.
			var rest []string
			for i := 0; i < len(c.args); i++ {
				switch {
				case c.args[i] == "--format":
					i++
				case c.args[i] == "--format=json":
				default:
					rest = append(rest, c.args[i])
				}
			}
			plain := plumbRunCtx(t, ctx, rest...)
			assert.Equal(t, c.code, plain.code)
			if c.code == exitUsage || c.status == "canceled" {
				assert.Empty(t, plain.stdout)
			}
		})
	}
}

// A bad system file's JSON error gives the place: the field for a bad
// formula, the line and column for broken JSON.
func TestJSONErrorPlace(t *testing.T) {
	dir := t.TempDir()
	broken := filepath.Join(dir, "broken.json")
	require.NoError(t, os.WriteFile(broken, []byte("{\n  \"name\": \"loop\",\n  \"states\": [1, }\n"), 0o644))
	r := plumbRun(t, "solve", "--file", broken, "--format", "json")
	require.Equal(t, exitUsage, r.code)
	doc := errorDoc(t, r.stdout)
	require.NotNil(t, doc.Line, doc.Error)
	require.NotNil(t, doc.Column, doc.Error)
	assert.Equal(t, 3, *doc.Line, doc.Error)
	assert.Contains(t, doc.Error, "line 3")
}

// A run that stopped part way writes its partial result, whose error is
// the message: no second document follows it.
func TestJSONErrorAfterPartialResult(t *testing.T) {
	r := plumbRun(t, "solve", "--t1", "1", "--max-steps", "5", "--format", "json")
	require.Equal(t, exitFailed, r.code)
	dec := json.NewDecoder(strings.NewReader(r.stdout))
	var doc map[string]any
	require.NoError(t, dec.Decode(&doc))
	assert.False(t, dec.More(), "one object")
	assert.Equal(t, "failed", doc["status"])
	assert.NotNil(t, doc["error"])
}

// asksJSON finds --format json in the spellings the flag package takes,
// the last one counting, none after "--" or the first positional argument,
// and not in the value of another flag.
func TestAsksJSON(t *testing.T) {
	fs, _, _ := newFlagSet(solveCmd)
	for _, c := range []struct {
		args []string
		want bool
	}{
		{[]string{"--format", "json"}, true},
		{[]string{"-format", "json"}, true},
		{[]string{"--format=json"}, true},
		{[]string{"--format", "json", "--format", "csv"}, false},
		{[]string{"--format", "csv", "--format=json"}, true},
		{[]string{"--", "--format", "json"}, false},
		{[]string{"--format"}, false},
		{[]string{"--plot", "json"}, false},
		{[]string{"--quiet", "--format", "json"}, true},             // a boolean flag takes no value
		{[]string{"--set", "--format", "json"}, false},              // --set's value is "--format"
		{[]string{"--t1", "5", "extra", "--format", "json"}, false}, // parsing stops at "extra"
		{[]string{"--bogus", "--format", "json"}, true},             // an unknown flag before a flag takes no value
		{[]string{"--tl", "5", "--format", "json"}, true},           // one before a word takes it as its value
	} {
		assert.Equal(t, c.want, asksJSON(fs, c.args), "%q", c.args)
	}
	assert.True(t, asksJSON(nil, []string{"--x", "1", "--format", "json"}))
}

// FuzzAsksJSON: on every command line the flag package parses, asksJSON
// agrees with the --format it parsed; on any other it does not panic.
func FuzzAsksJSON(f *testing.F) {
	for _, seed := range []string{
		"--format json", "--format=json --quiet", "--set --format json", "--quiet=false --format json",
		"-format json -- x", "--t1 5 --format csv", "--format json --format=table", "--bogus --format json",
		"--plot json.svg --format json", "--start x=1 - --format json",
	} {
		f.Add(seed)
	}
	f.Fuzz(func(t *testing.T, line string) {
		args := strings.Fields(line)
		fs, sh, _ := newFlagSet(solveCmd)
		got := asksJSON(fs, args)
		if err := fs.Parse(args); err == nil && got != (sh.format == "json") {
			t.Errorf("%q: asksJSON %v, parsed --format %q", args, got, sh.format)
		}
	})
}

// The document of a usage error is what errorJSON declares, field for
// field, with nulls for what does not apply.
func TestJSONErrorFields(t *testing.T) {
	r := plumbRun(t, "solve", "--rtol", "-1", "--format", "json")
	var got map[string]json.RawMessage
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &got))
	for _, k := range []string{"plumb_version", "arch", "command", "status", "error", "exit_status", "flag", "file", "field", "line", "column", "hint"} {
		assert.Contains(t, got, k)
	}
	assert.Len(t, got, 12)
	assert.True(t, bytes.Equal(got["hint"], []byte("null")))
}

// FuzzJSONErrorDocument: whatever follows --format json on a command line,
// plumb does not panic, and a command that fails writes on stdout either
// nothing (the command line took --format json back) or exactly one error
// document whose exit_status is the exit status.
func FuzzJSONErrorDocument(f *testing.F) {
	for _, seed := range []string{
		"", "--bogus", "extra", "--format csv", "--format table --bogus", "--quiet --progress lines",
		"--set r=x", "--plot a.gif", "-- --x", "--progress dots", "--file",
	} {
		f.Add(seed)
	}
	f.Fuzz(func(t *testing.T, line string) {
		if strings.Contains(line, "out") || strings.Contains(line, "plot") {
			t.Skip("--out and --plot write files; TestOut* and the plot tests cover them")
		}
		ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
		defer cancel()
		args := append([]string{"version", "--format", "json"}, strings.Fields(line)...)
		var out, errb bytes.Buffer
		code := run(ctx, args, strings.NewReader(""), &out, &errb)
		if code == exitOK || out.Len() == 0 {
			return
		}
		dec := json.NewDecoder(&out)
		var doc errorJSON
		if err := dec.Decode(&doc); err != nil || dec.More() {
			t.Fatalf("%q: exit %d, stdout is not one JSON object (%v): %q", args, code, err, out.String())
		}
		if doc.ExitStatus != code || doc.Error == "" {
			t.Errorf("%q: exit %d, document %+v", args, code, doc)
		}
	})
}
