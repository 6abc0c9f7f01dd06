package plumb

import (
	"fmt"
	"math/big"

	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/internal/expr"
)

// series returns the system's Taylor-coefficient provider.
func (s *System) series() (*systemSeries, error) {
	if err := s.check("a Taylor reference"); err != nil {
		return nil, err
	}
	if s.form == nil || s.kind == KindMap {
		return nil, fmt.Errorf("plumb: %s has no vector-field formulas for a Taylor reference: %w", s.Name, ErrKind)
	}
	return &systemSeries{n: s.form.n, prog: s.form.fieldProg, params: append([]float64(nil), s.params...)}, nil
}

// systemSeries implements integrate.Series from a system's formulas by the
// Taylor-mode recurrences of internal/expr, at the parameters it was made
// with (bigParams, when set, give them at full precision to big runs).
type systemSeries struct {
	n         int
	prog      *expr.Program
	params    []float64
	bigParams []*big.Float
}

func (f *systemSeries) Dim() int { return f.n }

func (f *systemSeries) DD(order int) (func(t dd.Float, y []dd.Float, c [][]dd.Float) error, error) {
	ty, err := f.prog.NewTaylorDD(order)
	if err != nil {
		return nil, fmt.Errorf("plumb: %w", err)
	}
	for i, p := range f.params {
		ty.SetParam(1+f.n+i, dd.From(p))
		if f.bigParams != nil {
			ty.SetParam(1+f.n+i, dd.FromBig(f.bigParams[i]))
		}
	}
	return func(t dd.Float, y []dd.Float, c [][]dd.Float) error {
		if err := ty.ODE(t, y, c); err != nil {
			return fmt.Errorf("plumb: %w", err)
		}
		return nil
	}, nil
}

func (f *systemSeries) Big(order int, prec uint) (func(t *big.Float, y []*big.Float, c [][]*big.Float) error, error) {
	ty, err := f.prog.NewTaylorBig(order, prec)
	if err != nil {
		return nil, fmt.Errorf("plumb: %w", err)
	}
	for i, p := range f.params {
		v := new(big.Float).SetPrec(prec).SetFloat64(p)
		if f.bigParams != nil {
			v.Set(f.bigParams[i])
		}
		ty.SetParam(1+f.n+i, v)
	}
	return func(t *big.Float, y []*big.Float, c [][]*big.Float) error {
		if err := ty.ODE(t, y, c); err != nil {
			return fmt.Errorf("plumb: %w", err)
		}
		return nil
	}, nil
}

// HasFormulas reports whether the system's vector field has formulas, so
// that referenceRun and System.Trust can compute a multiprecision reference
// (true for every built-in flow and every flow or Hamiltonian file).
func (s *System) HasFormulas() bool {
	_, err := s.series()
	return err == nil
}
