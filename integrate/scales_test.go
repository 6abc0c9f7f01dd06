package integrate

import (
	"context"
	"errors"
	"math"
	"testing"

	"github.com/stretchr/testify/require"
)

// scalesLadder is a small ladder over Lorenz: two tolerance rungs and a
// restart, so that every kind of start (t0, restart) and Delta0 is seen.
func scalesLadder() Ladder {
	return Ladder{
		Reference: Rung{Method: DormandPrince853, RelTol: 1e-12, AbsTol: 1e-12},
		Rungs: []Rung{
			{Name: "tol 1e-6", Kind: KindTolerance, Method: DormandPrince54, RelTol: 1e-6, AbsTol: 1e-6},
			{Name: "tol 1e-9", Kind: KindTolerance, Method: DormandPrince54, RelTol: 1e-9, AbsTol: 1e-9},
			{Name: "restart", Kind: KindRestart, RestartAt: 12, Restart: Places(3)},
		},
	}
}

// TestAuditScaleIdentity: dividing every component's difference by 2 and
// asking for tolerance 1 is the same audit as the plain distance at
// tolerance 2, bit for bit: ||d/2|| = ||d||/2 exactly in binary floating
// point (a power-of-two scaling is exact, and so is sqrt(s/4) = sqrt(s)/2),
// so ||d/2|| > 1 exactly when ||d|| > 2, and the log-linear interpolation
// sees the same ratios (exact identity).
func TestAuditScaleIdentity(t *testing.T) {
	p := catalogProblem(t, "lorenz")
	const t1 = 30
	for _, relative := range []bool{false, true} {
		plainTol, scaledTol := 2.0, 1.0
		if relative {
			// With Relative the spread halves too, so the fraction is the
			// same on both sides (exact identity).
			plainTol, scaledTol = 0.05, 0.05
		}
		plain, err := Audit(context.Background(), p, t1, scalesLadder(), &AuditSettings{Tol: plainTol, Relative: relative, Lambda: lorenzLambda1})
		require.NoError(t, err)
		scaled, err := Audit(context.Background(), p, t1, scalesLadder(), &AuditSettings{Tol: scaledTol, Relative: relative, Lambda: lorenzLambda1, Scales: []float64{2, 2, 2}})
		require.NoError(t, err)
		require.Equal(t, plain.Spread/2, scaled.Spread, "spread halves (exact identity)")
		require.Equal(t, plain.Tol/2, scaled.Tol, "absolute tolerance halves (exact identity)")
		require.Equal(t, plain.Trusted, scaled.Trusted, "trusted horizon (exact identity)")
		require.Equal(t, plain.Limit, scaled.Limit)
		for i := range plain.Rungs {
			pr, sr := plain.Rungs[i], scaled.Rungs[i]
			require.Truef(t, pr.Departed, "rung %s must depart by t=%d for the check to bite", pr.Rung.Name, t1)
			require.Equalf(t, pr.Horizon, sr.Horizon, "rung %s horizon (exact identity)", pr.Rung.Name)
			require.Equalf(t, pr.Departed, sr.Departed, "rung %s", pr.Rung.Name)
			require.Equalf(t, pr.Predicted, sr.Predicted, "rung %s prediction: tol and delta0 both halve (exact identity)", pr.Rung.Name)
			require.Len(t, sr.Divergence, len(pr.Divergence))
			for k := range pr.Divergence {
				if pr.Divergence[k]/2 != sr.Divergence[k] {
					t.Fatalf("rung %s point %d: scaled divergence %v, want half of %v (exact identity)", pr.Rung.Name, k, sr.Divergence[k], pr.Divergence[k])
				}
			}
		}
	}
}

// TestAuditObserveOneComponent: with only x observed (Scales = (1, 0, 0)),
// every rung's divergence is |x_rung - x_ref| of the same runs made by hand
// with Solve at the settings the audit documents, and its agreement horizon
// is the first grid time where that exceeds the tolerance, interpolated
// log-linearly (exact identity: same runs, same arithmetic).
func TestAuditObserveOneComponent(t *testing.T) {
	p := catalogProblem(t, "lorenz")
	const t1, tol = 30, 1.0
	l := scalesLadder()
	l.Rungs = l.Rungs[:2] // runs from t0: the hand computation needs no restart
	res, err := Audit(context.Background(), p, t1, l, &AuditSettings{Tol: tol, Scales: []float64{1, 0, 0}})
	require.NoError(t, err)
	full, err := Audit(context.Background(), p, t1, l, &AuditSettings{Tol: tol})
	require.NoError(t, err)

	solve := func(r Rung) *Solution {
		sol, err := Solve(context.Background(), p, t1, r.Method, &Settings{RelTol: r.RelTol, AbsTol: r.AbsTol, Times: res.Times, DropSteps: true, StiffCheck: -1})
		require.NoError(t, err)
		require.Len(t, sol.Samples, len(res.Times))
		return sol
	}
	ref := solve(l.Reference)
	differs := false
	for i, r := range l.Rungs {
		run := solve(r)
		got := res.Rungs[i]
		lo, hi, departed := res.Times[0], res.Times[len(res.Times)-1], false
		for k, smp := range run.Samples {
			d := math.Abs(smp.Y[0] - ref.Samples[k].Y[0])
			require.Equalf(t, d, got.Divergence[k], "rung %s at t=%g: |x - x_ref| (exact identity)", r.Name, res.Times[k])
			if !departed && d > tol {
				departed = true
				lo, hi = res.Times[k-1], res.Times[k]
			}
		}
		require.Truef(t, departed, "rung %s must depart by t=%d for the check to bite", r.Name, t1)
		// The horizon is located inside the bracket on the runs' dense
		// output (refine.go), so it lies in the grid interval where |dx|
		// first exceeds the tolerance.
		require.GreaterOrEqualf(t, got.Horizon, lo, "rung %s agreement horizon over x alone", r.Name)
		require.LessOrEqualf(t, got.Horizon, hi, "rung %s agreement horizon over x alone", r.Name)
		differs = differs || got.Horizon != full.Rungs[i].Horizon
	}
	// The full-state distance is at least |dx|, so it departs no later;
	// that the horizons differ at all shows the choice is honoured.
	require.True(t, differs, "observing x alone changed no horizon")
	for i := range l.Rungs {
		require.LessOrEqualf(t, full.Rungs[i].Horizon, res.Rungs[i].Horizon, "rung %s: ||d|| >= |dx| (exact identity)", l.Rungs[i].Name)
	}
}

// TestAuditScalesInvalid: bad scales are refused before any run.
func TestAuditScalesInvalid(t *testing.T) {
	p := oscillator()
	l := Ladder{Rungs: []Rung{{Kind: KindTolerance, RelTol: 1e-6}}}
	for _, c := range []struct {
		name   string
		scales []float64
		want   error
	}{
		{"length", []float64{1}, ErrDimension},
		{"negative", []float64{1, -1}, ErrSettings},
		{"NaN", []float64{math.NaN(), 1}, ErrSettings},
		{"Inf", []float64{1, math.Inf(1)}, ErrSettings},
		{"all zero", []float64{0, 0}, ErrSettings},
	} {
		t.Run(c.name, func(t *testing.T) {
			res, err := Audit(context.Background(), p, 10, l, &AuditSettings{Tol: 1, Scales: c.scales})
			require.Nil(t, res)
			require.Truef(t, errors.Is(err, c.want), "err %v, want %v", err, c.want)
			require.Contains(t, err.Error(), "Scales")
		})
	}
}
