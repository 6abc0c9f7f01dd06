package integrate

import (
	"fmt"
	"math"
	"unsafe"

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
	// fork, when set by Forkable, makes fresh copies of the functions;
	// ids records which functions fork made, so that Own replaces only
	// those a caller has not replaced since.
	fork func() Problem
	ids  [3]uintptr
}

// Forkable returns the Problem maker returns, remembering maker, so that Own
// can give each run fresh functions that compute the same values and share
// no workspace. Functions that keep scratch space between calls, as
// compiled formulas do, come this way so that one Problem can be handed to
// runs in several goroutines: every entry point of integrate and lyap calls
// Own once at set-up, so the step loop pays nothing for it. Problems from
// plumb's System are forkable.
func Forkable(maker func() Problem) Problem {
	p := maker()
	p.fork, p.ids = maker, p.funcIDs()
	return p
}

// Own returns p with fresh copies of the functions that its Forkable maker
// made and that have not been replaced since (a caller who copies a
// Problem and sets its own Jac keeps that Jac; F is still renewed), or p
// itself when it is not forkable. Each of Solve, NewStepper,
// SolveReversible and the lyap entry points calls it once, so concurrent
// runs of one Problem do not share the workspaces of its functions. A
// caller that calls F itself from several goroutines calls Own once per
// goroutine. A function that a caller put in must itself be safe for
// concurrent use for the Problem to be shared.
func (p Problem) Own() Problem {
	if p.fork == nil {
		return p
	}
	ids := p.funcIDs()
	if ids[0] != p.ids[0] && ids[1] != p.ids[1] && ids[2] != p.ids[2] {
		return p // every function replaced: nothing of the maker's is left
	}
	f := p.fork()
	if ids[0] == p.ids[0] {
		p.F = f.F
	}
	if ids[1] == p.ids[1] {
		p.Jac = f.Jac
	}
	if ids[2] == p.ids[2] {
		p.Split = f.Split
	}
	p.fork = nil // these functions are this run's own
	return p
}

// funcIDs identifies p's F, Jac and Split: the address of each function
// value's closure record (unique to one closure instance: the maker's
// functions capture their own workspace) and the Split pointer; 0 for nil.
func (p Problem) funcIDs() [3]uintptr {
	return [3]uintptr{
		*(*uintptr)(unsafe.Pointer(&p.F)),
		*(*uintptr)(unsafe.Pointer(&p.Jac)),
		uintptr(unsafe.Pointer(p.Split)),
	}
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
