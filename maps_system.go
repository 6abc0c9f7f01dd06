package plumb

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/internal/expr"
)

// MapSystem is a map x -> f(x), built in or from a system file, with its
// exact Jacobian. It satisfies the lyap.Map interface. Components with a
// period (an angle) are reduced to [0, period) after every iterate. Not safe
// for concurrent use. A zero MapSystem (not made by System.Map) has
// dimension 0, and its Next and Jacobian do nothing.
type MapSystem struct {
	n    int
	next *expr.Float64 // formulas, or nil for a built-in's Go map
	jac  *expr.Float64
	buf  []float64
	jbuf []float64
	// jacAt places the entries jac computes (see formulaSystem.jacAt);
	// unused with goJac, whose dense n×n Jacobian jbuf holds.
	jacAt []int
	// goNext and goJac are a built-in's hand-written map and Jacobian.
	goNext  func(t float64, x, dst []float64)
	goJac   func(t float64, x []float64, dst *mat.Dense)
	jm      *mat.Dense // n×n scratch of goJac
	periods []float64
}

// Dim returns the dimension of the state (0 for a nil or zero MapSystem).
func (m *MapSystem) Dim() int {
	if m == nil {
		return 0
	}
	return m.n
}

// zero reports a nil MapSystem or one not made by System.Map, whose Next
// and Jacobian do nothing.
func (m *MapSystem) zero() bool { return m == nil || (m.goNext == nil && m.next == nil) }

// Next writes f(x) into dst. Both should have length Dim: Next reads the
// first Dim components of x (missing ones keep the previous call's values)
// and writes at most len(dst) components. It does not allocate.
func (m *MapSystem) Next(x, dst []float64) {
	if m.zero() {
		return
	}
	if m.goNext != nil {
		m.goNext(0, x, m.buf)
	} else {
		copy(m.next.Vars()[1:1+m.n], x)
		m.next.Run(m.buf)
	}
	wrapPeriodic(m.buf, m.periods)
	copy(dst, m.buf)
}

// Jacobian writes df/dx at x into dst, which should be Dim×Dim (a matrix of
// another size gets the overlapping block). It does not allocate.
func (m *MapSystem) Jacobian(x []float64, dst *mat.Dense) {
	if m.zero() || dst == nil {
		return
	}
	if m.goJac != nil {
		m.goJac(0, x, m.jm)
		copy(m.jbuf, m.jm.RawMatrix().Data)
	} else {
		copy(m.jac.Vars()[1:1+m.n], x)
		m.jac.Run(m.jbuf)
	}
	r, c := dst.Dims()
	if m.goJac == nil {
		setSparse(dst, m.n, m.jacAt, m.jbuf)
		return
	}
	for i := 0; i < min(m.n, r); i++ {
		for j := 0; j < min(m.n, c); j++ {
			dst.Set(i, j, m.jbuf[i*m.n+j])
		}
	}
}

// Map returns the map of a system of kind map at the current parameters, or
// an error wrapping ErrKind for flows and Hamiltonians.
func (s *System) Map() (*MapSystem, error) {
	if s == nil {
		return nil, s.check("Map")
	}
	if s.kind != KindMap {
		return nil, fmt.Errorf("plumb: %s is a %s, not a map: %w", s.Name, s.kind, ErrKind)
	}
	if err := s.check("Map"); err != nil {
		return nil, err
	}
	if s.flow != nil {
		return s.builtinMap(), nil
	}
	f := s.form
	m := &MapSystem{n: f.n, next: f.fieldProg.NewFloat64(), jac: f.jacProg.NewFloat64(),
		buf: make([]float64, f.n), jbuf: make([]float64, len(f.jacAt)), jacAt: f.jacAt, periods: s.Periods()}
	f.setParams(m.next.Vars(), s.params)
	f.setParams(m.jac.Vars(), s.params)
	return m, nil
}

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
