// Package testode is the conformance suite that every integration method of
// package integrate runs: measured convergence order, tolerance
// proportionality, order of the continuous extension, backward integration,
// sampling, crossings, evaluation counts, bad input and non-finite fields.
//
// Usage, from a test of package integrate:
//
//	func TestConformance(t *testing.T) {
//		testode.Run(t, integrate.DormandPrince853, testode.Case{Order: 8, DenseOrder: 7, ...})
//	}
//
// The problems have exact solutions: the Kepler problem (exact through
// Kepler's equation), the harmonic oscillator, and a non-autonomous scalar
// pair. Order conditions are checked separately, on the tableaus, inside
// package integrate.
package testode

import (
	"context"
	"math"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
)

// Case says what a method claims, for Run.
type Case struct {
	// Order is the order p of the propagated solution: the global error of
	// a fixed-step run is O(h^p).
	Order int
	// DenseOrder is the order q of the continuous extension: its error
	// inside one step is O(h^(q+1)).
	DenseOrder int
	// WithStep, for fixed-step methods, returns the method with step h.
	// Nil for adaptive methods, which Run drives with fixed steps (MaxStep =
	// InitialStep = h and tolerances so loose that nothing is rejected) for
	// the order measurements, and with tolerances for everything else.
	WithStep func(h float64) integrate.Method
	// Step is the step size that fixed-step methods use for the accuracy
	// checks (backward runs, sampling, crossings); ignored for adaptive ones.
	Step float64
	// Tol is the tolerance (RelTol = AbsTol) that adaptive methods use for
	// the accuracy checks; zero means 1e-12.
	Tol float64
	// StageEvals is the number of evaluations of F per attempted step,
	// AcceptEvals the further ones per accepted step (1 when the derivative
	// at the new point is not a stage), DenseEvals the further ones per step
	// whose continuous extension is used.
	StageEvals, AcceptEvals, DenseEvals int
	// StiffTest says that the method has a stiffness test that must fire on
	// a stiff problem and stay silent on a non-stiff one.
	StiffTest bool
}

func (c Case) fixed() bool { return c.WithStep != nil }

// Tolerances and bands of the suite.
const (
	// orderBand: a fitted order must lie within ±0.2 of the claimed one
	// (REFERENCES.md §5d: "expect the observed order within about ±0.2 of
	// p"; common practice).
	orderBand = 0.2
	// stepBand: the one-step error order of an adaptive pair, h^(p+1),
	// must lie within ±0.3. For p = 8 only two halvings fit between the
	// onset of the asymptotic regime and the rounding floor of one step,
	// and the next term of the error still tilts the fit by up to 0.2
	// there (measured 8.85 on this problem, 8.8–9.2 on others).
	stepBand = 0.3
	// denseBand: the fitted one-step error order of the continuous
	// extension must lie within ±0.3 of q+1. Its error mixes several terms
	// of similar size (it is a polynomial in θ fitted to stages), so it
	// bends more before it is asymptotic than an endpoint error.
	denseBand = 0.3
	// propLo, propHi bound the slope of log(global error) against
	// log(tolerance) of adaptive pairs (tolerance proportionality; Hairer,
	// Nørsett & Wanner 1993, Sect. II.4 and the work-precision diagrams of
	// Sect. II.10). Slope 1 is the asymptotic ideal for local
	// extrapolation with an error estimate of the controller's order; the
	// safety factor, step limits and rejections bend it. The band is common
	// practice, checked against the slopes measured here (1.00–1.07).
	propLo, propHi = 0.8, 1.2
	// stepFloor: one step rounds at about 1e-16·|y|; one-step errors below
	// 1e-14 are left out of fits.
	stepFloor = 1e-14
	// roundWalk: N steps accumulate rounding like a random walk, about
	// sqrt(N)·eps (common practice); global errors below
	// roundWalk·sqrt(N)·eps are left out of fits.
	roundWalk = 30
	// fitPoints: fits use the finest fitPoints step sizes above the rounding
	// floor (steps shrink by √2, so 7 points span three halvings), and need
	// at least minFitPoints (two halvings).
	fitPoints, minFitPoints = 7, 5
)

// Run runs the conformance suite for m as sub-tests of t.
func Run(t *testing.T, m integrate.Method, c Case) {
	t.Helper()
	if c.Tol == 0 {
		c.Tol = 1e-12
	}
	t.Run("order", func(t *testing.T) { checkOrder(t, m, c) })
	if !c.fixed() {
		t.Run("tolerance", func(t *testing.T) { checkProportionality(t, m, c) })
	}
	t.Run("dense", func(t *testing.T) { checkDense(t, m, c) })
	t.Run("backward", func(t *testing.T) { checkBackward(t, m, c) })
	t.Run("sampling", func(t *testing.T) { checkSampling(t, m, c) })
	t.Run("crossings", func(t *testing.T) { checkCrossings(t, m, c) })
	t.Run("evaluations", func(t *testing.T) { checkEvaluations(t, m, c) })
	t.Run("badinput", func(t *testing.T) { checkBadInput(t, m, c) })
	t.Run("nonfinite", func(t *testing.T) { checkNonFinite(t, m, c) })
	if c.StiffTest {
		t.Run("stiffness", func(t *testing.T) { checkStiffness(t, m, c) })
	}
}

// withStep returns the method and settings that advance with step h: the
// fixed-step method itself, or the adaptive one pinned to h.
func (c Case) withStep(m integrate.Method, h float64) (integrate.Method, *integrate.Settings) {
	if c.fixed() {
		return c.WithStep(h), &integrate.Settings{}
	}
	// sk_i >= 1e3 makes every error estimate of a sane step far below 1.
	return m, &integrate.Settings{InitialStep: h, MaxStep: h, RelTol: 1, AbsTol: 1e3}
}

// accurate returns the method and settings of the accuracy checks.
func (c Case) accurate(m integrate.Method) (integrate.Method, *integrate.Settings) {
	if c.fixed() {
		return c.WithStep(c.Step), &integrate.Settings{}
	}
	return m, &integrate.Settings{RelTol: c.Tol, AbsTol: c.Tol}
}

// Kepler is the plane two-body problem, y = (q1, q2, p1, p2),
// d²q/dt² = −q/|q|³, starting at pericentre with eccentricity e: q(0) = (1−e, 0),
// p(0) = (0, √((1+e)/(1−e))); the period is 2π (Hairer, Lubich & Wanner,
// Geometric Numerical Integration, 2nd ed., Springer 2006, Ch. I).
func Kepler(e float64) integrate.Problem {
	return integrate.Problem{
		F: func(_ float64, y, d []float64) {
			r2 := float64(y[0]*y[0]) + float64(y[1]*y[1])
			r3 := float64(r2 * math.Sqrt(r2))
			d[0], d[1] = y[2], y[3]
			d[2], d[3] = -y[0]/r3, -y[1]/r3
		},
		Y0: []float64{1 - e, 0, 0, math.Sqrt((1 + e) / (1 - e))},
	}
}

// KeplerExact writes the exact solution of Kepler(e) at t into dst: with the
// eccentric anomaly E from Kepler's equation E − e sin E = t (solved by
// Newton's method to rounding),
//
//	q = (cos E − e, √(1−e²) sin E),  p = (−sin E, √(1−e²) cos E) / (1 − e cos E).
//
// This is an exact identity of the two-body problem with semi-major axis 1.
func KeplerExact(e, t float64, dst []float64) []float64 {
	M := math.Remainder(t, 2*math.Pi)
	E := M + e*math.Sin(M)
	for range 50 {
		d := (E - e*math.Sin(E) - M) / (1 - e*math.Cos(E))
		E -= d
		if math.Abs(d) < 1e-17 {
			break
		}
	}
	s, co := math.Sincos(E)
	w := math.Sqrt(1 - e*e)
	den := 1 - e*co
	if cap(dst) < 4 {
		dst = make([]float64, 4)
	}
	dst = dst[:4]
	dst[0], dst[1], dst[2], dst[3] = co-e, w*s, -s/den, w*co/den
	return dst
}

// oscillator is d²y/dt² = −y as a system, y(0) = (1, 0): y = (cos t, −sin t).
func oscillator() integrate.Problem {
	return integrate.Problem{
		F:  func(_ float64, y, d []float64) { d[0], d[1] = y[1], -y[0] },
		Y0: []float64{1, 0},
	}
}

// nonAutonomous is y1' = −2t·y1², y2' = cos(t)·y2, y(0) = (1, 1), with the
// exact solution y1 = 1/(1+t²), y2 = exp(sin t).
func nonAutonomous() integrate.Problem {
	return integrate.Problem{
		F: func(t float64, y, d []float64) {
			d[0] = float64(-2*t*y[0]) * y[0]
			d[1] = float64(math.Cos(t) * y[1])
		},
		Y0: []float64{1, 1},
	}
}

func nonAutonomousExact(t float64) []float64 {
	return []float64{1 / (1 + t*t), math.Exp(math.Sin(t))}
}

func maxDiff(a, b []float64) float64 {
	var m float64
	for i := range a {
		m = max(m, math.Abs(a[i]-b[i]))
	}
	return m
}

// fit returns the least-squares slope of log y against log x.
func fit(x, y []float64) float64 {
	var sx, sy, sxx, sxy float64
	n := float64(len(x))
	for i := range x {
		lx, ly := math.Log(x[i]), math.Log(y[i])
		sx += lx
		sy += ly
		sxx += lx * lx
		sxy += lx * ly
	}
	return (n*sxy - sx*sy) / (n*sxx - sx*sx)
}

// finest returns the last n points.
func finest(hs, errs []float64, n int) ([]float64, []float64) {
	lo := max(0, len(hs)-n)
	return hs[lo:], errs[lo:]
}

func norm2(a, b []float64) float64 {
	var s float64
	for i := range a {
		d := a[i] - b[i]
		s += d * d
	}
	return math.Sqrt(s)
}

// checkOrder measures the order of the propagated solution. Fixed-step
// methods: the global error at t = 4 of the Kepler problem (e = 0.2) with
// N = 8, 8√2, 16, ... steps, which must fall like h^p. Adaptive pairs,
// driven with fixed steps: the error of one step of size h from the exact
// state at t0 = 2.5 (near apocentre, e = 0.5), which must fall like
// h^(p+1); a single step reaches far below the rounding floor of a whole
// run, which an 8th-order global error cannot over three halvings.
func checkOrder(t *testing.T, m integrate.Method, c Case) {
	var hs, errs []float64
	want := float64(c.Order)
	what := "global error at t=4"
	if c.fixed() {
		const e, T = 0.2, 4.0
		p := Kepler(e)
		exact := KeplerExact(e, T, nil)
		for k := 0; ; k++ {
			N := int(math.Round(8 * math.Pow(2, float64(k)/2)))
			if N > 1<<21 {
				break
			}
			h := T / float64(N)
			mm, s := c.withStep(m, h)
			s.MaxSteps = N + 1
			sol, err := integrate.Solve(context.Background(), p, T, mm, dropped(s))
			if err != nil {
				t.Fatalf("N=%d: %v", N, err)
			}
			switch sol.Stats.Accepted {
			case N:
			case N + 1:
				// N·h rounds a few ulps short of T and the stepper's
				// last-step test (1e-12·h) misses it: one extra step of
				// ~1e-16. Harmless for the error; logged, not hidden.
				t.Logf("N=%d: %d steps (an extra rounding-size last step)", N, N+1)
			default:
				t.Fatalf("N=%d: got %d steps", N, sol.Stats.Accepted)
			}
			d := norm2(sol.Final, exact) // exact: Kepler's equation
			if d < roundWalk*math.Sqrt(float64(N))*0x1p-52 {
				break
			}
			hs, errs = append(hs, h), append(errs, d)
		}
	} else {
		const e, t0 = 0.5, 2.5
		want++
		what = "one-step error"
		p := Kepler(e)
		p.T0 = t0
		p.Y0 = KeplerExact(e, t0, nil)
		for k := 0; k < 60; k++ {
			h := math.Pow(2, -float64(k)/2)
			mm, s := c.withStep(m, h)
			t1 := t0 + h
			sol, err := integrate.Solve(context.Background(), p, t1, mm, s)
			if err != nil {
				t.Fatalf("h=%g: %v", h, err)
			}
			if sol.Stats.Accepted != 1 || sol.Stats.Rejected != 0 {
				t.Fatalf("h=%g: %d accepted, %d rejected steps, want 1 and 0", h, sol.Stats.Accepted, sol.Stats.Rejected)
			}
			d := norm2(sol.Final, KeplerExact(e, t1, nil)) // exact: Kepler's equation
			if d < stepFloor {
				break
			}
			hs, errs = append(hs, t1-t0), append(errs, d)
		}
	}
	wh, we := finest(hs, errs, fitPoints)
	if len(wh) < minFitPoints {
		t.Fatalf("only %d step sizes above the rounding floor: h=%v err=%v", len(wh), hs, errs)
	}
	slope := fit(wh, we)
	band := orderBand
	if !c.fixed() {
		band = stepBand
	}
	t.Logf("%s: %s ∝ h^%.3f (want %v ± %g) over h %.3g..%.3g (err %.2e..%.2e)",
		m.Name(), what, slope, want, band, wh[0], wh[len(wh)-1], we[0], we[len(we)-1])
	if math.Abs(slope-want) > band {
		t.Errorf("%s: fitted order %.3f, want %v ± %g (h=%v, err=%v)", what, slope, want, band, wh, we)
	}
}

// checkProportionality fits log(global error) against log(tol) for
// tol = 1e-6 .. 1e-12 over four periods of the Kepler problem (e = 0.5),
// where the exact solution returns to y0. (After a single period the
// error of DP853 partly cancels and its slope reads 0.79.)
func checkProportionality(t *testing.T, m integrate.Method, c Case) {
	p := Kepler(0.5)
	T := 8 * math.Pi
	var tols, errs, steps []float64
	for k := 6; k <= 12; k++ {
		tol := math.Pow(10, -float64(k))
		sol, err := integrate.Solve(context.Background(), p, T, m, &integrate.Settings{RelTol: tol, AbsTol: tol, DropSteps: true})
		if err != nil {
			t.Fatalf("tol %g: %v", tol, err)
		}
		tols = append(tols, tol)
		errs = append(errs, norm2(sol.Final, p.Y0)) // exact identity: y(8π) = y(0)
		steps = append(steps, float64(sol.Stats.Accepted))
	}
	slope := fit(tols, errs)
	work := fit(steps, errs)
	t.Logf("%s: error ∝ tol^%.3f over tol 1e-6..1e-12 (err %.2e..%.2e); error ∝ steps^%.2f (steps %v)",
		m.Name(), slope, errs[0], errs[len(errs)-1], work, steps)
	if slope < propLo || slope > propHi {
		t.Errorf("tolerance proportionality slope %.3f, want in [%g, %g] (tol=%v err=%v)", slope, propLo, propHi, tols, errs)
	}
}

// checkDense takes one step of size h from the exact state of the Kepler
// problem (e = 0.5) at t0 = 2.5 and compares the continuous extension at
// θ = 1/4, 1/2, 3/4 with the exact solution; the error is O(h^(q+1)), or
// O(h^(p+1)) if the step's own error dominates.
func checkDense(t *testing.T, m integrate.Method, c Case) {
	const e, t0 = 0.5, 2.5
	p := Kepler(e)
	p.T0 = t0
	p.Y0 = KeplerExact(e, t0, nil)
	var hs, errs []float64
	ex := make([]float64, 4)
	got := make([]float64, 4)
	for k := 0; k < 60; k++ {
		h := math.Pow(2, -float64(k)/2)
		mm, s := c.withStep(m, h)
		t1 := t0 + h
		sol, err := integrate.Solve(context.Background(), p, t1, mm, s)
		if err != nil {
			t.Fatalf("h=%g: %v", h, err)
		}
		if sol.Stats.Accepted != 1 {
			t.Fatalf("h=%g: %d steps, want 1", h, sol.Stats.Accepted)
		}
		hh := t1 - t0
		var d float64
		for _, th := range []float64{0.25, 0.5, 0.75} {
			tt := t0 + th*hh
			if sol.At(tt, got) == nil {
				t.Fatalf("At(%v) = nil inside [%v, %v]", tt, t0, t1)
			}
			d = max(d, norm2(got, KeplerExact(e, tt, ex))) // exact: Kepler's equation
		}
		if d < stepFloor {
			break
		}
		hs, errs = append(hs, hh), append(errs, d)
	}
	wh, we := finest(hs, errs, fitPoints)
	if len(wh) < minFitPoints {
		t.Fatalf("only %d step sizes above the rounding floor: h=%v err=%v", len(wh), hs, errs)
	}
	slope := fit(wh, we)
	want := float64(min(c.DenseOrder, c.Order) + 1)
	t.Logf("%s: dense-output error inside one step ∝ h^%.3f (want %v: dense order %d) over h %.3g..%.3g (err %.2e..%.2e)",
		m.Name(), slope, want, c.DenseOrder, wh[0], wh[len(wh)-1], we[0], we[len(we)-1])
	if math.Abs(slope-want) > denseBand {
		t.Errorf("dense-output error order %.3f, want %v ± %g (h=%v err=%v)", slope, want, denseBand, wh, we)
	}
}

// dropped returns a copy of s with DropSteps set.
func dropped(s *integrate.Settings) *integrate.Settings {
	c := *s
	c.DropSteps = true
	return &c
}
