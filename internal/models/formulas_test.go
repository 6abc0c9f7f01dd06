package models

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/internal/expr"
)

// compileFormulas builds the field and symbolic Jacobian of a catalog entry.
func compileFormulas(t *testing.T, m *Flow) (field, jac *expr.Float64) {
	t.Helper()
	names := append([]string{"t"}, m.States...)
	for _, p := range m.Params {
		names = append(names, p.Name)
	}
	g := expr.NewGraph(names)
	src, ok := Formulas[m.Name]
	if !ok {
		t.Fatalf("%s has no formulas", m.Name)
	}
	if len(src) != len(m.States) {
		t.Fatalf("%s: %d formulas for %d states", m.Name, len(src), len(m.States))
	}
	var rates, jacs []expr.Expr
	for _, s := range src {
		e, err := g.Parse(s)
		if err != nil {
			t.Fatalf("%s: %v", m.Name, err)
		}
		rates = append(rates, e)
	}
	for _, r := range rates {
		for j := range m.States {
			jacs = append(jacs, g.Diff(r, 1+j))
		}
	}
	field, jac = g.Compile(rates).NewFloat64(), g.Compile(jacs).NewFloat64()
	for _, ev := range []*expr.Float64{field, jac} {
		copy(ev.Vars()[1+len(m.States):], m.Defaults())
	}
	return field, jac
}

// TestFormulasMatchGo checks, for every built-in, that the formula field
// equals the hand-written Go field at random points and that the symbolic
// Jacobian equals the hand-written one (exact identity up to rounding) or,
// where the catalog has none, gonum's central finite differences of the Go
// field (reference library: gonum diff/fd).
func TestFormulasMatchGo(t *testing.T) {
	// The two fields evaluate the same expressions in a different order
	// (and x^1.5 by math.Pow instead of x·sqrt(x)): a few ulps, 1e-14
	// relative to max(1, |f|).
	const tolField = 1e-14
	// Symbolic against hand-written Jacobians: the same rounding argument.
	const tolJac = 1e-13
	// Central differences have error near 1e-8·|f'''|: 1e-7 relative.
	const tolFD = 1e-7
	rng := rand.New(rand.NewPCG(21, 22))
	for _, name := range Names() {
		m, _ := Lookup(name)
		t.Run(name, func(t *testing.T) {
			n := len(m.States)
			field, jac := compileFormulas(t, m)
			goField := m.Field(m.Defaults())
			got, want := make([]float64, n), make([]float64, n)
			jbuf := make([]float64, n*n)
			for trial := 0; trial < 20; trial++ {
				y := make([]float64, n)
				for i := range y {
					y[i] = m.Y0[i] + 0.3*rng.NormFloat64()
				}
				tt := rng.Float64()
				goField(tt, y, want)
				v := field.Vars()
				v[0] = tt
				copy(v[1:], y)
				field.Run(got)
				for i := range got {
					if d := math.Abs(got[i] - want[i]); d > tolField*math.Max(1, math.Abs(want[i])) {
						t.Errorf("f[%d] at %v: formula %.17g, Go %.17g (diff %g)", i, y, got[i], want[i], d)
					}
				}
				jv := jac.Vars()
				jv[0] = tt
				copy(jv[1:], y)
				jac.Run(jbuf)
				ref := mat.NewDense(n, n, nil)
				tol := tolJac
				if m.Jac != nil {
					m.Jac(m.Defaults())(tt, y, ref)
				} else {
					tol = tolFD
					fd.Jacobian(ref, func(dst, x []float64) { goField(tt, x, dst) }, y, &fd.JacobianSettings{Formula: fd.Central})
				}
				for i := 0; i < n; i++ {
					for j := 0; j < n; j++ {
						g, w := jbuf[i*n+j], ref.At(i, j)
						if math.Abs(g-w) > tol*math.Max(1, math.Abs(w)) {
							t.Errorf("J[%d][%d] at %v: symbolic %.12g, reference %.12g", i, j, y, g, w)
						}
					}
				}
			}
		})
	}
}
