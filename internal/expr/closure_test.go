package expr

import (
	"fmt"
	"math"
	"math/rand/v2"
	"reflect"
	"runtime"
	"strings"
	"testing"
)

// inlineShapes returns one formula per inline kind short of the deep ones
// (see inlineOut): a register, the one-operation kinds, and the L, R and LR
// forms of fuseCode, over x, y, z, a.
func inlineShapes() []string {
	sym := []string{"+", "-", "*"}
	fs := []string{"y", "x + y", "x - y", "x * y", "x / y", "-x", "x^2"}
	for i := range 3 {
		for o := range 3 {
			fs = append(fs, fmt.Sprintf("(x %s y) %s z", sym[i], sym[o]), fmt.Sprintf("x %s (y %s z)", sym[o], sym[i]))
			for r := range 3 {
				fs = append(fs, fmt.Sprintf("(x %s y) %s (z %s a)", sym[i], sym[o], sym[r]))
			}
		}
	}
	return fs
}

// TestInlineKinds checks that every inline kind is reached, each by the
// formula meant for it (as the first of two outputs, the second t*t, so
// that a lone register has a program too), and that the inline closure
// gives the bits of the tape (exact identity: the same operations in the
// same order) for y and dydt of every length up to one past the outputs, so
// both the unrolled part and the loop part of inline_gen.go are run.
func TestInlineKinds(t *testing.T) {
	seen := make([]bool, numKinds)
	rng := rand.New(rand.NewPCG(31, 32))
	for _, s := range append(inlineShapes(), deepShapes()...) {
		g := NewGraph(testVars)
		e, err := g.Parse(s)
		if err != nil {
			t.Fatal(err)
		}
		tt, err := g.Parse("t*t")
		if err != nil {
			t.Fatal(err)
		}
		p := g.Compile([]Expr{e, tt})
		pl := p.plan()
		if !pl.inline || len(pl.pre) != 0 || len(pl.kinds) != 2 {
			t.Fatalf("%s: inline %v with %d tape instructions, want an inline kind and none", s, pl.inline, len(pl.pre))
		}
		k := pl.kinds[0].k
		if int(k) >= numKinds || seen[k] {
			t.Fatalf("%s: kind %d out of range or reached twice", s, k)
		}
		seen[k] = true
		fast, tape := p.NewFloat64(), p.NewFloat64()
		tape.rs = nil // force the plain tape
		f := fast.FieldFunc()
		if name := runtime.FuncForPC(reflect.ValueOf(f).Pointer()).Name(); !strings.Contains(name, "inlineField2") {
			t.Fatalf("%s: FieldFunc is %s, want the inline closure", s, name)
		}
		for range 3 {
			x := samplePoint(rng)
			copy(fast.Vars(), x)
			copy(tape.Vars(), x)
			for ny := 0; ny < len(x); ny++ {
				for nd := 0; nd <= 3; nd++ {
					a, b := make([]float64, nd), make([]float64, nd)
					f(x[0], x[1:1+ny], a)
					tape.Field(x[0], x[1:1+ny], b)
					for i := range a {
						if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
							t.Fatalf("%s (y %d, dydt %d): inline %v, tape %v", s, ny, nd, a[i], b[i])
						}
					}
				}
			}
		}
	}
	for k, ok := range seen {
		if !ok {
			t.Errorf("inline kind %d reached by no formula", k)
		}
	}
}

// TestInlineLorenz checks that the Lorenz rates take the inline closure and
// that parameters written into Vars after FieldFunc take effect, with the
// bits of the tape (exact identity).
func TestInlineLorenz(t *testing.T) {
	p := lorenzProgram(t)
	fast, tape := p.NewFloat64(), p.NewFloat64()
	tape.rs = nil
	f := fast.FieldFunc()
	if name := runtime.FuncForPC(reflect.ValueOf(f).Pointer()).Name(); !strings.Contains(name, "inlineField3") {
		t.Fatalf("Lorenz FieldFunc is %s, want the inline closure", name)
	}
	y := []float64{1, 2, 3}
	for _, par := range [][]float64{{10, 28, 8.0 / 3}, {16, 45.92, 4}} {
		copy(fast.Vars()[4:], par)
		copy(tape.Vars()[4:], par)
		a, b := make([]float64, 3), make([]float64, 3)
		f(0, y, a)
		tape.Field(0, y, b)
		for i := range a {
			if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
				t.Fatalf("parameters %v, output %d: inline %v, tape %v", par, i, a[i], b[i])
			}
		}
	}
}

// deepShapes returns one formula per closure of deepFns, in the four shapes
// (operation symbols by index 0 add, 1 sub, 2 mul), over x, y, z, a.
func deepShapes() []string {
	sym := []string{"+", "-", "*"}
	var fs []string
	for i := range 3 {
		for o2 := range 3 {
			for o := range 3 {
				fs = append(fs,
					fmt.Sprintf("((x %s y) %s z) %s a", sym[o2], sym[i], sym[o]),
					fmt.Sprintf("(x %s (y %s z)) %s a", sym[i], sym[o2], sym[o]),
					fmt.Sprintf("a %s ((x %s y) %s z)", sym[o], sym[o2], sym[i]),
					fmt.Sprintf("a %s (x %s (y %s z))", sym[o], sym[i], sym[o2]))
			}
		}
	}
	return fs
}

// TestDeepShapes checks that every three-operation shape is absorbed whole
// into its output's closure (nothing left on the tape).
func TestDeepShapes(t *testing.T) {
	for _, s := range deepShapes() {
		g := NewGraph(testVars)
		e, err := g.Parse(s)
		if err != nil {
			t.Fatal(err)
		}
		p := g.Compile([]Expr{e})
		if pl := p.plan(); len(pl.pre) != 0 || len(pl.outs) != 1 {
			t.Errorf("%s: %d tape instructions and %d closures, want 0 and 1", s, len(pl.pre), len(pl.outs))
		}
	}
}

// TestFieldFuncBits checks that the closure form (FieldFunc) gives the same
// bits as the plain tape (exact identity: the closures keep every operation
// and rounding), for 1 to 7 outputs, outputs read by other outputs,
// repeated outputs, outputs that are a variable or a constant, and y and
// dydt of other lengths (one y value per output takes the lean path).
func TestFieldFuncBits(t *testing.T) {
	var all []string
	all = append(all, formulas...)
	all = append(all, deepShapes()...)
	all = append(all, inlineShapes()...)
	all = append(all, "x*y", "x*y + z", "x*y", "y", "2", "(x - y)*(x - y)", "z*(x - 1) + y")
	g := NewGraph(testVars)
	outs := make([]Expr, len(all))
	for i, s := range all {
		e, err := g.Parse(s)
		if err != nil {
			t.Fatalf("%s: %v", s, err)
		}
		outs[i] = e
	}
	rng := rand.New(rand.NewPCG(21, 22))
	for k := 1; k <= 7; k++ {
		for start := 0; start+k <= len(outs); start += k {
			p := g.Compile(outs[start : start+k])
			if p.fast == nil {
				continue
			}
			fast, plain := p.NewFloat64(), p.NewFloat64()
			plain.rs = nil // force the plain tape
			f := fast.FieldFunc()
			for range 5 {
				x := samplePoint(rng)
				copy(fast.Vars(), x)
				copy(plain.Vars(), x)
				for _, ny := range []int{len(x) - 1, 1, 2, 3, 4} {
					for _, nd := range []int{k, k - 1, k + 1} {
						a, b := make([]float64, nd), make([]float64, nd)
						f(x[0], x[1:1+ny], a)
						plain.Field(x[0], x[1:1+ny], b)
						for i := range a {
							if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
								t.Fatalf("%q: output %d (y %d, dydt %d): closures %v, tape %v",
									all[start:start+k], i, ny, nd, a[i], b[i])
							}
						}
					}
				}
			}
		}
	}
}

// FuzzFieldFunc checks that the closure form gives the same bits as the
// fused tape it replaces (Field; exact identity) for any formula that
// parses, used with its derivatives as 1 to 4 outputs and as all of them. A
// NaN need only be a NaN: which operand's payload a NaN result carries is
// left open by IEEE 754-2019 (section 6.2.3), and Go may order the operands
// of a commutative operation differently in two code paths.
func FuzzFieldFunc(f *testing.F) {
	for _, s := range formulas {
		f.Add(s)
	}
	for _, s := range deepShapes() {
		f.Add(s)
	}
	for _, s := range inlineShapes() {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, src string) {
		g := NewGraph(testVars)
		e, err := g.Parse(src)
		if err != nil || g.Len() > 2000 {
			return
		}
		outs := []Expr{e}
		for v := range testVars {
			outs = append(outs, g.Diff(e, v))
		}
		vars := []float64{0.3, 1.1, -0.7, 2, 0.5, -1.5}
		for _, k := range []int{1, 2, 3, 4, len(outs)} {
			p := g.Compile(outs[:k])
			fast, tape := p.NewFloat64(), p.NewFloat64()
			copy(fast.Vars(), vars)
			copy(tape.Vars(), vars)
			for _, ny := range []int{k, len(vars) - 1} {
				ny = min(ny, len(vars)-1)
				a, b := make([]float64, k), make([]float64, k)
				fast.FieldFunc()(vars[0], vars[1:1+ny], a)
				tape.Field(vars[0], vars[1:1+ny], b)
				for i := range a {
					same := math.Float64bits(a[i]) == math.Float64bits(b[i]) || math.IsNaN(a[i]) && math.IsNaN(b[i])
					if !same {
						t.Fatalf("%q, output %d of %d (y %d): closures %v, tape %v", src, i, k, ny, a[i], b[i])
					}
				}
			}
		}
	})
}

// TestInlinePre checks that outputs with inline kinds take the inline
// closure when the tape instructions left over are simple (each operation
// its small switch runs, see inlinePre), and the closure form otherwise,
// with the bits of the plain tape (exact identity: the same operations in
// the same order) for y and dydt of every length up to one past the
// outputs, so both the unrolled part and the loop part of inline_gen.go run.
func TestInlinePre(t *testing.T) {
	cases := []struct {
		name   string
		outs   []string
		pre    Op // an operation the tape keeps
		inline bool
	}{
		{"negation (the Rössler rates)", []string{"-y - z", "x + a*y", "b + z*(x - a)"}, OpNeg, true},
		{"shared sum", []string{"(x + y)*z", "(x + y)*a"}, OpAdd, true},
		{"shared difference", []string{"(x - y)*z", "(x - y)*a"}, OpSub, true},
		{"shared product", []string{"x*y*z", "x*y*a", "t"}, OpMul, true},
		{"shared quotient", []string{"(x/y)*z", "(x/y)*a", "y", "z - x"}, OpDiv, true},
		{"shared square", []string{"x^2*z"}, opSq, true},
		{"shared sine", []string{"sin(x)*z", "sin(x)*a"}, OpSin, false},
	}
	rng := rand.New(rand.NewPCG(41, 42))
	for _, c := range cases {
		g := NewGraph(testVars)
		outs := make([]Expr, len(c.outs))
		for i, s := range c.outs {
			e, err := g.Parse(s)
			if err != nil {
				t.Fatal(err)
			}
			outs[i] = e
		}
		p := g.Compile(outs)
		pl := p.plan()
		found := false
		for _, w := range pl.pre {
			found = found || Op(w) == c.pre
		}
		if !found || !pl.inline {
			t.Fatalf("%s: %d tape instructions without op %d, or outputs without inline kinds (%v)", c.name, len(pl.pre), c.pre, pl.inline)
		}
		fast, tape := p.NewFloat64(), p.NewFloat64()
		tape.rs = nil // force the plain tape
		f := fast.FieldFunc()
		name := runtime.FuncForPC(reflect.ValueOf(f).Pointer()).Name()
		if got := strings.Contains(name, fmt.Sprintf("inlineField%d", len(outs))); got != c.inline {
			t.Fatalf("%s: FieldFunc is %s, want the inline closure: %v", c.name, name, c.inline)
		}
		y, d := []float64{1, 2, 3, 1.5, 0.5}[:len(outs)], make([]float64, len(outs))
		if n := testing.AllocsPerRun(100, func() { f(0, y, d) }); n != 0 {
			t.Errorf("%s: FieldFunc allocates %v times", c.name, n)
		}
		for range 3 {
			x := samplePoint(rng)
			copy(fast.Vars(), x)
			copy(tape.Vars(), x)
			for ny := 0; ny < len(x); ny++ {
				for nd := 0; nd <= len(outs)+1; nd++ {
					a, b := make([]float64, nd), make([]float64, nd)
					f(x[0], x[1:1+ny], a)
					tape.Field(x[0], x[1:1+ny], b)
					for i := range a {
						if math.Float64bits(a[i]) != math.Float64bits(b[i]) {
							t.Fatalf("%s (y %d, dydt %d), output %d: FieldFunc %v, tape %v", c.name, ny, nd, i, a[i], b[i])
						}
					}
				}
			}
		}
	}
}
