package expr

import (
	"testing"

	"github.com/plumbdyn/plumb/internal/models"
)

// lorenzRates are the Lorenz (1963) rates over the slots t, x, y, z, sigma,
// rho, beta.
var lorenzVars = []string{"t", "x", "y", "z", "sigma", "rho", "beta"}
var lorenzRates = []string{"sigma*(y - x)", "x*(rho - z) - y", "x*y - beta*z"}

func lorenzField(tb testing.TB) func(t float64, y, dydt []float64) {
	g := NewGraph(lorenzVars)
	outs := make([]Expr, len(lorenzRates))
	for i, s := range lorenzRates {
		e, err := g.Parse(s)
		if err != nil {
			tb.Fatal(err)
		}
		outs[i] = e
	}
	ev := g.Compile(outs).NewFloat64()
	v := ev.Vars()
	v[4], v[5], v[6] = 10, 28, 8.0/3
	return func(t float64, y, dydt []float64) {
		v[0] = t
		v[1], v[2], v[3] = y[0], y[1], y[2]
		ev.Run(dydt)
	}
}

// BenchmarkLorenz compares the compiled formula field with the hand-written
// Go field of internal/models; report the ratio of the two ns/op.
func BenchmarkLorenz(b *testing.B) {
	m, err := models.Lookup("lorenz")
	if err != nil {
		b.Fatal(err)
	}
	y, d := []float64{1, 2, 3}, make([]float64, 3)
	b.Run("go", func(b *testing.B) {
		f := m.Field(m.Defaults())
		b.ReportAllocs()
		for b.Loop() {
			f(0, y, d)
		}
	})
	b.Run("formula", func(b *testing.B) {
		f := lorenzField(b)
		b.ReportAllocs()
		for b.Loop() {
			f(0, y, d)
		}
	})
}
