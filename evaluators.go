package plumb

import (
	"fmt"
	"math/big"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/internal/expr"
)

// bigEvaluator computes a system's right-hand side (the vector field of a
// flow or Hamiltonian, the next state of a map) in math/big.Float arithmetic
// at a fixed precision, for reference-precision runs. Not safe for
// concurrent use.
type bigEvaluator struct {
	n  int
	ev *expr.Big
}

// bigEval returns the right-hand side at prec bits of precision (for
// instance 256 for a reference run to compare with float64). The formulas'
// numbers and the parameters are the float64 values the float64 field uses,
// so both compute the same model and differ only in rounding. Each
// operation rounds to prec bits; the elementary functions are accurate to a
// few ulps (Brent & Zimmermann, Modern Computer Arithmetic, 2010, ch. 4).
//
// Built-in models use their catalog formulas. prec must be in [2,
// big.MaxPrec].
func (s *System) bigEval(prec uint) (*bigEvaluator, error) {
	if err := s.check("bigEval"); err != nil {
		return nil, err
	}
	if s.form == nil {
		return nil, fmt.Errorf("plumb: model %s has no formulas for multiprecision evaluation: %w", s.Name, ErrKind)
	}
	ev, err := s.form.fieldProg.NewBig(prec)
	if err != nil {
		return nil, fmt.Errorf("plumb: %w", err)
	}
	vars := ev.Vars()
	for i, p := range s.params {
		vars[1+s.form.n+i].SetFloat64(p)
	}
	return &bigEvaluator{n: s.form.n, ev: ev}, nil
}

// Prec returns the evaluator's precision in bits.
func (e *bigEvaluator) Prec() uint {
	if e == nil || e.ev == nil {
		return 0
	}
	return e.ev.Prec()
}

// Eval writes the right-hand side at (t, y) into dydt (t is ignored for
// maps). Nil entries of dydt are allocated at the evaluator's precision.
// Wrong lengths are errors wrapping integrate.ErrDimension, a nil entry of
// y one wrapping integrate.ErrNonFinite; a value that is not a real number
// (0/0, log of a negative number) is an error wrapping expr's ErrNaN.
func (e *bigEvaluator) Eval(t *big.Float, y, dydt []*big.Float) error {
	if e == nil || e.ev == nil {
		return noEvaluator("bigEvaluator.Eval")
	}
	if len(y) != e.n || len(dydt) != e.n {
		return fmt.Errorf("plumb: Eval with %d states and %d outputs, system has %d: %w", len(y), len(dydt), e.n, integrate.ErrDimension)
	}
	for i, v := range y {
		if v == nil {
			return fmt.Errorf("plumb: Eval: y[%d] is nil, not a number: %w", i, integrate.ErrNonFinite)
		}
	}
	vars := e.ev.Vars()
	if t != nil {
		vars[0].Set(t)
	}
	for i, v := range y {
		vars[1+i].Set(v)
	}
	if err := e.ev.Run(dydt); err != nil {
		return fmt.Errorf("plumb: %w", err)
	}
	return nil
}

// ddEvaluator computes a system's right-hand side in double-double
// arithmetic: about 32 significant digits at a few times the cost of
// float64, for reference runs cheaper than big.Float. + - * / have relative
// error below 2e-31 (Joldes, Muller & Popescu, ACM TOMS 44, 2017); the
// elementary functions about 1e-31 (see internal/dd). Not safe for
// concurrent use; Eval does not allocate.
type ddEvaluator struct {
	n  int
	ev *expr.DD
}

// ddEval returns the right-hand side in double-double
// arithmetic at the current parameters (see Evaluator for the model's
// numbers). Built-in models use their catalog formulas.
func (s *System) ddEval() (*ddEvaluator, error) {
	if err := s.check("ddEval"); err != nil {
		return nil, err
	}
	if s.form == nil {
		return nil, fmt.Errorf("plumb: model %s has no formulas for double-double evaluation: %w", s.Name, ErrKind)
	}
	ev := s.form.fieldProg.NewDD()
	vars := ev.Vars()
	for i, p := range s.params {
		vars[1+s.form.n+i] = dd.From(p)
	}
	return &ddEvaluator{n: s.form.n, ev: ev}, nil
}

// Eval writes the right-hand side at (t, y) into dydt (t is ignored for
// maps). Wrong lengths are errors wrapping integrate.ErrDimension.
func (e *ddEvaluator) Eval(t dd.Float, y, dydt []dd.Float) error {
	if e == nil || e.ev == nil {
		return noEvaluator("ddEvaluator.Eval")
	}
	if len(y) != e.n || len(dydt) != e.n {
		return fmt.Errorf("plumb: Eval with %d states and %d outputs, system has %d: %w", len(y), len(dydt), e.n, integrate.ErrDimension)
	}
	vars := e.ev.Vars()
	vars[0] = t
	copy(vars[1:], y)
	return e.ev.Run(dydt)
}
