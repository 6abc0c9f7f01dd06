package expr

import (
	"math"
	"math/rand/v2"
	"testing"
)

// Every member of a batch run gets the bits that Float64.Field gives it
// alone (exact identity: the batch applies the same operations), for
// formulas that use every kind of instruction, several member counts
// (including one that makes the registers grow) and parameters set after
// construction.
func TestBatchFieldMatchesFloat64(t *testing.T) {
	cases := []struct {
		name  string
		rates []string
	}{
		{"lorenz", []string{"sigma*(y - x)", "x*(rho - z) - y", "x*y - beta*z"}},
		{"functions", []string{"sin(x)*exp(-y^2) + atan2(y, z) - t", "sqrt(abs(x)) + x^3 - y^-2 + min(x, z)*max(y, sigma)",
			"tanh(z)/cosh(x) + sinh(y) + atan(x) + log(1 + z^2) + cos(t*x) + tan(0.1*y) + sign(x) + step(y) + x^1.5"}},
		{"constant rate", []string{"rho", "x", "-beta"}},
		{"uniform parts and a repeated output", []string{"(2*sigma + rho)*x - t*beta", "(2*sigma + rho)*x - t*beta", "sin(rho)/(1 + y^2) + exp(-t)"}},
	}
	rng := rand.New(rand.NewPCG(1, 2))
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			g := NewGraph([]string{"t", "x", "y", "z", "sigma", "rho", "beta"})
			var outs []Expr
			for _, s := range tc.rates {
				e, err := g.Parse(s)
				if err != nil {
					t.Fatal(err)
				}
				outs = append(outs, e)
			}
			p := g.Compile(outs)
			params := []float64{10, 28, 8.0 / 3}
			one := p.NewFloat64()
			copy(one.Vars()[4:], params)
			b := p.NewBatch(3, 4)
			for i, v := range params {
				if err := b.SetVar(4+i, v); err != nil {
					t.Fatal(err)
				}
			}
			for _, m := range []int{1, 3, 4, 37} {
				y := make([]float64, 3*m)
				for i := range y {
					y[i] = 4 * rng.NormFloat64()
				}
				got := make([]float64, 3*m)
				tt := rng.Float64()
				b.Field(tt, m, y, got)
				for k := 0; k < m; k++ {
					yk := []float64{y[k], y[m+k], y[2*m+k]}
					want := make([]float64, 3)
					one.Field(tt, yk, want)
					for i := range want {
						if g, w := got[i*m+k], want[i]; math.Float64bits(g) != math.Float64bits(w) && !(math.IsNaN(g) && math.IsNaN(w)) {
							t.Fatalf("m=%d member %d rate %d: batch %v, alone %v", m, k, i, g, w)
						}
					}
				}
			}
		})
	}
}

// A run allocates nothing once the registers have room (common practice:
// testing.AllocsPerRun).
func TestBatchFieldNoAlloc(t *testing.T) {
	g := NewGraph([]string{"t", "x", "y"})
	a, _ := g.Parse("x*y - sin(t)")
	c, _ := g.Parse("x^2 + y")
	b := g.Compile([]Expr{a, c}).NewBatch(2, 64)
	y, d := make([]float64, 128), make([]float64, 128)
	if n := testing.AllocsPerRun(100, func() { b.Field(0.5, 64, y, d) }); n != 0 {
		t.Fatalf("%v allocations per run", n)
	}
	if err := b.SetVar(3, 1); err == nil {
		t.Fatal("slot 3 of 3 variables accepted")
	}
}
