package maps

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/dd"
)

// ErrNoConvergence reports a root of the route to chaos (a superstable
// parameter, a bifurcation point) that Newton's method did not settle on.
var ErrNoConvergence = fmt.Errorf("maps: the iteration did not converge")

// Cascade is the period-doubling cascade of a one-dimensional family with
// one critical point: the superstable parameters and the ratios that
// converge to Feigenbaum's constants.
type Cascade struct {
	// Superstable[k] is the parameter R_k at which the critical point lies
	// on a cycle of period 2^k.
	Superstable []float64
	// Distances[k] is d_k = f^(2^(k-1))(xc) - xc at R_k, the signed
	// distance from the critical point to the nearest point of its cycle
	// (k >= 1; Distances[0] is 0).
	Distances []float64
	// Delta[k] = (R_k - R_(k-1)) / (R_(k+1) - R_k) for k = 1..n-1 (Delta[0]
	// is 0); it tends to Feigenbaum's δ = 4.6692016091...
	Delta []float64
	// Alpha[k] = -d_k / d_(k+1) for k = 1..n-1 (Alpha[0] is 0); it tends
	// to Feigenbaum's α = 2.5029078750...
	Alpha []float64
	// Doubling[k] is the parameter r_k, between R_(k-1) and R_k, at which
	// the cycle of period 2^(k-1) loses its stability to one of period 2^k
	// (its multiplier passes -1), for k = 1..n (Doubling[0] is 0); NaN
	// where Newton's method did not settle inside that interval.
	Doubling []float64
}

// LastDelta and LastAlpha are the estimates from the deepest levels.
func (c *Cascade) LastDelta() float64 { return last(c.Delta) }

// LastAlpha is the estimate of α from the deepest levels.
func (c *Cascade) LastAlpha() float64 { return last(c.Alpha) }

func last(v []float64) float64 {
	if len(v) < 2 {
		return math.NaN()
	}
	return v[len(v)-1]
}

// MaxCascadeLevel is the deepest level PeriodDoubling goes to: at level 13
// (period 8192) the superstable parameters of a quadratic family are 1e-8
// apart, and float64 resolves their differences only to about 1e-7 of
// themselves, the accuracy the ratios need.
const MaxCascadeLevel = 13

// PeriodDoubling finds the superstable parameters R_0..R_n of the family
// fam (one parameter, dimension 1) whose critical point is xc: R_k is the
// root of f_r^(2^k)(xc) = xc (iterated in double-double arithmetic when
// the map has that form) near the extrapolation R_(k-1) + (R_(k-1) -
// R_(k-2))/δ_k, found by the secant method, and must have least period
// 2^k. guess holds rough values of R_0 and R_1 (the secant method starts
// from them). From the R_k come the estimates of Feigenbaum's δ and α;
// between R_(k-1) and R_k lies the period-doubling point r_k, solved for
// by Newton's method on f^q(x) = x, (f^q)'(x) = -1 with q = 2^(k-1).
//
// Errors: n outside 2..MaxCascadeLevel (integrate.ErrSettings), a map of
// dimension other than 1 (integrate.ErrDimension), fam's error, a level
// that does not converge or converges on a cycle of the wrong period
// (ErrNoConvergence; the levels found so far are returned), a canceled ctx.
//
// References:
//
//	M. J. Feigenbaum, Quantitative universality for a class of nonlinear
//	  transformations, J. Stat. Phys. 19 (1978) 25–52.
//	K. Briggs, A precise calculation of the Feigenbaum constants, Math.
//	  Comp. 57 (1991) 435–439.
func PeriodDoubling(ctx context.Context, fam Family, xc float64, guess [2]float64, n int) (*Cascade, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if n < 2 || n > MaxCascadeLevel {
		return nil, fmt.Errorf("maps: cascade depth %d: must be in 2..%d: %w", n, MaxCascadeLevel, integrate.ErrSettings)
	}
	if fam == nil {
		return nil, fmt.Errorf("maps: PeriodDoubling of a nil family: %w", integrate.ErrSettings)
	}
	for _, v := range []float64{xc, guess[0], guess[1]} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("maps: critical point or guess %v: %w", v, integrate.ErrNonFinite)
		}
	}
	c := &Cascade{}
	for k := 0; k <= n; k++ {
		if err := ctx.Err(); err != nil {
			return c, fmt.Errorf("maps: cascade canceled at level %d: %w", k, err)
		}
		var r0, r1 float64
		switch k {
		case 0, 1:
			r0 = guess[k]
			r1 = r0 + float64(1e-6*(1+math.Abs(r0)))
		default:
			rs := c.Superstable
			d := 4.669201609102990 // Feigenbaum's δ (Briggs 1991): only the start of the search
			if k >= 3 {
				d = (rs[k-2] - rs[k-3]) / (rs[k-1] - rs[k-2])
			}
			step := (rs[k-1] - rs[k-2]) / d
			r0 = rs[k-1] + step
			r1 = r0 + float64(step*1e-3)
		}
		period := 1 << k
		g := func(r float64) (float64, error) {
			m, err := fam([]float64{r})
			if err != nil {
				return 0, err
			}
			if m.Dim() != 1 {
				return 0, fmt.Errorf("maps: PeriodDoubling of a map of dimension %d: %w", m.Dim(), integrate.ErrDimension)
			}
			return iterateGap(m, xc, period), nil
		}
		r, err := secant(g, r0, r1)
		if err != nil {
			return c, fmt.Errorf("maps: superstable parameter of period %d: %w", period, err)
		}
		m, err := fam([]float64{r})
		if err != nil {
			return c, err
		}
		if k >= 1 {
			// Least period 2^k: the critical point must not return at 2^(k-1).
			gap := iterateGap(m, xc, period/2)
			if math.Abs(gap) <= 1e-9*(1+math.Abs(xc)) {
				return c, fmt.Errorf("maps: level %d converged on a cycle of period %d at %v, not %d: %w", k, period/2, r, period, ErrNoConvergence)
			}
			c.Distances = append(c.Distances, gap)
		} else {
			c.Distances = append(c.Distances, 0)
		}
		c.Superstable = append(c.Superstable, r)
	}
	rs, ds := c.Superstable, c.Distances
	c.Doubling = make([]float64, n+1)
	for k := 1; k <= n; k++ {
		// From the critical point at R_(k-1), where it lies on the cycle
		// of period 2^(k-1) with multiplier 0.
		r, _, err := birth(fam, 1<<(k-1), -1, xc, rs[k-1], rs[k-1], rs[k])
		if err != nil || r < rs[k-1] || r > rs[k] {
			r = math.NaN()
		}
		c.Doubling[k] = r
	}
	c.Delta = make([]float64, n)
	c.Alpha = make([]float64, n)
	for k := 1; k < n; k++ {
		c.Delta[k] = (rs[k] - rs[k-1]) / (rs[k+1] - rs[k])
		c.Alpha[k] = -ds[k] / ds[k+1]
	}
	return c, nil
}

// iterateGap returns f^p(x) - x of a one-dimensional map, iterated in
// double-double arithmetic when the map has its double-double form (the
// rounding of 2^k float64 iterates would otherwise move the deepest
// superstable parameters by several 1e-14, more than the ratios allow),
// else in float64.
func iterateGap(m *Map, x float64, p int) float64 {
	if m.f.NextDD == nil {
		return iterate1(m, x, p) - x
	}
	v, w := []DoubleDouble{dd.From(x)}, []DoubleDouble{{}}
	for range p {
		if err := m.f.NextDD(v, w); err != nil || !w[0].IsFinite() {
			return math.NaN()
		}
		v[0] = w[0]
		if m.periods != nil {
			v[0] = wrapAngleDD(v[0], m.periods[0])
		}
	}
	return dd.Sub(v[0], dd.From(x)).Float64()
}

// iterate1 returns f^p(x) of a one-dimensional map.
func iterate1(m *Map, x float64, p int) float64 {
	v := []float64{x}
	for range p {
		m.Next(v, v)
	}
	return v[0]
}

// secant finds a root of g from r0, r1 by the secant method.
func secant(g func(float64) (float64, error), r0, r1 float64) (float64, error) {
	g0, err := g(r0)
	if err != nil {
		return 0, err
	}
	g1, err := g(r1)
	if err != nil {
		return 0, err
	}
	for range 100 {
		if g1 == 0 {
			return r1, nil
		}
		if g1 == g0 {
			break
		}
		r2 := r1 - float64(g1*(r1-r0))/(g1-g0)
		if math.IsNaN(r2) || math.IsInf(r2, 0) {
			break
		}
		if math.Abs(r2-r1) <= 2e-16*(1+math.Abs(r1)) {
			return r2, nil
		}
		r0, g0 = r1, g1
		r1 = r2
		if g1, err = g(r1); err != nil {
			return 0, err
		}
		if math.IsNaN(g1) || math.IsInf(g1, 0) {
			break
		}
	}
	if math.Abs(g1) <= 1e-13 {
		return r1, nil // settled within the rounding of f^p
	}
	return 0, fmt.Errorf("%w (secant method from %v)", ErrNoConvergence, r1)
}

// Onset finds the first parameter in [from, to] at which a cycle of least
// period p appears in a one-dimensional family, searching for cycles in
// [lo, hi] (CycleSettings.Low, High): the number of period-p cycles is
// counted at steps+1 equally spaced parameters, and in the first step where
// it grows the birth is solved for exactly, by Newton's method on
// f^p(x) = x, (f^p)'(x) = 1 in (x, r) from the new cycle whose multiplier
// is nearest 1. This is the tangent bifurcation that opens a periodic
// window (the logistic map's period-3 window at r = 1 + √8); at a period
// doubling the conditions are degenerate, the new cycle branching off the
// old, and Newton's method does not settle (ErrNoConvergence). It returns
// the parameter and a
// point of the cycle born there.
//
// Errors: invalid input (integrate.ErrSettings), no birth in the range
// (ErrNoConvergence with "no cycle of period p appears"), Newton's method
// not settling (ErrNoConvergence), fam's and Cycles' errors.
//
// References:
//
//	Y. Pomeau, P. Manneville, Intermittent transition to turbulence in
//	  dissipative dynamical systems, Commun. Math. Phys. 74 (1980)
//	  189–197 (the tangent bifurcation that opens a window).
func Onset(ctx context.Context, fam Family, p int, from, to float64, steps int, s *CycleSettings) (r, x float64, err error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if fam == nil || steps < 1 || steps > 1<<20 || !(from < to) || math.IsInf(from, 0) || math.IsInf(to, 0) {
		return 0, 0, fmt.Errorf("maps: Onset in [%v, %v] with %d steps: needs a family, from < to finite and steps in 1..2^20: %w", from, to, steps, integrate.ErrSettings)
	}
	count := func(r float64) ([]Cycle, error) {
		m, err := fam([]float64{r})
		if err != nil {
			return nil, err
		}
		return Cycles(ctx, m, p, s)
	}
	prev, err := count(from)
	if err != nil {
		return 0, 0, err
	}
	for i := 1; i <= steps; i++ {
		ri := from + (to-from)*float64(i)/float64(steps)
		cs, err := count(ri)
		if err != nil {
			return 0, 0, err
		}
		if len(cs) > len(prev) {
			best := cs[0]
			for _, c := range cs[1:] {
				if math.Abs(c.Multiplier-1) < math.Abs(best.Multiplier-1) {
					best = c
				}
			}
			rl := from + (to-from)*float64(i-1)/float64(steps)
			return birth(fam, p, 1, best.Points[0][0], ri, rl, ri)
		}
		prev = cs
	}
	return 0, 0, fmt.Errorf("maps: no cycle of period %d appears in [%v, %v]: %w", p, from, to, ErrNoConvergence)
}

// birth solves f_r^p(x) = x, (f_r^p)'(x) = mult for (x, r) by Newton's method
// from (x, r), with the partial derivatives in r and the second derivative
// in x by central differences (the root is still the exact one: only the
// rate of convergence depends on them). The result must lie in [rl, rr],
// widened by a step.
func birth(fam Family, p int, mult, x, r, rl, rr float64) (float64, float64, error) {
	eval := func(x, r float64) (g, dg float64, err error) {
		m, err := fam([]float64{r})
		if err != nil {
			return 0, 0, err
		}
		fp, d := iterDeriv(m, x, p)
		return fp - x, d - mult, nil
	}
	const hx, hr = 1e-7, 1e-7 // central differences: error h² ≈ 1e-14 against rounding ε/h ≈ 1e-9
	for range 60 {
		g, dg, err := eval(x, r)
		if err != nil {
			return 0, 0, err
		}
		_, dgxp, _ := eval(x+hx, r)
		_, dgxm, _ := eval(x-hx, r)
		grp, dgrp, _ := eval(x, r+hr)
		grm, dgrm, _ := eval(x, r-hr)
		// Jacobian of (g, dg) in (x, r).
		a11, a12 := dg+mult-1, (grp-grm)/(2*hr) // ∂(f^p(x) - x)/∂x = (f^p)' - 1
		a21, a22 := (dgxp-dgxm)/(2*hx), (dgrp-dgrm)/(2*hr)
		det := float64(a11*a22) - float64(a12*a21)
		if det == 0 || math.IsNaN(det) {
			break
		}
		dx := (float64(a22*g) - float64(a12*dg)) / det
		dr := (float64(a11*dg) - float64(a21*g)) / det
		x -= dx
		r -= dr
		if math.IsNaN(x) || math.IsNaN(r) {
			break
		}
		// The difference quotients make the convergence linear with a
		// factor near 1e-7: a step of 1e-13 leaves an error near 1e-20.
		if math.Abs(dr) <= 1e-13*(1+math.Abs(r)) && math.Abs(dx) <= 1e-13*(1+math.Abs(x)) {
			w := rr - rl
			if r < rl-w || r > rr+w {
				return 0, 0, fmt.Errorf("maps: the birth of period %d converged to r = %v, outside [%v, %v]: %w", p, r, rl, rr, ErrNoConvergence)
			}
			return r, x, nil
		}
	}
	return 0, 0, fmt.Errorf("maps: the birth of period %d near r = %v: %w", p, rr, ErrNoConvergence)
}

// iterDeriv returns f^p(x) and (f^p)'(x) of a one-dimensional map.
func iterDeriv(m *Map, x float64, p int) (float64, float64) {
	v := []float64{x}
	j := mat.NewDense(1, 1, nil)
	d := 1.0
	for range p {
		m.Jacobian(v, j)
		d *= j.At(0, 0)
		m.Next(v, v)
	}
	return v[0], d
}
