package plumb

import (
	"context"
	"github.com/plumbdyn/plumb/integrate"
	"math"
	"testing"
)

// TestTrustSystemShortSpan: the long audit of TrustSystem (reference
// accurate until every run from the start has departed, then continued in
// double-double) must give the agreement horizons of the audit against a
// reference accurate over the whole span (but for a restart after the
// accurate part, which starts from another state). Lorenz at its published
// parameters, Tol 1, to t = 100: the full-span reference needs 47 digits
// (big.Float); the short one is accurate to refTolFraction·Tol until its
// AccurateUntil, where every departure but the restart's has happened.
// Check (exact identity of the construction): both references lie within
// refTolFraction·Tol of the solution wherever a run departs, so each
// agreement horizon is the same grid time, unless a divergence passes the
// tolerance within that fraction at a grid time (then one grid step apart).
func TestTrustSystemShortSpan(t *testing.T) {
	if testing.Short() {
		t.Skip("two audits to t = 100, one with a 47-digit reference (about 2 s)")
	}
	sys, err := Model("lorenz")
	if err != nil {
		t.Fatal(err)
	}
	const horizon = 100
	// The exponent is given (Lorenz 1963 at its published parameters,
	// lambda_1 = 0.9056, Sprott 2003, Table A.1), so both audits use the
	// same precision rule.
	s := &TrustSettings{Tol: 1, Lambda: 0.9056}
	short, err := trustSystem(context.Background(), sys, horizon, s, true)
	if err != nil {
		t.Fatal(err)
	}
	full, err := trustSystem(context.Background(), sys, horizon, s, false)
	if err != nil {
		t.Fatal(err)
	}
	se, fe := short.Exact, full.Exact
	if se == nil || fe == nil {
		t.Fatal("an audit has no exact reference")
	}
	t.Logf("short: %s %d digits until %.4g, then %s %d digits, %d steps; full: %s %d digits, %d steps",
		se.Arithmetic, se.Digits, se.AccurateUntil, se.Continued, se.ContinuedDigits, se.Steps, fe.Arithmetic, fe.Digits, fe.Steps)
	if !(se.AccurateUntil < horizon) || se.Continued == "" || se.Digits >= fe.Digits {
		t.Fatalf("the short span was not taken: accurate until %g, continued %q, %d digits (full %d)", se.AccurateUntil, se.Continued, se.Digits, fe.Digits)
	}
	if fe.AccurateUntil != horizon || fe.Continued != "" {
		t.Errorf("full reference: accurate until %g, continued %q; want the whole span", fe.AccurateUntil, fe.Continued)
	}
	step := short.Times[1] - short.Times[0]
	runs := func(r *Report) []RungReport { return append([]RungReport{r.Reference}, r.Rungs...) }
	sr, fr := runs(short), runs(full)
	if len(sr) != len(fr) {
		t.Fatalf("%d runs against %d", len(sr), len(fr))
	}
	local := localSpan(s.Lambda, refTolFraction*s.Tol, 1)
	for i := range sr {
		a, b := sr[i], fr[i]
		t.Logf("%-34s short %.4g, full %.4g", a.Name, a.AgreesUntil, b.AgreesUntil)
		if a.Effect == "restart" && a.RestartAt >= se.AccurateUntil {
			// Restarted from the continuation's state, another point of
			// the attractor than the solution's: judged by the local
			// span it must depart within, not against the full audit.
			if !a.Departed || a.AgreesUntil-a.RestartAt >= local {
				t.Errorf("%s: departed %v at %g, want within %g of the restart", a.Name, a.Departed, a.AgreesUntil, local)
			}
			continue
		}
		if a.Name != b.Name || a.Departed != b.Departed || math.Abs(a.AgreesUntil-b.AgreesUntil) > step*(1+1e-9) {
			t.Errorf("%s: departed %v at %g with the short reference, %v at %g with the full one", a.Name, a.Departed, a.AgreesUntil, b.Departed, b.AgreesUntil)
		}
	}
	if short.Verdict != full.Verdict || math.Abs(short.TrustedUntil-full.TrustedUntil) > step*(1+1e-9) {
		t.Errorf("verdict %s until %g with the short reference, %s until %g with the full one", short.Verdict, short.TrustedUntil, full.Verdict, full.TrustedUntil)
	}
}

// TestSpanCovers: the condition under which the short reference stands
// (definition, see TrustSystem), on made-up reports.
func TestSpanCovers(t *testing.T) {
	const until, local = 50, 20
	run := func(effect string, restart, agrees float64, departed bool) RungReport {
		return RungReport{Name: effect, Effect: integrate.RungKind(effect), RestartAt: restart, AgreesUntil: agrees, Departed: departed}
	}
	ref := run("tightest", 0, 35, true)
	for _, c := range []struct {
		name string
		runs []RungReport
		want bool
	}{
		{"all depart before until", []RungReport{run("tolerance", 0, 18, true), run("restart", 40, 46, true)}, true},
		{"a rung departs after until", []RungReport{run("tolerance", 0, 55, true)}, false},
		{"a rung never departs", []RungReport{run("tolerance", 0, 100, false)}, false},
		{"restart after until, within the local span", []RungReport{run("restart", 80, 90, true)}, true},
		{"restart after until, beyond the local span", []RungReport{run("restart", 80, 101, true)}, false},
		{"restart across until", []RungReport{run("restart", 45, 56, true)}, false},
	} {
		rep := &Report{Reference: ref, Rungs: c.runs, Exact: &ExactReference{}}
		if got := spanCovers(rep, until, local); got != c.want {
			t.Errorf("%s: spanCovers = %v, want %v", c.name, got, c.want)
		}
	}
	if _, ok := lastDeparture(&Report{Rungs: []RungReport{run("tolerance", 0, 100, false)}}); ok {
		t.Error("lastDeparture: a rung that never departed gives a time")
	}
	if last, ok := lastDeparture(&Report{Rungs: []RungReport{run("tolerance", 0, 18, true), run("restart", 80, 90, true)}}); !ok || last != 18 {
		t.Errorf("lastDeparture = %g, %v; want 18 (restarts judged apart), true", last, ok)
	}
}
