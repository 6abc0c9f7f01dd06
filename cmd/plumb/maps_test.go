package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"github.com/plumbdyn/plumb/maps"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/plumbdyn/plumb"
)

// TestSolveMapOrbit: plumb solve on a map writes iterates 0..N, the same
// numbers as iterating the SDK's map (exact identity: the same computation),
// and the first Hénon iterates from (0, 0) are (1, 0), (-0.4, 0.3) (exact:
// x' = 1 + y - 1.4x², y' = 0.3x by hand).
func TestSolveMapOrbit(t *testing.T) {
	r := plumbRun(t, "solve", "--model", "henon", "--steps", "50", "--format", "json", "--quiet")
	if r.code != exitOK || r.stderr != "" {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	var out mapSolveJSON
	if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
		t.Fatal(err)
	}
	if len(out.Orbit) != 51 || out.End != 50 || out.Status != "completed" || out.Settings.Steps != 50 {
		t.Fatalf("%d iterates, end %d, status %s", len(out.Orbit), out.End, out.Status)
	}
	if x := out.Orbit[1].X; x[0] != 1 || x[1] != 0 {
		t.Errorf("iterate 1 = %v, want [1 0]", x)
	}
	if x := out.Orbit[2].X; math.Abs(x[0]+0.4) > 1e-15 || math.Abs(x[1]-0.3) > 1e-15 {
		t.Errorf("iterate 2 = %v, want [-0.4 0.3]", x)
	}
	sys, _ := plumb.Model("henon")
	m, _ := sys.Map()
	x := sys.Start()
	for n := 1; n <= 50; n++ {
		m.Next(x, x)
		if got := out.Orbit[n].X; got[0] != x[0] || got[1] != x[1] {
			t.Fatalf("iterate %d: CLI %v, SDK %v", n, got, x)
		}
	}
	if out.Final[0] != x[0] || out.Final[1] != x[1] {
		t.Errorf("final %v, want %v", out.Final, x)
	}
}

// TestSolveMapCSV: the CSV has the header n,<states> and one row per
// iterate; the default is 1000 iterates.
func TestSolveMapCSV(t *testing.T) {
	r := plumbRun(t, "solve", "--model", "standard", "--format", "csv", "--quiet")
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	recs, err := csv.NewReader(strings.NewReader(r.stdout)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(recs[0], ",") != "n,theta,p" || len(recs) != 1+mapSteps+1 {
		t.Fatalf("header %v, %d rows; want n,theta,p and %d", recs[0], len(recs)-1, mapSteps+1)
	}
	for _, rec := range recs[1:] {
		for _, cell := range rec[1:] {
			v, err := parseFinite(cell)
			if err != nil || v < 0 || v >= 2*math.Pi {
				t.Fatalf("row %v: %q outside [0, 2π) (the standard map is on the torus)", rec, cell)
			}
		}
	}
}

// TestSolveMapPlot draws the orbit as a scatter picture.
func TestSolveMapPlot(t *testing.T) {
	dir := t.TempDir()
	for _, model := range []string{"henon", "logistic"} {
		name := filepath.Join(dir, model+".svg")
		r := plumbRun(t, "solve", "--model", model, "--steps", "200", "--plot", name, "--quiet")
		if r.code != exitOK {
			t.Fatalf("%s: exit %d, stderr %q", model, r.code, r.stderr)
		}
		b, err := os.ReadFile(name)
		if err != nil || !strings.Contains(string(b), "<svg") {
			t.Errorf("%s: no SVG written (%v)", model, err)
		}
	}
}

// TestSpectrumMap checks plumb spectrum on the built-in maps and the
// fish-stock file against published and exact values.
func TestSpectrumMap(t *testing.T) {
	// 100 000 averaged iterates give standard errors near 1e-3 (Hénon)
	// and 1e-4 (logistic) in these runs; 5e-3 is four of the larger.
	const tolPublished = 5e-3
	// The sum rule holds iterate by iterate; what is left is rounding.
	const tolSum = 1e-9
	r := plumbRun(t, "spectrum", "--model", "henon", "--format", "json", "--quiet")
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	var out mapSpectrumJSON
	if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
		t.Fatal(err)
	}
	e := out.Exponents
	// Sprott, Common Chaotic Systems (Hénon 1976): 0.41922, -1.62319.
	if len(e) != 2 || math.Abs(e[0]-0.41922) > tolPublished || math.Abs(e[1]+1.62319) > tolPublished {
		t.Errorf("Hénon exponents %v, want 0.41922, -1.62319 (Sprott)", e)
	}
	// Exact: det J = -b, so lambda_1 + lambda_2 = ln 0.3.
	if s := e[0] + e[1]; math.Abs(s-math.Log(0.3)) > tolSum {
		t.Errorf("sum %.12f, want ln 0.3 = %.12f (exact)", s, math.Log(0.3))
	}
	// Sprott: D_KY = 1.25827; derived from the exponents, so the same margin
	// over |lambda_2| ≈ 1.6.
	if out.KaplanYorke == nil || math.Abs(*out.KaplanYorke-1.25827) > 2*tolPublished {
		t.Errorf("Kaplan–Yorke %v, want 1.25827 (Sprott)", out.KaplanYorke)
	}
	if !out.BeyondNoise || out.Units.Exponents == "" || out.Settings.Iterations != 100000 {
		t.Errorf("beyond noise %v, units %q, iterations %d", out.BeyondNoise, out.Units.Exponents, out.Settings.Iterations)
	}

	for _, c := range []struct {
		args []string
		want float64
		src  string
	}{
		{[]string{"--model", "logistic"}, math.Ln2, "exact: r = 4 is conjugate to the tent map (May 1976)"},
		{[]string{"--model", "logistic", "--set", "r=3.2"}, 0.5 * math.Log(math.Abs(4+2*3.2-3.2*3.2)), "exact: the stable 2-cycle's multiplier"},
		{[]string{"--file", "../../examples/systems/fish-stock.json"}, math.NaN(), "runs; chaotic at growth 3.7 (May 1976)"},
	} {
		r := plumbRun(t, append(append([]string{"spectrum"}, c.args...), "--format", "json", "--quiet", "--iterations", "50000")...)
		if r.code != exitOK {
			t.Fatalf("%v: exit %d, stderr %q", c.args, r.code, r.stderr)
		}
		var out mapSpectrumJSON
		if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
			t.Fatal(err)
		}
		got := out.Exponents[0]
		if math.IsNaN(c.want) {
			if !(got > 0) {
				t.Errorf("%v: exponent %v, want > 0 (%s)", c.args, got, c.src)
			}
			continue
		}
		if math.Abs(got-c.want) > tolPublished {
			t.Errorf("%v: exponent %.6f, want %.6f (%s)", c.args, got, c.want, c.src)
		}
	}
}

// TestTrustMapCLI: plumb trust on a map counts its horizon in iterates and
// is the SDK's TrustMap (exact identity: the same computation).
func TestTrustMapCLI(t *testing.T) {
	r := plumbRun(t, "trust", "--model", "logistic", "--horizon", "60", "--format", "json", "--quiet")
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	var out struct {
		Settings trustSettingsJSON `json:"settings"`
		Units    trustUnitsJSON    `json:"units"`
		plumb.Report
	}
	if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
		t.Fatal(err)
	}
	sys, _ := plumb.Model("logistic")
	rep, err := sys.Trust(context.Background(), 60, &plumb.TrustSettings{Tol: mapTrustTol, MapRungs: maps.DefaultRungs(60)})
	if err != nil {
		t.Fatal(err)
	}
	if out.Steps != 60 || out.TrustedUntil != rep.TrustedUntil || out.Verdict != rep.Verdict || len(out.Rungs) != len(rep.Rungs) {
		t.Fatalf("CLI steps %d until %v verdict %s; SDK until %v verdict %s", out.Steps, out.TrustedUntil, out.Verdict, rep.TrustedUntil, rep.Verdict)
	}
	for i := range rep.Rungs {
		if out.Rungs[i].DepartsAt != rep.Rungs[i].DepartsAt {
			t.Errorf("rung %s departs at %d, SDK %d", rep.Rungs[i].Name, out.Rungs[i].DepartsAt, rep.Rungs[i].DepartsAt)
		}
	}
	if out.Caution == "" || out.Verdict != plumb.NotTrusted {
		t.Errorf("caution %q, verdict %s", out.Caution, out.Verdict)
	}
	// One wrapper for flows and maps: a map's units.time says iterates,
	// its settings echo the horizon in iterates and the double-double
	// reference as exact.
	if !strings.HasPrefix(out.Units.Time, "iterates") || out.TimeUnit != "iterate" || out.Settings.Horizon != 60 || !out.Settings.Exact || out.Settings.Every != 0 {
		t.Errorf("units.time %q, time_unit %q, settings %+v", out.Units.Time, out.TimeUnit, out.Settings)
	}

	// The table says iterates, the CSV has one row per iterate.
	r = plumbRun(t, "trust", "--model", "henon", "--horizon", "60", "--quiet")
	if r.code != exitOK || !strings.Contains(r.stdout, "audit of iterates 0 .. 60") || !strings.Contains(r.stdout, "caution:") {
		t.Errorf("table: exit %d\n%s", r.code, r.stdout)
	}
	r = plumbRun(t, "trust", "--model", "henon", "--horizon", "60", "--format", "csv", "--quiet")
	if lines := strings.Count(r.stdout, "\n"); r.code != exitOK || lines != 62 || !strings.HasPrefix(r.stdout, "n,precision_float64,precision_40bit,precision_24bit,restart\n") {
		t.Errorf("csv: exit %d, %d lines\n%.200s", r.code, lines, r.stdout)
	}
	name := filepath.Join(t.TempDir(), "d.svg")
	if r = plumbRun(t, "trust", "--model", "ikeda", "--horizon", "80", "--plot", name, "--quiet"); r.code != exitOK {
		t.Errorf("plot: exit %d, stderr %q", r.code, r.stderr)
	}
}

// TestMapUsageErrors: flags of the other kind, fractional horizons and
// impossible rungs are usage errors that name the flag.
func TestMapUsageErrors(t *testing.T) {
	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"solve", "--model", "henon", "--t1", "5"}, "--t1"},
		{[]string{"solve", "--model", "henon", "--steps", "0"}, "--steps"},
		{[]string{"solve", "--model", "lorenz", "--steps", "10"}, "--steps"},
		{[]string{"spectrum", "--model", "henon", "--method", "rk4"}, "--method"},
		{[]string{"spectrum", "--model", "henon", "--iterations", "3"}, "--iterations"},
		{[]string{"spectrum", "--model", "henon", "--discard", "0"}, "--discard"},
		{[]string{"spectrum", "--model", "henon", "--exponents", "3"}, "--exponents"},
		{[]string{"spectrum", "--model", "lorenz", "--discard", "10"}, "--discard"},
		{[]string{"trust", "--model", "henon", "--horizon", "2.5"}, "--horizon"},
		{[]string{"trust", "--model", "henon", "--rungs", "method"}, "--rungs"},
		{[]string{"trust", "--model", "henon", "--restart-at", "100"}, "--restart-at"},
		{[]string{"trust", "--model", "henon", "--tol", "0"}, "--tol"},
	} {
		r := plumbRun(t, c.args...)
		if r.code != exitUsage || !strings.Contains(r.stderr, c.want) || r.stdout != "" {
			t.Errorf("%v: exit %d, stderr %q; want 2 naming %s", c.args, r.code, r.stderr, c.want)
		}
	}
}

// TestSolveMapFailure: an orbit that escapes to infinity is written up to
// its last finite iterate, and the exit status is 1.
func TestSolveMapFailure(t *testing.T) {
	r := plumbRun(t, "solve", "--model", "logistic", "--set", "r=5", "--steps", "100", "--format", "csv", "--quiet")
	if r.code != exitFailed || !strings.Contains(r.stderr, "not finite") || !strings.HasPrefix(r.stdout, "n,x\n0,0.3\n") {
		t.Errorf("exit %d, stderr %q\n%.100s", r.code, r.stderr, r.stdout)
	}
}

// TestSolveMapCanceled: Ctrl-C during an orbit still writes the iterates
// done, and the exit status is 1.
func TestSolveMapCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r := plumbRunCtx(t, ctx, "solve", "--model", "henon", "--steps", "5000", "--format", "csv", "--quiet")
	rows := strings.Count(r.stdout, "\n") - 1
	if r.code != exitFailed || !strings.Contains(r.stderr, "canceled") || rows < 1 || rows > 5000 {
		t.Errorf("exit %d, %d rows, stderr %q", r.code, rows, r.stderr)
	}
}

// TestMapGolden pins the map outputs of solve, spectrum and trust.
func TestMapGolden(t *testing.T) {
	for _, c := range []struct {
		file string
		args []string
	}{
		{"solve_henon.csv", []string{"solve", "--model", "henon", "--steps", "20", "--format", "csv"}},
		{"spectrum_henon.txt", []string{"spectrum", "--model", "henon", "--iterations", "20000"}},
		{"trust_logistic.txt", []string{"trust", "--model", "logistic", "--horizon", "60"}},
	} {
		r := plumbRun(t, c.args...)
		if r.code != exitOK {
			t.Fatalf("%v: exit %d, stderr %q", c.args, r.code, r.stderr)
		}
		golden(t, c.file, r.stdout)
	}
}

// TestTrustMapCanceledNull: a map audit canceled before it starts answers
// nothing: trusted_until is null (not iterate 0) and error says why.
func TestTrustMapCanceledNull(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r := plumbRunCtx(t, ctx, "trust", "--model", "logistic", "--format", "json", "--quiet")
	if r.code != exitFailed {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	var keys map[string]json.RawMessage
	if err := json.Unmarshal([]byte(r.stdout), &keys); err != nil {
		t.Fatalf("a canceled map audit wrote no JSON: %v", err)
	}
	if got := string(keys["trusted_until"]); got != "null" {
		t.Errorf("trusted_until %s, want null", got)
	}
	if got := string(keys["error"]); !strings.Contains(got, "cancel") {
		t.Errorf("error %s, want the reason", got)
	}
}
