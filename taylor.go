package plumb

import (
	"fmt"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/internal/expr"
)

// taylorStepper advances a flow by fixed steps of the Taylor method of a
// chosen order, with Taylor coefficients from the recurrences of Taylor-mode
// differentiation of the system's formulas (Jorba & Zou, Experimental
// Mathematics 14, 2005). Not safe for concurrent use; Step does not
// allocate.
type taylorStepper struct {
	n  int
	ty *expr.Taylor
}

// taylor returns a Taylor stepper of the given order (1 to 1000) at the
// current parameters, for flows and Hamiltonians (maps get an error
// wrapping ErrKind). Built-in models use their catalog formulas.
func (s *System) taylor(order int) (*taylorStepper, error) {
	if err := s.check("Taylor"); err != nil {
		return nil, err
	}
	if s.form == nil || s.kind == KindMap {
		return nil, fmt.Errorf("plumb: %s has no vector-field formulas for a Taylor method: %w", s.Name, ErrKind)
	}
	if order < 1 {
		return nil, fmt.Errorf("plumb: Taylor order %d, want at least 1: %w", order, integrate.ErrSettings)
	}
	ty, err := s.form.fieldProg.NewTaylor(order)
	if err != nil {
		return nil, fmt.Errorf("plumb: %w: %w", err, integrate.ErrSettings)
	}
	for i, p := range s.params {
		ty.SetParam(1+s.form.n+i, p)
	}
	return &taylorStepper{n: s.form.n, ty: ty}, nil
}

// Order returns the stepper's order.
func (ts *taylorStepper) Order() int {
	if ts == nil || ts.ty == nil {
		return 0
	}
	return ts.ty.Order()
}

// Step writes the Taylor polynomial's value at t+h, from y at t, into dst
// (which may be y). Wrong lengths are errors wrapping integrate.ErrDimension.
func (ts *taylorStepper) Step(t float64, y []float64, h float64, dst []float64) error {
	if ts == nil || ts.ty == nil {
		return noEvaluator("taylorStepper.Step")
	}
	if len(y) != ts.n || len(dst) != ts.n {
		return fmt.Errorf("plumb: Taylor step with %d states and %d outputs, system has %d: %w", len(y), len(dst), ts.n, integrate.ErrDimension)
	}
	return ts.ty.Step(t, y, h, dst)
}

// Coefficients writes the Taylor coefficients of the solution through
// (t, y): dst[i][k] is the coefficient of h^k of component i, k = 0..Order.
func (ts *taylorStepper) Coefficients(t float64, y []float64, dst [][]float64) error {
	if ts == nil || ts.ty == nil {
		return noEvaluator("taylorStepper.Coefficients")
	}
	if len(y) != ts.n || len(dst) != ts.n {
		return fmt.Errorf("plumb: Taylor coefficients with %d states and %d rows, system has %d: %w", len(y), len(dst), ts.n, integrate.ErrDimension)
	}
	for i := range dst {
		if len(dst[i]) < ts.Order()+1 {
			return fmt.Errorf("plumb: row %d has %d coefficients, want %d: %w", i, len(dst[i]), ts.Order()+1, integrate.ErrDimension)
		}
	}
	return ts.ty.ODE(t, y, dst)
}

// taylorDDStepper is taylorStepper in double-double arithmetic (about 32
// significant digits), for reference solutions. Not safe for concurrent
// use; Step does not allocate.
type taylorDDStepper struct {
	n  int
	ty *expr.TaylorDD
}

// taylorDD returns a double-double Taylor stepper of the given order (1 to
// 1000) at the current parameters; see Taylor.
func (s *System) taylorDD(order int) (*taylorDDStepper, error) {
	if err := s.check("TaylorDD"); err != nil {
		return nil, err
	}
	if s.form == nil || s.kind == KindMap {
		return nil, fmt.Errorf("plumb: %s has no vector-field formulas for a Taylor method: %w", s.Name, ErrKind)
	}
	if order < 1 {
		return nil, fmt.Errorf("plumb: Taylor order %d, want at least 1: %w", order, integrate.ErrSettings)
	}
	ty, err := s.form.fieldProg.NewTaylorDD(order)
	if err != nil {
		return nil, fmt.Errorf("plumb: %w: %w", err, integrate.ErrSettings)
	}
	for i, p := range s.params {
		ty.SetParam(1+s.form.n+i, dd.From(p))
	}
	return &taylorDDStepper{n: s.form.n, ty: ty}, nil
}

// Order returns the stepper's order.
func (ts *taylorDDStepper) Order() int {
	if ts == nil || ts.ty == nil {
		return 0
	}
	return ts.ty.Order()
}

// Step writes the Taylor polynomial's value at t+h, from y at t, into dst
// (which may be y). Wrong lengths are errors wrapping integrate.ErrDimension.
func (ts *taylorDDStepper) Step(t dd.Float, y []dd.Float, h dd.Float, dst []dd.Float) error {
	if ts == nil || ts.ty == nil {
		return noEvaluator("taylorDDStepper.Step")
	}
	if len(y) != ts.n || len(dst) != ts.n {
		return fmt.Errorf("plumb: Taylor step with %d states and %d outputs, system has %d: %w", len(y), len(dst), ts.n, integrate.ErrDimension)
	}
	return ts.ty.Step(t, y, h, dst)
}
