package plumb

import (
	"context"
	"encoding/json"
	"errors"
	"math"
	"math/big"
	"os"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
)

// lorenzRef is the stored high-precision data of integrate/testdata/lorenz.json,
// made by integrate/testdata/make_ref.py (an independent Taylor integrator
// in mpmath 1.2.1 at 80 digits, checked at 60).
type lorenzRef struct {
	Lorenz struct {
		BetaDouble struct {
			Values map[string][]string `json:"values"`
		} `json:"beta_double"`
	} `json:"lorenz"`
}

func loadLorenzRef(t testing.TB) map[string][]*big.Float {
	t.Helper()
	// The file is lorenz.json (lorenz_ref.json in older trees; same data).
	b, err := os.ReadFile("integrate/testdata/lorenz.json")
	if err != nil {
		b, err = os.ReadFile("integrate/testdata/lorenz_ref.json")
	}
	if err != nil {
		t.Fatal(err)
	}
	var r lorenzRef
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	out := map[string][]*big.Float{}
	for k, vs := range r.Lorenz.BetaDouble.Values {
		for _, v := range vs {
			f, _, err := big.ParseFloat(v, 10, 300, big.ToNearestEven)
			if err != nil {
				t.Fatal(err)
			}
			out[k] = append(out[k], f)
		}
	}
	return out
}

// maxDiff is the largest absolute component difference of a and b.
func maxDiff(a, b []*big.Float) float64 {
	m := 0.0
	for i := range a {
		f, _ := new(big.Float).SetPrec(300).Sub(a[i], b[i]).Float64()
		m = math.Max(m, math.Abs(f))
	}
	return m
}

// lorenzLambda is the largest Lyapunov exponent of Lorenz at the classical
// parameters, 0.9056 (J. C. Sprott, Chaos and Time-Series Analysis, Oxford
// 2003, Table A.1; REFERENCES.md Sect. 1a).
const lorenzLambda = 0.9056

// TestReferenceLorenzStored compares Taylor references of Lorenz (beta =
// float64(8/3), start (1,1,1)) with the stored 80-digit values at t = 10 and
// 20 (integrate/testdata/lorenz.json, mpmath; its 60-digit check run
// agrees to 9e-56 at t = 20).
//
// What is achievable: a run at D digits makes local errors about 10^-D·|y|
// per step (|y| <= 50 on the attractor), grown by at most e^(λ_1 t) =
// 7.5e7 at t = 20 and summed over ~600 steps: 10^-D · 50 · 7.5e7 · 600 ≈
// 2e12 · 10^-D, so 2e-19 for double-double (D = 31) and 2e-28 at D = 40.
// The tolerances below are these bounds; the measured errors are far
// smaller (6e-28 and 7e-39), since errors grow less than the worst case
// along this stretch of orbit.
func TestReferenceLorenzStored(t *testing.T) {
	ref := loadLorenzRef(t)
	sys, err := Model("lorenz")
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name   string
		digits int
		arith  string
		tol20  float64 // the bound above, at t = 20
	}{
		{"double-double", 31, "double-double", 1e-18},
		{"big 40 digits", 40, "big.Float", 1e-27},
	}
	for _, c := range cases {
		r, err := referenceRun(context.Background(), sys, 20, []float64{10, 20}, &referenceSettings{Digits: c.digits})
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		if r.Arithmetic != c.arith || r.Digits != c.digits {
			t.Errorf("%s: ran %s at %d digits, want %s at %d", c.name, r.Arithmetic, r.Digits, c.arith, c.digits)
		}
		e10, e20 := maxDiff(r.States[0], ref["10"]), maxDiff(r.States[1], ref["20"])
		t.Logf("%s: order %d, %d steps, h in [%.4g, %.4g]; error %.3g at t=10, %.3g at t=20; check %.3g",
			c.name, r.Order, r.Stats.Steps, r.Stats.MinStep, r.Stats.MaxStep, e10, e20, r.Check.AtEnd)
		if e20 > c.tol20 {
			t.Errorf("%s: error at t=20 is %.3g, want below %.3g", c.name, e20, c.tol20)
		}
		// The self-check run is checkDrop digits less precise, so its
		// difference must exceed the true error of the main run.
		if !(r.Check.AtEnd > e20) {
			t.Errorf("%s: self-check difference %.3g does not exceed the true error %.3g", c.name, r.Check.AtEnd, e20)
		}
	}
	// The automatic choice: λ_1 = 0.9056, 20 digits wanted at t = 20 give
	// ceil(0.9056·20/ln 10 + 20) + guardDigits = 32 digits (big.Float).
	r, err := referenceRun(context.Background(), sys, 20, nil, &referenceSettings{Lambda: lorenzLambda})
	if err != nil {
		t.Fatal(err)
	}
	const tol = 1e-20 // the default Tol, 10^-20·max(1, |y0|), |y0| = 1
	if r.Digits != 32 || r.Arithmetic != "big.Float" {
		t.Errorf("automatic precision: %d digits in %s, want 32 in big.Float", r.Digits, r.Arithmetic)
	}
	if e := maxDiff(r.States[0], ref["20"]); e > tol {
		t.Errorf("automatic precision: error %.3g at t=20, want below %.3g", e, tol)
	}
}

// TestReferenceSelfConsistency runs Lorenz to t = 100 at the automatic
// precision (λ_1 = 0.9056 and 20 digits wanted: ceil(39.3 + 20) + 4 = 64
// digits) and checks (a) the stored 80-digit value at t = 100 (whose
// 60-digit check agrees to 2e-24, so the 80-digit value is good to about
// 1e-43) to the requested 1e-20, and (b) the self-check: the 59-digit run
// must agree within 10^checkDrop·Tol (its error is at most 10^checkDrop
// times the main run's if the precision rule holds).
func TestReferenceSelfConsistency(t *testing.T) {
	if testing.Short() {
		t.Skip("t = 100 at 64 digits takes about six seconds")
	}
	ref := loadLorenzRef(t)
	sys, _ := Model("lorenz")
	r, err := referenceRun(context.Background(), sys, 100, nil, &referenceSettings{Lambda: lorenzLambda})
	if err != nil {
		t.Fatal(err)
	}
	const tol = 1e-20 // the default Tol with |y0| = 1
	e := maxDiff(r.States[0], ref["100"])
	t.Logf("t=100: %d digits (%s, order %d, %d steps): error %.3g; check at %d digits differs by %.3g",
		r.Digits, r.Arithmetic, r.Order, r.Stats.Steps, e, r.Check.Digits, r.Check.AtEnd)
	if r.Digits != 64 {
		t.Errorf("digits = %d, want 64", r.Digits)
	}
	if e > tol {
		t.Errorf("error at t=100 is %.3g, want below %.3g", e, tol)
	}
	if lim := tol * math.Pow(10, checkDrop); r.Check.AtEnd > lim {
		t.Errorf("self-check differs by %.3g, want below %.3g", r.Check.AtEnd, lim)
	}
}

// TestReferenceConvergence measures how the error at t = 10 falls with the
// working precision: with order and step from the tolerance (Jorba & Zou
// 2005, Sect. 3.2) the error should scale as 10^-D, a slope of -1 in
// log10(error) against D. Digits 14..26 run in double-double, so rounding
// is not the limit. The slope tolerance 0.3 allows the step rule's
// discreteness (common practice for fitted orders).
func TestReferenceConvergence(t *testing.T) {
	ref := loadLorenzRef(t)
	sys, _ := Model("lorenz")
	var xs, ys []float64
	prevSteps := 0
	for _, d := range []int{14, 18, 22, 26} {
		r, err := referenceRun(context.Background(), sys, 10, nil, &referenceSettings{Digits: d, NoCheck: true})
		if err != nil {
			t.Fatal(err)
		}
		e := maxDiff(r.States[0], ref["10"])
		t.Logf("digits %d: order %d (want %d), %d steps, h in [%.4g, %.4g], error %.3g",
			d, r.Order, integrate.TaylorOrder(math.Pow(10, -float64(d))), r.Stats.Steps, r.Stats.MinStep, r.Stats.MaxStep, e)
		// Order p = ceil(D·ln10/2) + 1 (Jorba & Zou 2005, Sect. 3.2).
		if want := int(math.Ceil(float64(d)*math.Ln10/2)) + 1; r.Order != want {
			t.Errorf("digits %d: order %d, want %d", d, r.Order, want)
		}
		// With the order growing with D, the step h ≈ ρ/e² barely
		// changes: the steps grow by less than a fifth per 4 digits
		// (Jorba & Zou 2005, Sect. 3.2: the step tends to ρ/e²).
		if prevSteps > 0 && float64(r.Stats.Steps) > 1.2*float64(prevSteps) {
			t.Errorf("digits %d: %d steps, after %d at 4 digits fewer", d, r.Stats.Steps, prevSteps)
		}
		prevSteps = r.Stats.Steps
		xs = append(xs, float64(d))
		ys = append(ys, math.Log10(e))
	}
	var mx, my float64
	for i := range xs {
		mx += xs[i]
		my += ys[i]
	}
	mx /= float64(len(xs))
	my /= float64(len(xs))
	var sxy, sxx float64
	for i := range xs {
		sxy += (xs[i] - mx) * (ys[i] - my)
		sxx += (xs[i] - mx) * (xs[i] - mx)
	}
	const slopeTol = 0.3
	if slope := sxy / sxx; math.Abs(slope+1) > slopeTol {
		t.Errorf("log10(error) against digits has slope %.3g, want -1 ± %g", slope, slopeTol)
	}
}

// TestReferenceArenstorf integrates the Arenstorf orbit with its decimal
// data (mu = 0.012277471, start (0.994, 0, 0, -2.00158510637908252240537862224),
// period T = 17.0652165601579625588917206249; Hairer, Nørsett & Wanner,
// Solving ODEs I, 2nd ed. 1993, Ch. II intro) held at full precision, at
// 40 digits, and checks that it returns to its start after one period to
// 1e-20: the stored 80-digit run (integrate/testdata/arenstorf.json,
// "decimal_inputs") returns to 4.6e-27, the error of the 30-digit period.
func TestReferenceArenstorf(t *testing.T) {
	sys, err := Model("arenstorf")
	if err != nil {
		t.Fatal(err)
	}
	sr, err := sys.series()
	if err != nil {
		t.Fatal(err)
	}
	const prec = 300
	dec := func(s string) *big.Float {
		f, _, err := big.ParseFloat(s, 10, prec, big.ToNearestEven)
		if err != nil {
			t.Fatal(err)
		}
		return f
	}
	sr.bigParams = []*big.Float{dec("0.012277471")}
	start := []*big.Float{dec("0.994"), dec("0"), dec("0"), dec("-2.00158510637908252240537862224")}
	T := dec("17.0652165601579625588917206249")
	tf, _ := T.Float64()
	r, err := integrate.SolveTaylor(context.Background(), sr, 0, sys.Start(), []float64{tf},
		&integrate.TaylorSettings{Digits: 40, Start: start, OutTimes: []*big.Float{T}})
	if err != nil {
		t.Fatal(err)
	}
	miss := maxDiff(r.States[0], start)
	t.Logf("Arenstorf at 40 digits: order %d, %d steps, h in [%.3g, %.3g], return miss %.3g", r.Order, r.Stats.Steps, r.Stats.MinStep, r.Stats.MaxStep, miss)
	const tol = 1e-20 // the stored run's miss is 4.6e-27; 40 digits leave room for the growth
	if miss > tol {
		t.Errorf("return miss %.3g, want below %.3g", miss, tol)
	}
}

// TestReferenceBadInput checks that bad input gives errors, not panics.
func TestReferenceBadInput(t *testing.T) {
	ctx := context.Background()
	sys, _ := Model("lorenz")
	cases := []struct {
		name  string
		sys   *System
		t1    float64
		times []float64
		s     *referenceSettings
		want  error
	}{
		{"nil system", nil, 1, nil, nil, integrate.ErrSettings},
		{"t1 zero", sys, 0, nil, nil, integrate.ErrSpan},
		{"t1 NaN", sys, math.NaN(), nil, nil, integrate.ErrSpan},
		{"t1 Inf", sys, math.Inf(1), nil, nil, integrate.ErrSpan},
		{"time beyond t1", sys, 1, []float64{2}, nil, integrate.ErrSpan},
		{"time negative", sys, 1, []float64{-1}, nil, integrate.ErrSpan},
		{"times not increasing", sys, 1, []float64{0.5, 0.5}, nil, integrate.ErrSpan},
		{"time NaN", sys, 1, []float64{math.NaN()}, nil, integrate.ErrSpan},
		{"lambda NaN", sys, 1, nil, &referenceSettings{Lambda: math.NaN()}, integrate.ErrSettings},
		{"tol negative", sys, 1, nil, &referenceSettings{Tol: -1}, integrate.ErrSettings},
		{"digits negative", sys, 1, nil, &referenceSettings{Digits: -3}, integrate.ErrSettings},
		{"digits huge", sys, 1, nil, &referenceSettings{Digits: 1 << 20}, integrate.ErrSettings},
		{"max steps negative", sys, 1, nil, &referenceSettings{Digits: 20, MaxSteps: -1}, integrate.ErrSettings},
		{"step budget", sys, 1, nil, &referenceSettings{Digits: 20, MaxSteps: 3}, integrate.ErrStepBudget},
	}
	for _, c := range cases {
		r, err := referenceRun(ctx, c.sys, c.t1, c.times, c.s)
		if !errors.Is(err, c.want) {
			t.Errorf("%s: err = %v, want %v", c.name, err, c.want)
		}
		if c.name == "step budget" && (r == nil || r.Stats.Steps != 3) {
			t.Errorf("%s: partial result %+v, want 3 steps kept", c.name, r)
		}
	}
	canceled, cancel := context.WithCancel(ctx)
	cancel()
	if _, err := referenceRun(canceled, sys, 1, nil, &referenceSettings{Digits: 20}); !errors.Is(err, context.Canceled) {
		t.Errorf("canceled: err = %v", err)
	}
	if _, err := (*System)(nil).Trust(ctx, 1, &TrustSettings{Tol: 1}); err == nil {
		t.Error("System.Trust of a nil system: no error")
	}
	if _, err := sys.Trust(ctx, -1, &TrustSettings{Tol: 1}); !errors.Is(err, ErrHorizon) {
		t.Errorf("System.Trust horizon -1: err = %v", err)
	}
	if _, err := sys.Trust(ctx, 1, nil); !errors.Is(err, ErrTolerance) {
		t.Errorf("TrustSystem nil settings: err = %v", err)
	}
}

// TestTrustSystemReference audits Lorenz over 30 time units against the
// Taylor reference. The tightest float64 run (DormandPrince853 at 1e-12)
// is now compared too: with local errors ~1e-12 growing as e^(λ_1 t) it
// should leave 1e-3 near ln(1e-3/1e-12)/0.9056 ≈ 23 (Boffetta et al.
// 2002, Sect. 2.1); the window [15, 30) allows the local error's
// prefactor (a factor e^±7 either way: common practice for such
// predictions). The trusted horizon must not exceed the DormandPrince54
// 1e-6 rung's prediction by far: ln(1e-3/1e-6)/0.9056 ≈ 7.6 plus the
// same allowance.
func TestTrustSystemReference(t *testing.T) {
	sys, _ := Model("lorenz")
	rep, err := sys.Trust(context.Background(), 30, &TrustSettings{Tol: 1e-3, Lambda: lorenzLambda, NoReversal: true})
	if err != nil {
		t.Fatal(err)
	}
	ref := rep.Reference
	t.Logf("reference run agrees until %.4g (departed %v); trusted until %.4g (%s)", ref.AgreesUntil, ref.Departed, rep.TrustedUntil, rep.LimitingRung)
	if len(ref.Divergence) != len(rep.Times) {
		t.Fatalf("reference divergence has %d points for %d times", len(ref.Divergence), len(rep.Times))
	}
	if !ref.Departed || ref.AgreesUntil < 15 || ref.AgreesUntil >= 30 {
		t.Errorf("reference run agrees until %.4g (departed %v), want a departure in [15, 30)", ref.AgreesUntil, ref.Departed)
	}
	if rep.TrustedUntil > 7.6+8 {
		t.Errorf("trusted until %.4g, want below %.4g", rep.TrustedUntil, 7.6+8)
	}
	// 0.9056·30/ln 10 = 11.8 digits of growth, log10(1/1e-6) = 6 wanted
	// (Tol·refTolFraction), 4 guard digits: 22 digits, in double-double.
	if e := rep.Exact; e == nil || e.Digits != 22 || e.Arithmetic != "double-double" {
		t.Errorf("exact reference %+v, want 22 digits in double-double", e)
	}
	if rep.Exponent == nil || rep.Exponent.Source != "given" {
		t.Errorf("exponent %+v, want the given one", rep.Exponent)
	}
}
