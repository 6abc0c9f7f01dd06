package main

import (
	"bytes"
	"context"
	"flag"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"sync"
	"testing"
	"time"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata and the README's usage section")

func TestMain(m *testing.M) {
	// A fixed clock makes the wall-time lines on stderr reproducible, and a
	// fixed arch makes the JSON goldens hold on every architecture (the
	// real GOARCH is checked in TestJSONArch).
	now = func() time.Time { return time.Date(2026, 1, 1, 0, 0, 0, 0, time.UTC) }
	goarch = "golden-arch"
	// The bar appears at once under the fixed clock (TestBarDelay checks
	// the delay itself).
	barDelay = 0
	os.Exit(m.Run())
}

// result is one in-process run of plumb.
type result struct {
	code           int
	stdout, stderr string
}

// plumbRun calls run with buffers.
func plumbRun(t *testing.T, args ...string) result {
	t.Helper()
	return plumbRunCtx(t, context.Background(), args...)
}

func plumbRunCtx(t *testing.T, ctx context.Context, args ...string) result {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(ctx, args, strings.NewReader(""), &out, &errb)
	return result{code: code, stdout: out.String(), stderr: errb.String()}
}

// golden compares got with testdata/name, or rewrites it with -update.
func golden(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run 'go test ./cmd/plumb -update' to create it)", err)
	}
	if got != string(want) {
		t.Errorf("output differs from %s (refresh with 'go test ./cmd/plumb -update' if the change is meant):\n%s", path, firstDiff(got, string(want)))
	}
}

// firstDiff shows the first differing line of got and want.
func firstDiff(got, want string) string {
	g, w := strings.Split(got, "\n"), strings.Split(want, "\n")
	for i := 0; i < len(g) || i < len(w); i++ {
		var gl, wl string
		if i < len(g) {
			gl = g[i]
		}
		if i < len(w) {
			wl = w[i]
		}
		if gl != wl {
			return "line " + strconv.Itoa(i+1) + ":\n got: " + gl + "\nwant: " + wl
		}
	}
	return "(same lines, different bytes)"
}

func TestNoCommand(t *testing.T) {
	r := plumbRun(t)
	if r.code != exitUsage || r.stdout != "" || !strings.Contains(r.stderr, "usage: plumb COMMAND") {
		t.Errorf("plumb with no arguments: code %d, stdout %q, stderr %q; want 2, nothing, usage", r.code, r.stdout, r.stderr)
	}
}

func TestUnknownCommand(t *testing.T) {
	r := plumbRun(t, "frobnicate")
	if r.code != exitUsage || r.stdout != "" || !strings.Contains(r.stderr, `unknown command "frobnicate"`) {
		t.Errorf("got code %d, stdout %q, stderr %q; want 2 naming the command", r.code, r.stdout, r.stderr)
	}
}

// TestBadFlags runs every usage error path: exit 2, nothing on stdout, a
// message on stderr that names the flag.
func TestBadFlags(t *testing.T) {
	tests := []struct {
		name string
		args []string
		flag string // must appear in the message
	}{
		{"undefined flag", []string{"solve", "--frob"}, "--frob"},
		{"undefined flag single dash", []string{"solve", "-frob"}, "--frob"},
		{"missing value", []string{"solve", "--t1"}, "--t1"},
		{"t1 not a number", []string{"solve", "--t1", "abc"}, "--t1"},
		{"t1 NaN", []string{"solve", "--t1", "NaN"}, "--t1"},
		{"t0 Inf", []string{"solve", "--t0", "-Inf"}, "--t0"},
		{"empty span", []string{"solve", "--t0", "3", "--t1", "3"}, "--t1"},
		{"dt negative", []string{"solve", "--dt", "-0.1"}, "--dt"},
		{"dt tiny", []string{"solve", "--dt", "1e-12"}, "--dt"},
		{"rtol negative", []string{"solve", "--rtol", "-1e-6"}, "--rtol"},
		{"atol negative", []string{"solve", "--atol", "-1"}, "--atol"},
		{"max-steps negative", []string{"solve", "--max-steps", "-1"}, "--max-steps"},
		{"max-steps not int", []string{"solve", "--max-steps", "1.5"}, "--max-steps"},
		{"unknown method", []string{"solve", "--method", "rk9"}, "--method"},
		{"h with adaptive", []string{"solve", "--step", "0.01"}, "--step"},
		{"cross-state malformed", []string{"solve", "--cross-state", "x"}, "--cross-state"},
		{"cross-state value", []string{"solve", "--cross-state", "x=abc"}, "--cross-state"},
		{"cross-state unknown state", []string{"solve", "--cross-state", "w=0"}, "--cross-state"},
		{"cross-sense", []string{"solve", "--cross-sense", "up"}, "--cross-sense"},
		{"rows value", []string{"solve", "--format", "csv", "--rows", "all"}, "--rows"},
		{"rows without csv", []string{"solve", "--rows", "crossings"}, "--rows"},
		{"rows crossings without cross-state", []string{"solve", "--format", "csv", "--rows", "crossings"}, "--cross-state"},
		{"positional", []string{"solve", "lorenz"}, "lorenz"},
		{"unknown model", []string{"solve", "--model", "nope"}, "--model"},
		{"missing file", []string{"solve", "--file", "loop.json"}, "--file"},
		{"model and file", []string{"solve", "--model", "lorenz", "--file", "loop.json"}, "--file"},
		{"set malformed", []string{"solve", "--set", "rho"}, "--set"},
		{"set not a number", []string{"solve", "--set", "rho=lots"}, "--set"},
		{"set Inf", []string{"solve", "--set", "rho=Inf"}, "--set"},
		{"set unknown parameter", []string{"solve", "--set", "gamma=1"}, "gamma"},
		{"format", []string{"solve", "--format", "xml"}, "--format"},
		{"plot extension", []string{"solve", "--plot", "out.jpg"}, "--plot"},
		{"plot no extension", []string{"solve", "--plot", "out"}, "--plot"},
		{"quiet value", []string{"solve", "--quiet=maybe"}, "--quiet"},
		{"models format csv", []string{"models", "--format", "csv"}, "--format"},
		{"models plot", []string{"models", "--plot", "m.svg"}, "--plot"},
		{"models set without model", []string{"models", "--set", "rho=1"}, "--set"},
		{"models unknown model", []string{"models", "--model", "nope"}, "--model"},
		{"models unknown parameter", []string{"models", "--model", "lorenz", "--set", "gamma=1"}, "gamma"},
		{"models file", []string{"models", "--file", "loop.json"}, "--file"},
		{"help unknown", []string{"help", "frob"}, "frob"},
		{"help two", []string{"help", "solve", "models"}, "COMMAND"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := plumbRun(t, tt.args...)
			if r.code != exitUsage {
				t.Errorf("exit %d, want %d; stderr %q", r.code, exitUsage, r.stderr)
			}
			if r.stdout != "" {
				t.Errorf("stdout %q, want nothing", r.stdout)
			}
			if !strings.Contains(r.stderr, tt.flag) {
				t.Errorf("stderr %q does not name %s", r.stderr, tt.flag)
			}
			if !strings.HasPrefix(r.stderr, "plumb "+tt.args[0]+": ") {
				t.Errorf("stderr %q does not start with the command", r.stderr)
			}
		})
	}
}

// TestFixedStepNeedsStep checks the --step rule for fixed-step methods with a
// table entry of the test's own (the table is the only place methods are
// named, so this is the path every fixed-step method takes).
func TestFixedStepNeedsStep(t *testing.T) {
	saved := methods
	defer func() { methods = saved }()
	methods = append(append([]method(nil), saved...), method{"fixed-probe", "test entry", true, saved[0].make, false})
	for _, args := range [][]string{
		{"solve", "--method", "fixed-probe"},
		{"solve", "--method", "fixed-probe", "--step", "0"},
		{"solve", "--method", "fixed-probe", "--step", "-0.1"},
	} {
		r := plumbRun(t, args...)
		if r.code != exitUsage || !strings.Contains(r.stderr, "--step") {
			t.Errorf("%v: exit %d, stderr %q; want 2 naming --step", args, r.code, r.stderr)
		}
	}
	r := plumbRun(t, "solve", "--method", "fixed-probe", "--step", "0.01", "--t1", "0.1", "--format", "json", "--quiet")
	if r.code != exitOK || !strings.Contains(r.stdout, `"step": 0.01`) {
		t.Errorf("with --step: exit %d, stderr %q; want 0 and h echoed", r.code, r.stderr)
	}
}

// stepCtx is a context canceled after n checks: integrate watches Done once
// per accepted step (others may call Err), so this cancels mid-run at a fixed
// step, as Ctrl-C does at an arbitrary one. It may be checked from several
// goroutines (a scan's workers, context.WithCancel's watcher), so the count
// is kept under a lock.
type stepCtx struct {
	context.Context
	mu   sync.Mutex
	n    int
	done chan struct{}
}

// tick counts one check and reports whether the context is now canceled.
func (c *stepCtx) tick() bool {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.done == nil {
		c.done = make(chan struct{})
	}
	select {
	case <-c.done:
		return true
	default:
	}
	if c.n--; c.n < 0 {
		close(c.done)
		return true
	}
	return false
}

func (c *stepCtx) Done() <-chan struct{} {
	c.tick()
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.done
}

func (c *stepCtx) Err() error {
	if c.tick() {
		return context.Canceled
	}
	return nil
}

// TestVersion: 'plumb --version' and 'plumb version' print the version and
// the architecture (golden-arch in tests) on stdout.
func TestVersion(t *testing.T) {
	want := "plumb " + version + " " + runtime.GOOS + "/golden-arch (" + runtime.Version() + ")\n"
	for _, args := range [][]string{{"--version"}, {"-version"}, {"version"}} {
		r := plumbRun(t, args...)
		if r.code != exitOK || r.stdout != want || r.stderr != "" {
			t.Errorf("%v: exit %d, stdout %q, stderr %q; want %q", args, r.code, r.stdout, r.stderr, want)
		}
	}
}
