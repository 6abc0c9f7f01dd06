package plumb

import (
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/internal/dd"
)

// builtinMap returns the hand-written map and Jacobian of a built-in map at
// the current parameters (copied now).
func (s *System) builtinMap() *MapSystem {
	n := len(s.y0)
	m := &MapSystem{
		n:      n,
		goNext: s.flow.Field(append([]float64(nil), s.params...)),
		buf:    make([]float64, n), jbuf: make([]float64, n*n),
		jm:      mat.NewDense(n, n, nil),
		periods: s.Periods(),
	}
	if s.flow.Jac != nil {
		m.goJac = s.flow.Jac(append([]float64(nil), s.params...))
	} else {
		// Every built-in map has a hand-written Jacobian (models_test.go);
		// the formulas' symbolic one is the fallback.
		m.jac = s.form.jacProg.NewFloat64()
		m.jacAt, m.jbuf = s.form.jacAt, make([]float64, len(s.form.jacAt))
		s.form.setParams(m.jac.Vars(), s.params)
	}
	return m
}

// wrapPeriodic reduces every component x[i] with periods[i] > 0 to
// [0, periods[i]). math.Mod is exact, so the reduction adds no rounding
// error beyond the one addition that brings a negative remainder up.
func wrapPeriodic(x, periods []float64) {
	for i, p := range periods {
		if p > 0 && i < len(x) {
			x[i] = wrapAngle(x[i], p)
		}
	}
}

// wrapAngle reduces x to [0, p).
func wrapAngle(x, p float64) float64 {
	r := math.Mod(x, p)
	if r < 0 {
		r += p
		if r >= p { // a tiny negative r rounds up to p
			r = 0
		}
	}
	return r
}

// wrapAngleDD reduces the double-double x to [0, p) for a float64 period p:
// x - k·p with k = floor(x/p), where k·p is formed exactly (dd.MulFloat of an
// integer-valued k and p is exact while |k| < 2^53), so that the reduction
// keeps the double-double's accuracy.
func wrapAngleDD(x dd.Float, p float64) dd.Float {
	k := math.Floor(x.Float64() / p)
	if k == 0 {
		if x.Hi < 0 {
			k = -1
		} else {
			return x
		}
	}
	r := dd.Sub(x, dd.MulFloat(dd.From(k), p))
	for range 2 { // the float64 quotient may be off by one either way
		if r.Hi < 0 {
			r = dd.Add(r, dd.From(p))
		} else if dd.Cmp(r, dd.From(p)) >= 0 {
			r = dd.Sub(r, dd.From(p))
		}
	}
	return r
}
