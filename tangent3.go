package plumb

import "github.com/plumbdyn/plumb/lyap"

// Tangent3 returns the system's fused evaluation of the vector field and
// its Jacobian's product with three tangent vectors at the current
// parameters (see lyap.Tangent3), for lyap.Settings.Tangent3: a full
// spectrum of a three-dimensional built-in flow that has one (Lorenz,
// Rössler) then costs about half as much per evaluation of the field,
// with the same bits. nil for every other system; lyap checks a non-nil
// one against Problem's F and Jac before it uses it. Later calls to Set
// do not change a returned function.
func (s *System) Tangent3() lyap.Tangent3 {
	if s.check("") != nil || s.flow == nil || s.flow.Tangent3 == nil || len(s.y0) != 3 {
		return nil
	}
	return s.flow.Tangent3(append([]float64(nil), s.params...))
}
