package testode

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
)

// stepErrors returns the largest error at the stored steps of sol against
// exact.
func stepErrors(sol *integrate.Solution, exact func(t float64) []float64) float64 {
	var m float64
	y := make([]float64, sol.Dim)
	for i, tt := range sol.T {
		m = max(m, maxDiff(sol.State(i, y), exact(tt)))
	}
	return m
}

// reflect returns the problem z(s) = y(−s): z' = −F(−s, z), z(−T0) = Y0.
func reflect(p integrate.Problem) integrate.Problem {
	f := p.F
	return integrate.Problem{
		F: func(s float64, z, dz []float64) {
			f(-s, z, dz)
			for i := range dz {
				dz[i] = -dz[i]
			}
		},
		T0: -p.T0,
		Y0: p.Y0,
	}
}

// checkBackward checks that integrating backward in time is the same
// computation as integrating forward: a run of the reflected problem
// z' = −F(−s, z) from −t0 to −t1 must give bit for bit the times (negated),
// states and counts of the forward run (exact identity: IEEE 754 rounding
// is symmetric under negation, and a step with −h on −F forms the same
// products). It also checks that a backward run of the Kepler problem over
// one period is as accurate as the forward one.
func checkBackward(t *testing.T, m integrate.Method, c Case) {
	p := nonAutonomous()
	p.T0 = 0.25
	const t1 = 3.0
	mm, s := c.accurate(m)
	fw, err := integrate.Solve(context.Background(), p, t1, mm, s)
	if err != nil {
		t.Fatalf("forward: %v", err)
	}
	bw, err := integrate.Solve(context.Background(), reflect(p), -t1, mm, s)
	if err != nil {
		t.Fatalf("backward: %v", err)
	}
	if fw.Stats != bw.Stats {
		t.Errorf("backward stats %+v, forward %+v", bw.Stats, fw.Stats)
	}
	if len(fw.T) != len(bw.T) {
		t.Fatalf("backward run has %d steps, forward %d", len(bw.T), len(fw.T))
	}
	for i := range fw.T {
		if bw.T[i] != -fw.T[i] {
			t.Fatalf("step %d: backward t = %v, want −(%v) exactly", i, bw.T[i], fw.T[i])
		}
	}
	for i := range fw.Y {
		if bw.Y[i] != fw.Y[i] {
			t.Fatalf("state entry %d: backward %v, forward %v: not bit-identical", i, bw.Y[i], fw.Y[i])
		}
	}
	tm := 0.5 * (p.T0 + t1)
	a, b := fw.At(tm, nil), bw.At(-tm, nil)
	if a == nil || b == nil || maxDiff(a, b) != 0 {
		t.Errorf("dense output at t=%v: forward %v, backward %v: not bit-identical", tm, a, b)
	}

	// Kepler: forward 0 → 2π from y0, backward 2π → 0 from y(2π) = y0.
	k := Kepler(0.5)
	T := 2 * math.Pi
	f2, err := integrate.Solve(context.Background(), k, T, mm, dropped(s))
	if err != nil {
		t.Fatalf("kepler forward: %v", err)
	}
	kb := k
	kb.T0 = T
	b2, err := integrate.Solve(context.Background(), kb, 0, mm, dropped(s))
	if err != nil {
		t.Fatalf("kepler backward: %v", err)
	}
	ef, eb := maxDiff(f2.Final, k.Y0), maxDiff(b2.Final, k.Y0) // exact: y(0) = y(2π) = y0
	t.Logf("%s: Kepler over one period: forward error %.3g, backward error %.3g", m.Name(), ef, eb)
	// backwardSlack: the backward run is the mirror image of the forward
	// one (q2 → −q2, p1 → −p1, exact symmetry of the Kepler problem), so
	// its error is the same up to rounding of the times; 4 leaves room for
	// that, 1e-13 for the rounding floor.
	const backwardSlack = 4
	if eb > backwardSlack*ef+1e-13 {
		t.Errorf("backward error %.3g, forward %.3g: want within a factor %d", eb, ef, backwardSlack)
	}
}

// checkSampling checks the sampling grid: it starts with the initial state
// itself, its times are t0 + i·Every computed by multiplication, it ends on
// t1 exactly with the final state, and its values follow the solution.
func checkSampling(t *testing.T, m integrate.Method, c Case) {
	p := nonAutonomous()
	mm, s0 := c.accurate(m)
	for _, tc := range []struct {
		name   string
		t0, t1 float64
		every  float64
		times  []float64
	}{
		{name: "every forward", t0: 0, t1: 2, every: 0.3},
		{name: "every backward", t0: 2, t1: 0, every: 0.3},
		{name: "times", t0: 0, t1: 2, times: []float64{0, 0.25, 1.1, 1.999, 2}},
	} {
		q := p
		q.T0 = tc.t0
		q.Y0 = nonAutonomousExact(tc.t0)
		s := *s0
		s.Every, s.Times = tc.every, tc.times
		sol, err := integrate.Solve(context.Background(), q, tc.t1, mm, &s)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		var want []float64
		if tc.times != nil {
			want = tc.times
		} else {
			dir := math.Copysign(1, tc.t1-tc.t0)
			for i := 0; float64(i)*tc.every < math.Abs(tc.t1-tc.t0)-1e-9*tc.every; i++ {
				want = append(want, tc.t0+float64(float64(i)*dir*tc.every)) // unfused, as the grid
			}
			want = append(want, tc.t1)
		}
		if len(sol.Samples) != len(want) {
			t.Fatalf("%s: %d samples, want %d", tc.name, len(sol.Samples), len(want))
		}
		for i, smp := range sol.Samples {
			if smp.T != want[i] {
				t.Errorf("%s: sample %d at t=%v, want %v exactly", tc.name, i, smp.T, want[i])
			}
		}
		first, last := sol.Samples[0], sol.Samples[len(sol.Samples)-1]
		if maxDiff(first.Y, q.Y0) != 0 {
			t.Errorf("%s: first sample %v, want the initial state %v exactly", tc.name, first.Y, q.Y0)
		}
		if last.T != tc.t1 || maxDiff(last.Y, sol.Final) != 0 || sol.End != tc.t1 {
			t.Errorf("%s: last sample (%v, %v), end %v, final %v: want t1 = %v and the final state exactly",
				tc.name, last.T, last.Y, sol.End, sol.Final, tc.t1)
		}
		M := stepErrors(sol, nonAutonomousExact)
		// A sample lies inside a step, where the continuous extension adds
		// its own error to the global one: of the order of the local error
		// for adaptive pairs (at most about Tol·|y|, |y| <= e here), and far
		// below the global error for the fixed steps used here.
		// sampleSlack = 10 covers both.
		const sampleSlack = 10
		local := 0.0
		if !c.fixed() {
			local = 3 * c.Tol
		}
		var worst float64
		for _, smp := range sol.Samples {
			e := maxDiff(smp.Y, nonAutonomousExact(smp.T))
			worst = max(worst, e)
			if e > sampleSlack*(M+local)+1e-14 {
				t.Errorf("%s: sample at t=%v has error %.3g, want <= %.3g (steps have at most %.3g)",
					tc.name, smp.T, e, sampleSlack*(M+local)+1e-14, M)
			}
		}
		t.Logf("%s %s: %d samples, errors up to %.2g (steps up to %.2g)", m.Name(), tc.name, len(sol.Samples), worst, M)
	}
}

// checkCrossings locates the zeros of y1 = cos t of the oscillator d²y/dt² = −y
// on [0, 10] (at π/2 + kπ, exact) and a stopping crossing of y2 = −sin t at π.
func checkCrossings(t *testing.T, m integrate.Method, c Case) {
	p := oscillator()
	exact := func(tt float64) []float64 { return []float64{math.Cos(tt), -math.Sin(tt)} }
	mm, s0 := c.accurate(m)
	s := *s0
	s.Crossings = []integrate.Crossing{{Name: "y1", G: func(_ float64, y []float64) float64 { return y[0] }}}
	sol, err := integrate.Solve(context.Background(), p, 10, mm, &s)
	if err != nil {
		t.Fatalf("%v", err)
	}
	M := stepErrors(sol, exact)
	// At a zero of cos, |d/dt cos| = 1, so a state error M moves the zero
	// by about M; 2M + 1e-12 bounds the time error (1e-12: the located
	// zero's own tolerance is ~1e-14).
	bound := 2*M + 1e-12
	want := []float64{math.Pi / 2, 3 * math.Pi / 2, 5 * math.Pi / 2}
	senses := []integrate.Sense{integrate.Falling, integrate.Rising, integrate.Falling}
	if len(sol.Hits) != len(want) {
		t.Fatalf("%d crossings, want %d: %+v", len(sol.Hits), len(want), sol.Hits)
	}
	var worst float64
	for i, h := range sol.Hits {
		d := math.Abs(h.T - want[i])
		worst = max(worst, d)
		if d > bound || h.Sense != senses[i] {
			t.Errorf("crossing %d at t=%.17g (%v), want %.17g (%v) within %.3g", i, h.T, h.Sense, want[i], senses[i], bound)
		}
		// crossResidual: the zero is refined on the continuous extension to
		// a bracket of a few ulps of t; |G| there is below 1e-13.
		const crossResidual = 1e-13
		if math.Abs(h.Y[0]) > crossResidual {
			t.Errorf("crossing %d: G = %.3g at the located zero, want |G| <= %g", i, h.Y[0], crossResidual)
		}
	}
	t.Logf("%s: crossing times within %.2g of π/2 + kπ (step errors up to %.2g)", m.Name(), worst, M)

	// A stopping crossing: y2 = −sin t rises through 0 at π.
	s.Crossings = []integrate.Crossing{{G: func(_ float64, y []float64) float64 { return y[1] }, Sense: integrate.Rising, Stop: true}}
	sol, err = integrate.Solve(context.Background(), p, 10, mm, &s)
	if err != nil {
		t.Fatalf("stop: %v", err)
	}
	if sol.Status != integrate.Stopped || len(sol.Hits) != 1 || math.Abs(sol.End-math.Pi) > bound {
		t.Fatalf("stop: status %v, %d hits, end %.17g: want stopped at π within %.3g", sol.Status, len(sol.Hits), sol.End, bound)
	}
	if e := maxDiff(sol.Final, []float64{-1, 0}); e > 2*bound {
		t.Errorf("stop: final state %v, want (−1, 0) within %.3g", sol.Final, 2*bound)
	}
}

// checkEvaluations counts the evaluations of F of a Stepper run: one at the
// start (and one more for the automatic initial step of adaptive methods),
// StageEvals per attempt, AcceptEvals per accepted step, and DenseEvals per
// step only when its continuous extension is used.
func checkEvaluations(t *testing.T, m integrate.Method, c Case) {
	p := Kepler(0.5)
	T := 2 * math.Pi
	mm, s := c.accurate(m)
	base := 2
	if c.fixed() {
		mm, s = c.withStep(m, T/64)
		base = 1
	}
	run := func(dense bool) (integrate.Stats, []float64) {
		st, err := integrate.NewStepper(p, T, mm, s)
		if err != nil {
			t.Fatalf("%v", err)
		}
		buf := make([]float64, 4)
		for st.Next(context.Background()) {
			if dense && st.Dense(st.T()-0.5*st.H(), buf) == nil {
				t.Fatalf("Dense at mid-step returned nil")
			}
		}
		if err := st.Err(); err != nil || !st.Done() {
			t.Fatalf("stepper ended with %v, done %v", err, st.Done())
		}
		return st.Stats(), append([]float64(nil), st.Y()...)
	}
	plain, y1 := run(false)
	withDense, y2 := run(true)
	want := base + c.StageEvals*(plain.Accepted+plain.Rejected) + c.AcceptEvals*plain.Accepted
	if plain.Evaluations != want {
		t.Errorf("evaluations %d, want %d = %d + %d·%d attempts + %d·%d accepted",
			plain.Evaluations, want, base, c.StageEvals, plain.Accepted+plain.Rejected, c.AcceptEvals, plain.Accepted)
	}
	if got, w := withDense.Evaluations, want+c.DenseEvals*plain.Accepted; got != w {
		t.Errorf("evaluations with dense output %d, want %d", got, w)
	}
	if maxDiff(y1, y2) != 0 || withDense.Accepted != plain.Accepted {
		t.Errorf("asking for dense output changed the run: %v vs %v", y2, y1)
	}
	t.Logf("%s: %d accepted, %d rejected, %d evaluations (%d with dense output)",
		m.Name(), plain.Accepted, plain.Rejected, plain.Evaluations, withDense.Evaluations)
}

// call runs f and turns a panic into a test failure.
func call(t *testing.T, name string, f func() error) (err error) {
	t.Helper()
	defer func() {
		if r := recover(); r != nil {
			t.Errorf("%s: panic: %v", name, r)
			err = nil
		}
	}()
	return f()
}

// checkBadInput feeds invalid problems and settings to Solve and NewStepper
// and wants an error wrapping the right sentinel, before any step, with no
// panic.
func checkBadInput(t *testing.T, m integrate.Method, c Case) {
	good := nonAutonomous()
	mm, s0 := c.accurate(m)
	nanAt0 := good
	nanAt0.F = func(_ float64, _, d []float64) { d[0], d[1] = math.NaN(), 0 }
	type tc struct {
		name  string
		p     integrate.Problem
		t1    float64
		s     func(s *integrate.Settings)
		m     integrate.Method
		want  error
		names string // the message must contain this
	}
	cases := []tc{
		{name: "nil F", p: integrate.Problem{Y0: []float64{1}}, t1: 1, want: integrate.ErrSettings},
		{name: "empty Y0", p: integrate.Problem{F: good.F}, t1: 1, want: integrate.ErrDimension},
		{name: "NaN in Y0", p: integrate.Problem{F: good.F, Y0: []float64{1, math.NaN()}}, t1: 1, want: integrate.ErrNonFinite},
		{name: "Inf in Y0", p: integrate.Problem{F: good.F, Y0: []float64{math.Inf(-1), 1}}, t1: 1, want: integrate.ErrNonFinite},
		{name: "t1 == t0", p: good, t1: 0, want: integrate.ErrSpan},
		{name: "t1 NaN", p: good, t1: math.NaN(), want: integrate.ErrSpan},
		{name: "T0 Inf", p: integrate.Problem{F: good.F, Y0: good.Y0, T0: math.Inf(1)}, t1: 1, want: integrate.ErrSpan},
		{name: "F NaN at t0", p: nanAt0, t1: 1, want: integrate.ErrNonFinite},
		{name: "RelTol < 0", p: good, t1: 1, s: func(s *integrate.Settings) { s.RelTol = -1 }, want: integrate.ErrSettings, names: "RelTol = -1"},
		{name: "RelTol NaN", p: good, t1: 1, s: func(s *integrate.Settings) { s.RelTol = math.NaN() }, want: integrate.ErrSettings},
		{name: "AbsTol Inf", p: good, t1: 1, s: func(s *integrate.Settings) { s.AbsTol = math.Inf(1) }, want: integrate.ErrSettings},
		{name: "RelTols length", p: good, t1: 1, s: func(s *integrate.Settings) { s.RelTols = []float64{1e-6} }, want: integrate.ErrDimension},
		{name: "zero tolerances", p: good, t1: 1, s: func(s *integrate.Settings) { s.RelTols, s.AbsTols = []float64{0, 1e-6}, []float64{0, 1e-6} }, want: integrate.ErrSettings},
		{name: "MaxStep < 0", p: good, t1: 1, s: func(s *integrate.Settings) { s.MaxStep = -1 }, want: integrate.ErrSettings},
		{name: "Every NaN", p: good, t1: 1, s: func(s *integrate.Settings) { s.Every = math.NaN() }, want: integrate.ErrSettings},
		{name: "Times outside", p: good, t1: 1, s: func(s *integrate.Settings) { s.Times = []float64{2} }, want: integrate.ErrSettings},
	}
	if c.fixed() {
		for _, h := range []float64{0, -0.1, math.NaN(), math.Inf(1)} {
			cases = append(cases, tc{name: fmt.Sprintf("step %v", h), p: good, t1: 1, m: c.WithStep(h), want: integrate.ErrSettings, names: fmt.Sprint(h)})
		}
	}
	for _, k := range cases {
		s := *s0
		if k.s != nil {
			k.s(&s)
		}
		meth := mm
		if k.m != nil {
			meth = k.m
		}
		var sol *integrate.Solution
		err := call(t, k.name, func() error {
			var err error
			sol, err = integrate.Solve(context.Background(), k.p, k.t1, meth, &s)
			return err
		})
		if !errors.Is(err, k.want) {
			t.Errorf("%s: Solve error %v, want one wrapping %q", k.name, err, k.want)
			continue
		}
		if sol != nil {
			t.Errorf("%s: Solve returned a solution with an error before stepping", k.name)
		}
		if !strings.HasPrefix(err.Error(), "integrate: ") {
			t.Errorf("%s: message %q lacks the package prefix", k.name, err)
		}
		if k.names != "" && !strings.Contains(err.Error(), k.names) {
			t.Errorf("%s: message %q does not name the value %s", k.name, err, k.names)
		}
		err = call(t, k.name, func() error {
			_, err := integrate.NewStepper(k.p, k.t1, meth, &s)
			return err
		})
		if !errors.Is(err, k.want) {
			t.Errorf("%s: NewStepper error %v, want one wrapping %q", k.name, err, k.want)
		}
	}
}

// checkNonFinite wants a vector field that turns NaN or Inf part-way to end
// the solve with an error wrapping ErrNonFinite (never success), keeping the
// partial solution up to where the field was finite.
func checkNonFinite(t *testing.T, m integrate.Method, c Case) {
	const tBad = 0.5
	for _, bad := range []float64{math.NaN(), math.Inf(1)} {
		p := nonAutonomous()
		f := p.F
		p.F = func(tt float64, y, d []float64) {
			f(tt, y, d)
			if tt > tBad {
				d[1] = bad
			}
		}
		mm, s := c.accurate(m)
		var sol *integrate.Solution
		err := call(t, "nonfinite", func() error {
			var err error
			sol, err = integrate.Solve(context.Background(), p, 1, mm, s)
			return err
		})
		if !errors.Is(err, integrate.ErrNonFinite) {
			t.Errorf("field %v after t=%v: error %v, want one wrapping %q", bad, tBad, err, integrate.ErrNonFinite)
			continue
		}
		var fe *integrate.FieldError
		if !errors.As(err, &fe) {
			t.Errorf("field %v: error %v carries no FieldError", bad, err)
		}
		if sol == nil || sol.Status != integrate.Failed || sol.End > tBad || len(sol.T) < 2 {
			t.Errorf("field %v: want the partial solution up to t <= %v with status failed, got %+v", bad, tBad, sol)
			continue
		}
		if i := firstNonFinite(sol.Y); i >= 0 {
			t.Errorf("field %v: partial solution holds %v at entry %d", bad, sol.Y[i], i)
		}
		t.Logf("%s: field %v after t=%v: stopped at t=%.6g after %d steps: %v", m.Name(), bad, tBad, sol.End, sol.Stats.Accepted, err)
	}
}

func firstNonFinite(v []float64) int {
	for i, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return i
		}
	}
	return -1
}

// checkStiffness runs the stiffness test at every step: the Van der Pol
// oscillator with μ = 1000 from (2, 0) (problem VDPOL of the Mazzia &
// Magherini Test Set, 2008) must trip it early on [0, 1]; one period of the
// Arenstorf orbit (Hairer, Nørsett & Wanner 1993, Ch. II introduction) must
// not (REFERENCES.md §8, test idea).
func checkStiffness(t *testing.T, m integrate.Method, c Case) {
	const mu = 1000
	vdp := integrate.Problem{
		F: func(_ float64, y, d []float64) {
			d[0] = y[1]
			d[1] = float64(mu*float64(float64(1-float64(y[0]*y[0]))*y[1])) - y[0]
		},
		Y0: []float64{2, 0},
	}
	s := &integrate.Settings{RelTol: 1e-6, AbsTol: 1e-6, StiffCheck: 1, DropSteps: true}
	sol, err := integrate.Solve(context.Background(), vdp, 1, m, s)
	if err != nil {
		t.Fatalf("vdpol: %v", err)
	}
	if !sol.Stats.Stiff {
		t.Errorf("vdpol μ=1000: stiffness not detected in %d steps", sol.Stats.Accepted)
	} else {
		t.Logf("%s: vdpol μ=1000 flagged stiff at t=%.4g (%d steps to t=1)", m.Name(), sol.Stats.StiffAt, sol.Stats.Accepted)
	}

	const amu = 0.012277471
	const amu1 = 1 - amu
	aren := integrate.Problem{
		F: func(_ float64, y, d []float64) {
			// y = (y1, y2, y1', y2')
			a := float64((y[0]+amu)*(y[0]+amu)) + float64(y[1]*y[1])
			b := float64((y[0]-amu1)*(y[0]-amu1)) + float64(y[1]*y[1])
			d1 := float64(a * math.Sqrt(a))
			d2 := float64(b * math.Sqrt(b))
			d[0], d[1] = y[2], y[3]
			d[2] = y[0] + float64(2*y[3]) - float64(amu1*(y[0]+amu))/d1 - float64(amu*(y[0]-amu1))/d2
			d[3] = y[1] - float64(2*y[2]) - float64(amu1*y[1])/d1 - float64(amu*y[1])/d2
		},
		Y0: []float64{0.994, 0, 0, -2.00158510637908252240537862224},
	}
	const period = 17.0652165601579625588917206249
	s = &integrate.Settings{RelTol: 1e-8, AbsTol: 1e-8, StiffCheck: 1, DropSteps: true}
	sol, err = integrate.Solve(context.Background(), aren, period, m, s)
	if err != nil {
		t.Fatalf("arenstorf: %v", err)
	}
	if sol.Stats.Stiff {
		t.Errorf("arenstorf: flagged stiff at t=%v, want no flag", sol.Stats.StiffAt)
	}
}
