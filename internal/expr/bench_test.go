package expr

import (
	"fmt"
	"testing"
	"time"

	"github.com/plumbdyn/plumb/internal/models"
)

// lorenzRates are the Lorenz (1963) rates over the slots t, x, y, z, sigma,
// rho, beta.
var lorenzVars = []string{"t", "x", "y", "z", "sigma", "rho", "beta"}
var lorenzRates = []string{"sigma*(y - x)", "x*(rho - z) - y", "x*y - beta*z"}

// lorenzProgram compiles lorenzRates over lorenzVars.
func lorenzProgram(tb testing.TB) *Program {
	tb.Helper()
	g := NewGraph(lorenzVars)
	outs := make([]Expr, len(lorenzRates))
	for i, s := range lorenzRates {
		e, err := g.Parse(s)
		if err != nil {
			tb.Fatal(err)
		}
		outs[i] = e
	}
	return g.Compile(outs)
}

func lorenzField(tb testing.TB) func(t float64, y, dydt []float64) {
	ev := lorenzProgram(tb).NewFloat64()
	copy(ev.Vars()[4:], []float64{10, 28, 8.0 / 3})
	return ev.FieldFunc()
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

// BenchmarkLorenzRatio times the formula field and the Go field in the same
// run, alternating blocks of calls, and reports their ratio (the noise of a
// shared machine affects both alike).
func BenchmarkLorenzRatio(b *testing.B) {
	m, err := models.Lookup("lorenz")
	if err != nil {
		b.Fatal(err)
	}
	goField, formula := m.Field(m.Defaults()), lorenzField(b)
	y, d := []float64{1, 2, 3}, make([]float64, 3)
	const block = 1000
	var tGo, tFormula time.Duration
	b.ReportAllocs()
	for b.Loop() {
		t0 := time.Now()
		for range block {
			goField(0, y, d)
		}
		t1 := time.Now()
		for range block {
			formula(0, y, d)
		}
		tGo += t1.Sub(t0)
		tFormula += time.Since(t1)
	}
	b.ReportMetric(float64(tFormula)/float64(tGo), "formula/go")
}

// lorenz96Field compiles the Lorenz-96 rates of internal/models (40 sites,
// dx_i/dt = (x_{i+1} - x_{i-2})·x_{i-1} - x_i + F) over the slots t, x1 ...
// x40, F, with F = 8.
func lorenz96Field(tb testing.TB) func(t float64, y, dydt []float64) {
	const n = 40
	vars := []string{"t"}
	for i := range n {
		vars = append(vars, fmt.Sprintf("x%d", i+1))
	}
	vars = append(vars, "F")
	site := func(i int) string { return fmt.Sprintf("x%d", (i+n)%n+1) }
	g := NewGraph(vars)
	outs := make([]Expr, n)
	for i := range n {
		e, err := g.Parse(fmt.Sprintf("(%s - %s)*%s - %s + F", site(i+1), site(i-2), site(i-1), site(i)))
		if err != nil {
			tb.Fatal(err)
		}
		outs[i] = e
	}
	ev := g.Compile(outs).NewFloat64()
	ev.Vars()[1+n] = 8
	return ev.FieldFunc()
}

// BenchmarkLorenz96Ratio is BenchmarkLorenzRatio for the 40 Lorenz-96
// rates (more outputs than the unrolled calls cover).
func BenchmarkLorenz96Ratio(b *testing.B) {
	m, err := models.Lookup("lorenz96")
	if err != nil {
		b.Fatal(err)
	}
	goField, formula := m.Field(m.Defaults()), lorenz96Field(b)
	y, d := append([]float64(nil), m.Y0...), make([]float64, len(m.Y0))
	for i := range y {
		y[i] += 0.01 * float64(i)
	}
	const block = 100
	var tGo, tFormula time.Duration
	b.ReportAllocs()
	for b.Loop() {
		t0 := time.Now()
		for range block {
			goField(0, y, d)
		}
		t1 := time.Now()
		for range block {
			formula(0, y, d)
		}
		tGo += t1.Sub(t0)
		tFormula += time.Since(t1)
	}
	b.ReportMetric(float64(tFormula)/float64(tGo), "formula/go")
}
