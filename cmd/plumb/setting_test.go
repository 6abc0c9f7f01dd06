package main

import (
	"strings"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
)

// TestToleranceRuleIsTheSDKs: plumb solve accepts a pair of tolerances
// exactly when integrate.Settings.Validate does (one rule, the SDK's; the
// CLI used to refuse --rtol 1e-16 --atol 1e-10, which the SDK accepts),
// names the flag when it refuses, and echoes the tolerances the run used
// (0 stands for the SDK's default).
func TestToleranceRuleIsTheSDKs(t *testing.T) {
	for _, c := range []struct {
		name       string
		rtol, atol float64
		// wantR, wantA are the echoed tolerances of an accepted pair.
		wantR, wantA float64
	}{
		{"below 1e-15 beside an atol", 1e-16, 1e-10, 1e-16, 1e-10},
		{"zero rtol is the SDK default", 0, 1e-10, integrate.DefaultRelTol, 1e-10},
		{"zero atol is the SDK default", 1e-8, 0, 1e-8, integrate.DefaultAbsTol},
		{"negative rtol", -1e-6, 1e-10, 0, 0},
		{"negative atol", 1e-6, -1, 0, 0},
	} {
		t.Run(c.name, func(t *testing.T) {
			sdk := (&integrate.Settings{RelTol: c.rtol, AbsTol: c.atol}).Validate()
			out, r := decodeSolveOrNot(t, "--t1", "0.1", "--dt", "0.1", "--rtol", formatFloat(c.rtol), "--atol", formatFloat(c.atol))
			if sdk != nil {
				if r.code != exitUsage {
					t.Fatalf("SDK refuses (%v) but plumb solve exits %d", sdk, r.code)
				}
				if !strings.Contains(r.stderr, "--rtol") && !strings.Contains(r.stderr, "--atol") {
					t.Errorf("stderr %q names neither --rtol nor --atol", r.stderr)
				}
				return
			}
			if r.code != exitOK {
				t.Fatalf("SDK accepts but plumb solve exits %d: %s", r.code, r.stderr)
			}
			if out.Settings.RelTol != c.wantR || out.Settings.AbsTol != c.wantA {
				t.Errorf("echoed rtol %g, atol %g; want %g, %g", out.Settings.RelTol, out.Settings.AbsTol, c.wantR, c.wantA)
			}
		})
	}
}

// decodeSolveOrNot is decodeSolve for runs that may be refused: stdout is
// decoded only on exit 0.
func decodeSolveOrNot(t *testing.T, args ...string) (solveJSON, result) {
	t.Helper()
	r := plumbRun(t, append(append([]string{"solve"}, args...), "--format", "json", "--quiet")...)
	if r.code != exitOK {
		return solveJSON{}, r
	}
	out, _ := decodeSolve(t, args...)
	return out, r
}

// TestSettingUsage: an SDK settings error is reported under the flag that
// set the field, with the SDK's reason; lyap's tolerance errors name
// lyap's Settings and map to the same flags.
func TestSettingUsage(t *testing.T) {
	for _, c := range []struct {
		name string
		err  error
		want string
	}{
		{"integrate rtol", (&integrate.Settings{RelTol: -1}).Validate(), "--rtol -1: must be finite and >= 0"},
		{"integrate max steps", (&integrate.Settings{MaxSteps: -3}).Validate(), "--max-steps -3: must be >= 0"},
		{"lyap atol", (&lyap.Settings{AbsTol: -2}).Validate(), "--atol -2: must be finite and >= 0"},
		{"lyap transient", (&lyap.Settings{Transient: -1}).Validate(), "--transient -1: must be finite and >= 0"},
		{"field without a flag", (&integrate.Settings{MinStep: -1}).Validate(), "the settings were refused: integrate: Settings.MinStep = -1"},
	} {
		flags := solveSettingFlags
		if strings.HasPrefix(c.name, "lyap") {
			flags = spectrumSettingFlags
		}
		err := settingUsage(c.err, flags)
		ue, ok := err.(*usageError)
		if !ok || !strings.HasPrefix(ue.msg, c.want) {
			t.Errorf("%s: %v, want a usage error starting %q", c.name, err, c.want)
		}
	}
}
