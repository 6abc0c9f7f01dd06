package plumb

import (
	"fmt"

	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/maps"
)

// Map returns the map of a system of kind map at the current parameters
// (copied now), with its exact Jacobian and, for a system with formulas
// (every built-in and every file), its double-double form, the reference of
// maps.Audit; an error wrapping ErrKind for flows and Hamiltonians.
func (s *System) Map() (*maps.Map, error) {
	if s == nil {
		return nil, s.check("Map")
	}
	if s.kind != KindMap {
		return nil, fmt.Errorf("plumb: %s is a %s, not a map: %w", s.Name, s.kind, ErrKind)
	}
	if err := s.check("Map"); err != nil {
		return nil, err
	}
	var f maps.Funcs
	n := len(s.y0)
	if s.flow != nil {
		// A built-in's hand-written map and Jacobian.
		next := s.flow.Field(append([]float64(nil), s.params...))
		f.Next = func(x, dst []float64) { next(0, x, dst) }
		if s.flow.Jac != nil {
			jac := s.flow.Jac(append([]float64(nil), s.params...))
			f.Jacobian = func(x []float64, dst *mat.Dense) { jac(0, x, dst) }
		}
	}
	if fs := s.form; fs != nil {
		n = fs.n
		if f.Next == nil {
			next := fs.fieldProg.NewFloat64()
			fs.setParams(next.Vars(), s.params)
			f.Next = func(x, dst []float64) {
				copy(next.Vars()[1:1+n], x)
				next.Run(dst)
			}
		}
		if f.Jacobian == nil {
			// Every built-in map has a hand-written Jacobian (models_test.go);
			// the formulas' symbolic one is the fallback.
			jac := fs.jacProg.NewFloat64()
			fs.setParams(jac.Vars(), s.params)
			jbuf, sp := make([]float64, len(fs.jacAt)), newSparseJac(n, fs.jacAt)
			f.Jacobian = func(x []float64, dst *mat.Dense) {
				copy(jac.Vars()[1:1+n], x)
				sp.fill(dst, jac, jbuf)
			}
		}
		ev := fs.fieldProg.NewDD()
		vars := ev.Vars()
		for i, p := range s.params {
			vars[1+n+i] = dd.From(p)
		}
		f.NextDD = func(x, dst []maps.DoubleDouble) error {
			if len(x) != n || len(dst) != n {
				return fmt.Errorf("plumb: double-double map with %d states and %d outputs, system has %d", len(x), len(dst), n)
			}
			vars[0] = dd.Float{}
			copy(vars[1:], x)
			return ev.Run(dst)
		}
	}
	return maps.New(n, f, s.Periods())
}
