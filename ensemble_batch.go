package plumb

import (
	"fmt"

	"github.com/plumbdyn/plumb/integrate"
)

// BatchProblem returns the system's vector field for a batch of members at
// the current parameters, one member per start (each of length
// len(States)), for integrate.SolveBatch. A system read from formulas gets
// the compiled batch evaluator, which runs each instruction over all the
// members of a block at once; a built-in with a hand-written field gets
// that field through integrate.LoopFork, so that its members have the bits
// of Problem's runs. Every goroutine of a run gets a field of its own
// (BatchProblem.Fork). A map has no vector field (ErrKind).
func (s *System) BatchProblem(starts [][]float64) (integrate.BatchProblem, error) {
	if err := s.check("BatchProblem"); err != nil {
		return integrate.BatchProblem{}, err
	}
	if s.kind == KindMap {
		return integrate.BatchProblem{}, fmt.Errorf("plumb: %s is a map, which has no vector field to integrate: %w", s.Name, ErrKind)
	}
	n := len(s.y0)
	params := append([]float64(nil), s.params...)
	bp := integrate.BatchProblem{Dim: n, Starts: starts}
	if s.flow != nil {
		bp.Fork = integrate.LoopFork(func() integrate.Func { return s.fields(params).F }, n)
		return bp, nil
	}
	prog := s.form.fieldProg
	bp.Fork = func() integrate.BatchFunc {
		ev := prog.NewBatch(n, integrate.BatchBlock)
		for i, v := range params {
			// Slots: t, the n states, then the parameters in order.
			if err := ev.SetVar(1+n+i, v); err != nil {
				panic("plumb: batch evaluator slots: " + err.Error()) // a broken invariant
			}
		}
		return ev.Field
	}
	return bp, nil
}
