package plumb

import (
	"context"
	"errors"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
)

// TestTrustYourRun audits the caller's run, Dormand–Prince 8(5,3) at
// rtol 1e-9 (atol Solve's 1e-9), on Lorenz to t = 50 against the Taylor
// reference. Its horizon must lie between those of the default ladder's
// Dormand–Prince 5(4) runs at 1e-8 and 1e-10: a local error per unit step
// of about 1e-9 starts the divergence between those of the two bracketing
// runs, and the flow grows every start alike (e^(λ_1 t); Boffetta et al.
// 2002, Sect. 2.1), a method of higher order at a tolerance in between
// making errors in between (common practice: the pairs' errors follow
// their tolerances). The report's trusted horizon and verdict are that
// run's, and the tighter rung (rtol 1e-11) names what tightening buys.
func TestTrustYourRun(t *testing.T) {
	sys, _ := Model("lorenz")
	ctx := context.Background()
	def, err := sys.Trust(ctx, 50, &TrustSettings{Tol: 1, Lambda: lorenzLambda})
	if err != nil {
		t.Fatal(err)
	}
	if def.YourRun != nil {
		t.Errorf("default ladder: your_run %+v, want none", def.YourRun)
	}
	// The default ladder's Dormand–Prince 5(4) rungs at 1e-8 and 1e-10.
	var lo, hi float64
	for _, r := range def.Rungs {
		if r.Effect == "tolerance" && r.RelTol == 1e-8 {
			lo = r.AgreesUntil
		}
		if r.Effect == "tolerance" && r.RelTol == 1e-10 {
			hi = r.AgreesUntil
		}
	}
	rep, err := sys.Trust(ctx, 50, &TrustSettings{Tol: 1, Lambda: lorenzLambda,
		Run: &integrate.Rung{Method: integrate.DormandPrince853, RelTol: 1e-9}})
	if err != nil {
		t.Fatal(err)
	}
	y := rep.YourRun
	if y == nil || rep.Rungs[y.Rung].Effect != "run" || !y.Departed {
		t.Fatalf("your_run %+v", y)
	}
	t.Logf("your run %.6g, default dp54 1e-8 %.6g, 1e-10 %.6g; tighter %s %.6g (gain %.4g)", y.AgreesUntil, lo, hi, y.Tighter, y.TighterUntil, y.Gain)
	if !(lo > 0 && y.AgreesUntil > lo && y.AgreesUntil < hi) {
		t.Errorf("your run agrees until %.6g, want between the 1e-8 (%.6g) and 1e-10 (%.6g) rungs", y.AgreesUntil, lo, hi)
	}
	if rep.TrustedUntil != y.AgreesUntil || rep.Verdict != NotTrusted || rep.LimitedBy != "run" {
		t.Errorf("trusted until %g limited by %q, verdict %s; want the run's %g, run, not trusted", rep.TrustedUntil, rep.LimitedBy, rep.Verdict, y.AgreesUntil)
	}
	if y.Tighter == "" || y.Gain != y.TighterUntil-y.AgreesUntil {
		t.Errorf("tighter %q until %g, gain %g", y.Tighter, y.TighterUntil, y.Gain)
	}
}

// TestTrustYourRunBadInput: the run is validated in the SDK, before any work.
func TestTrustYourRunBadInput(t *testing.T) {
	sys, _ := Model("lorenz")
	l := integrate.DefaultLadder(0, 10)
	for _, c := range []struct {
		name string
		s    *TrustSettings
		want error
	}{
		{"run and ladder", &TrustSettings{Tol: 1, Run: &integrate.Rung{}, Ladder: &l}, integrate.ErrSettings},
		{"rtol too tight", &TrustSettings{Tol: 1, Run: &integrate.Rung{RelTol: 1e-16}}, integrate.ErrLadder},
		{"fixed without step", &TrustSettings{Tol: 1, Run: &integrate.Rung{Fixed: integrate.RK4}}, integrate.ErrLadder},
	} {
		for name, f := range map[string]func() (*Report, error){
			"Trust":       func() (*Report, error) { return TrustProblem(context.Background(), sys.Problem(), 10, c.s) },
			"TrustSystem": func() (*Report, error) { return sys.Trust(context.Background(), 10, c.s) },
		} {
			if rep, err := f(); rep != nil || !errors.Is(err, c.want) {
				t.Errorf("%s, %s: (%v, %v), want nil and %v", name, c.name, rep, err, c.want)
			}
		}
	}
}
