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
