package main

import (
	"strings"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
)

// TestTrustYourRun: --method and --rtol make the audit one of the user's
// own run: JSON names its rung (effect "run") in your_run and echoes the
// run in settings; the trusted horizon is that rung's (by definition); the
// table's headline and verdict speak of it. The horizon itself is checked
// against the default ladder in the root package (TestTrustYourRun there).
func TestTrustYourRun(t *testing.T) {
	out, _, r := decodeTrust(t, "--method", "dp853", "--rtol", "1e-9", "--rungs", "tol")
	if r.code != exitOK {
		t.Fatalf("exit %d: %s", r.code, r.stderr)
	}
	y := out.Report.YourRun
	if y == nil || y.Rung < 0 || y.Rung >= len(out.Report.Rungs) {
		t.Fatalf("your_run %+v", y)
	}
	own := out.Report.Rungs[y.Rung]
	if own.Effect != "run" || own.RelTol != 1e-9 || !strings.Contains(own.Method, "8(5,3)") || own.AgreesUntil != y.AgreesUntil {
		t.Errorf("your run's rung: %+v", own)
	}
	if out.Report.TrustedUntil != y.AgreesUntil {
		t.Errorf("trusted_until %g, your run agrees until %g", out.Report.TrustedUntil, y.AgreesUntil)
	}
	if s := out.Settings; s.Method != "dp853" || s.RelTol != 1e-9 || s.AbsTol != 1e-9 {
		t.Errorf("settings echo %+v", s)
	}
	tab := plumbRun(t, "trust", "--method", "dp853", "--rtol", "1e-9", "--rungs", "tol", "--quiet")
	for _, want := range []string{"your run, Dormand–Prince 8(5,3) rtol 1e-09  run", "agrees with the reference until t = ", "tightening to Dormand–Prince 8(5,3) rtol 1e-11 buys", "verdict for your run to t = 50"} {
		if !strings.Contains(tab.stdout, want) {
			t.Errorf("table lacks %q:\n%s", want, tab.stdout)
		}
	}
	// Without the flags there is no your_run (the default audit as before).
	def, raw, _ := decodeTrust(t, "--rungs", "tol")
	if _, ok := raw["your_run"]; ok || def.Settings.Method != "" {
		t.Errorf("default audit: your_run present or method echoed (%q)", def.Settings.Method)
	}
}

// TestTrustYourRunBadInput: a bad run is a usage error naming its flag.
func TestTrustYourRunBadInput(t *testing.T) {
	for _, c := range []struct {
		name string
		args []string
		flag string
	}{
		{"unknown method", []string{"--method", "leapfrog"}, "--method"},
		{"rtol negative", []string{"--rtol", "-1e-6"}, "--rtol"},
		{"rtol too tight", []string{"--rtol", "1e-16"}, "--rtol"},
		{"atol negative", []string{"--atol", "-1"}, "--atol"},
		{"step on adaptive", []string{"--step", "0.01"}, "--step"},
		{"fixed without step", []string{"--method", "rk4"}, "--step"},
		{"splitting on lorenz", []string{"--method", "verlet", "--step", "0.01"}, "--method"},
		{"method on a map", []string{"--model", "henon", "--method", "dp853"}, "--method"},
	} {
		r := plumbRun(t, append([]string{"trust"}, c.args...)...)
		if r.code != exitUsage || r.stdout != "" || !strings.Contains(r.stderr, c.flag) {
			t.Errorf("%s: exit %d, stdout %q, stderr %q; want 2 naming %s", c.name, r.code, r.stdout, r.stderr, c.flag)
		}
	}
}

// TestTrustYourRunZeroTol: --rtol 0 and --atol 0 stand for the SDK's
// defaults, as in every command (integrate.Settings.WithDefaults: an exact
// identity, the same constants), and the echo says what was used.
func TestTrustYourRunZeroTol(t *testing.T) {
	out, _, r := decodeTrust(t, "--rtol", "0", "--atol", "0", "--rungs", "tol", "--exact=false", "--horizon", "10")
	if r.code != exitOK {
		t.Fatalf("exit %d: %s", r.code, r.stderr)
	}
	y := out.Report.YourRun
	if y == nil {
		t.Fatal("no your_run")
	}
	own := out.Report.Rungs[y.Rung]
	if own.RelTol != integrate.DefaultRelTol || own.AbsTol != integrate.DefaultAbsTol {
		t.Errorf("your run's rung rtol %g atol %g, want the SDK's %g, %g", own.RelTol, own.AbsTol, integrate.DefaultRelTol, integrate.DefaultAbsTol)
	}
	if s := out.Settings; s.RelTol != integrate.DefaultRelTol || s.AbsTol != integrate.DefaultAbsTol {
		t.Errorf("settings echo rtol %g atol %g, want the defaults used", s.RelTol, s.AbsTol)
	}
}
