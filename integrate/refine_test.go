package integrate

import (
	"context"
	"math"
	"testing"
)

// horizonRelTol is the agreement asked of one run's horizon across audits
// of different spans: the bisection stops at refineRelTol = 1e-9 of the
// time, so 1e-6 leaves three decades for the different brackets the grids
// give (common practice).
const horizonRelTol = 1e-6

// spanLadder is a ladder whose rungs do not depend on the span: tolerance,
// method and precision rungs (a restart's time and RK4's automatic step
// follow the span).
func spanLadder(t0, t1 float64) Ladder {
	l := DefaultLadder(t0, t1)
	var rs []Rung
	for _, r := range l.Rungs {
		if r.Kind != KindRestart && r.Fixed == nil {
			rs = append(rs, r)
		}
	}
	l.Rungs = rs
	return l
}

// TestAuditHorizonSpanIndependent audits Lorenz over 50, 500 and 2000 time
// units: a run from the same start takes the same steps whatever the span
// (the steps do not depend on the output times, and the last step only
// lands on t1), so each rung departs at the same time (exact identity of
// deterministic runs), and the located horizon must agree to
// horizonRelTol although the comparison grid spacing goes from 0.05 to 2.
func TestAuditHorizonSpanIndependent(t *testing.T) {
	p := catalogProblem(t, "lorenz")
	var first *AuditResult
	for _, span := range []float64{50, 500, 2000} {
		res, err := Audit(context.Background(), p, span, spanLadder(0, span), &AuditSettings{Tol: 1})
		if err != nil {
			t.Fatal(err)
		}
		if first == nil {
			first = res
			continue
		}
		for i, r := range res.Rungs {
			want := first.Rungs[i]
			if !r.Departed || !want.Departed {
				t.Fatalf("span %g, %s: departed %v / %v", span, r.Rung.Name, r.Departed, want.Departed)
			}
			if rel := math.Abs(r.Horizon-want.Horizon) / want.Horizon; rel > horizonRelTol {
				t.Errorf("span %g, %s: horizon %.12g, at span 50 %.12g (relative %.2g > %g)", span, r.Rung.Name, r.Horizon, want.Horizon, rel, horizonRelTol)
			}
		}
	}
}

// TestAuditHorizonIsCrossing checks each located horizon against the runs'
// own continuous solutions, computed apart with Solve and Solution.At: the
// distance is at most the tolerance just before the horizon and above it at
// the horizon (the definition of the first crossing), and nowhere above it
// at the runs' step times before (no earlier crossing was missed at the
// resolution of the steps).
func TestAuditHorizonIsCrossing(t *testing.T) {
	p := catalogProblem(t, "lorenz")
	const span, tol = 200, 1.0
	l := spanLadder(0, span)
	res, err := Audit(context.Background(), p, span, l, &AuditSettings{Tol: tol})
	if err != nil {
		t.Fatal(err)
	}
	ref, err := Solve(context.Background(), p, span, l.Reference.Method, &Settings{RelTol: ReferenceRelTol, AbsTol: ReferenceAbsTol, StiffCheck: -1})
	if err != nil {
		t.Fatal(err)
	}
	for i, r := range res.Rungs {
		rr := l.Rungs[i].resolve(&resolvedRung{Rung: l.Reference, m: l.Reference.Method}, 0)
		q := p
		if rr.Kind == KindPrecision {
			q.Y0 = rr.Rounding.Vec(nil, p.Y0)
		}
		sol, err := Solve(context.Background(), q, span, rr.m, &Settings{RelTol: rr.RelTol, AbsTol: rr.AbsTol, StiffCheck: -1})
		if err != nil {
			t.Fatal(err)
		}
		dist := func(t float64) float64 {
			a, b := sol.At(t, nil), ref.At(t, nil)
			var s float64
			for k := range a {
				s += (a[k] - b[k]) * (a[k] - b[k])
			}
			return math.Sqrt(s)
		}
		h := r.Horizon
		// The bisection's bracket: [h·(1 - 2·refineRelTol), h].
		if before, at := dist(h*(1-2*refineRelTol)), dist(h); before > tol || at <= tol {
			t.Errorf("%s: horizon %.10g: distance %.17g just before, %.17g at it; want <= %g then > %g", r.Rung.Name, h, before, at, tol, tol)
		}
		for _, ts := range sol.T {
			if ts >= h*(1-2*refineRelTol) {
				break
			}
			if d := dist(ts); d > tol {
				t.Errorf("%s: distance %.4g > tol at step time %.10g, before the horizon %.10g", r.Rung.Name, d, ts, h)
				break
			}
		}
	}
}
