package plumb

import (
	"context"
	"errors"
	"github.com/plumbdyn/plumb/maps"
	"math"
	"os"
	"reflect"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
)

// Published largest exponents, per iterate.
const (
	henonLambda1 = 0.41922 // Sprott, Common Chaotic Systems (Hénon 1976, a=1.4, b=0.3)
	henonLambda2 = -1.62319
)

// TestMapExponentsBuiltins runs lyap.MapExponents on the built-in maps and
// on the fish-stock system file.
func TestMapExponentsBuiltins(t *testing.T) {
	// 100 000 averaged iterates leave a batch-means standard error near
	// 1e-3 on Hénon's exponents and 1e-4 on the logistic map's (seen in
	// the runs); 5e-3 is four to five of those and below Sprott's last
	// digit times 10.
	const tolPublished = 5e-3
	// Sum rules hold iterate by iterate (sum of ln R_ii = ln|det J|), so
	// the residual is rounding accumulated over the average: 1e-9.
	const tolSum = 1e-9
	cases := []struct {
		name    string
		set     map[string]float64
		want    []float64 // NaN: not checked
		wantSum float64
		source  string
	}{
		{"henon", nil, []float64{henonLambda1, henonLambda2}, math.Log(0.3), "Sprott; sum ln b exact (det J = -b)"},
		// One dimension: the sum is the exponent itself, checked above.
		{"logistic", nil, []float64{math.Ln2}, math.NaN(), "exact: conjugacy to the tent map (May 1976)"},
		{"logistic", map[string]float64{"r": 3.2}, []float64{0.5 * math.Log(math.Abs(4+2*3.2-3.2*3.2))}, math.NaN(), "exact: multiplier of the stable 2-cycle"},
		{"standard", nil, []float64{math.NaN(), math.NaN()}, 0, "exact: area preserving (det J = 1)"},
		{"ikeda", nil, []float64{math.NaN(), math.NaN()}, 2 * math.Log(0.9), "exact: det J = u²"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s, err := Model(c.name)
			if err != nil {
				t.Fatal(err)
			}
			if s.Kind() != KindMap {
				t.Fatalf("kind %s, want map", s.Kind())
			}
			for k, v := range c.set {
				if err := s.Set(k, v); err != nil {
					t.Fatal(err)
				}
			}
			m, err := s.Map()
			if err != nil {
				t.Fatal(err)
			}
			sp, err := lyap.MapExponents(context.Background(), m, s.Start(), m.Dim(), nil)
			if err != nil {
				t.Fatal(err)
			}
			sum := 0.0
			for i, v := range sp.Exponents {
				sum += v
				if w := c.want[i]; !math.IsNaN(w) && math.Abs(v-w) > tolPublished {
					t.Errorf("lambda_%d = %.6f, want %.6f (%s), diff %.2g", i+1, v, w, c.source, v-w)
				}
			}
			if !math.IsNaN(c.wantSum) && math.Abs(sum-c.wantSum) > tolSum {
				t.Errorf("sum %.12f, want %.12f (%s), diff %.2g", sum, c.wantSum, c.source, sum-c.wantSum)
			}
		})
	}
}

// TestBuiltinMapKind: a built-in map is a map everywhere: no vector field,
// a wrapped standard map, evaluators at the same numbers.
func TestBuiltinMapKind(t *testing.T) {
	s, err := Model("standard")
	if err != nil {
		t.Fatal(err)
	}
	if p := s.Problem(); p.F != nil {
		t.Error("a map's Problem has a vector field")
	}
	m, err := s.Map()
	if err != nil {
		t.Fatal(err)
	}
	x := []float64{6, 3}
	for range 1000 {
		m.Next(x, x)
		for i, v := range x {
			if !(v >= 0 && v < 2*math.Pi) {
				t.Fatalf("component %d = %v, outside [0, 2π) (the standard map lives on the torus)", i, v)
			}
		}
	}
	if allocs := testing.AllocsPerRun(100, func() { m.Next(x, x) }); allocs != 0 {
		t.Errorf("Next allocates %v times", allocs)
	}
	if _, err := Model("lorenz"); err != nil {
		t.Fatal(err)
	}
}

// TestTrustMapHorizons checks TrustMap's measured departures against the
// predictability horizon ln(tol/delta0)/lambda_1 (Boffetta et al. 2002,
// Sect. 2.1): float64 (delta0 = eps ≈ 1.1e-16) leaves the double-double
// orbit after about ln(tol/eps)/lambda_1 iterates, about 50 for a doubling
// map (Hammel, Yorke & Grebogi 1988, intro), and 24-bit storage about
// ln(2^29)/lambda_1 iterates earlier.
func TestTrustMapHorizons(t *testing.T) {
	// One orbit's departure scatters with the finite-time exponent; a
	// factor 1.5 on the horizon and 25% on the difference are the
	// brief's margins, wide enough for that scatter.
	const factor, diffTol = 1.5, 0.25
	const eps = 1.1e-16 // float64 unit roundoff, 2^-53
	const tol = 0.1
	for _, c := range []struct {
		name   string
		lambda float64
		source string
	}{
		{"henon", henonLambda1, "Sprott (Hénon 1976)"},
		{"logistic", math.Ln2, "exact (May 1976)"},
	} {
		t.Run(c.name, func(t *testing.T) {
			s, _ := Model(c.name)
			rep, err := s.Trust(context.Background(), 200, &TrustSettings{Tol: tol})
			if err != nil {
				t.Fatal(err)
			}
			rung := map[string]RungReport{}
			for _, r := range rep.Rungs {
				rung[r.Name] = r
			}
			f64, b24 := rung["float64"], rung["24 bits"]
			if !f64.Departed || !b24.Departed {
				t.Fatalf("float64 departed %v, 24 bits %v; both should within 200 iterates", f64.Departed, b24.Departed)
			}
			want := math.Log(tol/eps) / c.lambda
			if got := float64(f64.DepartsAt); got > factor*want || got < want/factor {
				t.Errorf("float64 departs at iterate %v, predicted %.1f from lambda_1 = %.5g (%s)", got, want, c.lambda, c.source)
			}
			wantDiff := 29 * math.Ln2 / c.lambda
			if got := float64(f64.DepartsAt - b24.DepartsAt); math.Abs(got-wantDiff) > diffTol*wantDiff {
				t.Errorf("24 bits departs %v iterates before float64, predicted %.1f (%s)", got, wantDiff, c.source)
			}
			if rep.Verdict != NotTrusted || rep.Growth != "exponential" {
				t.Errorf("verdict %s, growth %s; want not_trusted, exponential", rep.Verdict, rep.Growth)
			}
			if rep.Exponent == nil || math.Abs(rep.Exponent.Value-c.lambda) > 5e-3 {
				t.Errorf("exponent %+v, want %.5g (%s)", rep.Exponent, c.lambda, c.source)
			}
			if rep.TrustedUntil != b24.AgreesUntil || rep.LimitingRung != "24 bits" {
				t.Errorf("trusted until %v limited by %q; want the 24-bit rung's %v", rep.TrustedUntil, rep.LimitingRung, b24.AgreesUntil)
			}
		})
	}
}

// TestTrustMapStableCycle: the logistic map at r = 3.2 has a stable
// 2-cycle (multiplier 4+2r-r² = -0.16, exact), which forgets every
// rounding: the whole horizon is trusted.
func TestTrustMapStableCycle(t *testing.T) {
	s, _ := Model("logistic")
	if err := s.Set("r", 3.2); err != nil {
		t.Fatal(err)
	}
	// 0.01: above the restart rung's rounding to 3 places (5e-4), which
	// the cycle then forgets as well.
	rep, err := s.Trust(context.Background(), 500, &TrustSettings{Tol: 0.01})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Verdict != TrustedWithMargin || rep.TrustedUntil != 500 {
		t.Errorf("verdict %s until %v, want trusted_with_margin until 500", rep.Verdict, rep.TrustedUntil)
	}
	if rep.Growth != "bounded" || rep.PredictedHorizon != 0 {
		t.Errorf("growth %s, predicted %v; want bounded and no prediction", rep.Growth, rep.PredictedHorizon)
	}
	if rep.Exponent == nil || rep.Exponent.Value >= 0 {
		t.Errorf("exponent %+v, want negative", rep.Exponent)
	}
}

// TestTrustMapFile audits the fish-stock system file and checks the
// report is the same bits on a second run (determinism).
func TestTrustMapFile(t *testing.T) {
	load := func() *System {
		f, err := os.Open("examples/systems/fish-stock.json")
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		s, err := LoadSystem(f)
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	a, err := load().Trust(context.Background(), 100, &TrustSettings{Tol: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	b, _ := load().Trust(context.Background(), 100, &TrustSettings{Tol: 0.05})
	if !reflect.DeepEqual(a, b) {
		t.Error("two audits of the same file differ")
	}
	if a.Exponent == nil || !(a.Exponent.Value > 0) || a.Verdict != NotTrusted {
		t.Errorf("growth 3.7 is chaotic (May 1976): exponent %+v, verdict %s", a.Exponent, a.Verdict)
	}
}

func TestTrustMapErrors(t *testing.T) {
	ctx := context.Background()
	henon, _ := Model("henon")
	lorenz, _ := Model("lorenz")
	ok := &TrustSettings{Tol: 0.1}
	cases := []struct {
		name  string
		sys   *System
		steps float64
		s     *TrustSettings
		want  error
	}{
		{"map rungs on a flow", lorenz, 10, &TrustSettings{Tol: 1, MapRungs: maps.DefaultRungs(10)}, integrate.ErrSettings},
		{"nil system", nil, 10, ok, ErrNoSystem},
		{"no steps", henon, 0, ok, maps.ErrSteps},
		{"part of an iterate", henon, 10.5, ok, ErrHorizon},
		{"too many iterates", henon, maps.MaxSteps + 1, ok, maps.ErrSteps},
		{"ladder on a map", henon, 10, &TrustSettings{Tol: 1, Ladder: &integrate.Ladder{}}, integrate.ErrSettings},
		{"run on a map", henon, 10, &TrustSettings{Tol: 1, Run: &integrate.Rung{}}, integrate.ErrSettings},
		{"grid on a map", henon, 10, &TrustSettings{Tol: 1, Every: 1}, integrate.ErrSettings},
		{"step budget on a map", henon, 10, &TrustSettings{Tol: 1, MaxSteps: 5}, integrate.ErrSettings},
		{"own state names", henon, 10, &TrustSettings{Tol: 1, States: []string{"a", "b"}}, integrate.ErrSettings},
		{"own periods", henon, 10, &TrustSettings{Tol: 1, Periods: []float64{0, 0}}, integrate.ErrSettings},
		{"nil settings", henon, 10, nil, ErrTolerance},
		{"zero tol", henon, 10, &TrustSettings{}, ErrTolerance},
		{"negative lambda", henon, 10, &TrustSettings{Tol: 1, Lambda: -1}, integrate.ErrSettings},
		{"empty rungs", henon, 10, &TrustSettings{Tol: 1, MapRungs: []maps.Rung{}}, integrate.ErrLadder},
		{"late restart", henon, 10, &TrustSettings{Tol: 1, MapRungs: []maps.Rung{{Name: "r", Kind: integrate.KindRestart, RestartAt: 10, Restart: integrate.Places(3)}}}, integrate.ErrLadder},
		{"method rung", henon, 10, &TrustSettings{Tol: 1, MapRungs: []maps.Rung{{Name: "m", Kind: integrate.KindMethod}}}, integrate.ErrLadder},
		{"bad bits", henon, 10, &TrustSettings{Tol: 1, MapRungs: []maps.Rung{{Name: "b", Kind: integrate.KindPrecision, Storage: integrate.Bits(99)}}}, integrate.ErrSettings},
	}
	for _, c := range cases {
		rep, err := c.sys.Trust(ctx, c.steps, c.s)
		if !errors.Is(err, c.want) || rep != nil {
			t.Errorf("%s: report %v, error %v; want nil and %v", c.name, rep != nil, err, c.want)
		}
	}
	// An orbit that leaves the finite numbers: the logistic map at r = 5
	// escapes to -Inf; the reference fails and the report is incomplete.
	s, _ := Model("logistic")
	_ = s.Set("r", 5)
	rep, err := s.Trust(ctx, 100, ok)
	if err == nil || rep == nil || rep.Verdict != Incomplete {
		t.Errorf("escaping orbit: report %v, error %v; want an incomplete report and an error", rep, err)
	}
	// Canceled before the work: partial report with the context's error.
	cctx, cancel := context.WithCancel(ctx)
	cancel()
	rep, err = henon.Trust(cctx, 100, ok)
	if !errors.Is(err, context.Canceled) || rep == nil || rep.Verdict != Incomplete {
		t.Errorf("canceled: report %v, error %v", rep, err)
	}
}

// TestTrustMapRelative: a relative tolerance is a fraction of the
// reference orbit's spread (definition), and a fixed point has none.
func TestTrustMapRelative(t *testing.T) {
	s, _ := Model("henon")
	rep, err := s.Trust(context.Background(), 100, &TrustSettings{Tol: 0.1, Relative: true})
	if err != nil {
		t.Fatal(err)
	}
	if !(rep.Spread > 0) || rep.TolAbs != 0.1*rep.Spread || !rep.Relative {
		t.Errorf("spread %v, tol_abs %v; want tol_abs = 0.1·spread", rep.Spread, rep.TolAbs)
	}
	// The logistic map's fixed point 1 - 1/r (exact) never moves.
	l, _ := Model("logistic")
	_ = l.Set("r", 2)
	_ = l.SetStart([]float64{0.5})
	rep, err = l.Trust(context.Background(), 50, &TrustSettings{Tol: 0.1, Relative: true})
	if !errors.Is(err, integrate.ErrSettings) || rep == nil || rep.Verdict != Incomplete {
		t.Errorf("fixed point: error %v, report %v", err, rep)
	}
}
