package plumb

import (
	"context"
	"math"
	"testing"
	"time"

	"github.com/plumbdyn/plumb/integrate"
)

// longHorizonRelTol is how close a rung's horizon in a long audit must come
// to the same rung's in an audit to t = 100: runs from the same start take
// the same steps whatever the span (exact identity of deterministic runs),
// so only the location of the crossing (to 1e-9 of the time) and the
// references' own errors (below a thousandth of the tolerance where the
// runs depart) differ; 1% is the bar asked of the audit.
const longHorizonRelTol = 0.01

// spanFreeLadder is the default ladder without its restart rung (whose time
// follows the span) and with RK4 at a fixed step (its automatic step
// follows the reference's mean step, which the span changes slightly).
func spanFreeLadder() *integrate.Ladder {
	l := integrate.DefaultLadder(0, 1)
	var rs []integrate.Rung
	for _, r := range l.Rungs {
		if r.Kind == integrate.KindRestart {
			continue
		}
		if r.Fixed != nil {
			r.Step = 0.0016
		}
		rs = append(rs, r)
	}
	l.Rungs = rs
	return &l
}

// checkSameHorizons compares every rung of long with the same rung of
// short, the tightest float64 run included.
func checkSameHorizons(t *testing.T, what string, short, long *Report) {
	t.Helper()
	rows := func(r *Report) []RungReport { return append([]RungReport{r.Reference}, r.Rungs...) }
	a, b := rows(short), rows(long)
	if len(a) != len(b) {
		t.Fatalf("%s: %d rungs, t = 100 audit %d", what, len(b), len(a))
	}
	for i := range a {
		if !a[i].Departed || !b[i].Departed {
			t.Errorf("%s, %s: departed %v (t = 100: %v)", what, b[i].Name, b[i].Departed, a[i].Departed)
			continue
		}
		rel := math.Abs(b[i].AgreesUntil-a[i].AgreesUntil) / a[i].AgreesUntil
		t.Logf("%s, %-34s %.10g (t = 100: %.10g, relative %.2g)", what, b[i].Name, b[i].AgreesUntil, a[i].AgreesUntil, rel)
		if rel > longHorizonRelTol {
			t.Errorf("%s, %s: horizon %.6g, t = 100 audit %.6g (relative %.2g > %g)", what, b[i].Name, b[i].AgreesUntil, a[i].AgreesUntil, rel, longHorizonRelTol)
		}
	}
}

// TestTrustSystemLongHorizon audits Lorenz to t = 10^4 against the Taylor
// reference, which once failed: the full-span reference asks for about 3900
// digits, whose 10^-D underflowed float64 and overflowed the series order.
// The audit must complete, with every rung's horizon that of the audit to
// t = 100 (see longHorizonRelTol). About a minute on one core, so -short
// runs TestTrustSystemPastDoubleDigits instead.
func TestTrustSystemLongHorizon(t *testing.T) {
	if testing.Short() {
		t.Skip("about a minute; TestTrustSystemPastDoubleDigits covers the same path")
	}
	sys, _ := Model("lorenz")
	set := &TrustSettings{Tol: 1, Lambda: lorenzLambda, Ladder: spanFreeLadder(), NoReversal: true}
	short, err := sys.Trust(context.Background(), 100, set)
	if err != nil {
		t.Fatal(err)
	}
	start := time.Now()
	long, err := sys.Trust(context.Background(), 1e4, set)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("audit to t = 1e4: %v, reference %+v", time.Since(start), *long.Exact)
	if long.Verdict == Incomplete || long.Exact == nil {
		t.Fatalf("verdict %s, exact %v", long.Verdict, long.Exact)
	}
	checkSameHorizons(t, "t = 1e4", short, long)
}

// TestTrustSystemPastDoubleDigits is the fast variant of
// TestTrustSystemLongHorizon: to t = 1000 a full-span reference needs about
// 400 digits (past float64's 10^-323), and a step budget of 200000 makes
// the Dormand–Prince 5(4) run at 1e-10 (about 270 steps per time unit)
// fail near t = 740, long after it departed: such a run keeps its horizon,
// so the shortened reference is used (before, it fell back to the
// full-span one and overflowed its series order).
func TestTrustSystemPastDoubleDigits(t *testing.T) {
	sys, _ := Model("lorenz")
	set := &TrustSettings{Tol: 1, Lambda: lorenzLambda, Ladder: spanFreeLadder(), NoReversal: true, MaxSteps: 200000}
	short, err := sys.Trust(context.Background(), 100, set)
	if err != nil {
		t.Fatal(err)
	}
	long, err := sys.Trust(context.Background(), 1000, set)
	if err != nil {
		t.Fatal(err)
	}
	if long.Exact == nil || long.Exact.Continued == "" || long.Failed == 0 {
		t.Fatalf("exact %+v, failed %d: want a shortened reference and a rung stopped by the step budget", long.Exact, long.Failed)
	}
	if d, err := referenceDigits(lorenzLambda, 1000, 1e-3, 1); err != nil || d <= 323 {
		t.Fatalf("full-span digits %d (%v): the test no longer crosses float64's range", d, err)
	}
	checkSameHorizons(t, "t = 1000", short, long)
}

// TestTrustSystemHorizonSpans audits Lorenz against the Taylor reference
// over 50, 500 and 2000 time units (grid spacing 0.05 to 2): each rung's
// horizon must agree to a relative 1e-6 (exact identity of deterministic
// runs, see TestAuditHorizonSpanIndependent; here the reference side is the
// Taylor states joined by cubic Hermite interpolation, whose error on
// Lorenz is about 1e-6 in the distance at the steps of the coarsest rung,
// DormandPrince853 at 1e-8, a relative 1e-8 in its horizon). -short leaves
// out the span 2000 (15 s).
func TestTrustSystemHorizonSpans(t *testing.T) {
	const spanRelTol = 1e-6
	sys, _ := Model("lorenz")
	spans := []float64{50, 500, 2000}
	if testing.Short() {
		spans = spans[:2]
	}
	set := &TrustSettings{Tol: 1, Lambda: lorenzLambda, Ladder: spanFreeLadder(), NoReversal: true}
	var first *Report
	for _, span := range spans {
		rep, err := sys.Trust(context.Background(), span, set)
		if err != nil {
			t.Fatal(err)
		}
		if first == nil {
			first = rep
			continue
		}
		rows := append([]RungReport{rep.Reference}, rep.Rungs...)
		want := append([]RungReport{first.Reference}, first.Rungs...)
		for i, r := range rows {
			rel := math.Abs(r.AgreesUntil-want[i].AgreesUntil) / want[i].AgreesUntil
			if !r.Departed || rel > spanRelTol {
				t.Errorf("span %g, %s: horizon %.12g (departed %v), span 50: %.12g, relative %.2g > %g",
					span, r.Name, r.AgreesUntil, r.Departed, want[i].AgreesUntil, rel, spanRelTol)
			}
		}
	}
}
