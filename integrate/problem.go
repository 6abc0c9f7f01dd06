package integrate

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Func is a vector field: it writes dy/dt at (t, y) into dydt. len(dydt) ==
// len(y). It must not keep y or dydt after it returns, and must not write y.
type Func func(t float64, y, dydt []float64)

// Problem is an initial value problem y' = F(t, y), y(T0) = Y0.
type Problem struct {
	// F is the vector field. Required.
	F Func
	// Jac, if not nil, writes the Jacobian dF/dy at (t, y) into dst, an
	// n×n matrix. Optional: methods and analyses that need it fall back to
	// finite differences or say so.
	Jac func(t float64, y []float64, dst *mat.Dense)
	// T0 is the initial time.
	T0 float64
	// Y0 is the initial state; it is copied, never written.
	Y0 []float64
	// Split, if not nil, gives the separable parts of a Hamiltonian problem
	// for the symplectic methods. Explicit Runge–Kutta methods ignore it.
	Split *Separable
	// Fork, if not nil, returns fresh F, Jac and Split that compute the
	// same values as these but share no workspace with them or with any
	// other Fork's (its T0 and Y0 are ignored). Fork describes F, Jac and
	// Split: a caller who replaces any of them in a copy of a Problem sets
	// Fork to nil (or to one that forks the replacement), or runs would
	// use the functions Fork makes instead. Functions that keep scratch
	// space between calls, as compiled formulas do, set it so that one
	// Problem can be handed to runs in several goroutines: every entry
	// point of integrate and lyap calls it once at set-up (see Own), so
	// the step loop pays nothing for it. Problems from plumb's System have
	// it.
	Fork func() Problem
}

// Own returns p with F, Jac and Split of its own from p.Fork, or p itself
// when Fork is nil. Each of Solve, NewStepper, SolveReversible and the lyap
// entry points calls it once, so concurrent runs of one Problem do not share
// the functions' workspaces. A caller that calls F itself from several
// goroutines calls Own once per goroutine. The functions of a Problem with
// no Fork must be safe for concurrent use to be shared.
func (p Problem) Own() Problem {
	if p.Fork == nil {
		return p
	}
	f := p.Fork()
	p.F, p.Jac, p.Split = f.F, f.Jac, f.Split
	return p
}

// Separable describes a Hamiltonian H(q, p) = T(p) + V(q) whose state is laid
// out as y = (q, p), each of length N = len(Y0)/2. The symplectic methods need
// it; the Runge–Kutta methods use F alone.
type Separable struct {
	// DT writes dT/dp at p into dst (for T = |p|²/2m, dst = p/m).
	DT func(p, dst []float64)
	// DV writes dV/dq at q into dst.
	DV func(q, dst []float64)
	// H, if not nil, returns the Hamiltonian at (q, p), for energy reports.
	H func(q, p []float64) float64
}

// Dim returns the dimension of the state.
func (p Problem) Dim() int { return len(p.Y0) }

// validate checks the problem for use with t1.
func (p Problem) validate(t1 float64) error {
	if p.F == nil {
		return fmt.Errorf("integrate: Problem.F is nil: %w", ErrSettings)
	}
	if len(p.Y0) == 0 {
		return fmt.Errorf("integrate: Problem.Y0 is empty: %w", ErrDimension)
	}
	if math.IsNaN(p.T0) || math.IsInf(p.T0, 0) {
		return fmt.Errorf("integrate: Problem.T0 = %v: %w", p.T0, ErrSpan)
	}
	if math.IsNaN(t1) || math.IsInf(t1, 0) {
		return fmt.Errorf("integrate: t1 = %v: %w", t1, ErrSpan)
	}
	if t1 == p.T0 {
		return fmt.Errorf("integrate: t1 = t0 = %v: %w", t1, ErrSpan)
	}
	for i, v := range p.Y0 {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("integrate: %w", &FieldError{T: p.T0, Index: i, Value: v, What: "initial state"})
		}
	}
	if p.Split != nil && len(p.Y0)%2 != 0 {
		return fmt.Errorf("integrate: Problem.Split needs an even state dimension, got %d: %w", len(p.Y0), ErrDimension)
	}
	return nil
}

// firstNonFinite returns the index of the first NaN or Inf in v, or -1.
func firstNonFinite(v []float64) int {
	for i, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return i
		}
	}
	return -1
}
