package expr

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"

	"github.com/plumbdyn/plumb/internal/dd"
)

// TestTaylorSeries checks each formula's Taylor series along the line
// x(t) = x0 + t·dx (and the same for y, z, a, b) against direct evaluation:
// Σ c_k h^k must equal f(x0 + h·dx) up to the truncation error of order
// (h/ρ)^(K+1), ρ the distance to the nearest singularity (exact identity of
// Taylor's theorem).
func TestTaylorSeries(t *testing.T) {
	// K = 24 and h = 0.05 on formulas analytic in a radius > 0.4 around the
	// box: truncation below (0.05/0.4)^25 ~ 1e-23; float64 rounding of the
	// recurrences, amplified by the coefficients' growth, stays below 1e-12.
	const K, h, tol = 24, 0.05, 1e-12
	g := NewGraph(testVars)
	rng := rand.New(rand.NewPCG(19, 20))
	for _, src := range formulas {
		e, err := g.Parse(src)
		if err != nil {
			t.Fatal(err)
		}
		if src == "abs(x - 1.25)*tanh(y) + sinh(z) - cosh(a)" || src == "min(x, y) + max(z, a)*b" {
			continue // kinks: analytic only away from them; see TestTaylorKinks
		}
		p := g.Compile([]Expr{e})
		ty, err := p.NewTaylor(K)
		if err != nil {
			t.Fatal(err)
		}
		ev := p.NewFloat64()
		for range 10 {
			x0 := samplePoint(rng)
			dx := make([]float64, len(x0))
			for i := range dx {
				dx[i] = rng.Float64() - 0.5
			}
			for i := range x0 {
				s := ty.Var(i)
				for k := range s {
					s[k] = 0
				}
				s[0], s[1] = x0[i], dx[i]
			}
			ty.Run()
			c := ty.Out(0)
			sum := 0.0
			for k := K; k >= 0; k-- {
				sum = sum*h + c[k]
			}
			xh := make([]float64, len(x0))
			for i := range xh {
				xh[i] = x0[i] + h*dx[i]
			}
			want := []float64{0}
			ev.Eval(xh, want)
			if math.Abs(sum-want[0]) > tol*math.Max(1, math.Abs(want[0])) {
				t.Errorf("%s at %v: series %.16g, direct %.16g (diff %g)", src, x0, sum, want[0], sum-want[0])
			}
		}
	}
}

// TestTaylorODE checks the solution coefficients of ODEs with closed-form
// solutions (exact identities): y' = -y², y(0) = 1 gives y = 1/(1+t), so
// y_k = (-1)^k; the oscillator x' = v, v' = -x from (1, 0) gives cos t and
// -sin t; y' = y·cos(t) gives y = exp(sin t).
func TestTaylorODE(t *testing.T) {
	const K = 20
	// Coefficients come from short recurrences of exactly representable or
	// well-conditioned numbers: a few ulps.
	const tol = 1e-14
	type tc struct {
		vars  []string
		rates []string
		y0    []float64
		want  func(i, k int) float64
	}
	fact := func(k int) float64 { return math.Gamma(float64(k + 1)) }
	cases := []tc{
		{[]string{"t", "y"}, []string{"-y^2"}, []float64{1}, func(_, k int) float64 { return math.Pow(-1, float64(k)) }},
		{[]string{"t", "y"}, []string{"-y*y"}, []float64{1}, func(_, k int) float64 { return math.Pow(-1, float64(k)) }},
		{[]string{"t", "y"}, []string{"-(1/y)^-2"}, []float64{1}, func(_, k int) float64 { return math.Pow(-1, float64(k)) }},
		{[]string{"t", "x", "v"}, []string{"v", "-x"}, []float64{1, 0}, func(i, k int) float64 {
			// cos t = Σ (-1)^m t^2m/(2m)!, -sin t = -Σ (-1)^m t^(2m+1)/(2m+1)!
			if i == 0 {
				if k%2 == 1 {
					return 0
				}
				return math.Pow(-1, float64(k/2)) / fact(k)
			}
			if k%2 == 0 {
				return 0
			}
			return -math.Pow(-1, float64((k-1)/2)) / fact(k)
		}},
	}
	for _, c := range cases {
		g := NewGraph(c.vars)
		var outs []Expr
		for _, r := range c.rates {
			e, err := g.Parse(r)
			if err != nil {
				t.Fatal(err)
			}
			outs = append(outs, e)
		}
		ty, _ := g.Compile(outs).NewTaylor(K)
		dst := make([][]float64, len(c.y0))
		for i := range dst {
			dst[i] = make([]float64, K+1)
		}
		if err := ty.ODE(0, c.y0, dst); err != nil {
			t.Fatal(err)
		}
		for i := range dst {
			for k := 0; k <= K; k++ {
				if w := c.want(i, k); math.Abs(dst[i][k]-w) > tol*math.Max(1, math.Abs(w)) {
					t.Errorf("%v: y%d_%d = %.17g, want %.17g", c.rates, i, k, dst[i][k], w)
				}
			}
		}
	}
	// y' = y·cos t, y(0) = 1: y = exp(sin t); compare the series at h = 0.1
	// with the closed form (Taylor truncation ~ 0.1^21).
	g := NewGraph([]string{"t", "y"})
	e, _ := g.Parse("y*cos(t)")
	ty, _ := g.Compile([]Expr{e}).NewTaylor(K)
	dst := [][]float64{make([]float64, K+1)}
	ty.ODE(0, []float64{1}, dst)
	sum := 0.0
	for k := K; k >= 0; k-- {
		sum = sum*0.1 + dst[0][k]
	}
	if w := math.Exp(math.Sin(0.1)); math.Abs(sum-w) > 1e-15 {
		t.Errorf("exp(sin t) at 0.1: series %.17g, closed form %.17g", sum, w)
	}
}

func TestTaylorNoAllocs(t *testing.T) {
	g := NewGraph(lorenzVars)
	var outs []Expr
	for _, s := range lorenzRates {
		e, _ := g.Parse(s)
		outs = append(outs, e)
	}
	ty, _ := g.Compile(outs).NewTaylor(20)
	ty.SetParam(4, 10)
	ty.SetParam(5, 28)
	ty.SetParam(6, 8.0/3)
	dst := [][]float64{make([]float64, 21), make([]float64, 21), make([]float64, 21)}
	y0 := []float64{1, 2, 3}
	if n := testing.AllocsPerRun(50, func() { ty.ODE(0, y0, dst) }); n != 0 {
		t.Errorf("Taylor.ODE allocates %v times", n)
	}
}

// TestTaylorKinks checks abs, min and max along lines that stay on one
// branch (exact identities: the series is the branch's own).
func TestTaylorKinks(t *testing.T) {
	g := NewGraph([]string{"x", "y"})
	cases := []struct {
		src  string
		want []float64 // coefficients for x = -2 + t, y = 0.5 - 3t
	}{
		{"abs(x)", []float64{2, -1, 0}},
		{"min(x, y)", []float64{-2, 1, 0}},
		{"max(x, y)", []float64{0.5, -3, 0}},
		{"abs(x)*y", []float64{1, -6.5, 3}},
	}
	for _, c := range cases {
		e, _ := g.Parse(c.src)
		ty, _ := g.Compile([]Expr{e}).NewTaylor(2)
		copy(ty.Var(0), []float64{-2, 1, 0})
		copy(ty.Var(1), []float64{0.5, -3, 0})
		ty.Run()
		for k, w := range c.want {
			if got := ty.Out(0)[k]; got != w {
				t.Errorf("%s: coefficient %d = %v, want %v", c.src, k, got, w)
			}
		}
	}
}

// TestTaylorStepOrder measures the convergence order of Taylor stepping on
// the oscillator x' = v, v' = -x over [0, 1] (exact solution cos t, -sin t):
// the global error of an order-n method falls by 2^n when h halves.
func TestTaylorStepOrder(t *testing.T) {
	g := NewGraph([]string{"t", "x", "v"})
	ex, _ := g.Parse("v")
	for _, order := range []int{2, 4, 6} {
		p := g.Compile([]Expr{ex, g.Neg(g.Var(1))})
		ty, _ := p.NewTaylor(order)
		errAt := func(steps int) float64 {
			h := 1 / float64(steps)
			y := []float64{1, 0}
			for s := range steps {
				ty.Step(float64(s)*h, y, h, y)
			}
			return math.Hypot(y[0]-math.Cos(1), y[1]+math.Sin(1))
		}
		e1, e2 := errAt(16), errAt(32)
		got := math.Log2(e1 / e2)
		// The fitted order is within 0.15 of n once h is in the asymptotic
		// range (common practice for convergence tests).
		if math.Abs(got-float64(order)) > 0.15 {
			t.Errorf("order %d: measured %.3f (errors %g, %g)", order, got, e1, e2)
		}
	}
}

// TestTaylorDDMatchesFloat64 checks that the double-double recurrences give
// the float64 ones' coefficients to float64 accuracy on every formula
// (same recurrences, different rounding: 1e-12 relative to max(1, |c_k|)
// after the float64 recurrences' error growth).
func TestTaylorDDMatchesFloat64(t *testing.T) {
	const K, tol = 12, 1e-12
	g := NewGraph(testVars)
	rng := rand.New(rand.NewPCG(23, 24))
	for _, src := range formulas {
		e, _ := g.Parse(src)
		p := g.Compile([]Expr{e})
		t64, _ := p.NewTaylor(K)
		tdd, _ := p.NewTaylorDD(K)
		x0 := samplePoint(rng)
		for i := range x0 {
			a, b := t64.Var(i), tdd.Var(i)
			clear(a)
			clear(b)
			a[0], a[1] = x0[i], 0.25
			b[0], b[1] = dd.From(x0[i]), dd.From(0.25)
		}
		t64.Run()
		tdd.Run()
		for k := 0; k <= K; k++ {
			f, d := t64.Out(0)[k], tdd.Out(0)[k].Float64()
			if math.Abs(f-d) > tol*math.Max(1, math.Abs(d)) {
				t.Errorf("%s: coefficient %d: float64 %.16g, double-double %.16g", src, k, f, d)
			}
		}
	}
}

// TestTaylorDDExact checks the double-double coefficients of y' = -y²,
// y(0) = 1, against y_k = (-1)^k (exact identity), and a step of
// y' = y·cos t against exp(sin h) computed in math/big at 200 bits.
func TestTaylorDDExact(t *testing.T) {
	const K = 30
	// The recurrences add a few double-double roundings per coefficient.
	const tol = 1e-30
	g := NewGraph([]string{"t", "y"})
	e, _ := g.Parse("-y^2")
	ty, _ := g.Compile([]Expr{e}).NewTaylorDD(K)
	dst := [][]dd.Float{make([]dd.Float, K+1)}
	ty.ODE(dd.Float{}, []dd.Float{dd.From(1)}, dst)
	for k, c := range dst[0] {
		if w := math.Pow(-1, float64(k)); math.Abs(dd.Sub(c, dd.From(w)).Float64()) > tol {
			t.Errorf("y_%d = %v, want %v", k, c, w)
		}
	}
	e2, _ := g.Parse("y*cos(t)")
	ty2, _ := g.Compile([]Expr{e2}).NewTaylorDD(K)
	y := []dd.Float{dd.From(1)}
	h := dd.From(0.0625)
	ty2.Step(dd.Float{}, y, h, y)
	// Truncation: 0.0625^31 ~ 5e-38; reference exp(sin h) at 200 bits.
	ref := BigExp(new(big.Float).SetPrec(200), BigSin(new(big.Float).SetPrec(200), h.Big()))
	diff, _ := new(big.Float).Sub(y[0].Big(), ref).Float64()
	if math.Abs(diff) > 1e-30 {
		t.Errorf("exp(sin 0.0625): Taylor step off by %g", diff)
	}
}
