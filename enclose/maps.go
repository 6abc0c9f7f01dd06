package enclose

import (
	"context"
	"fmt"

	"github.com/plumbdyn/plumb/internal/ival"
)

// Map encloses the orbit of the map x_{k+1} = F(x_k) given by formulas
// for the given number of iterates, from every point of the start box (x0,
// or the box of half-width Settings.Radius around it), with the wrapping
// control of Lohner's method: the set is carried as c + A·r and
//
//	x_{k+1} ∈ F(c) + (J_F(X)·A)·r
//
// by the mean value theorem, X the hull of the set and J_F(X) the
// interval Jacobian of the formulas (symbolic derivatives evaluated in
// intervals over X); the new A is the orthogonal factor of the QR
// decomposition of mid(J_F(X)·A) and the new r is enclosed with Q⁻¹ as
// for flows (see Flow). Step.T counts iterates, Result.Horizon is the last
// iterate up to which the width stayed below Settings.Tol. With
// Settings.Direct the box is mapped directly, X_{k+1} = F(X_k), for
// comparison. Settings.Order and Settings.Stops do not apply.
//
// Failures, errors and the caution are those of Flow.
//
// References:
//
//	R. J. Lohner, Enclosing the solutions of ordinary initial and boundary
//	  value problems, in Computerarithmetic, Teubner 1987, 255–286.
//	A. Neumaier, Interval Methods for Systems of Equations, Cambridge
//	  University Press 1990 (mean value forms).
func Map(ctx context.Context, f *Formulas, x0 []float64, iterates int, s *Settings) (*Result, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	set := s.WithDefaults()
	if f != nil && !f.Map {
		return nil, fmt.Errorf("enclose: Map of a flow's formulas (use Flow): %w", ErrFormulas)
	}
	c, err := f.compile()
	if err != nil {
		return nil, err
	}
	if err := checkStart(c.n, x0); err != nil {
		return nil, err
	}
	if iterates < 1 {
		return nil, fmt.Errorf("enclose: %d iterates, want at least 1: %w", iterates, ErrSettings)
	}
	set.Order = 0
	fr := newMapRun(c, set)
	return fr.run(ctx, 0, x0, float64(iterates))
}

// newMapRun returns a run whose evaluators are the map's: pt evaluates F,
// ap the Jacobian J_F, both over boxes.
func newMapRun(c *compiled, set Settings) *flowRun {
	fr := newWork(c, set)
	fr.pt = newSeries(c.field, 0)
	fr.ap = newSeries(c.jac, 0)
	c.setParams(fr.pt)
	c.setParams(fr.ap)
	return fr
}

// eval runs the order-0 evaluator s at the box y (state slots).
func (fr *flowRun) eval(s *series, y []ival.Interval) error {
	for i, sl := range fr.c.yslots {
		s.c[sl][0] = y[i]
	}
	return s.order(0)
}

// mapStep maps the set once; t is the current iterate.
func (fr *flowRun) mapStep(t float64) *Failure {
	n := fr.n
	if fr.set.Direct {
		if err := fr.eval(fr.pt, fr.x); err != nil {
			return boxFailure(t, err)
		}
		for i := range n {
			fr.x[i] = fr.pt.out(i)[0]
		}
		return nil
	}
	for i := range n {
		fr.y0[i] = ival.Point(fr.cv[i])
	}
	if err := fr.eval(fr.pt, fr.y0); err != nil {
		return boxFailure(t, err)
	}
	for i := range n {
		fr.s[i] = fr.pt.out(i)[0]
	}
	if err := fr.eval(fr.ap, fr.x); err != nil {
		return boxFailure(t, err)
	}
	for e := range n * n {
		fr.jm[e] = fr.ap.out(e)[0]
	}
	fr.lohner()
	return nil
}
