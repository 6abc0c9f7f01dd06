package lyap

import (
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/models"
)

// modelProblem returns the built-in flow name at its published parameters,
// with its exact Jacobian.
func modelProblem(t testing.TB, name string) integrate.Problem {
	t.Helper()
	f, err := models.Lookup(name)
	if err != nil {
		t.Fatal(err)
	}
	p := f.Defaults()
	pr := integrate.Problem{F: f.Field(p), Y0: append([]float64(nil), f.Y0...)}
	if f.Jac != nil {
		pr.Jac = f.Jac(p)
	}
	if f.Separable != nil {
		parts := f.Separable(p)
		pr.Split = &integrate.Separable{DT: parts.DT, DV: parts.DV, H: parts.H}
	}
	return pr
}

// modelTangent3 returns the fused evaluation of the built-in flow name at
// parameters p (its defaults when p is nil), or nil when it has none.
func modelTangent3(t testing.TB, name string, p []float64) Tangent3 {
	t.Helper()
	f, err := models.Lookup(name)
	if err != nil {
		t.Fatal(err)
	}
	if f.Tangent3 == nil {
		return nil
	}
	if p == nil {
		p = f.Defaults()
	}
	return f.Tangent3(p)
}
