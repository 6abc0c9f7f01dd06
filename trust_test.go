package plumb_test

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
)

// lorenzLambda1 is the largest Lyapunov exponent of the Lorenz system at
// sigma=10, rho=28, beta=8/3: 0.9056 (J. C. Sprott, Common Chaotic Systems,
// 1998/2004; confirmed, REFERENCES.md Sect. 1a).
const lorenzLambda1 = 0.9056

func model(t testing.TB, name string) *plumb.System {
	t.Helper()
	s, err := plumb.Model(name)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// TestTrustDefaultDemo audits the convection-loop demo (Lorenz 1963
// parameters, start (1,1,1)) to t=50 at tolerance 1.
func TestTrustDefaultDemo(t *testing.T) {
	rep, err := plumb.TrustProblem(context.Background(), model(t, "lorenz").Problem(), 50, &plumb.TrustSettings{Tol: 1})
	if err != nil {
		t.Fatal(err)
	}
	// A chaotic run at tolerance 1 cannot be believed to t=50: with
	// delta0 ~ 1e-6 (the loosest rung) and lambda_1 = 0.906 the horizon is
	// about ln(1e6)/0.906 ≈ 15 (Boffetta et al. 2002).
	if rep.Verdict != plumb.NotTrusted || rep.TrustedUntil < 8 || rep.TrustedUntil > 30 {
		t.Errorf("verdict %s, trusted until %g; want not trusted, horizon in [8, 30]", rep.Verdict, rep.TrustedUntil)
	}
	if rep.LimitedBy == "" || rep.LimitingRung == "" {
		t.Errorf("no limiting effect named: %q %q", rep.LimitedBy, rep.LimitingRung)
	}
	if rep.Growth != "exponential" {
		t.Errorf("growth %q, want exponential", rep.Growth)
	}
	// lyap's estimate against Sprott's value: within 3 standard errors plus
	// 0.01 for the finite averaging time (common practice).
	e := rep.Exponent
	if e == nil || e.Source != "estimated" || math.Abs(e.Value-lorenzLambda1) > 3*e.StdErr+0.01 {
		t.Errorf("exponent %+v, want %v (Sprott) within 3 standard errors", e, lorenzLambda1)
	}
	if rep.PredictedHorizon <= 0 || rep.Float64Horizon <= rep.TrustedUntil {
		t.Errorf("predicted %g, float64 horizon %g (trusted %g)", rep.PredictedHorizon, rep.Float64Horizon, rep.TrustedUntil)
	}
	// Each prediction is lyap.Horizon after the rung's start (the same
	// formula, Boffetta et al. 2002, computed by package lyap).
	for _, r := range rep.Rungs {
		if r.Predicted == 0 {
			continue
		}
		start := rep.T0
		if r.Effect == "restart" {
			start = r.RestartAt
		}
		if want := start + lyap.Horizon(e.Value, r.Delta0, rep.TolAbs); math.Abs(r.Predicted-want) > 1e-12*want {
			t.Errorf("%s: predicted %v, want %v (lyap.Horizon)", r.Name, r.Predicted, want)
		}
	}
	if rep.Caution == "" || !strings.Contains(rep.Caution, "not a safety certificate") {
		t.Errorf("caution %q", rep.Caution)
	}
	if rep.Reversal == nil {
		t.Error("no reversibility check")
	}
	for _, r := range rep.Rungs {
		t.Logf("%-34s %-9s agrees until %6.4g predicted %6.4g  %s rate %.3g", r.Name, r.Effect, r.AgreesUntil, r.Predicted, r.Growth, r.Rate)
	}
	t.Logf("exponent %.4g ± %.2g; trusted until %.4g (%s); float64 %.4g", e.Value, e.StdErr, rep.TrustedUntil, rep.LimitingRung, rep.Float64Horizon)

	// JSON: snake_case fields, a valid document, read back equal.
	blob, err := json.Marshal(rep)
	if err != nil {
		t.Fatal(err)
	}
	for _, key := range []string{`"trusted_until"`, `"limited_by"`, `"verdict"`, `"agrees_until"`, `"divergence"`, `"caution"`, `"exponent"`, `"std_err"`, `"arch"`} {
		if !bytes.Contains(blob, []byte(key)) {
			t.Errorf("JSON lacks %s", key)
		}
	}
	var back plumb.Report
	if err := json.Unmarshal(blob, &back); err != nil || back.TrustedUntil != rep.TrustedUntil || len(back.Rungs) != len(rep.Rungs) {
		t.Errorf("JSON round trip: %v", err)
	}

	var buf bytes.Buffer
	if err := rep.Write(&buf); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	for _, want := range []string{"agrees until", "predicted", "verdict for t = 50: not trusted", "caution:", "Lyapunov", "limited by"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
	t.Logf("summary:\n%s", out)
}

// TestTrustNonChaotic checks Kepler (Hairer, Lubich & Wanner 2006, e=0.6),
// the harmonic oscillator and a simple pendulum (planar autonomous flows
// cannot be chaotic: Poincaré–Bendixson theorem): no exponential divergence,
// and at a loose tolerance (5% of the orbit's size) the whole horizon is
// trusted.
func TestTrustNonChaotic(t *testing.T) {
	osc := integrate.Problem{F: func(_ float64, y, d []float64) { d[0] = y[1]; d[1] = -y[0] }, Y0: []float64{1, 0}}
	// A simple pendulum swinging to 2.5 rad, its angle declared periodic.
	pend := integrate.Problem{F: func(_ float64, y, d []float64) { d[0] = y[1]; d[1] = -math.Sin(y[0]) }, Y0: []float64{2.5, 0}}
	for _, c := range []struct {
		name    string
		p       integrate.Problem
		periods []float64
	}{{"kepler", model(t, "kepler").Problem(), nil}, {"oscillator", osc, nil}, {"pendulum", pend, []float64{2 * math.Pi, 0}}} {
		rep, err := plumb.TrustProblem(context.Background(), c.p, 50, &plumb.TrustSettings{Tol: 0.05, Relative: true, Periods: c.periods})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Verdict == plumb.NotTrusted || rep.TrustedUntil != 50 || rep.LimitedBy != "" {
			t.Errorf("%s: verdict %s until %g (%s), want the whole horizon trusted", c.name, rep.Verdict, rep.TrustedUntil, rep.LimitedBy)
		}
		if rep.Growth != "polynomial" && rep.Growth != "bounded" {
			t.Errorf("%s: growth %q, want polynomial", c.name, rep.Growth)
		}
		if rep.PredictedHorizon != 0 {
			t.Errorf("%s: predicted horizon %g without exponential growth", c.name, rep.PredictedHorizon)
		}
		var buf bytes.Buffer
		if err := rep.Write(&buf); err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(buf.String(), "polynomially") || !strings.Contains(buf.String(), "every rung agrees") {
			t.Errorf("%s: summary:\n%s", c.name, buf.String())
		}
		t.Logf("%s: %s, tol used %.3g, exponent %+v", c.name, rep.Verdict, rep.TolUsed, rep.Exponent)
	}
}

// TestTrustBadInput checks the sentinels before any work.
func TestTrustBadInput(t *testing.T) {
	p := model(t, "lorenz").Problem()
	ok := &plumb.TrustSettings{Tol: 1, Lambda: 0.9}
	only := integrate.Ladder{Reference: integrate.DefaultLadder(0, 1).Reference}
	for _, c := range []struct {
		name    string
		horizon float64
		s       *plumb.TrustSettings
		want    error
	}{
		{"zero horizon", 0, ok, plumb.ErrHorizon},
		{"negative horizon", -5, ok, plumb.ErrHorizon},
		{"NaN horizon", math.NaN(), ok, plumb.ErrHorizon},
		{"infinite horizon", math.Inf(1), ok, plumb.ErrHorizon},
		{"nil settings", 10, nil, plumb.ErrTolerance},
		{"zero tolerance", 10, &plumb.TrustSettings{}, plumb.ErrTolerance},
		{"negative tolerance", 10, &plumb.TrustSettings{Tol: -1}, plumb.ErrTolerance},
		{"ladder with one rung", 10, &plumb.TrustSettings{Tol: 1, Ladder: &only}, integrate.ErrLadder},
		{"periods length", 10, &plumb.TrustSettings{Tol: 1, Periods: []float64{1}}, integrate.ErrDimension},
		{"negative lambda", 10, &plumb.TrustSettings{Tol: 1, Lambda: -1}, integrate.ErrSettings},
		{"negative max steps", 10, &plumb.TrustSettings{Tol: 1, MaxSteps: -1}, integrate.ErrSettings},
	} {
		rep, err := plumb.TrustProblem(context.Background(), p, c.horizon, c.s)
		if !errors.Is(err, c.want) || rep != nil {
			t.Errorf("%s: got (%v, %v), want nil and %v", c.name, rep, err, c.want)
		}
	}
}

// TestTrustFailedRung checks that a rung failing mid-ladder is reported with
// its error while the completed rungs are kept.
func TestTrustFailedRung(t *testing.T) {
	l := integrate.DefaultLadder(0, 20)
	l.Rungs = append(l.Rungs[:2], integrate.Rung{Kind: integrate.KindMethod, Fixed: integrate.Euler, Step: 0.05})
	rep, err := plumb.TrustProblem(context.Background(), model(t, "lorenz").Problem(), 20, &plumb.TrustSettings{Tol: 1, Lambda: lorenzLambda1, Ladder: &l})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Failed != 1 || len(rep.Rungs) != 3 {
		t.Fatalf("failed %d of %d", rep.Failed, len(rep.Rungs))
	}
	bad := rep.Rungs[2]
	if bad.Error == "" || len(bad.Divergence) >= len(rep.Times) {
		t.Errorf("Euler h=0.05 rung: error %q, %d of %d points; want a failure with a partial curve", bad.Error, len(bad.Divergence), len(rep.Times))
	}
	for _, r := range rep.Rungs[:2] {
		if r.Error != "" || len(r.Divergence) != len(rep.Times) || r.AgreesUntil <= 0 {
			t.Errorf("%s: error %q, %d points, agrees until %g", r.Name, r.Error, len(r.Divergence), r.AgreesUntil)
		}
	}
	if _, err := json.Marshal(rep); err != nil {
		t.Errorf("JSON of a report with a failed rung: %v", err)
	}
	var buf bytes.Buffer
	if err := rep.Write(&buf); err != nil || !strings.Contains(buf.String(), "(failed)") {
		t.Errorf("summary (err %v):\n%s", err, buf.String())
	}
}

// TestTrustPeriodic audits the crane's double pendulum with its angles
// compared wrapped (System.Periods).
func TestTrustPeriodic(t *testing.T) {
	s := model(t, "double-pendulum")
	rep, err := plumb.TrustProblem(context.Background(), s.Problem(), 10, &plumb.TrustSettings{Tol: 0.1, Periods: s.Periods(), NoReversal: true})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Reversal != nil {
		t.Error("reversal ran with NoReversal")
	}
	// Wrapping bounds each angle difference by pi (exact identity), so the
	// spread's angle part is at most pi per angle; the rates add their own.
	if !(rep.Spread > 0) || math.IsInf(rep.Spread, 0) {
		t.Errorf("spread %v", rep.Spread)
	}
	t.Logf("double pendulum: %s until %.4g (%s), growth %s, exponent %+v", rep.Verdict, rep.TrustedUntil, rep.LimitingRung, rep.Growth, rep.Exponent)
}

// BenchmarkTrustDefault times the default audit: the convection-loop demo to
// t=50 at tolerance 1, with the exponent estimate.
func BenchmarkTrustDefault(b *testing.B) {
	p := model(b, "lorenz").Problem()
	b.ReportAllocs()
	for b.Loop() {
		if _, err := plumb.TrustProblem(context.Background(), p, 50, &plumb.TrustSettings{Tol: 1}); err != nil {
			b.Fatal(err)
		}
	}
}

// ExampleSystem_Trust audits the convection-loop demo to t=50 against
// the multiprecision reference.
func ExampleSystem_Trust() {
	sys, err := plumb.Model("lorenz")
	if err != nil {
		fmt.Println(err)
		return
	}
	rep, err := sys.Trust(context.Background(), 50, &plumb.TrustSettings{Tol: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("verdict:", rep.Verdict)
	fmt.Println("growth:", rep.Growth)
	fmt.Println("limited before t=30:", rep.TrustedUntil < 30)
	// Output:
	// verdict: not_trusted
	// growth: exponential
	// limited before t=30: true
}

// TestTrustCanceled checks that a canceled audit returns the context's error
// with the partial report, and that progress is reported while it runs.
func TestTrustCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	p := model(t, "lorenz").Problem()
	var stages []string
	rep, err := plumb.TrustProblem(ctx, p, 20, &plumb.TrustSettings{Tol: 1, Lambda: lorenzLambda1, Progress: func(stage plumb.Stage, done, total int) {
		stages = append(stages, fmt.Sprintf("%s %d/%d", stage, done, total))
		if done == 3 {
			cancel()
		}
	}})
	if !errors.Is(err, context.Canceled) || rep == nil {
		t.Fatalf("got (%v, %v), want a partial report and context.Canceled", rep, err)
	}
	if len(rep.Rungs) != 2 || rep.Caution == "" || rep.Verdict != plumb.Incomplete {
		t.Errorf("partial report has %d rungs (want the 2 done before the cancel), caution %q, verdict %s", len(rep.Rungs), rep.Caution, rep.Verdict)
	}
	if len(stages) == 0 || stages[0] != "audit 1/10" {
		t.Errorf("progress %v, want it to start with audit 1/10", stages)
	}
}

// TestTrustTinyLambdaEncodes: a given exponent so small that 1/lambda
// overflows still gives a report that encodes as JSON (no +Inf in it).
func TestTrustTinyLambdaEncodes(t *testing.T) {
	osc := integrate.Problem{F: func(_ float64, y, d []float64) { d[0] = y[1]; d[1] = -y[0] }, Y0: []float64{1, 0}}
	rep, err := plumb.TrustProblem(context.Background(), osc, 5, &plumb.TrustSettings{Tol: 0.1, Lambda: 1e-310})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := json.Marshal(rep); err != nil {
		t.Errorf("report with lambda 1e-310 does not encode: %v", err)
	}
}
