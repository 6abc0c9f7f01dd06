package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"io"
	"math"
	"strconv"
	"strings"
	"testing"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
)

// The golden run: the convection demo over one time unit, sampled every 0.1,
// with the crossings of x through 5 and of z through 25.
var goldenSolve = []string{"solve", "--t1", "1", "--dt", "0.1", "--cross-state", "x=5", "--cross-state", "z=25"}

func TestSolveGolden(t *testing.T) {
	for _, tt := range []struct {
		format, file string
	}{
		{"table", "solve_lorenz.txt"},
		{"csv", "solve_lorenz.csv"},
		{"json", "solve_lorenz.json"},
		{"jsonl", "solve_lorenz.jsonl"},
	} {
		t.Run(tt.format, func(t *testing.T) {
			r := plumbRun(t, append(goldenSolve, "--format", tt.format)...)
			if r.code != exitOK {
				t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
			}
			golden(t, tt.file, r.stdout)
			golden(t, "solve_lorenz.stderr", r.stderr)
		})
	}
	r := plumbRun(t, append(goldenSolve, "--format", "csv", "--rows", "crossings")...)
	if r.code != exitOK {
		t.Fatalf("--rows crossings: exit %d, stderr %q", r.code, r.stderr)
	}
	golden(t, "solve_lorenz_crossings.csv", r.stdout)
}

// decodeSolve runs plumb solve --format json and decodes the result.
func decodeSolve(t *testing.T, args ...string) (solveJSON, result) {
	t.Helper()
	r := plumbRun(t, append(append([]string{"solve"}, args...), "--format", "json", "--quiet")...)
	var out solveJSON
	if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
		t.Fatalf("stdout is not one JSON object: %v\n%s", err, r.stdout)
	}
	return out, r
}

// TestSolveMatchesSDK: the CLI is a view of the SDK, so its numbers must be
// the SDK's bit for bit (exact identity: the same computation).
func TestSolveMatchesSDK(t *testing.T) {
	out, r := decodeSolve(t, "--model", "rossler", "--set", "c=4", "--t0", "2", "--t1", "17", "--dt", "0.25", "--rtol", "1e-8", "--atol", "1e-9", "--cross-state", "y=0", "--cross-sense", "rising")
	if r.code != exitOK || r.stderr != "" {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	sys, err := plumb.Model("rossler")
	if err != nil {
		t.Fatal(err)
	}
	if err := sys.Set("c", 4); err != nil {
		t.Fatal(err)
	}
	p := sys.Problem()
	p.T0 = 2
	sol, err := integrate.Solve(context.Background(), p, 17, integrate.DormandPrince54, &integrate.Settings{
		RelTol: 1e-8, AbsTol: 1e-9, Every: 0.25, DropSteps: true, MaxSteps: integrate.DefaultMaxSteps,
		Crossings: []integrate.Crossing{{G: func(_ float64, y []float64) float64 { return y[1] }, Sense: integrate.Rising}},
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(out.Samples) != len(sol.Samples) || len(out.Samples) != 61 { // 15/0.25 + 1 grid points (exact count)
		t.Fatalf("got %d samples, SDK %d, want 61", len(out.Samples), len(sol.Samples))
	}
	for i, s := range sol.Samples {
		if out.Samples[i].T != s.T || !sameBits(out.Samples[i].Y, s.Y) {
			t.Fatalf("sample %d: CLI (%v, %v), SDK (%v, %v)", i, out.Samples[i].T, out.Samples[i].Y, s.T, s.Y)
		}
	}
	if len(out.Crossings) != len(sol.Hits) || len(sol.Hits) == 0 {
		t.Fatalf("got %d crossings, SDK %d (want the same, at least one)", len(out.Crossings), len(sol.Hits))
	}
	for i, h := range sol.Hits {
		c := out.Crossings[i]
		if c.T != h.T || !sameBits(c.Y, h.Y) || c.Sense != "rising" || c.Crossing != "y=0" {
			t.Errorf("crossing %d: CLI %+v, SDK %+v", i, c, h)
		}
	}
	if !sameBits(out.Final, sol.Final) || out.End != sol.End {
		t.Errorf("final: CLI %v at %v, SDK %v at %v", out.Final, out.End, sol.Final, sol.End)
	}
	if out.Stats.Evaluations != sol.Stats.Evaluations || out.Stats.Accepted != sol.Stats.Accepted || out.Stats.Rejected != sol.Stats.Rejected {
		t.Errorf("stats: CLI %+v, SDK %+v", out.Stats, sol.Stats)
	}
	// Settings and system echoed back.
	st := out.Settings
	if st.T0 != 2 || st.T1 != 17 || st.Dt != 0.25 || st.RelTol != 1e-8 || st.AbsTol != 1e-9 || st.Method != "dp54" ||
		st.MethodName != integrate.DormandPrince54.Name() || st.Sampling != "grid" || st.CrossSense != "rising" ||
		len(st.CrossState) != 1 || st.CrossState[0] != (crossStateJSON{"y", 0}) {
		t.Errorf("settings echoed as %+v", st)
	}
	if out.System.Name != "rossler" || out.System.Parameters[2].Name != "c" || out.System.Parameters[2].Value != 4 {
		t.Errorf("system echoed as %+v", out.System)
	}
	if out.PlumbVersion != version || out.Command != "solve" || out.Status != "completed" || out.Error != "" {
		t.Errorf("header/status: %+v %q %q", out.header, out.Status, out.Error)
	}
}

func sameBits(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
			return false
		}
	}
	return true
}

// TestSolveFormatsAgree: CSV and JSON hold the same bits (both write the
// shortest decimal that reads back exactly), and a second run is identical.
func TestSolveFormatsAgree(t *testing.T) {
	args := []string{"solve", "--model", "double-pendulum", "--t1", "3", "--dt", "0.3", "--quiet"}
	a := plumbRun(t, append(args, "--format", "csv")...)
	b := plumbRun(t, append(args, "--format", "csv")...)
	if a.code != exitOK || a.stdout != b.stdout {
		t.Fatalf("two runs differ or failed (exit %d, stderr %q)", a.code, a.stderr)
	}
	recs, err := csv.NewReader(strings.NewReader(a.stdout)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(recs[0], ",") != "t,theta1,theta2,omega1,omega2" {
		t.Errorf("CSV header %q", recs[0])
	}
	out, _ := decodeSolve(t, args[1:]...)
	if len(recs)-1 != len(out.Samples) {
		t.Fatalf("CSV has %d rows, JSON %d samples", len(recs)-1, len(out.Samples))
	}
	for i, s := range out.Samples {
		row := recs[i+1]
		tv, _ := strconv.ParseFloat(row[0], 64)
		if tv != s.T {
			t.Errorf("row %d: t %v, JSON %v", i, tv, s.T)
		}
		for k, v := range s.Y {
			got, err := strconv.ParseFloat(row[k+1], 64)
			if err != nil || math.Float64bits(got) != math.Float64bits(v) {
				t.Errorf("row %d col %d: CSV %s, JSON %v", i, k, row[k+1], v)
			}
		}
	}
	// The start row is the model's start (exact identity).
	sys, _ := plumb.Model("double-pendulum")
	if !sameBits(out.Samples[0].Y, sys.Start()) || out.Samples[0].T != 0 {
		t.Errorf("first sample %+v, want the start %v at 0", out.Samples[0], sys.Start())
	}
}

// TestSolveKeplerPeriod: one period of the Kepler orbit with e = 0.6 is
// 2*pi and returns to the start (Hairer, Lubich & Wanner 2006, Ch. I: with
// H = -1/2 the semi-major axis is 1, and Kepler's third law gives T = 2*pi).
func TestSolveKeplerPeriod(t *testing.T) {
	// At rtol = atol = 1e-10 the global error of Dormand–Prince 5(4) after
	// one revolution is about 1e-8 (tolerance proportionality, Hairer,
	// Nørsett & Wanner 1993, Sect. II.4); 1e-6 leaves two decades.
	const tol = 1e-6
	out, r := decodeSolve(t, "--model", "kepler", "--t1", strconv.FormatFloat(2*math.Pi, 'g', -1, 64), "--dt", "0")
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	sys, _ := plumb.Model("kepler")
	for i, y0 := range sys.Start() {
		if d := math.Abs(out.Final[i] - y0); d > tol {
			t.Errorf("component %d after one period: %v, start %v, |diff| %.3g > %g", i, out.Final[i], y0, d, tol)
		}
	}
	// --dt 0 writes the start and every accepted step.
	if out.Settings.Sampling != "steps" || len(out.Samples) != out.Stats.Accepted+1 {
		t.Errorf("--dt 0: %d samples for %d accepted steps, sampling %q", len(out.Samples), out.Stats.Accepted, out.Settings.Sampling)
	}
}

// TestSolveCrossingsOnValue: each reported crossing lies on its level.
func TestSolveCrossingsOnValue(t *testing.T) {
	// Crossings are refined to about 4 eps in t (integrate.Crossing), so the
	// residual is |dz/dt| * 4 eps * t ~ 1e-12 here; 1e-9 is generous.
	const tol = 1e-9
	out, r := decodeSolve(t, "--t1", "10", "--cross-state", "z=25", "--cross-sense", "falling")
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	if len(out.Crossings) < 3 {
		t.Fatalf("only %d falling crossings of z=25 in 10 time units", len(out.Crossings))
	}
	prev := math.Inf(-1)
	for i, c := range out.Crossings {
		if d := math.Abs(c.Y[2] - 25); d > tol || c.Sense != "falling" || c.T <= prev {
			t.Errorf("crossing %d: t=%v z=%v (|z-25| %.3g) sense %s", i, c.T, c.Y[2], d, c.Sense)
		}
		prev = c.T
	}
}

func TestSolveBackward(t *testing.T) {
	out, r := decodeSolve(t, "--t0", "1", "--t1", "0", "--dt", "0.5")
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	var ts []float64
	for _, s := range out.Samples {
		ts = append(ts, s.T)
	}
	if len(ts) != 3 || ts[0] != 1 || ts[1] != 0.5 || ts[2] != 0 { // grid t0 + i*dt towards t1 (exact)
		t.Errorf("backward sample times %v, want [1 0.5 0]", ts)
	}
}

// TestSolveFailureKeepsPartial: a run that exhausts its step budget exits 1,
// says which step failed and why, and still writes what it computed.
func TestSolveFailureKeepsPartial(t *testing.T) {
	r := plumbRun(t, "solve", "--max-steps", "40", "--dt", "0.01", "--format", "csv")
	if r.code != exitFailed {
		t.Fatalf("exit %d, want 1; stderr %q", r.code, r.stderr)
	}
	if !strings.Contains(r.stderr, "integrating lorenz") || !strings.Contains(r.stderr, "step budget exhausted") {
		t.Errorf("stderr %q does not say which step failed and why", r.stderr)
	}
	lines := strings.Split(strings.TrimSpace(r.stdout), "\n")
	if lines[0] != "t,x,y,z" || len(lines) < 3 {
		t.Errorf("partial CSV has %d lines, header %q", len(lines), lines[0])
	}
	out, r := decodeSolve(t, "--max-steps", "40")
	if r.code != exitFailed || out.Status != "failed" || !strings.Contains(string(out.Error), "step budget") || out.End <= 0 || out.End >= 20 {
		t.Errorf("JSON of a failed run: status %q, error %q, end %v", out.Status, out.Error, out.End)
	}
}

// TestSolveStepBudgetHint: the hint after an exhausted step budget names
// what the user can change: the tolerances of an adaptive method, but the
// step and the budget of a fixed-step one (which has no tolerance); a
// fixed step that cannot finish within the budget given is refused before
// the run (exit 2), since its count is known.
func TestSolveStepBudgetHint(t *testing.T) {
	cases := []struct {
		name      string
		args      []string
		code      int
		want, not []string
	}{
		{"adaptive", []string{"--max-steps", "40"}, exitFailed, []string{"--max-steps", "--rtol"}, nil},
		// rk4 at h = 0.001 over 10 time units takes 10000 steps (exact).
		{"fixed step", []string{"--method", "rk4", "--step", "0.001", "--t1", "10", "--max-steps", "100"}, exitUsage, []string{"--step", "--max-steps", "10000 steps"}, []string{"--rtol", "--atol"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			r := plumbRun(t, append([]string{"solve", "--format", "csv", "--quiet"}, c.args...)...)
			if r.code != c.code {
				t.Fatalf("exit %d, want %d; stderr %q", r.code, c.code, r.stderr)
			}
			if c.code == exitUsage && r.stdout != "" {
				t.Errorf("a run refused up front wrote %q", r.stdout)
			}
			hint := r.stderr
			if c.code == exitFailed {
				_, hint, _ = strings.Cut(r.stderr, "hint: ")
			}
			for _, w := range c.want {
				if !strings.Contains(hint, w) {
					t.Errorf("hint %q does not name %s", hint, w)
				}
			}
			for _, w := range c.not {
				if strings.Contains(hint, w) {
					t.Errorf("hint %q names %s, which a fixed-step run does not have", hint, w)
				}
			}
		})
	}
}

// TestSolveCanceled: a canceled context (what Ctrl-C does) still writes
// what was done.
func TestSolveCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r := plumbRunCtx(t, ctx, "solve", "--format", "json", "--quiet")
	if r.code != exitFailed {
		t.Fatalf("exit %d, want 1", r.code)
	}
	var out solveJSON
	if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
		t.Fatalf("canceled run wrote no JSON: %v", err)
	}
	if out.Status != "canceled" || len(out.Samples) != 1 || out.Samples[0].T != 0 {
		t.Errorf("status %q with %d samples; want canceled with the start sample", out.Status, len(out.Samples))
	}
	if !strings.Contains(r.stderr, "canceled") {
		t.Errorf("stderr %q does not say it was canceled", r.stderr)
	}
}

// TestSolveDefaultDemo is the README's main command: the convection demo
// with every default.
func TestSolveDefaultDemo(t *testing.T) {
	r := plumbRun(t, "solve")
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	lines := strings.Split(strings.TrimSpace(r.stdout), "\n")
	// 20/0.01 + 1 samples, a header, a blank line and four summary lines (exact count).
	if want := 2001 + 1 + 5; len(lines) != want {
		t.Errorf("table has %d lines, want %d", len(lines), want)
	}
	if !strings.Contains(r.stdout, "status  completed at t=20") {
		t.Errorf("summary missing:\n%s", strings.Join(lines[len(lines)-5:], "\n"))
	}
	if !strings.Contains(r.stderr, "2001 samples") {
		t.Errorf("stderr %q lacks the wall-time line", r.stderr)
	}
}

// TestQuietAndWallTime: wall time is on stderr only, and --quiet removes it.
func TestQuietAndWallTime(t *testing.T) {
	loud := plumbRun(t, "solve", "--t1", "1", "--format", "json")
	quiet := plumbRun(t, "solve", "--t1", "1", "--format", "json", "--quiet")
	if loud.stdout != quiet.stdout {
		t.Error("--quiet changed stdout")
	}
	if !strings.Contains(loud.stderr, " in ") || quiet.stderr != "" {
		t.Errorf("stderr loud %q, quiet %q", loud.stderr, quiet.stderr)
	}
	if strings.Contains(loud.stdout, "wall") || strings.Contains(loud.stdout, "µs") {
		t.Error("a wall time leaked into the JSON")
	}
}

// TestJSONArch: with the real GOARCH the result says which it is.
func TestJSONArch(t *testing.T) {
	saved := goarch
	defer func() { goarch = saved }()
	goarch = "arm64"
	out, _ := decodeSolve(t, "--t1", "0.1")
	if out.Arch != "arm64" {
		t.Errorf("arch %q, want the GOARCH in effect", out.Arch)
	}
}

// TestProgressOnTerminal: with stderr a terminal a bar is drawn there, and
// stdout is unchanged.
func TestProgressOnTerminal(t *testing.T) {
	plain := plumbRun(t, "solve", "--t1", "2", "--format", "csv")
	saved := isTerminal
	defer func() { isTerminal = saved }()
	isTerminal = func(io.Writer) bool { return true }
	bar := plumbRun(t, "solve", "--t1", "2", "--format", "csv")
	if bar.stdout != plain.stdout {
		t.Error("the progress bar changed stdout")
	}
	if !strings.Contains(bar.stderr, "100%") || !strings.Contains(bar.stderr, "[====") {
		t.Errorf("no progress bar on stderr: %q", bar.stderr)
	}
	q := plumbRun(t, "solve", "--t1", "2", "--format", "csv", "--quiet")
	if q.stderr != "" {
		t.Errorf("--quiet still drew: %q", q.stderr)
	}
}

func TestProgressBar(t *testing.T) {
	var b strings.Builder
	p := newProgressBar(&b, "x", 0, 10)
	p.at(0.01)
	p.at(0.02) // same percentage: no redraw
	n := b.Len()
	p.at(5)
	if n == 0 || b.Len() == n || !strings.HasSuffix(b.String(), " 50%") {
		t.Errorf("bar text %q", b.String())
	}
	p.at(math.NaN()) // ignored
	p.clear()
	if !strings.HasSuffix(b.String(), "\r") {
		t.Errorf("clear left %q", b.String())
	}
}

// TestSolveCanceledMidRun: canceling part way writes the samples so far,
// which agree bit for bit with the same prefix of a full run.
func TestSolveCanceledMidRun(t *testing.T) {
	full := plumbRun(t, "solve", "--t1", "5", "--format", "csv", "--quiet")
	r := plumbRunCtx(t, &stepCtx{Context: context.Background(), n: 200}, "solve", "--t1", "5", "--format", "csv", "--quiet")
	if r.code != exitFailed || !strings.Contains(r.stderr, "canceled") {
		t.Fatalf("exit %d, stderr %q; want 1 and a message that says canceled", r.code, r.stderr)
	}
	got := strings.Split(strings.TrimSpace(r.stdout), "\n")
	want := strings.Split(strings.TrimSpace(full.stdout), "\n")
	if len(got) < 10 || len(got) >= len(want) {
		t.Fatalf("canceled run wrote %d lines, full run %d", len(got), len(want))
	}
	for i := range got {
		if got[i] != want[i] {
			t.Fatalf("line %d: canceled %q, full %q", i, got[i], want[i])
		}
	}
}
