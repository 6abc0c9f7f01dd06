package expr

import (
	"errors"
	"math"
	"math/big"
	"math/rand/v2"
	"testing"

	"github.com/plumbdyn/plumb/internal/dd"
)

// TestTaylorBigMatchesDD checks that the big.Float recurrences at 200 bits
// give the double-double ones' coefficients on every formula (same
// recurrences, different rounding): 1e-26 relative to max(1, |c_k|), the
// double-double recurrences' rounding (2^-104 per operation) grown over
// K = 12 orders of sums (common practice for error growth of recurrences).
func TestTaylorBigMatchesDD(t *testing.T) {
	const K, prec, tol = 12, 200, 1e-26
	g := NewGraph(testVars)
	rng := rand.New(rand.NewPCG(29, 30))
	for _, src := range formulas {
		e, _ := g.Parse(src)
		p := g.Compile([]Expr{e})
		tdd, _ := p.NewTaylorDD(K)
		tb, err := p.NewTaylorBig(K, prec)
		if err != nil {
			t.Fatal(err)
		}
		x0 := samplePoint(rng)
		for i := range x0 {
			b := tdd.Var(i)
			clear(b)
			b[0], b[1] = dd.From(x0[i]), dd.From(0.25)
			s := tb.Var(i)
			for _, x := range s {
				x.SetInt64(0)
			}
			s[0].SetFloat64(x0[i])
			s[1].SetFloat64(0.25)
		}
		tdd.Run()
		for k := 0; k <= K; k++ {
			tb.order(k)
		}
		for k := 0; k <= K; k++ {
			d := tdd.Out(0)[k]
			bv := tb.Out(0)[k]
			diff, _ := new(big.Float).Sub(bv, d.Big()).Float64()
			if math.Abs(diff) > tol*math.Max(1, math.Abs(d.Float64())) {
				t.Errorf("%s: coefficient %d: big %.30g, double-double %.30g (diff %g)", src, k, bv, d.Big(), diff)
			}
		}
	}
}

// TestTaylorBigExact checks y' = -y², y(0) = 1 against y_k = (-1)^k (exact
// identity: y = 1/(1+t)) and y' = y·cos t, whose solution is exp(sin t),
// against BigExp(BigSin(h)) at 300 bits.
func TestTaylorBigExact(t *testing.T) {
	const K, prec = 60, 300
	g := NewGraph([]string{"t", "y"})
	e, _ := g.Parse("-y^2")
	ty, _ := g.Compile([]Expr{e}).NewTaylorBig(K, prec)
	dst := [][]*big.Float{make([]*big.Float, K+1)}
	one := big.NewFloat(1)
	if err := ty.ODE(new(big.Float), []*big.Float{one}, dst); err != nil {
		t.Fatal(err)
	}
	for k, c := range dst[0] {
		w := big.NewFloat(math.Pow(-1, float64(k)))
		if c.Cmp(w) != 0 { // exact: every operation is on small integers
			t.Errorf("y_%d = %v, want %v", k, c, w)
		}
	}
	e2, _ := g.Parse("y*cos(t)")
	ty2, _ := g.Compile([]Expr{e2}).NewTaylorBig(K, prec)
	c := [][]*big.Float{make([]*big.Float, K+1)}
	if err := ty2.ODE(new(big.Float), []*big.Float{one}, c); err != nil {
		t.Fatal(err)
	}
	h := new(big.Float).SetPrec(prec).SetFloat64(0.0625)
	sum := new(big.Float).SetPrec(prec)
	for k := K; k >= 0; k-- {
		sum.Mul(sum, h)
		sum.Add(sum, c[0][k])
	}
	// Truncation 0.0625^61 ~ 3e-74; 300-bit rounding ~ 5e-91 per operation.
	const tol = 1e-70
	ref := BigExp(new(big.Float).SetPrec(prec), BigSin(new(big.Float).SetPrec(prec), h))
	diff, _ := new(big.Float).Sub(sum, ref).Float64()
	if math.Abs(diff) > tol {
		t.Errorf("exp(sin 0.0625): Taylor sum off by %g, want below %g", diff, tol)
	}
}

// TestTaylorBigBadInput checks errors instead of panics.
func TestTaylorBigBadInput(t *testing.T) {
	g := NewGraph([]string{"t", "y"})
	e, _ := g.Parse("log(y) + sqrt(y)")
	p := g.Compile([]Expr{e})
	if _, err := p.NewTaylorBig(-1, 100); err == nil {
		t.Error("order -1 accepted")
	}
	if _, err := p.NewTaylorBig(4, 1); err == nil {
		t.Error("precision 1 accepted")
	}
	ty, _ := p.NewTaylorBig(4, 100)
	err := ty.ODE(new(big.Float), []*big.Float{big.NewFloat(-1)}, nil)
	if !errors.Is(err, ErrNaN) {
		t.Errorf("log(-1): err = %v, want ErrNaN", err)
	}
	if err := ty.ODE(new(big.Float), nil, nil); err == nil {
		t.Error("ODE with no states accepted")
	}
	e0, _ := g.Parse("1/(y - y)")
	ty0, _ := g.Compile([]Expr{e0}).NewTaylorBig(3, 100)
	if err := ty0.ODE(new(big.Float), []*big.Float{big.NewFloat(0)}, nil); !errors.Is(err, ErrNaN) {
		t.Errorf("0/0: err = %v, want ErrNaN", err)
	}
}

// FuzzTaylorBig checks that no formula panics the big.Float Taylor
// recurrences: every input either fails to parse or gives coefficients or
// an error wrapping ErrNaN.
func FuzzTaylorBig(f *testing.F) {
	for _, s := range formulas {
		f.Add(s, 0.7)
	}
	for _, s := range []string{"1/0", "0/0*x", "log(x - x)", "sqrt(-x)", "x^-3", "(x - 1)^1.5", "atan2(0, 0)", "tan(x)^2/(x - 0.7)"} {
		f.Add(s, 0.7)
	}
	f.Fuzz(func(t *testing.T, src string, x0 float64) {
		g := NewGraph([]string{"t", "x"})
		e, err := g.Parse(src)
		if err != nil || g.Len() > 500 {
			return
		}
		ty, err := g.Compile([]Expr{e}).NewTaylorBig(8, 80)
		if err != nil {
			t.Fatal(err)
		}
		if x0 != x0 || x0-x0 != 0 {
			return // big.Float has no NaN or Inf start
		}
		err = ty.ODE(new(big.Float), []*big.Float{big.NewFloat(x0)}, nil)
		if err != nil && !errors.Is(err, ErrNaN) {
			t.Fatalf("%q at x0=%v: error %v does not wrap ErrNaN", src, x0, err)
		}
	})
}
