package integrate

import (
	"fmt"
	"math"
	"reflect"
)

// This file holds the engine of the explicit symplectic splitting methods for
// separable Hamiltonians H(q, p) = T(p) + V(q) with the state y = (q, p):
// a step is a sequence of exact sub-flows
//
//	kick  (flow of V for time c·h):  p ← p − c·h·∇V(q)
//	drift (flow of T for time c·h):  q ← q + c·h·∇T(p)
//
// Each sub-flow is symplectic, so their composition is. The named methods
// (Verlet, Yoshida4, PEFRL, ...) are coefficient sequences in composition.go.

// splitKind says whether a sequence starts with a kick or a drift.
type splitKind uint8

const (
	kickFirst  splitKind = iota // K D K D ... (momenta first)
	driftFirst                  // D K D K ... (positions first)
)

// splitting is a splitting method: a name, its order, its step size and the
// coefficient sequence (alternating kicks and drifts, starting with first).
// It implements Method.
type splitting struct {
	name      string
	order     int
	h         float64
	first     splitKind
	coef      []float64
	symmetric bool // coef is a palindrome: the method is time-symmetric
}

func (m *splitting) Name() string           { return m.name }
func (m *splitting) Order() int             { return m.order }
func (m *splitting) errOrder() int          { return 0 }
func (m *splitting) fixedStep() float64     { return m.h }
func (m *splitting) controller() Controller { return Controller{} }

// withStep returns a copy of the method with step size h.
func (m *splitting) withStep(h float64) Method {
	c := *m
	c.h = h
	return &c
}

// forceEvals is the number of evaluations of ∇V per step (with the last
// kick's force reused by the next step when the sequence ends with a kick).
func (m *splitting) forceEvals() int {
	k := 0
	for i := range m.coef {
		if m.isKick(i) {
			k++
		}
	}
	if m.first == kickFirst && m.isKick(len(m.coef)-1) {
		k-- // first-same-as-last
	}
	return k
}

func (m *splitting) isKick(i int) bool { return (i%2 == 0) == (m.first == kickFirst) }

func (m *splitting) newScheme(p *Problem, n int) (scheme, error) {
	if !(m.h > 0) || math.IsInf(m.h, 0) {
		return nil, fmt.Errorf("integrate: %s: step size h = %v: must be finite and > 0: %w", m.name, m.h, ErrSettings)
	}
	if p.Split == nil {
		return nil, fmt.Errorf("integrate: %s needs Problem.Split (a separable Hamiltonian T(p) + V(q)): %w", m.name, ErrMethod)
	}
	if p.Split.DT == nil || p.Split.DV == nil {
		return nil, fmt.Errorf("integrate: %s needs Problem.Split.DT and Problem.Split.DV: %w", m.name, ErrMethod)
	}
	if n%2 != 0 || n == 0 {
		return nil, fmt.Errorf("integrate: %s needs a state (q, p) of even dimension, got %d: %w", m.name, n, ErrDimension)
	}
	return newSplitWork(m, p.Split, n), nil
}

// splitWork is the per-solve workspace of a splitting method.
type splitWork struct {
	m       *splitting
	dt, dv  func(x, dst []float64)
	n, half int
	g       []float64 // ∇V at gq (the force cache)
	gq      []float64 // the q at which g was evaluated
	gValid  bool
	v       []float64 // ∇T scratch
	unitT   bool      // DT is UnitMass: drifts skip the call
	symHermite
}

func newSplitWork(m *splitting, s *Separable, n int) *splitWork {
	h := n / 2
	buf := make([]float64, 3*h)
	w := &splitWork{m: m, dt: s.DT, dv: s.DV, n: n, half: h,
		g: buf[:h:h], gq: buf[h : 2*h : 2*h], v: buf[2*h : 3*h : 3*h]}
	w.unitT = isUnitMass(s.DT)
	return w
}

// UnitMass is ∂T/∂p for the kinetic energy T = |p|²/2 of unit masses: it
// copies p into dst. Given as Separable.DT it lets the splitting methods take
// their Runge–Kutta–Nyström form (d²q/dt² = −∇V(q)): each drift becomes
// q ← q + c·h·p without a call. Any other function, even one computing the
// same values, is called as given.
func UnitMass(p, dst []float64) { copy(dst, p) }

// isUnitMass reports whether dt is UnitMass itself (the same top-level
// function; closures and other functions never match).
func isUnitMass(dt func(p, dst []float64)) bool {
	return dt != nil && reflect.ValueOf(dt).Pointer() == reflect.ValueOf(UnitMass).Pointer()
}

// force makes g = ∇V(q), reusing the cache when q is the cached point
// bit for bit. It returns the number of evaluations made (0 or 1).
func (w *splitWork) force(q []float64) int {
	if w.gValid {
		same := true
		for i, x := range q {
			if x != w.gq[i] {
				same = false
				break
			}
		}
		if same {
			return 0
		}
	}
	w.dv(q, w.g)
	copy(w.gq, q)
	w.gValid = true
	return 1
}

// step applies one step of size h (any sign) from y to y1 (y1 may not alias
// y). It returns the evaluations of ∇V made. It does not allocate.
func (w *splitWork) step(h float64, y, y1 []float64) int {
	n, hf := w.n, w.half
	copy(y1[:n], y[:n])
	q, p := y1[:hf:hf], y1[hf:n:n]
	evals := 0
	kick := w.m.first == kickFirst
	for _, c := range w.m.coef {
		ch := float64(c * h)
		if kick {
			evals += w.force(q)
			g := w.g[:len(p)]
			for i := range p {
				p[i] -= float64(ch * g[i])
			}
		} else {
			if w.unitT {
				for i := range q {
					q[i] += float64(ch * p[i])
				}
			} else {
				w.dt(p, w.v)
				v := w.v[:len(q)]
				for i := range q {
					q[i] += float64(ch * v[i])
				}
			}
		}
		kick = !kick
	}
	return evals
}

// attempt implements scheme: one step from (t, y) into y1, with
// F(t+h, y1) = (∇T(p1), −∇V(q1)) left in f1. The error estimate is 0: the
// step is fixed.
func (w *splitWork) attempt(_, h float64, y, _, y1, f1, _, _ []float64) (float64, int) {
	ev := w.step(h, y, y1)
	ev += w.endField(y1, f1)
	return 0, ev
}

// endField writes F at y1 from the split parts, reusing the cached force.
func (w *splitWork) endField(y1, f1 []float64) int {
	n, hf := w.n, w.half
	q, p := y1[:hf], y1[hf:n]
	ev := w.force(q)
	if w.unitT {
		copy(f1[:hf], p)
	} else {
		w.dt(p, f1[:hf])
	}
	fp := f1[hf:n]
	for i := range fp {
		fp[i] = -w.g[i]
	}
	return ev
}

func (*splitWork) fsal() bool { return true }

func (*splitWork) stiffness(float64, []float64, []float64) (float64, float64, bool) {
	return 0, 0, false
}

// symHermite is the cubic Hermite continuous extension from the states
// and derivatives at both ends of a step:
//
//	u(θ) = h00(θ)·y0 + h10(θ)·h·f0 + h01(θ)·y1 + h11(θ)·h·f1
//
// It is exact for cubics, so its error is O(h⁴) inside a step (order 3,
// whatever the order of the method); at the step ends it returns the
// method's own states.
//
// References:
//
//	E. Hairer, S. P. Nørsett, G. Wanner, Solving Ordinary Differential
//	  Equations I, 2nd ed., Springer 1993, Sect. II.6 (Hermite interpolation).
type symHermite struct{}

func (symHermite) denseSize() int { return 4 }

func (symHermite) dense(_, h float64, y, f0, y1, f1, coef []float64) int {
	n := len(y)
	c0, c1, c2, c3 := coef[:n], coef[n:2*n], coef[2*n:3*n], coef[3*n:4*n]
	for i := range y {
		c0[i] = y[i]
		c1[i] = y1[i]
		c2[i] = float64(h * f0[i])
		c3[i] = float64(h * f1[i])
	}
	return 0
}

func (symHermite) interp(coef []float64, theta float64, dst []float64) {
	n := len(dst)
	c0, c1, c2, c3 := coef[:n], coef[n:2*n], coef[2*n:3*n], coef[3*n:4*n]
	th2 := float64(theta * theta)
	th3 := float64(th2 * theta)
	h00 := float64(2*th3) - float64(3*th2) + 1
	h01 := float64(3*th2) - float64(2*th3)
	h10 := th3 - float64(2*th2) + theta
	h11 := th3 - th2
	for i := range dst {
		dst[i] = float64(h00*c0[i]) + float64(h01*c1[i]) + float64(h10*c2[i]) + float64(h11*c3[i])
	}
}
