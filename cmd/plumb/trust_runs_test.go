package main

import (
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/runio"
)

// solveTo runs plumb solve with args and writes its CSV to dir/name.
func solveTo(t *testing.T, dir, name string, args ...string) string {
	t.Helper()
	r := plumbRun(t, append([]string{"solve", "--format", "csv", "--quiet", "--t1", "50", "--dt", "0.05"}, args...)...)
	require.Equal(t, exitOK, r.code, r.stderr)
	path := filepath.Join(dir, name)
	require.NoError(t, os.WriteFile(path, []byte(r.stdout), 0o644))
	return path
}

// runsJSON is the JSON of an audit of recorded runs, as decoded.
type runsJSON = trustJSON[runsSettingsJSON]

// decodeRuns runs plumb trust with args and --format json.
func decodeRuns(t *testing.T, args ...string) (runsJSON, map[string]json.RawMessage, result) {
	t.Helper()
	r := plumbRun(t, append(append([]string{"trust"}, args...), "--format", "json", "--quiet")...)
	var out runsJSON
	var raw map[string]json.RawMessage
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &out), "stdout: %.300s, stderr: %s", r.stdout, r.stderr)
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &raw))
	return out, raw, r
}

// TestTrustRunsRoundTrip: runs written by plumb solve (DP5(4) at the
// built-in ladder's three tolerances, the reference DP8(5,3) at 1e-12) and
// a 24-bit storage run (plumb solve has no storage flag: written through
// the SDK and runio.WriteCSV), read back by --run, give the agreement
// horizons of the built-in audit with --exact=false to the comparison
// grid's spacing (0.05: --dt, and horizon/1000 in the built-in audit). The
// built-in audit locates its horizons on the continuous solutions; the
// files only have the grid, so the two agree to within one interval.
func TestTrustRunsRoundTrip(t *testing.T) {
	const every = 0.05
	dir := t.TempDir()
	ref := solveTo(t, dir, "ref.csv", "--method", "dp853", "--rtol", "1e-12", "--atol", "1e-12")
	args := []string{"--run", "ref=" + ref}
	for _, tol := range []string{"1e-06", "1e-08", "1e-10"} {
		args = append(args, "--run", "tol:tol_"+tol+"="+solveTo(t, dir, "tol"+tol+".csv", "--method", "dp54", "--rtol", tol, "--atol", tol))
	}
	sys, err := plumb.Model("lorenz")
	require.NoError(t, err)
	sol, err := integrate.Solve(context.Background(), sys.Problem(), 50, integrate.Rounded(integrate.DormandPrince853, integrate.Bits(24)),
		&integrate.Settings{RelTol: 1e-12, AbsTol: 1e-12, Every: every, DropSteps: true})
	require.NoError(t, err)
	run := &runio.Run{TimeName: "t", Names: sys.States}
	for _, s := range sol.Samples {
		run.T = append(run.T, s.T)
		run.Y = append(run.Y, s.Y...)
	}
	f, err := os.Create(filepath.Join(dir, "bits24.csv"))
	require.NoError(t, err)
	require.NoError(t, runio.WriteCSV(f, run))
	require.NoError(t, f.Close())
	args = append(args, "--run", "precision:precision_24bit="+f.Name())

	got, raw, r := decodeRuns(t, args...)
	require.Equal(t, exitOK, r.code, r.stderr)
	built, _, br := decodeTrust(t, "--exact=false", "--rungs", "tol,precision")
	require.Equal(t, exitOK, br.code, br.stderr)
	byID := map[string]plumb.RungReport{}
	for _, rr := range built.Report.Rungs {
		byID[rr.ID] = rr
	}
	require.Len(t, got.Report.Rungs, 4)
	for _, rr := range got.Report.Rungs {
		want, ok := byID[rr.ID]
		require.True(t, ok, "built-in rung %s", rr.ID)
		assert.Equal(t, want.Departed, rr.Departed, rr.ID)
		assert.InDeltaf(t, want.AgreesUntil, rr.AgreesUntil, every, "%s: horizon from solve's files vs the built-in audit (to the grid spacing)", rr.ID)
		assert.Equal(t, want.Effect, rr.Effect)
		t.Logf("%s: %.4f from files, %.4f built in", rr.ID, rr.AgreesUntil, want.AgreesUntil)
	}
	require.NotNil(t, got.TrustedUntil)
	assert.InDelta(t, *built.TrustedUntil, *got.TrustedUntil, every)
	assert.Equal(t, built.Report.Verdict, got.Report.Verdict)
	assert.Equal(t, "runs", got.Report.Exponent.Source)
	for _, k := range []string{"plumb_version", "arch", "command", "settings", "units", "status", "error", "trusted_until", "recorded", "rungs", "times", "verdict", "caution"} {
		assert.Contains(t, raw, k)
	}
	for _, k := range []string{"system", "exact_reference", "reversal"} {
		assert.NotContains(t, raw, k)
	}
	assert.Len(t, got.Settings.Runs, 5)

	// The same runs as CSV (curves headed by the runs' ids) and a chart.
	csvOut := plumbRun(t, append(append([]string{"trust"}, args...), "--format", "csv", "--quiet")...)
	require.Equal(t, exitOK, csvOut.code, csvOut.stderr)
	assert.True(t, strings.HasPrefix(csvOut.stdout, "t,tol_1e-06,tol_1e-08,tol_1e-10,precision_24bit\n"), csvOut.stdout[:80])
	svg := filepath.Join(dir, "runs.svg")
	tab := plumbRun(t, append(append([]string{"trust"}, args...), "--plot", svg)...)
	require.Equal(t, exitOK, tab.code, tab.stderr)
	assert.Contains(t, tab.stdout, "nothing is extrapolated")
	assert.Contains(t, tab.stdout, "an estimate from the runs")
	info, err := os.Stat(svg)
	require.NoError(t, err)
	assert.Positive(t, info.Size())
}

// TestTrustRunsBadInput: each bad --run is a usage error (exit 2) naming
// the flag, the file and, where it applies, the line or column.
func TestTrustRunsBadInput(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		require.NoError(t, os.WriteFile(p, []byte(text), 0o644))
		return p
	}
	a := write("a.csv", "t,x,y\n0,1,2\n1,2,3\n2,3,4\n")
	late := write("late.csv", "t,x,y\n5,1,2\n6,2,3\n")
	onlyX := write("onlyx.csv", "t,x\n0,1\n1,2\n2,3\n")
	ragged := write("ragged.csv", "t,x,y\n0,1,2\n1,2\n")
	nan := write("nan.csv", "t,x,y\n0,1,2\n1,NaN,3\n")
	back := write("back.csv", "t,x,y\n0,1,2\n1,2,3\n0.5,2,3\n")
	for _, c := range []struct {
		name string
		args []string
		want []string
	}{
		{"one run only", []string{"--run", "ref=" + a}, []string{`run 1 "a"`, "only run"}},
		{"disjoint", []string{"--run", "ref=" + a, "--run", "tol=" + late}, []string{`"late"`, "late.csv", "does not overlap"}},
		{"missing column", []string{"--run", "ref=" + a, "--run", "tol=" + onlyX}, []string{"onlyx.csv", `column "y" is missing`}},
		{"ragged", []string{"--run", "ref=" + a, "--run", "tol=" + ragged}, []string{"--run tolerance:ragged=", "ragged.csv:3"}},
		{"NaN", []string{"--run", "ref=" + a, "--run", "tol=" + nan}, []string{"nan.csv:3", "column 2"}},
		{"times back", []string{"--run", "ref=" + a, "--run", "tol=" + back}, []string{"back.csv:4"}},
		{"no such file", []string{"--run", "ref=" + a, "--run", "tol=" + filepath.Join(dir, "none.csv")}, []string{"none.csv"}},
		{"bad effect", []string{"--run", "luck=" + a}, []string{"--run", `effect "luck"`}},
		{"no path", []string{"--run", "ref"}, []string{"--run", "EFFECT[:LABEL]=PATH"}},
		{"with a model", []string{"--run", "ref=" + a, "--run", "tol=" + a, "--model", "lorenz"}, []string{"--model", "recorded runs"}},
		{"exec flag alone", []string{"--run", "ref=" + a, "--run", "tol=" + a, "--jobs", "3"}, []string{"--jobs", "--exec"}},
		{"horizon past the span", []string{"--run", "ref=" + a, "--run", "tol:b=" + a, "--horizon", "5"}, []string{"nothing is extrapolated"}},
		{"same label", []string{"--run", "ref=" + a, "--run", "tol=" + a}, []string{`run 2 "a"`, "label of run 1"}},
		{"unknown observed", []string{"--run", "ref=" + a, "--run", "tol:b=" + a, "--observe", "q"}, []string{`column "q" is missing`}},
	} {
		t.Run(c.name, func(t *testing.T) {
			r := plumbRun(t, append([]string{"trust", "--quiet"}, c.args...)...)
			assert.Equal(t, exitUsage, r.code, r.stderr)
			assert.Empty(t, r.stdout)
			for _, w := range c.want {
				assert.Contains(t, r.stderr, w)
			}
		})
	}
}

// TestTrustRunsStdin: a run read from stdin (--run ref=-) and a file.
func TestTrustRunsStdin(t *testing.T) {
	dir := t.TempDir()
	b := filepath.Join(dir, "b.jsonl")
	require.NoError(t, os.WriteFile(b, []byte("{\"t\":0,\"x\":1}\n{\"t\":1,\"x\":1.5}\n{\"t\":2,\"x\":4}\n"), 0o644))
	r := plumbRunStdin(t, "t,x\n0,1\n1,2\n2,3\n", "trust", "--run", "ref=-", "--run", "other:b="+b, "--format", "json", "--quiet")
	require.Equal(t, exitOK, r.code, r.stderr)
	var out runsJSON
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &out))
	// |x_b - x_ref| = 0, 0.5, 1 at t = 0, 1, 2: at tol 1 it never exceeds
	// (exact arithmetic), using the whole tolerance.
	require.Len(t, out.Report.Rungs, 1)
	assert.Equal(t, []float64{0, 0.5, 1}, out.Report.Rungs[0].Divergence)
	assert.False(t, out.Report.Rungs[0].Departed)
	assert.Equal(t, "stdin", out.Report.Recorded.Runs[0].Label)
}

// TestTrustExec: --exec launches a program per rung from a template (here
// sh, so that one script plays every case): the reference and a good rung
// stand, while a rung that exits non-zero, one that hangs past
// --time-limit and one that writes nothing are reported failed rungs with
// exit status and stderr, and a rung equal to the reference is flagged.
func TestTrustExec(t *testing.T) {
	if _, err := os.Stat("/bin/sh"); err != nil {
		t.Skip("no /bin/sh: the launch test needs a POSIX shell")
	}
	script := `case "$1" in
ok) printf "t,x\n0,1\n1,2\n2,3\n" > "$2" ;;
same) printf "t,x\n0,1\n1,2\n2,3\n" > "$2" ;;
off) printf "t,x\n0,1\n1,2.5\n2,5\n" > "$2" ;;
fail) echo "boom: the solver diverged" >&2; exit 3 ;;
hang) sleep 30 ;;
empty) : ;;
esac`
	r := plumbRun(t, "trust", "--exec", "/bin/sh -c '"+script+"' sh {mode} {out}",
		"--vary", "mode=other:ok,same,off,fail,hang,empty", "--time-limit", "1s", "--jobs", "3", "--format", "json", "--quiet")
	require.Equal(t, exitOK, r.code, r.stderr)
	var out runsJSON
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &out))
	rec := out.Report.Recorded
	require.Len(t, rec.Runs, 6)
	byLabel := map[string]plumb.RecordedRunReport{}
	for _, run := range rec.Runs {
		byLabel[run.Label] = run
	}
	assert.True(t, byLabel["mode=same"].SameAsReference)
	assert.Nil(t, byLabel["mode=off"].Failure)
	// |x_off - x_ok| = 0, 0.5, 2: departs between t = 1 and 2, log-linear
	// at 1 + ln(1/0.5)/ln(2/0.5) = 1.5 (exact identity).
	for _, rr := range out.Report.Rungs {
		if rr.Name == "mode=off" {
			assert.True(t, rr.Departed)
			assert.InDelta(t, 1.5, rr.AgreesUntil, 1e-12)
		}
	}
	if f := byLabel["mode=fail"].Failure; assert.NotNil(t, f) {
		assert.Equal(t, 3, f.ExitStatus)
		assert.Contains(t, f.StderrTail, "boom: the solver diverged")
	}
	if f := byLabel["mode=hang"].Failure; assert.NotNil(t, f) {
		assert.True(t, f.TimedOut)
	}
	if f := byLabel["mode=empty"].Failure; assert.NotNil(t, f) {
		assert.Contains(t, f.Why, "wrote nothing")
	}
	assert.Equal(t, 3, out.Report.Failed)
	assert.Equal(t, []string{"/bin/sh", "-c"}, out.Settings.Exec.Command[:2])

	// A failing reference fails the audit: exit 1, naming its stderr.
	bad := plumbRun(t, "trust", "--exec", "/bin/sh -c 'echo broken >&2; exit 4' sh {out} {rtol}", "--quiet")
	assert.Equal(t, exitFailed, bad.code)
	assert.Contains(t, bad.stderr, "exited with status 4")
	assert.Contains(t, bad.stderr, "broken")

	// Template errors are usage errors naming --exec.
	for _, c := range []struct{ args, want []string }{
		{[]string{"--exec", "./no-such-program {out} {rtol}"}, []string{"--exec", "no-such-program"}},
		{[]string{"--exec", "sh --in {rtol}"}, []string{"--exec", "{out}"}},
		{[]string{"--exec", "sh {out} {speed}"}, []string{"--exec", "{speed}"}},
		{[]string{"--exec", "sh 'unclosed {out}"}, []string{"--exec", "unclosed"}},
		{[]string{"--exec", "sh {out}"}, []string{"--exec", "varies anything"}},
		{[]string{"--exec", "sh {out} {rtol}", "--tols", "1e-6,x"}, []string{"--tols"}},
		{[]string{"--exec", "sh {out} {m}", "--vary", "m=precision:a"}, []string{"--vary", "one value"}},
	} {
		r := plumbRun(t, append([]string{"trust", "--quiet"}, c.args...)...)
		assert.Equal(t, exitUsage, r.code, "%v: %s", c.args, r.stderr)
		for _, w := range c.want {
			assert.Contains(t, r.stderr, w, c.args)
		}
	}
}

// TestSplitWords: the --exec template is split like a shell splits plain
// words and quotes (POSIX shell command language, Sect. 2.2: quoting).
func TestSplitWords(t *testing.T) {
	for _, c := range []struct {
		in   string
		want []string
	}{
		{"a b  c", []string{"a", "b", "c"}},
		{`a 'b c' "d e"`, []string{"a", "b c", "d e"}},
		{`a "x\"y" 'it''s' b\ c`, []string{"a", `x"y`, "its", "b c"}},
		{`--out={out} ''`, []string{"--out={out}", ""}},
		{"", nil},
	} {
		got, err := splitWords(c.in)
		require.NoError(t, err, c.in)
		assert.Equal(t, c.want, got, c.in)
	}
	for _, bad := range []string{`a 'b`, `a "b`} {
		_, err := splitWords(bad)
		assert.Error(t, err, bad)
	}
}

// FuzzSplitWords: the template splitter never panics, and a template
// without quotes or backslashes comes back as its words between blanks and
// newlines (other white space, such as a vertical tab, is part of a word).
func FuzzSplitWords(f *testing.F) {
	for _, s := range []string{"a b", `'x y' "z"`, `a\ b`, `"\\"`, `'`, `"`, "\\", "{out} {rtol}"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		words, err := splitWords(s)
		if err != nil {
			return
		}
		if !strings.ContainsAny(s, "'\"\\") {
			// The shell's separators: blank (space, tab) and newline.
			blank := func(r rune) bool { return r == ' ' || r == '\t' || r == '\n' }
			if got, want := strings.Join(words, " "), strings.Join(strings.FieldsFunc(s, blank), " "); got != want {
				t.Fatalf("%q: %q, want %q", s, got, want)
			}
		}
	})
}

// FuzzRunSpec: --run's parser never panics; what it accepts has a label,
// a path and an effect or the reference mark.
func FuzzRunSpec(f *testing.F) {
	for _, s := range []string{"ref=a.csv", "tol:loose=b.csv", "start:=c.npy", "ref=-", "x=y", "=", ":=", "precision:a:b=c"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		var l runList
		if err := l.Set(s); err != nil {
			return
		}
		r := l[0]
		if r.label == "" || strings.TrimSpace(r.path) == "" || (!r.ref && r.effect == "") {
			t.Fatalf("%q accepted as %+v", s, r)
		}
	})
}

// FuzzVary: --vary's parser never panics and keeps at least two values.
func FuzzVary(f *testing.F) {
	for _, s := range []string{"m=precision:a,b", "m=other:,x", "m=tol:a", "=:", "m=x:a,b"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		var l varyList
		if err := l.Set(s); err != nil {
			return
		}
		if len(l[0].Values) < 2 || l[0].Name == "" {
			t.Fatalf("%q accepted as %+v", s, l[0])
		}
	})
}

// TestTrustExecCanceled: when the context ends (Ctrl-C), the running
// programs are stopped at once, and the runs that completed are audited
// and written, with status canceled and exit status 1.
func TestTrustExecCanceled(t *testing.T) {
	if _, err := os.Stat("/bin/sh"); err != nil {
		t.Skip("no /bin/sh: the launch test needs a POSIX shell")
	}
	// Stopping takes well under this on an idle machine; the bound leaves
	// room for a loaded one, and is far below the 30 s the hang would take.
	const stopWithin = 10 * time.Second
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	go func() {
		time.Sleep(500 * time.Millisecond)
		cancel()
	}()
	script := `case "$1" in
ok|off) printf "t,x\n0,1\n1,2\n2,3\n" > "$2" ;;
hang) sleep 30 ;;
esac`
	start := time.Now()
	r := plumbRunCtx(t, ctx, "trust", "--exec", "/bin/sh -c '"+script+"' sh {mode} {out}",
		"--vary", "mode=other:ok,off,hang", "--jobs", "3", "--format", "json", "--quiet")
	took := time.Since(start)
	assert.Less(t, took, stopWithin)
	assert.Equal(t, exitFailed, r.code, r.stderr)
	var out runsJSON
	require.NoError(t, json.Unmarshal([]byte(r.stdout), &out), r.stdout)
	assert.Equal(t, "canceled", out.Status)
	assert.Equal(t, plumb.Incomplete, out.Report.Verdict)
	assert.Nil(t, out.TrustedUntil)
	require.Len(t, out.Report.Recorded.Runs, 3)
	assert.Nil(t, out.Report.Recorded.Runs[1].Failure, "the completed run stands")
	assert.NotNil(t, out.Report.Recorded.Runs[2].Failure, "the stopped run is a failed rung")
}
