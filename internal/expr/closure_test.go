package expr

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

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
