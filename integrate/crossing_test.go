package integrate

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"
)

// harmonic is y” = -y as y = (x, v): with y0 = (1, 0) the exact solution
// is x = cos(t - t0), v = -sin(t - t0) (exact identity).
func harmonic(_ float64, y, d []float64) {
	d[0] = y[1]
	d[1] = -y[0]
}

const (
	// tightTol makes DP5(4)'s global error on the harmonic oscillator over
	// a few periods about 1e-13 (measured here), so located zeros are good
	// to about 1e-12.
	tightTol = 1e-14
	// zeroTol is the accuracy required of a located zero of x = cos t.
	zeroTol = 1e-12
)

func TestCrossingHarmonicZeros(t *testing.T) {
	// Zeros of cos t: pi/2 + k·pi (exact identity); falling at k even,
	// rising at k odd.
	p := Problem{F: harmonic, Y0: []float64{1, 0}}
	x := Crossing{Name: "x", G: func(_ float64, y []float64) float64 { return y[0] }}
	cases := []struct {
		name  string
		sense Sense
		k     []int // which zeros pi/2 + k·pi are expected
	}{
		{"either", Either, []int{0, 1, 2, 3, 4, 5}},
		{"rising", Rising, []int{1, 3, 5}},
		{"falling", Falling, []int{0, 2, 4}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			cr := x
			cr.Sense = c.sense
			sol, err := Solve(context.Background(), p, 6*math.Pi, nil, &Settings{RelTol: tightTol, AbsTol: tightTol, Crossings: []Crossing{cr}})
			if err != nil {
				t.Fatal(err)
			}
			if len(sol.Hits) != len(c.k) {
				t.Fatalf("%d hits, want %d: %+v", len(sol.Hits), len(c.k), sol.Hits)
			}
			for i, h := range sol.Hits {
				want := math.Pi/2 + float64(c.k[i])*math.Pi
				if d := math.Abs(h.T - want); d > zeroTol {
					t.Errorf("hit %d at %.17g, want %.17g (diff %.2g)", i, h.T, want, d)
				}
				wantSense := Falling
				if c.k[i]%2 == 1 {
					wantSense = Rising
				}
				if h.Sense != wantSense {
					t.Errorf("hit %d sense %v, want %v", i, h.Sense, wantSense)
				}
				if math.Abs(h.Y[0]) > zeroTol || math.Abs(math.Abs(h.Y[1])-1) > zeroTol {
					t.Errorf("hit %d state %v, want (0, ±1)", i, h.Y)
				}
			}
		})
	}
}

// TestCrossingPeriods measures the period from successive rising crossings:
// 2·pi for the harmonic oscillator (exact identity), and the Arenstorf
// period T = 17.0652165601579625588917206249 (Hairer, Nørsett & Wanner 1993)
// from the crossings of y2 = 0 near the start (y1 > 0.9).
func TestCrossingPeriods(t *testing.T) {
	t.Run("harmonic", func(t *testing.T) {
		p := Problem{F: harmonic, Y0: []float64{1, 0}}
		up := Crossing{G: func(_ float64, y []float64) float64 { return y[0] }, Sense: Rising}
		sol, err := Solve(context.Background(), p, 20, nil, &Settings{RelTol: tightTol, AbsTol: tightTol, Crossings: []Crossing{up}})
		if err != nil {
			t.Fatal(err)
		}
		if len(sol.Hits) != 3 { // 3pi/2, 7pi/2, 11pi/2 < 20
			t.Fatalf("%d rising crossings, want 3", len(sol.Hits))
		}
		for i := 1; i < len(sol.Hits); i++ {
			if d := sol.Hits[i].T - sol.Hits[i-1].T - 2*math.Pi; math.Abs(d) > 2*zeroTol {
				t.Errorf("period %d = 2pi%+.2g", i, d)
			}
		}
	})
	t.Run("arenstorf", func(t *testing.T) {
		p, m := flowProblem(t, "arenstorf", nil)
		T := m.Known["period"]
		// y2 falls through 0 at t = 0 (y2' = -2.0016) and again at T; a
		// crossing at t0 is not reported.
		near := Crossing{G: func(_ float64, y []float64) float64 {
			if y[0] < 0.9 {
				return 1 // away from the start: no zero
			}
			return y[1]
		}, Sense: Falling}
		// At tol 1e-12 the state error at T is about 3e-8 (TestArenstorfReturn)
		// and |dy2/dt| = 2, so the crossing time is good to about 2e-8; 1e-7
		// leaves margin.
		const periodTol = 1e-7
		sol, err := Solve(context.Background(), p, 1.2*T, nil, &Settings{RelTol: 1e-12, AbsTol: 1e-12, Crossings: []Crossing{near}})
		if err != nil {
			t.Fatal(err)
		}
		if len(sol.Hits) != 1 {
			t.Fatalf("%d hits, want 1 (at T): %+v", len(sol.Hits), sol.Hits)
		}
		if d := sol.Hits[0].T - T; math.Abs(d) > periodTol {
			t.Errorf("period from the crossing %.15g, want %.15g (diff %.2g)", sol.Hits[0].T, T, d)
		}
	})
}

// TestCrossingFallingBall locates a falling ball's first ground contact,
// t = sqrt(2h/g) (exact identity for x” = -g). The solution is a quadratic,
// which DP5(4) and its continuous extension reproduce up to rounding, so
// the only error is the root finder's: a few ulps of t.
func TestCrossingFallingBall(t *testing.T) {
	const g, h0 = 9.81, 10.0
	p := Problem{F: func(_ float64, y, d []float64) { d[0] = y[1]; d[1] = -g }, Y0: []float64{h0, 0}}
	ground := Crossing{Name: "ground", G: func(_ float64, y []float64) float64 { return y[0] }, Sense: Falling, Stop: true}
	want := math.Sqrt(2 * h0 / g)
	// Brent stops at a bracket of 4·eps·|t|; the quadratic's rounding adds
	// a few ulps: 32 ulps of t.
	const ballTol = 32 * 0x1p-52
	sol, err := Solve(context.Background(), p, 10, nil, &Settings{Every: 0.1, Crossings: []Crossing{ground}})
	if err != nil {
		t.Fatal(err)
	}
	if sol.Status != Stopped {
		t.Fatalf("status %v, want stopped", sol.Status)
	}
	if len(sol.Hits) != 1 {
		t.Fatalf("%d hits, want 1", len(sol.Hits))
	}
	hit := sol.Hits[0]
	if d := math.Abs(hit.T-want) / want; d > ballTol {
		t.Errorf("contact at %.17g, want %.17g (rel diff %.2g)", hit.T, want, d)
	}
	// Stop: the solve ends at the crossing, End and Final are there.
	if sol.End != hit.T {
		t.Errorf("End = %v, want the crossing time %v", sol.End, hit.T)
	}
	if sol.Final[0] != hit.Y[0] || sol.Final[1] != hit.Y[1] {
		t.Errorf("Final = %v, want the crossing state %v", sol.Final, hit.Y)
	}
	if math.Abs(sol.Final[0]) > 1e-12 || math.Abs(sol.Final[1]+g*want) > 1e-12 {
		t.Errorf("Final = %v, want (0, %v)", sol.Final, -g*want)
	}
	// No sample after the crossing; the last one is at or before it.
	last := sol.Samples[len(sol.Samples)-1]
	if last.T > hit.T {
		t.Errorf("sample at %v after the stop at %v", last.T, hit.T)
	}
	if n := int(math.Floor(want/0.1)) + 1; len(sol.Samples) != n {
		t.Errorf("%d samples, want %d (t = 0, 0.1, ... up to the stop)", len(sol.Samples), n)
	}
	// At works up to End and not beyond.
	if y := sol.At(hit.T, nil); y == nil || y[0] != hit.Y[0] {
		t.Errorf("At(End) = %v, want %v", y, hit.Y)
	}
	if y := sol.At(math.Nextafter(hit.T, 10), nil); y != nil {
		t.Errorf("At just after End = %v, want nil", y)
	}
}

// TestCrossingTwoInOneStep: y = (t-0.4)(t-0.6) solves y' = 2t-1, y(0) =
// 0.24, exactly for DP5(4) (a quadratic), so one step of size 1 covers [0,
// 1]. G = y is positive at both ends of the step: only the interior probes
// see the two zeros (exact identity: 0.4 and 0.6).
func TestCrossingTwoInOneStep(t *testing.T) {
	p := Problem{F: func(t float64, _, d []float64) { d[0] = 2*t - 1 }, Y0: []float64{0.24}}
	// Brent's bracket, 4·eps·max(|t|, |h|), plus rounding of the quadratic.
	const rootTol = 1e-14
	for _, probes := range []int{0, 1, 5} {
		cr := Crossing{G: func(_ float64, y []float64) float64 { return y[0] }, Probes: probes}
		sol, err := Solve(context.Background(), p, 1, nil, &Settings{InitialStep: 1, Crossings: []Crossing{cr}})
		if err != nil {
			t.Fatal(err)
		}
		if sol.Stats.Accepted != 1 {
			t.Fatalf("probes %d: %d steps, want one step over [0, 1]", probes, sol.Stats.Accepted)
		}
		if len(sol.Hits) != 2 {
			t.Fatalf("probes %d: %d hits, want 2: %+v", probes, len(sol.Hits), sol.Hits)
		}
		for i, want := range []float64{0.4, 0.6} {
			if d := math.Abs(sol.Hits[i].T - want); d > rootTol {
				t.Errorf("probes %d: hit %d at %.17g, want %g", probes, i, sol.Hits[i].T, want)
			}
		}
		if sol.Hits[0].Sense != Falling || sol.Hits[1].Sense != Rising {
			t.Errorf("probes %d: senses %v, %v, want falling, rising", probes, sol.Hits[0].Sense, sol.Hits[1].Sense)
		}
	}
}

// TestCrossingAtStepEnd: with InitialStep = MaxStep = 0.5 the steps end
// at t = 0.5, 1, 1.5, 2 (sums exact in binary), and G = t - 1 is exactly
// zero at the end of the second step: that zero is reported once, not again
// as the start of the third step.
func TestCrossingAtStepEnd(t *testing.T) {
	p := Problem{F: func(_ float64, _, d []float64) { d[0] = 1 }, Y0: []float64{-1}}
	for _, sense := range []Sense{Either, Rising} {
		cr := Crossing{G: func(t float64, _ []float64) float64 { return t - 1 }, Sense: sense}
		sol, err := Solve(context.Background(), p, 2, nil, &Settings{InitialStep: 0.5, MaxStep: 0.5, Crossings: []Crossing{cr}})
		if err != nil {
			t.Fatal(err)
		}
		atOne := false
		for _, tt := range sol.T {
			atOne = atOne || tt == 1
		}
		if !atOne {
			t.Fatalf("no step ends at t = 1 (steps %v): the case does not test what it should", sol.T)
		}
		if len(sol.Hits) != 1 {
			t.Fatalf("sense %v: %d hits, want 1: %+v", sense, len(sol.Hits), sol.Hits)
		}
		// y = t - 1 up to rounding of the stage sums (a few ulps).
		if h := sol.Hits[0]; h.T != 1 || math.Abs(h.Y[0]) > 1e-15 || h.Sense != Rising {
			t.Errorf("sense %v: hit %+v, want t = 1, y = 0, rising", sense, h)
		}
	}
}

// TestCrossingLargeTime: the root tolerance scales with |t|. Near t = 1e6
// the spacing of doubles is 1.2e-10, so an absolute tolerance of 1e-15 could
// never be met; Brent must stop at 4·eps·|t| ≈ 9e-10 after a few
// iterations, and the zero of x = cos(t - t0) at t0 + pi/2 must be found to
// that bracket plus the solution's error.
func TestCrossingLargeTime(t *testing.T) {
	const t0 = 1e6
	p := Problem{F: harmonic, T0: t0, Y0: []float64{1, 0}}
	calls := 0
	cr := Crossing{G: func(_ float64, y []float64) float64 { calls++; return y[0] }}
	sol, err := Solve(context.Background(), p, t0+3, nil, &Settings{RelTol: 1e-12, AbsTol: 1e-12, Crossings: []Crossing{cr}})
	if err != nil {
		t.Fatal(err)
	}
	if len(sol.Hits) != 1 {
		t.Fatalf("%d hits, want 1", len(sol.Hits))
	}
	want := t0 + math.Pi/2
	// Bracket 4·eps·|t| plus the state error at tol 1e-12 (~1e-11) over a
	// slope of 1.
	tol := 4*0x1p-52*want + 1e-10
	if d := math.Abs(sol.Hits[0].T - want); d > tol {
		t.Errorf("hit at %.17g, want %.17g (diff %.2g, tol %.2g)", sol.Hits[0].T, want, d, tol)
	}
	// Probes: 3 per step plus the step end; Brent's iterations on top of
	// that stay few (an unscaled tolerance would run to the 200-iteration cap).
	probeCalls := 1 + 4*sol.Stats.Accepted
	extra := calls - probeCalls
	t.Logf("%d steps, %d evaluations of G beyond the probes, hit at t0%+.17g", sol.Stats.Accepted, extra, sol.Hits[0].T-t0)
	if extra > 30 {
		t.Errorf("Brent used %d evaluations of G, want <= 30", extra)
	}
}

// TestCrossingSeveralFunctions: hits of several functions come in time
// order with the index of their function. For x = cos t, v = -sin t the
// zeros of x are pi/2 + k·pi and those of v are k·pi (exact identities).
func TestCrossingSeveralFunctions(t *testing.T) {
	p := Problem{F: harmonic, Y0: []float64{1, 0}}
	cs := []Crossing{
		{Name: "x", G: func(_ float64, y []float64) float64 { return y[0] }},
		{Name: "v", G: func(_ float64, y []float64) float64 { return y[1] }},
	}
	sol, err := Solve(context.Background(), p, 7, nil, &Settings{RelTol: tightTol, AbsTol: tightTol, Crossings: cs})
	if err != nil {
		t.Fatal(err)
	}
	// In (0, 7]: x at pi/2, 3pi/2, 5pi/2 (7.85 > 7: no); v at pi, 2pi.
	want := []struct {
		which int
		t     float64
	}{{0, math.Pi / 2}, {1, math.Pi}, {0, 3 * math.Pi / 2}, {1, 2 * math.Pi}}
	if len(sol.Hits) != len(want) {
		t.Fatalf("%d hits, want %d: %+v", len(sol.Hits), len(want), sol.Hits)
	}
	for i, w := range want {
		if h := sol.Hits[i]; h.Which != w.which || math.Abs(h.T-w.t) > zeroTol {
			t.Errorf("hit %d: function %d at %.17g, want function %d at %.17g", i, h.Which, h.T, w.which, w.t)
		}
	}
}

// TestCrossingNaN: a crossing function that returns NaN has no sign to
// compare; the solve must end with ErrNonFinite naming the crossing, not
// report a crossing there. At t0 it fails before any step.
func TestCrossingNaN(t *testing.T) {
	p := Problem{F: harmonic, Y0: []float64{1, 0}}
	late := Crossing{G: func(t float64, y []float64) float64 {
		if t > 2 {
			return math.NaN()
		}
		return y[0]
	}}
	sol, err := Solve(context.Background(), p, 5, nil, &Settings{Crossings: []Crossing{late}})
	if !errors.Is(err, ErrNonFinite) || !strings.Contains(err.Error(), "Crossings[0].G") {
		t.Fatalf("err = %v, want ErrNonFinite naming Crossings[0].G", err)
	}
	if sol == nil || sol.Status != Failed || sol.End > 2 || len(sol.Hits) != 1 {
		t.Fatalf("partial solution %+v, want failed before t = 2 with the zero at pi/2", sol)
	}
	if sol.T[len(sol.T)-1] != sol.End || sol.Final[0] != sol.Y[len(sol.Y)-2] {
		t.Errorf("End %v / Final %v do not match the last stored step %v", sol.End, sol.Final, sol.T[len(sol.T)-1])
	}
	first := Crossing{G: func(float64, []float64) float64 { return math.NaN() }}
	if sol, err := Solve(context.Background(), p, 5, nil, &Settings{Crossings: []Crossing{first}}); !errors.Is(err, ErrNonFinite) || sol != nil {
		t.Errorf("NaN at t0: err = %v, solution %v; want ErrNonFinite and no solution", err, sol)
	}
}
