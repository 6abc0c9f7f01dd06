package expr

import (
	"errors"
	"math"
	"math/big"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/diff/fd"

	"github.com/plumbdyn/plumb/internal/dd"
)

var testVars = []string{"t", "x", "y", "z", "a", "b"}

// formulas exercise every operation; each is defined on the sampling box
// x, y, z in [0.5, 2], a, b in [0.5, 1.5], t in [0, 1].
var formulas = []string{
	"a*(y - x)",
	"x*(b - z) - y",
	"x*y - 8/3*z",
	"-x^2 + y^3 - z^-2",
	"sin(x)*cos(y) + tan(z/2)",
	"exp(-t*x)/(1 + y^2)",
	"log(x*y) + sqrt(z + a)",
	"abs(x - 1.25)*tanh(y) + sinh(z) - cosh(a)",
	"atan(x - y) + atan2(y, x - 1)",
	"pow(x, y) + x^a + 2^z",
	"min(x, y) + max(z, a)*b",
	"(x + y)*(x + y) - sin(x + y)",
	"pi*x + 1.5e-3*y - 2E2*z",
	"x/y/z - x - -y",
	"2^-x^2",
}

func TestParseErrors(t *testing.T) {
	g := NewGraph(testVars)
	cases := []struct {
		src  string
		err  error
		col  int
		line int
	}{
		{"x + ", ErrSyntax, 5, 1},
		{"x + q", ErrUnknown, 5, 1},
		{"sin(x, y)", ErrArity, 1, 1},
		{"foo(x)", ErrUnknown, 1, 1},
		{"(x + y", ErrSyntax, 7, 1},
		{"x y", ErrSyntax, 3, 1},
		{"2x", ErrSyntax, 2, 1},
		{"1e", ErrSyntax, 3, 1},
		{"1e999", ErrSyntax, 1, 1},
		{"x +\n  $", ErrSyntax, 3, 2},
		{"sin", ErrSyntax, 1, 1},
		{"", ErrSyntax, 1, 1},
		{"x + ) ", ErrSyntax, 5, 1},
		{".", ErrSyntax, 1, 1},
		{strings.Repeat("(", maxDepth+1) + "x" + strings.Repeat(")", maxDepth+1), ErrSyntax, maxDepth + 1, 1}, // the ( past maxDepth levels
		{strings.Repeat("sin(", maxDepth+1) + "x" + strings.Repeat(")", maxDepth+1), ErrSyntax, 4*maxDepth + 4, 1},
		{strings.Repeat("x^", maxDepth+1) + "x", ErrSyntax, 2*maxDepth + 2, 1},
	}
	for _, c := range cases {
		_, err := g.Parse(c.src)
		var pe *ParseError
		if !errors.As(err, &pe) {
			t.Errorf("Parse(%q) = %v, want a *ParseError", c.src, err)
			continue
		}
		if !errors.Is(err, c.err) || pe.Col != c.col || pe.Line != c.line {
			t.Errorf("Parse(%q): %v at %d:%d, want %v at %d:%d", c.src, pe.Err, pe.Line, pe.Col, c.err, c.line, c.col)
		}
		if !strings.Contains(err.Error(), "^") {
			t.Errorf("Parse(%q): error %q has no caret line", c.src, err)
		}
	}
	_, err := g.Parse("x + q")
	want := "expr: line 1, column 5: unknown name \"q\" (variables: [t x y z a b])\n  x + q\n      ^"
	if err.Error() != want {
		t.Errorf("error text\n%s\nwant\n%s", err, want)
	}
}

func TestRoundTrip(t *testing.T) {
	g := NewGraph(testVars)
	for _, s := range formulas {
		e, err := g.Parse(s)
		if err != nil {
			t.Fatalf("Parse(%q): %v", s, err)
		}
		f := g.Format(e)
		e2, err := g.Parse(f)
		if err != nil {
			t.Fatalf("Parse(Format(%q)) = Parse(%q): %v", s, f, err)
		}
		if e2 != e {
			t.Errorf("Parse(Format(%q)) = %q is a different node", s, g.Format(e2))
		}
		// And in a fresh graph the printed text is a fixed point.
		g2 := NewGraph(testVars)
		e3, _ := g2.Parse(f)
		if f2 := g2.Format(e3); f2 != f {
			t.Errorf("Format in a fresh graph: %q, want %q", f2, f)
		}
	}
	// Derivatives print and re-read too.
	for _, s := range formulas {
		e, _ := g.Parse(s)
		for v := range testVars {
			d := g.Diff(e, v)
			if d2, err := g.Parse(g.Format(d)); err != nil || d2 != d {
				t.Errorf("d(%s)/d%s = %q does not read back (%v)", s, testVars[v], g.Format(d), err)
			}
		}
	}
}

func TestSimplify(t *testing.T) {
	g := NewGraph(testVars)
	cases := []struct{ in, want string }{
		{"x*1 + 0", "x"},
		{"0*sin(x) + y", "y"},
		{"2*3 + x", "6 + x"},
		{"x - x", "0"},
		{"-(-x)", "x"},
		{"x + -y", "x - y"},
		{"x^1*y^0", "x"},
		{"x*2", "2*x"},
		{"1/0", "1/0"},
		{"x - (-2)", "x - (-2)"},
		{"(-x)^2", "(-x)^2"},
		{"-x^2", "-x^2"},
		{"x^y^z", "x^y^z"},
		{"(x^y)^z", "(x^y)^z"},
		{"x - (y - z)", "x - (y - z)"},
		{"x/(y*z)", "x/(y*z)"},
	}
	for _, c := range cases {
		e, err := g.Parse(c.in)
		if err != nil {
			t.Fatal(err)
		}
		if got := g.Format(e); got != c.want {
			t.Errorf("%s simplifies to %q, want %q", c.in, got, c.want)
		}
	}
	// Common subexpressions are one node: (x+y) appears once.
	e, _ := g.Parse("(x + y)*(x + y)")
	n := g.Len()
	g.Parse("x + y")
	if g.Len() != n {
		t.Error("x + y was not shared")
	}
	if p := g.Compile([]Expr{e}); p.Len() != 2 {
		t.Errorf("(x+y)*(x+y) compiles to %d instructions, want 2 (add, square)", p.Len())
	}
}

// samplePoint returns a random point of the sampling box.
func samplePoint(rng *rand.Rand) []float64 {
	v := make([]float64, len(testVars))
	v[0] = rng.Float64()
	for i := 1; i <= 3; i++ {
		v[i] = 0.5 + 1.5*rng.Float64()
	}
	v[4] = 0.5 + rng.Float64()
	v[5] = 0.5 + rng.Float64()
	return v
}

// TestDerivatives compares symbolic derivatives with gonum's central finite
// differences (reference library: gonum diff/fd) at random points.
func TestDerivatives(t *testing.T) {
	// Central differences with fd's default step have truncation and
	// rounding error near 1e-8·|f'''|; 1e-7 relative (or absolute below 1)
	// is the requested check level.
	const tol = 1e-7
	g := NewGraph(testVars)
	rng := rand.New(rand.NewPCG(13, 14))
	for _, s := range formulas {
		e, _ := g.Parse(s)
		grad := make([]Expr, len(testVars))
		for v := range testVars {
			grad[v] = g.Diff(e, v)
		}
		fe := g.Compile([]Expr{e}).NewFloat64()
		ge := g.Compile(grad).NewFloat64()
		out := make([]float64, 1)
		f := func(x []float64) float64 {
			fe.Eval(x, out)
			return out[0]
		}
		for range 20 {
			x := samplePoint(rng)
			got := make([]float64, len(testVars))
			ge.Eval(x, got)
			want := fd.Gradient(nil, f, x, &fd.Settings{Formula: fd.Central})
			for v := range got {
				if math.Abs(got[v]-want[v]) > tol*math.Max(1, math.Abs(want[v])) {
					t.Errorf("d(%s)/d%s at %v = %.12g, finite differences %.12g", s, testVars[v], x, got[v], want[v])
				}
			}
		}
	}
}

// TestKinks checks the documented derivatives at the kinks of abs, min, max.
func TestKinks(t *testing.T) {
	g := NewGraph(testVars)
	cases := []struct {
		src  string
		v    int
		at   float64 // value of x; y is 1
		want float64 // from the definitions in Diff's doc comment
	}{
		{"abs(x)", 1, 0, 0},
		{"min(x, y)", 1, 1, 1},
		{"min(x, y)", 2, 1, 0},
		{"max(x, y)", 1, 1, 1},
		{"max(y, x)", 1, 1, 0},
		{"min(x, y)", 2, 2, 1},
	}
	for _, c := range cases {
		e, _ := g.Parse(c.src)
		ev := g.Compile([]Expr{g.Diff(e, c.v)}).NewFloat64()
		vars := []float64{0, c.at, 1, 0, 0, 0}
		out := []float64{0}
		ev.Eval(vars, out)
		if out[0] != c.want {
			t.Errorf("d %s/d%s at x=%v: %v, want %v", c.src, testVars[c.v], c.at, out[0], c.want)
		}
	}
}

// TestEvaluatorsAgree runs every formula in float64, double-double and
// big.Float at 200 bits: double-double must match big to 1e-28 relative
// (the documented function accuracies, compounded over a few operations);
// float64 to 1e-13 (a few rounding errors of 1.1e-16 each, amplified by at
// most the formulas' condition numbers on the box).
func TestEvaluatorsAgree(t *testing.T) {
	const tolDD, tol64 = 1e-28, 1e-13
	g := NewGraph(testVars)
	outs := make([]Expr, len(formulas))
	for i, s := range formulas {
		outs[i], _ = g.Parse(s)
	}
	p := g.Compile(outs)
	f64, fdd := p.NewFloat64(), p.NewDD()
	fb, err := p.NewBig(200)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(15, 16))
	o64 := make([]float64, len(outs))
	odd := make([]dd.Float, len(outs))
	ob := make([]*big.Float, len(outs))
	for range 50 {
		x := samplePoint(rng)
		f64.Eval(x, o64)
		for i, v := range x {
			fdd.Vars()[i] = dd.From(v)
			fb.Vars()[i].SetFloat64(v)
		}
		fdd.Run(odd)
		if err := fb.Run(ob); err != nil {
			t.Fatal(err)
		}
		for i := range outs {
			w, _ := ob[i].Float64()
			d := new(big.Float).SetPrec(200).Sub(odd[i].Big(), ob[i])
			dv, _ := d.Float64()
			if math.Abs(dv) > tolDD*math.Max(1, math.Abs(w)) {
				t.Errorf("%s: double-double differs from big by %g", formulas[i], dv)
			}
			if math.Abs(o64[i]-w) > tol64*math.Max(1, math.Abs(w)) {
				t.Errorf("%s: float64 %v, big %v", formulas[i], o64[i], w)
			}
		}
	}
}

func TestBigNaN(t *testing.T) {
	g := NewGraph(testVars)
	for _, s := range []string{"log(x - 10)", "sqrt(-x)", "x/0 - 2*x/0", "(-x)^0.5"} {
		e, err := g.Parse(s)
		if err != nil {
			t.Fatal(err)
		}
		ev, _ := g.Compile([]Expr{e}).NewBig(100)
		ev.Vars()[1].SetFloat64(1)
		if err := ev.Run(make([]*big.Float, 1)); !errors.Is(err, ErrNaN) {
			t.Errorf("%s at x=1: error %v, want ErrNaN", s, err)
		}
	}
}

func TestNoAllocs(t *testing.T) {
	g := NewGraph(testVars)
	outs := make([]Expr, len(formulas))
	for i, s := range formulas {
		outs[i], _ = g.Parse(s)
	}
	p := g.Compile(outs)
	f64, fdd := p.NewFloat64(), p.NewDD()
	copy(f64.Vars(), []float64{0.5, 1, 1.5, 0.7, 1, 1})
	o := make([]float64, len(outs))
	od := make([]dd.Float, len(outs))
	if n := testing.AllocsPerRun(100, func() { f64.Run(o) }); n != 0 {
		t.Errorf("Float64.Run allocates %v times", n)
	}
	if n := testing.AllocsPerRun(100, func() { fdd.Run(od) }); n != 0 {
		t.Errorf("DD.Run allocates %v times", n)
	}
	lf := lorenzField(t)
	y, d := []float64{1, 2, 3}, make([]float64, 3)
	if n := testing.AllocsPerRun(100, func() { lf(0, y, d) }); n != 0 {
		t.Errorf("Lorenz formula field allocates %v times", n)
	}
}

// TestFusedLorenz checks the fusion of the Lorenz rates: 8 operations in 4
// dispatches (σ·(y-x); x·(ρ-z) then -y; x·y - β·z).
func TestFusedLorenz(t *testing.T) {
	p := lorenzProgram(t)
	if len(p.code) != 8 || len(p.fast) != 4 {
		t.Errorf("Lorenz: %d plain and %d fused instructions, want 8 and 4", len(p.code), len(p.fast))
	}
}

// TestFusedBits checks that the fused fast path gives the same bits as the
// plain tape (exact identity: fusion keeps every rounding).
func TestFusedBits(t *testing.T) {
	g := NewGraph(testVars)
	outs := make([]Expr, 0, len(formulas)*len(testVars))
	for _, s := range formulas {
		e, _ := g.Parse(s)
		outs = append(outs, e)
		for v := range testVars {
			outs = append(outs, g.Diff(e, v))
		}
	}
	for start := 0; start < len(outs); start += 7 {
		p := g.Compile(outs[start:min(start+7, len(outs))])
		if p.fast == nil {
			continue
		}
		fast, plain := p.NewFloat64(), p.NewFloat64()
		plain.rs = nil // force the plain tape
		rng := rand.New(rand.NewPCG(17, 18))
		a, b := make([]float64, p.NumOut()), make([]float64, p.NumOut())
		for range 20 {
			x := samplePoint(rng)
			fast.Eval(x, a)
			plain.Eval(x, b)
			for i := range a {
				if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
					t.Fatalf("output %d: fused %v, plain %v", start+i, a[i], b[i])
				}
			}
		}
	}
}
