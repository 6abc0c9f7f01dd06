package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
)

// TestTrustGolden is the README's main command: plumb trust with no flags
// audits the convection demo. Its text is deterministic (counts only, no
// wall time on stdout), so it is compared with a golden file, and a second
// run must give the same bytes.
func TestTrustGolden(t *testing.T) {
	r := plumbRun(t, "trust")
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	golden(t, "trust_lorenz.txt", r.stdout)
	golden(t, "trust_lorenz.stderr", r.stderr)
	again := plumbRun(t, "trust")
	if again.stdout != r.stdout {
		t.Errorf("a second run differs:\n%s", firstDiff(again.stdout, r.stdout))
	}
	for _, want := range []string{
		"system: lorenz (Lorenz convection) sigma=10 rho=28",
		"audit of t = 0 .. 50 at tolerance 1",
		"agrees until", "predicted", "verdict for t = 50:",
		"not a safety certificate", "licensed review",
	} {
		if !strings.Contains(r.stdout, want) {
			t.Errorf("the summary lacks %q", want)
		}
	}
}

// flowTrustJSON is the JSON of the audit of a system, as decoded.
type flowTrustJSON = trustJSON[trustSettingsJSON]

// decodeTrust runs plumb trust --format json and decodes the result.
func decodeTrust(t *testing.T, args ...string) (flowTrustJSON, map[string]json.RawMessage, result) {
	t.Helper()
	r := plumbRun(t, append(append([]string{"trust"}, args...), "--format", "json", "--quiet")...)
	var out flowTrustJSON
	var raw map[string]json.RawMessage
	if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
		t.Fatalf("stdout is not one JSON object: %v\n%.400s", err, r.stdout)
	}
	if err := json.Unmarshal([]byte(r.stdout), &raw); err != nil {
		t.Fatal(err)
	}
	if out.Report != nil && out.TrustedUntil != nil {
		// The top-level field shadows the report's on decoding too.
		out.Report.TrustedUntil = *out.TrustedUntil
	}
	return out, raw, r
}

// TestTrustJSONFields: the JSON holds the header, the settings echoed and
// every field of the report, under stable snake_case names.
func TestTrustJSONFields(t *testing.T) {
	out, raw, r := decodeTrust(t)
	if r.code != exitOK || r.stderr != "" {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	for _, k := range []string{
		"plumb_version", "arch", "command", "system", "settings", "units", "status",
		"t0", "horizon", "tol", "relative", "tol_abs", "spread", "trusted_until", "limited_by",
		"limiting_rung", "predicted_horizon", "verdict", "tol_used", "growth", "float64_horizon",
		"exponent", "tightest", "rungs", "times", "failed", "reversal", "caution",
	} {
		if _, ok := raw[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	if out.PlumbVersion != version || out.Arch != "golden-arch" || out.Command != "trust" || out.Status != "completed" {
		t.Errorf("header %q %q %q, status %q", out.PlumbVersion, out.Arch, out.Command, out.Status)
	}
	if !strings.Contains(out.Caution, "not a safety certificate") {
		t.Errorf("caution %q", out.Caution)
	}
	s := out.Settings
	if s.Horizon != trustHorizon || s.Tol != trustTol || s.Relative || strings.Join(s.Rungs, ",") != "tol,method,precision,restart" ||
		s.RestartAt != 40 || s.RestartPlaces != 3 || s.Every != 0.05 {
		t.Errorf("settings echoed as %+v", s)
	}
	if len(out.Rungs) != 8 || len(out.Times) != trustGrid+1 {
		t.Fatalf("%d rungs on %d times, want the 8 of the default ladder on %d", len(out.Rungs), len(out.Times), trustGrid+1)
	}
	var rung map[string]json.RawMessage
	var rungs []json.RawMessage
	if err := json.Unmarshal(raw["rungs"], &rungs); err != nil || json.Unmarshal(rungs[0], &rung) != nil {
		t.Fatal("rungs is not a list of objects")
	}
	for _, k := range []string{"name", "id", "effect", "method", "agrees_until", "departed", "delta0", "predicted", "growth", "rate", "divergence", "evaluations", "steps"} {
		if _, ok := rung[k]; !ok {
			t.Errorf("a rung lacks %q", k)
		}
	}
}

// TestTrustMatchesSDK: the CLI is a view of plumb.Trust, so its numbers
// are the SDK's bit for bit (exact identity: the same computation).
func TestTrustMatchesSDK(t *testing.T) {
	args := []string{"--model", "rossler", "--set", "c=4", "--horizon", "30", "--tol", "0.01", "--rungs", "tol,restart", "--restart-at", "12.5", "--restart-places", "2"}
	out, _, r := decodeTrust(t, append(args, "--exact=false")...)
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	sys, err := plumb.Model("rossler")
	if err != nil {
		t.Fatal(err)
	}
	if err := sys.Set("c", 4); err != nil {
		t.Fatal(err)
	}
	l := integrate.DefaultLadder(0, 30)
	ladder := integrate.Ladder{Reference: l.Reference}
	for _, g := range l.Rungs {
		switch g.Kind {
		case integrate.KindTolerance:
			ladder.Rungs = append(ladder.Rungs, g)
		case integrate.KindRestart:
			g.RestartAt, g.Restart = 12.5, integrate.Places(2)
			ladder.Rungs = append(ladder.Rungs, g)
		}
	}
	want, err := plumb.TrustProblem(context.Background(), sys.Problem(), 30, &plumb.TrustSettings{Tol: 0.01, Ladder: &ladder})
	if err != nil {
		t.Fatal(err)
	}
	// By default the CLI audits against the multiprecision reference:
	// plumb.TrustSystem, bit for bit.
	exact, _, r := decodeTrust(t, args...)
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	wantExact, err := sys.Trust(context.Background(), 30, &plumb.TrustSettings{Tol: 0.01, Ladder: &ladder})
	if err != nil {
		t.Fatal(err)
	}
	if exact.Report.TrustedUntil != wantExact.TrustedUntil || wantExact.Exact == nil || len(exact.Rungs) != len(wantExact.Rungs) {
		t.Errorf("CLI (exact) trusted until %v, %d rungs; TrustSystem %v, %d rungs, exact %+v",
			exact.Report.TrustedUntil, len(exact.Rungs), wantExact.TrustedUntil, len(wantExact.Rungs), wantExact.Exact)
	}
	for i := range exact.Rungs {
		if i < len(wantExact.Rungs) && !sameBits(exact.Rungs[i].Divergence, wantExact.Rungs[i].Divergence) {
			t.Errorf("rung %d: the CLI's curve against the exact reference differs from TrustSystem's", i)
		}
	}
	if out.Report.TrustedUntil != want.TrustedUntil || out.Verdict != want.Verdict || out.PredictedHorizon != want.PredictedHorizon || len(out.Rungs) != len(want.Rungs) {
		t.Fatalf("CLI trusted until %v (%s, predicted %v, %d rungs); SDK %v (%s, %v, %d)",
			out.Report.TrustedUntil, out.Verdict, out.PredictedHorizon, len(out.Rungs), want.TrustedUntil, want.Verdict, want.PredictedHorizon, len(want.Rungs))
	}
	for i, g := range out.Rungs {
		w := want.Rungs[i]
		if g.Name != w.Name || g.AgreesUntil != w.AgreesUntil || !sameBits(g.Divergence, w.Divergence) {
			t.Errorf("rung %d: CLI %q agrees until %v; SDK %q %v (or the curves differ)", i, g.Name, g.AgreesUntil, w.Name, w.AgreesUntil)
		}
	}
	if last := out.Rungs[len(out.Rungs)-1]; last.Name != "restart at t=12.5, 2 places" || last.RestartAt != 12.5 {
		t.Errorf("restart rung %q at %v, want the one --restart-at and --restart-places ask for", last.Name, last.RestartAt)
	}
}

// TestTrustRelative: with --relative the absolute tolerance is the given
// fraction of the spread (exact identity, AuditSettings.Relative).
func TestTrustRelative(t *testing.T) {
	out, _, r := decodeTrust(t, "--horizon", "10", "--tol", "0.05", "--relative", "--rungs", "tol")
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	if !out.Relative || out.Spread <= 0 || out.TolAbs != 0.05*out.Spread {
		t.Errorf("relative %v: tol_abs %v, spread %v; want tol_abs = 0.05·spread", out.Relative, out.TolAbs, out.Spread)
	}
}

// TestTrustCSV: the CSV holds the same divergence curves as the JSON, with
// empty cells before the restart.
func TestTrustCSV(t *testing.T) {
	args := []string{"trust", "--horizon", "20", "--rungs", "tol,restart", "--quiet"}
	r := plumbRun(t, append(args, "--format", "csv")...)
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	rows, err := csv.NewReader(strings.NewReader(r.stdout)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	out, _, _ := decodeTrust(t, args[1:len(args)-1]...)
	// With the exact reference the tightest float64 run is compared too,
	// and has its column first.
	runs := append([]plumb.RungReport{out.Reference}, out.Rungs...)
	if len(rows) != len(out.Times)+1 || len(rows[0]) != len(runs)+1 || rows[0][0] != "t" {
		t.Fatalf("CSV is %d×%d, want %d×%d", len(rows), len(rows[0]), len(out.Times)+1, len(runs)+1)
	}
	for j, rg := range runs {
		if rows[0][j+1] != rg.ID {
			t.Errorf("column %d is %q, want the id %q", j+1, rows[0][j+1], rg.ID)
		}
		for i := range out.Times {
			cell := rows[i+1][j+1]
			k := i - rg.Start
			switch {
			case k < 0 || k >= len(rg.Divergence):
				if cell != "" {
					t.Errorf("%s at row %d: %q, want empty", rg.Name, i+1, cell)
				}
			case cell != formatFloat(rg.Divergence[k]):
				t.Errorf("%s at row %d: %q, want %s", rg.Name, i+1, cell, formatFloat(rg.Divergence[k]))
			}
		}
	}
}

// TestTrustCSVNames: the CSV's column names are machine names that stay
// the same when the span changes the rungs' human names (the RK4 rung's
// step and the restart time follow the horizon), and the tightest run is
// there under the name the table and the JSON give it.
func TestTrustCSVNames(t *testing.T) {
	want := []string{"t", "tightest", "tol_1e-06", "tol_1e-08", "tol_1e-10", "method_dp853", "method_rk4", "precision_24bit", "precision_40bit", "restart"}
	for _, h := range []string{"10", "20"} {
		r := plumbRun(t, "trust", "--horizon", h, "--format", "csv", "--quiet")
		if r.code != exitOK {
			t.Fatalf("--horizon %s: exit %d, stderr %q", h, r.code, r.stderr)
		}
		head, _, _ := strings.Cut(r.stdout, "\n")
		if head != strings.Join(want, ",") {
			t.Errorf("--horizon %s: CSV header %q, want %q", h, head, strings.Join(want, ","))
		}
	}
	out, raw, _ := decodeTrust(t, "--horizon", "10")
	if _, ok := raw["reference"]; ok {
		t.Error("the JSON still calls the tightest run reference")
	}
	if tt := out.Reference; tt.ID != "tightest" || tt.Effect != "tightest" || len(tt.Divergence) == 0 {
		t.Errorf("tightest run: id %q, effect %q, %d points", tt.ID, tt.Effect, len(tt.Divergence))
	}
	table := plumbRun(t, "trust", "--horizon", "10", "--quiet").stdout
	if !strings.Contains(table, "  tightest  ") {
		t.Errorf("the table does not call the tightest run tightest:\n%s", table)
	}
	c := trustChart(out.Report)
	if len(c.Series) == 0 || !strings.HasPrefix(c.Series[0].Name, "tightest: ") {
		t.Errorf("the plot's first series is %q, want the tightest run", c.Series[0].Name)
	}
}

// TestTrustPlot draws the divergence picture in both formats and checks
// that the chart holds every rung, the tolerance and the prediction.
func TestTrustPlot(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"trust.svg", "trust.png"} {
		path := filepath.Join(dir, name)
		r := plumbRun(t, "trust", "--horizon", "25", "--plot", path, "--quiet")
		if r.code != exitOK {
			t.Fatalf("%s: exit %d, stderr %q", name, r.code, r.stderr)
		}
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		if strings.HasSuffix(name, ".svg") {
			checkSVG(t, b)
		} else {
			checkPNG(t, b)
		}
	}
	out, _, _ := decodeTrust(t, "--horizon", "25")
	c := trustChart(out.Report)
	// With the exact reference: the tightest run, the rungs, the
	// tolerance and the prediction.
	if !c.LogY || len(c.Series) != len(out.Rungs)+3 {
		t.Fatalf("chart has %d series (log y %v), want tightest + %d rungs + tolerance + prediction", len(c.Series), c.LogY, len(out.Rungs))
	}
	tol := c.Series[len(out.Rungs)+1]
	if !strings.HasPrefix(tol.Name, "tolerance") || tol.Y[0] != out.TolAbs || tol.Y[1] != out.TolAbs {
		t.Errorf("tolerance series %q at %v", tol.Name, tol.Y)
	}
	// The prediction is delta0·exp(lambda·t) of the rung that predicts
	// first: at the predicted horizon it reaches the tolerance (exact
	// identity of ln(tol/delta0)/lambda).
	pred := c.Series[len(c.Series)-1]
	if !strings.HasPrefix(pred.Name, "prediction") {
		t.Fatalf("last series %q, want the prediction", pred.Name)
	}
	var d0 float64
	for _, rg := range out.Rungs {
		if rg.Predicted == out.PredictedHorizon {
			d0 = rg.Delta0
		}
	}
	at := d0 * math.Exp(out.Exponent.Value*out.PredictedHorizon)
	if math.Abs(at-out.TolAbs) > 1e-12*out.TolAbs {
		t.Errorf("prediction at the predicted horizon is %v, want the tolerance %v", at, out.TolAbs)
	}
	if pred.Y[0] != d0 {
		t.Errorf("prediction starts at %v, want delta0 %v", pred.Y[0], d0)
	}
}

// TestTrustBadInput: every usage error exits 2 with nothing on stdout and a
// message naming the flag.
func TestTrustBadInput(t *testing.T) {
	tests := []struct {
		name string
		args []string
		flag string
	}{
		{"horizon zero", []string{"--horizon", "0"}, "--horizon"},
		{"horizon negative", []string{"--horizon", "-5"}, "--horizon"},
		{"horizon NaN", []string{"--horizon", "NaN"}, "--horizon"},
		{"tol zero", []string{"--tol", "0"}, "--tol"},
		{"tol negative", []string{"--tol", "-1"}, "--tol"},
		{"tol Inf", []string{"--tol", "Inf"}, "--tol"},
		{"unknown model", []string{"--model", "loop"}, "--model"},
		{"unknown parameter", []string{"--set", "gamma=1"}, "gamma"},
		{"rungs empty", []string{"--rungs", ""}, "--rungs"},
		{"rungs reference only", []string{"--rungs", "reference"}, "--rungs"},
		{"rungs unknown", []string{"--rungs", "tol,stepsize"}, "stepsize"},
		{"rungs twice", []string{"--rungs", "tol,tol"}, "--rungs"},
		{"restart-at outside", []string{"--restart-at", "60"}, "--restart-at"},
		{"restart-at at start", []string{"--restart-at", "0"}, "--restart-at"},
		{"restart-at without restart rung", []string{"--rungs", "tol", "--restart-at", "10"}, "--restart-at"},
		{"restart-places negative", []string{"--restart-places", "-1"}, "--restart-places"},
		{"restart-places huge", []string{"--restart-places", "400"}, "--restart-places"},
		{"max-steps zero", []string{"--max-steps", "0"}, "--max-steps"},
		{"max-steps negative", []string{"--max-steps", "-3"}, "--max-steps"},
		{"max-steps on a map", []string{"--model", "henon", "--max-steps", "10"}, "--max-steps"},
		{"format", []string{"--format", "xml"}, "--format"},
		{"plot extension", []string{"--plot", "trust.pdf"}, "--plot"},
		{"relative value", []string{"--relative=perhaps"}, "--relative"},
		{"positional", []string{"lorenz"}, "lorenz"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := plumbRun(t, append([]string{"trust"}, tt.args...)...)
			if r.code != exitUsage || r.stdout != "" || !strings.Contains(r.stderr, tt.flag) || !strings.HasPrefix(r.stderr, "plumb trust: ") {
				t.Errorf("exit %d, stdout %q, stderr %q; want 2, nothing, a message naming %s", r.code, r.stdout, r.stderr, tt.flag)
			}
		})
	}
}

// TestTrustCanceled: a canceled audit (Ctrl-C) exits 1 and still writes
// what was done: before any run, an empty table; part way, the rungs
// completed, which agree bit for bit with those of a full run.
func TestTrustCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	r := plumbRunCtx(t, ctx, "trust", "--quiet")
	if r.code != exitFailed || !strings.Contains(r.stderr, "canceled") || !strings.Contains(r.stdout, "audit of t = 0 .. 50") || !strings.Contains(r.stdout, "the audit did not finish") {
		t.Errorf("canceled before the start: exit %d, stderr %q, stdout %q", r.code, r.stderr, r.stdout)
	}
	// Part way: without the exact reference (whose precision needs the
	// exponent first, so an early cancel lands in that estimate), the audit
	// runs first. integrate checks the context once per accepted step: 3000
	// steps cover the reference (about 1700 steps to t=20) and a few rungs.
	full, _, _ := decodeTrust(t, "--horizon", "20", "--exact=false")
	r = plumbRunCtx(t, &stepCtx{Context: context.Background(), n: 3000}, "trust", "--horizon", "20", "--format", "json", "--quiet", "--exact=false")
	if r.code != exitFailed || !strings.Contains(r.stderr, "canceled") {
		t.Fatalf("canceled part way: exit %d, stderr %q", r.code, r.stderr)
	}
	var part flowTrustJSON
	if err := json.Unmarshal([]byte(r.stdout), &part); err != nil {
		t.Fatalf("a canceled audit wrote no JSON: %v", err)
	}
	if part.Status != "canceled" || part.Verdict != plumb.Incomplete || len(part.Rungs) == 0 || len(part.Rungs) >= len(full.Rungs) {
		t.Fatalf("status %q, verdict %q, %d of %d rungs", part.Status, part.Verdict, len(part.Rungs), len(full.Rungs))
	}
	// No horizon is read off an unfinished audit: trusted_until is null,
	// not 0, and error says why.
	var keys map[string]json.RawMessage
	if err := json.Unmarshal([]byte(r.stdout), &keys); err != nil {
		t.Fatal(err)
	}
	if got := string(keys["trusted_until"]); got != "null" {
		t.Errorf("canceled audit: trusted_until %s, want null", got)
	}
	if got := string(keys["error"]); !strings.Contains(got, "canceled") {
		t.Errorf("canceled audit: error %s, want the reason", got)
	}
	for i, g := range part.Rungs[:len(part.Rungs)-1] { // the last one was cut short
		if g.Name != full.Rungs[i].Name || !sameBits(g.Divergence, full.Rungs[i].Divergence) {
			t.Errorf("completed rung %d (%s) differs from the full run's", i, g.Name)
		}
	}
	r = plumbRunCtx(t, &stepCtx{Context: context.Background(), n: 3000}, "trust", "--horizon", "20", "--quiet", "--exact=false")
	if r.code != exitFailed || !strings.Contains(r.stdout, full.Rungs[0].Name) || strings.Contains(r.stdout, "trusted until") {
		t.Errorf("canceled table: exit %d, stdout %q; want the completed rungs and no trusted horizon", r.code, r.stdout)
	}
}

// TestTrustProgress: with stderr a terminal a bar is drawn there, for a
// flow and a map alike, and stdout is unchanged; --quiet draws nothing.
func TestTrustProgress(t *testing.T) {
	for _, args := range [][]string{
		{"trust", "--horizon", "10", "--rungs", "tol", "--format", "csv"},
		{"trust", "--model", "henon", "--horizon", "40", "--format", "csv"},
	} {
		plain := plumbRun(t, args...)
		saved := isTerminal
		isTerminal = func(io.Writer) bool { return true }
		bar := plumbRun(t, args...)
		q := plumbRun(t, append(args, "--quiet")...)
		isTerminal = saved
		if bar.stdout != plain.stdout {
			t.Errorf("%v: the progress bar changed stdout", args)
		}
		if !strings.Contains(bar.stderr, "plumb trust [") || !strings.Contains(bar.stderr, "100%") {
			t.Errorf("%v: no progress bar on stderr: %q", args, bar.stderr)
		}
		if q.stderr != "" {
			t.Errorf("%v: --quiet still wrote %q", args, q.stderr)
		}
	}
}

// TestTrustPeriodicModel: on the double pendulum the CLI passes the
// model's angle periods to the audit, so distances are wrapped: its curves
// are those of plumb.Trust with System.Periods, bit for bit (exact
// identity), and not those of the unwrapped distance once the angles have
// drifted apart by more than half a turn.
func TestTrustPeriodicModel(t *testing.T) {
	out, _, r := decodeTrust(t, "--model", "double-pendulum", "--horizon", "12", "--rungs", "precision", "--exact=false")
	if r.code != exitOK || out.Status != "completed" {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	sys, err := plumb.Model("double-pendulum")
	if err != nil {
		t.Fatal(err)
	}
	l := integrate.DefaultLadder(0, 12)
	ladder := integrate.Ladder{Reference: l.Reference}
	for _, g := range l.Rungs {
		if g.Kind == integrate.KindPrecision {
			ladder.Rungs = append(ladder.Rungs, g)
		}
	}
	for _, wrapped := range []bool{true, false} {
		// The curves come from the audit alone; a given exponent skips the
		// estimate, which changes nothing in them.
		s := &plumb.TrustSettings{Tol: 1, Ladder: &ladder, Lambda: 1}
		if wrapped {
			s.Periods = sys.Periods()
		}
		want, err := plumb.TrustProblem(context.Background(), sys.Problem(), 12, s)
		if err != nil {
			t.Fatal(err)
		}
		same := sameBits(out.Rungs[0].Divergence, want.Rungs[0].Divergence)
		if same != wrapped {
			t.Errorf("CLI curve equals the SDK's with periods=%v: %v", wrapped, same)
		}
	}
}

// FuzzRungsFlag: --rungs never panics, for a flow or a map; a refused list
// is a usage error naming --rungs, an accepted one names known groups once
// each, gives a ladder with at least one rung, and reads back from its own
// echo.
func FuzzRungsFlag(f *testing.F) {
	for _, s := range []string{"tol,method,precision,restart", "restart", "tol,,method", " tol , precision ", "", "reference", "ref,tol", "tol,tol", "stepsize", ",", "TOL", "precision,restart", "restart,precision,restart"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		cl := &call{sh: &shared{given: map[string]bool{}}}
		// The map audit's kinds go through the same parser: what it
		// accepts is among them, once each.
		if kinds, names, err := pickRungs(cl, s, mapRungKinds, "orbit"); err == nil {
			if len(kinds) == 0 || len(kinds) != len(names) || len(kinds) > len(mapRungKinds) {
				t.Fatalf("map --rungs %q gave kinds %v, names %v", s, kinds, names)
			}
		} else if ue := (*usageError)(nil); !errors.As(err, &ue) || !strings.Contains(ue.msg, "--rungs") {
			t.Fatalf("map --rungs %q: %v; want a usage error naming --rungs", s, err)
		}
		fl := &trustFlags{horizon: 50, rungs: s, restartPlaces: trustRestartPlaces}
		l, names, err := fl.ladder(cl, 0)
		if err != nil {
			var ue *usageError
			if !errors.As(err, &ue) || !strings.Contains(ue.msg, "--rungs") {
				t.Fatalf("--rungs %q: %v; want a usage error naming --rungs", s, err)
			}
			return
		}
		if len(l.Rungs) == 0 || len(names) == 0 {
			t.Fatalf("--rungs %q accepted with %d rungs", s, len(l.Rungs))
		}
		seen := map[string]bool{}
		for _, n := range names {
			if seen[n] || !strings.Contains(","+strings.Join(rungGroupNames(), ",")+",", ","+n+",") {
				t.Fatalf("--rungs %q gave names %v", s, names)
			}
			seen[n] = true
		}
		fl.rungs = strings.Join(names, ",")
		l2, names2, err := fl.ladder(cl, 0)
		if err != nil || strings.Join(names2, ",") != fl.rungs || len(l2.Rungs) != len(l.Rungs) {
			t.Errorf("echo %q of --rungs %q does not read back: %v", fl.rungs, s, err)
		}
	})
}
