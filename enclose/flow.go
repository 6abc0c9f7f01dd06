package enclose

import (
	"context"
	"fmt"
	"math"
	"slices"

	"github.com/plumbdyn/plumb/internal/detmath"
	"github.com/plumbdyn/plumb/internal/ival"
)

// Flow encloses the solution of the flow y' = f(t, y) given by formulas
// from time t0 to t1 > t0, through every point of the start box (y0, or
// the box of half-width Settings.Radius around it). Each step proves that
// the exact solution of the formulas, with their float64 parameters, lies
// in the step's box; Result.Horizon is the last step time up to which the
// box stayed narrower than Settings.Tol.
//
// One step from t to t+h:
//
//  1. An a-priori enclosure B of the solution over [t, t+h] by the Picard
//     test: when X + [0,h]·f([t,t+h], B) lies in the interior of B, every
//     solution from the box X stays in B over the step. h is halved while
//     no such B is found, and B is then narrowed with the Taylor
//     polynomial over [0,h] (see apriori).
//  2. The Taylor polynomial T of order p at the box, from the interval
//     Taylor coefficients of the solution, plus the Lagrange remainder
//     h^(p+1)·y_[p+1]([t,t+h], B), which encloses the truncation error of
//     every solution from X.
//  3. Lohner's wrapping control: the set is carried as c + A·r (a point c,
//     a matrix A, an interval box r). By the mean value theorem T(x) lies
//     in T(c) + J·A·r, with J an enclosure of the derivative of T over
//     the box, here from the interval Taylor coefficients of the
//     variational equations V' = (∂f/∂y)·V, V(t) = I (exact derivatives of
//     the coefficients, by symbolic differentiation of the formulas). The
//     new A is the orthogonal factor Q of the QR decomposition of mid(J·A)
//     (columns pivoted by the length of the set along them), and
//     r' = (Q⁻¹·J·A)·r + Q⁻¹·(s - c'), with Q⁻¹ enclosed rigorously (see
//     inverse) and s = T(c) + remainder, c' = mid(s).
//
// The step size is the Taylor step of the point coefficients at c, whose
// last two terms are about one rounding unit of the state (Jorba & Zou
// 2005), capped at 0.5/L with L the row-sum norm of ∂f/∂y over the box
// (the Picard operator contracts for h·L < 1), shortened to land on
// Settings.Stops and t1, by 0.8 while the Picard test fails, and halved
// (at most three times) while the remainder is wider than 16 units in the
// last place of the state: the coefficient over the wide box B
// overestimates, and a remainder above the rounding floor costs width at
// every later step.
//
// The run stops early, with the partial result and Result.Failure set,
// when the width passes Settings.GiveUp, the Picard test fails at every
// step size tried, a kink or jump of the formulas can be reached in the
// box (abs, min, max, sign, step, sqrt, ...), a formula is undefined
// there, or Settings.MaxSteps are taken. A canceled context returns the
// partial result and an error wrapping ctx.Err(). Bad formulas, starts or
// settings return an error and no result.
//
// # Caution
//
// A proven enclosure is a statement about the model's equations as
// written and their float64 parameters, not about the real system they
// describe. Safety-critical use follows the field's codes and licensed
// review.
//
// References:
//
//	R. J. Lohner, Enclosing the solutions of ordinary initial and boundary
//	  value problems, in E. Kaucher, U. Kulisch, Ch. Ullrich (eds.),
//	  Computerarithmetic, Teubner 1987, 255–286.
//	R. E. Moore, Interval Analysis, Prentice-Hall 1966.
//	N. S. Nedialkov, K. R. Jackson, G. F. Corliss, Validated solutions of
//	  initial value problems for ordinary differential equations, Applied
//	  Mathematics and Computation 105 (1999) 21–68.
//	À. Jorba, M. Zou, A software package for the numerical integration of
//	  ODEs by means of high-order Taylor methods, Experimental Mathematics
//	  14 (2005) 99–117.
func Flow(ctx context.Context, f *Formulas, t0 float64, y0 []float64, t1 float64, s *Settings) (*Result, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	set := s.WithDefaults()
	if f != nil && f.Map {
		return nil, fmt.Errorf("enclose: Flow of a map's formulas (use Map): %w", ErrFormulas)
	}
	c, err := f.compile()
	if err != nil {
		return nil, err
	}
	if err := checkStart(c.n, y0); err != nil {
		return nil, err
	}
	if !finiteF(t0) || !finiteF(t1) || !(t1 > t0) {
		return nil, fmt.Errorf("enclose: span [%g, %g]: want finite times with t1 > t0: %w", t0, t1, ErrSettings)
	}
	fr := newFlowRun(c, set)
	return fr.run(ctx, t0, y0, t1)
}

func finiteF(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// checkStart checks the start's length and values.
func checkStart(n int, y0 []float64) error {
	if len(y0) != n {
		return fmt.Errorf("enclose: start has %d values for %d states: %w", len(y0), n, ErrFormulas)
	}
	for i, v := range y0 {
		if !finiteF(v) {
			return fmt.Errorf("enclose: start value %d is %v: %w", i, v, ErrFormulas)
		}
	}
	return nil
}

// flowRun holds the evaluators and workspaces of one enclosure of a flow.
type flowRun struct {
	c   *compiled
	set Settings
	n   int
	p   int
	// pt: the field's series of order p (coefficients at the point c, or
	// over the box for Direct); rem: order p+1 over the a-priori box; ap:
	// order 0 (the field over a box, for the Picard test); vs: the
	// variational system's series of order p.
	pt, rem, ap, vs *series

	// The set is c + A·r; x is its hull.
	cv   []float64
	a    []float64
	r, x []ival.Interval

	// workspaces
	b, b2, nb, fb, z, s, d, y0 []ival.Interval
	jm, ja, qi, cm, tmp1, tmp2 []ival.Interval
	vinit                      []ival.Interval
	m, q, col, wt              []float64
	used                       []bool
	rv, x1, x2                 []ival.Interval

	shrunk int
}

func newFlowRun(c *compiled, set Settings) *flowRun {
	fr := newWork(c, set)
	p := set.Order
	fr.pt = newSeries(c.field, p)
	fr.rem = newSeries(c.field, p+1)
	fr.ap = newSeries(c.field, 0)
	fr.vs = newSeries(c.vari, p)
	for _, sr := range []*series{fr.pt, fr.rem, fr.ap, fr.vs} {
		c.setParams(sr)
	}
	return fr
}

// newWork returns a run with its workspaces and no evaluators.
func newWork(c *compiled, set Settings) *flowRun {
	n := c.n
	fr := &flowRun{c: c, set: set, n: n, p: set.Order}
	iv := func(k int) []ival.Interval { return make([]ival.Interval, k) }
	fr.cv, fr.a = make([]float64, n), make([]float64, n*n)
	fr.r, fr.x = iv(n), iv(n)
	fr.b, fr.b2, fr.nb, fr.fb, fr.z, fr.s, fr.d, fr.y0 = iv(n), iv(n), iv(n), iv(n), iv(n), iv(n), iv(n), iv(n)
	fr.jm, fr.ja, fr.qi, fr.cm, fr.tmp1, fr.tmp2 = iv(n*n), iv(n*n), iv(n*n), iv(n*n), iv(n*n), iv(n*n)
	fr.vinit = iv(n + n*n)
	fr.m, fr.q, fr.col, fr.wt = make([]float64, n*n), make([]float64, n*n), make([]float64, n*n), make([]float64, n)
	fr.used = make([]bool, n)
	fr.rv, fr.x1, fr.x2 = iv(n), iv(n), iv(n)
	return fr
}

// run steps from t0 to t1 (a map: iterates t1 - t0 times).
func (fr *flowRun) run(ctx context.Context, t0 float64, y0 []float64, t1 float64) (*Result, error) {
	n, set := fr.n, fr.set
	res := &Result{Method: "Lohner (QR)", Order: set.Order, Tol: set.Tol, Horizon: t0}
	if set.Direct {
		res.Method = "direct box"
	}
	copy(fr.cv, y0)
	clear(fr.a)
	for i := range n {
		fr.a[i*n+i] = 1
		fr.r[i] = ival.New(-set.Radius, set.Radius)
		fr.x[i] = ival.Add(ival.Point(y0[i]), fr.r[i])
	}
	stops := []float64{t1}
	for _, v := range set.Stops {
		if v > t0 && v < t1 && !fr.c.isMap {
			stops = append(stops, v)
		}
	}
	slices.Sort(stops)
	below := true
	record := func(t float64) bool {
		w := widthOf(fr.x)
		st := Step{T: t, Lo: make([]float64, n), Hi: make([]float64, n), Width: w}
		for i, v := range fr.x {
			st.Lo[i], st.Hi[i] = v.Lo, v.Hi
		}
		res.Steps = append(res.Steps, st)
		if below && w < set.Tol {
			res.Horizon = t
		} else {
			below = false
		}
		if !(w <= set.GiveUp) {
			res.Failure = &Failure{T: t, Kind: FailWidth, Reason: fmt.Sprintf("the enclosure's width %.3g passed %.3g", w, set.GiveUp)}
			return false
		}
		return true
	}
	if !record(t0) {
		return res, nil
	}
	t := t0
	for si := 0; si < len(stops); {
		if err := ctx.Err(); err != nil {
			res.Failure = &Failure{T: t, Kind: FailCanceled, Reason: "canceled"}
			res.Shrunk = fr.shrunk
			return res, fmt.Errorf("enclose: canceled at t=%g: %w", t, err)
		}
		if len(res.Steps) > set.MaxSteps {
			res.Failure = &Failure{T: t, Kind: FailBudget, Reason: fmt.Sprintf("%d steps taken", set.MaxSteps)}
			break
		}
		var tn float64
		var fail *Failure
		if fr.c.isMap {
			tn, fail = t+1, fr.mapStep(t)
		} else {
			tn, fail = fr.step(t, stops[si])
		}
		if fail != nil {
			res.Failure = fail
			break
		}
		t = tn
		if t >= stops[si] {
			si++
		}
		if set.Progress != nil {
			set.Progress(float64(t-t0) / float64(t1-t0))
		}
		if !record(t) {
			break
		}
	}
	res.Shrunk = fr.shrunk
	return res, nil
}

// stepSize returns the Taylor step from the point coefficients of order
// p-1 and p in pt: the h at which their terms are about one rounding unit
// of the state (Jorba & Zou 2005, their first step-size control).
func (fr *flowRun) stepSize() float64 {
	scale := 1.0
	for _, v := range fr.cv {
		scale = max(scale, math.Abs(v))
	}
	eps := 0x1p-52 * scale
	h := math.Inf(1)
	for _, k := range []int{fr.p - 1, fr.p} {
		norm := 0.0
		for i := range fr.n {
			v := fr.pt.c[fr.c.yslots[i]][k]
			norm = max(norm, math.Abs(v.Lo), math.Abs(v.Hi))
		}
		if norm > 0 {
			h = min(h, detmath.Exp(detmath.Log(eps/norm)/float64(k)))
		}
	}
	return 0.9 * h
}

// The a-priori enclosure's search: tries of the Picard test per step size,
// the inflation of a failed box, and the smallest step tried, relative to
// the time.
const (
	picardTries   = 8
	picardInflate = 0.1
	minStepRel    = 1e-10
	picardShrink  = 0.8
	// picardLip caps the first trial step at picardLip/L (see step).
	picardLip = 0.5
	// remainderUlps: the remainder's width the step aims at, in units of
	// the state's last place; remainderHalvings: the most halvings of a
	// step to reach it.
	remainderUlps     = 16
	remainderHalvings = 3
)

// step advances the set from t by one step, landing on stop when within
// reach, and returns the new time, or the reason it could not.
func (fr *flowRun) step(t, stop float64) (float64, *Failure) {
	n, p := fr.n, fr.p
	for i := range n {
		fr.y0[i] = ival.Point(fr.cv[i])
	}
	if err := fr.pt.ode(true, ival.Point(t), fr.c.yslots, fr.y0); err != nil {
		return t, boxFailure(t, err)
	}
	h := min(fr.stepSize(), stop-t)
	scale := 1.0
	for _, v := range fr.cv {
		scale = max(scale, math.Abs(v))
	}
	// Taylor coefficients over the box X, which do not depend on h: the
	// variational system (Lohner) or the field alone (Direct; the point
	// coefficients are then no longer needed).
	var box *series
	var slots []int
	if fr.set.Direct {
		if err := fr.pt.ode(true, ival.Point(t), fr.c.yslots, fr.x); err != nil {
			return t, boxFailure(t, err)
		}
		box, slots = fr.pt, fr.c.yslots
	} else {
		copy(fr.vinit, fr.x)
		for i := range n * n {
			fr.vinit[n+i] = ival.Interval{}
		}
		for i := range n {
			fr.vinit[n+i*n+i] = ival.Point(1)
		}
		if err := fr.vs.ode(true, ival.Point(t), fr.c.vslots, fr.vinit); err != nil {
			return t, boxFailure(t, err)
		}
		box, slots = fr.vs, fr.c.vslots
		// The Picard operator contracts when h·L < 1, L a Lipschitz
		// constant of f; V's first coefficient is ∂f/∂y over X, a
		// first guess of L (the test itself decides).
		lip := 0.0
		for i := range n {
			row := 0.0
			for j := range n {
				row += fr.vs.c[fr.c.vslots[n+i*n+j]][1].Mag()
			}
			lip = max(lip, row)
		}
		if lip > 0 {
			h = min(h, picardLip/lip)
		}
	}
	var tn float64
	var hI ival.Interval
	for halved := 0; ; halved++ {
		var fail *Failure
		tn, hI, fail = fr.validate(t, stop, h)
		if fail != nil {
			return t, fail
		}
		h = hI.Hi
		// Narrow B with the Taylor polynomial over [0, h] and the
		// remainder over B; then the remainder over the narrowed box.
		tI := ival.Hull(ival.Point(t), ival.Point(tn))
		h0 := ival.New(0, hI.Hi)
		if err := fr.rem.ode(true, tI, fr.c.yslots, fr.b); err != nil {
			return t, boxFailure(t, err)
		}
		for i := range n {
			y := box.c[slots[i]]
			acc := fr.rem.c[fr.c.yslots[i]][p+1]
			for k := p; k >= 0; k-- {
				acc = ival.Add(ival.Mul(acc, h0), y[k])
			}
			fr.b[i] = intersect(fr.b[i], acc)
		}
		if err := fr.rem.ode(true, tI, fr.c.yslots, fr.b); err != nil {
			return t, boxFailure(t, err)
		}
		hq := ival.PowInt(hI, p+1)
		for i := range n {
			fr.z[i] = ival.Mul(fr.rem.c[fr.c.yslots[i]][p+1], hq)
		}
		// A remainder far above the rounding of the state (the
		// coefficient over the wide box B overestimates) costs width at
		// every later step: halve the step, which divides it by 2^(p+1).
		if widthOf(fr.z) <= remainderUlps*0x1p-52*scale || halved == remainderHalvings || tn == stop && halved > 0 {
			break
		}
		fr.shrunk++
		h /= 2
	}
	if fr.set.Direct {
		for i := range n {
			y := fr.pt.c[fr.c.yslots[i]]
			acc := y[p]
			for k := p - 1; k >= 0; k-- {
				acc = ival.Add(ival.Mul(acc, hI), y[k])
			}
			fr.x[i] = ival.Add(acc, fr.z[i])
		}
		return tn, nil
	}
	// s = T(c) + z from the point coefficients (pt still holds them:
	// Direct is off).
	for i := range n {
		y := fr.pt.c[fr.c.yslots[i]]
		acc := y[p]
		for k := p - 1; k >= 0; k-- {
			acc = ival.Add(ival.Mul(acc, hI), y[k])
		}
		fr.s[i] = ival.Add(acc, fr.z[i])
	}
	// J = Σ V_k h^k over the box.
	for e := range n * n {
		v := fr.vs.c[fr.c.vslots[n+e]]
		acc := v[p]
		for k := p - 1; k >= 0; k-- {
			acc = ival.Add(ival.Mul(acc, hI), v[k])
		}
		fr.jm[e] = acc
	}
	fr.lohner()
	return tn, nil
}

// validate finds the step from t, at most h and landing on stop when
// within reach, over which the Picard test proves an a-priori enclosure
// (left in fr.b), shrinking h while it fails. It returns the step's end
// and its length as an interval, or why no step was found.
func (fr *flowRun) validate(t, stop, h float64) (float64, ival.Interval, *Failure) {
	for {
		tn := t + h
		if tn >= stop || stop-tn < 1e-3*h {
			tn = stop
		}
		if tn <= t {
			return t, ival.Interval{}, &Failure{T: t, Kind: FailStepUnderflow, Reason: fmt.Sprintf("the step %g no longer advances the time %g", h, t)}
		}
		hI := ival.Sub(ival.Point(tn), ival.Point(t))
		err := fr.apriori(t, tn, hI)
		if err == nil {
			return tn, hI, nil
		}
		fr.shrunk++
		h *= picardShrink
		if h < minStepRel*max(1, math.Abs(t)) {
			if f := boxFailure(t, err); f != nil {
				return t, ival.Interval{}, f
			}
			return t, ival.Interval{}, &Failure{T: t, Kind: FailPicard, Reason: fmt.Sprintf("no a-priori enclosure over a step down to h = %.3g", h/picardShrink)}
		}
	}
}

// lohner replaces (c, A, r) by their image under x -> s + J·(x - c), s
// and J in fr.s and fr.jm, and sets the hull x.
func (fr *flowRun) lohner() {
	n := fr.n
	imatPoint(fr.ja, fr.jm, fr.a, n) // JA = J·A
	allZero := true
	for j := range n {
		fr.wt[j] = fr.r[j].Rad()
		if fr.wt[j] > 0 {
			allZero = false
		}
	}
	for e := range n * n {
		fr.m[e] = fr.ja[e].Mid()
	}
	if allZero {
		for j := range n {
			fr.wt[j] = 1
		}
	}
	ok := qr(fr.q, fr.m, fr.wt, fr.col, fr.used, n) && inverse(fr.qi, fr.q, fr.tmp1, fr.tmp2, n)
	if !ok {
		clear(fr.q)
		for e := range n * n {
			fr.qi[e] = ival.Interval{}
		}
		for i := range n {
			fr.q[i*n+i] = 1
			fr.qi[i*n+i] = ival.Point(1)
		}
	}
	for i := range n {
		fr.cv[i] = fr.s[i].Mid()
		fr.d[i] = ival.Sub(fr.s[i], ival.Point(fr.cv[i]))
	}
	imat(fr.cm, fr.qi, fr.ja, n) // C = Q⁻¹·J·A
	ivec(fr.rv, fr.cm, fr.r, n)
	ivec(fr.nb, fr.qi, fr.d, n)
	for i := range n {
		fr.rv[i] = ival.Add(fr.rv[i], fr.nb[i])
	}
	// Two enclosures of the image: c' + Q·r' and s + J·A·r.
	pvec(fr.x1, fr.q, fr.rv, n)
	ivec(fr.x2, fr.ja, fr.r, n)
	for i := range n {
		a := ival.Add(ival.Point(fr.cv[i]), fr.x1[i])
		b := ival.Add(fr.s[i], fr.x2[i])
		fr.x[i] = ival.Hull(intersect(a, b), ival.Point(fr.cv[i]))
	}
	copy(fr.r, fr.rv)
	copy(fr.a, fr.q)
}

// intersect returns the common part of two intervals known to overlap
// (both enclose the same set).
func intersect(a, b ival.Interval) ival.Interval {
	return ival.Interval{Lo: max(a.Lo, b.Lo), Hi: min(a.Hi, b.Hi)}
}
