package expr

import (
	"math/big"
	"testing"

	"github.com/plumbdyn/plumb/internal/dd"
)

// TestKinkSides checks the kink list of a program and the branch each
// Taylor evaluator takes with a forced side, on series at a kink: u = t
// (value 0, slope 1) and w = 2t (value 0, slope 2). Expected slopes by
// exact identities: abs(u) is ±u, min(u, w) and max(u, w) are u or w, and
// sign(u)·w has value 0 and slope ±2 (sign is ±1 on each side).
func TestKinkSides(t *testing.T) {
	g := NewGraph([]string{"u", "w"})
	cases := []struct {
		src   string
		kind  KinkKind
		slope [3]float64 // first-order coefficient with side 0, +1, -1
		sw1   float64    // switching function's first-order coefficient
	}{
		{"abs(u)", KinkCorner, [3]float64{0, 1, -1}, 1},
		{"min(u, w)", KinkCorner, [3]float64{1, 2, 1}, -1}, // u - w = -t: side 0 ties to u
		{"max(u, w)", KinkCorner, [3]float64{1, 1, 2}, -1},
		{"sign(u)*w", KinkJump, [3]float64{0, 2, -2}, 1},
		{"step(u)*w", KinkJump, [3]float64{2, 2, 0}, 1},
		{"sqrt(u+1)", KinkBranch, [3]float64{0.5, 0.5, 0.5}, 1},
		{"atan2(u, w-1)", KinkCut, [3]float64{-1, -1, -1}, 1},
	}
	for _, c := range cases {
		e, err := g.Parse(c.src)
		if err != nil {
			t.Fatal(err)
		}
		p := g.Compile([]Expr{e})
		ks := p.Kinks()
		if len(ks) != 1 || ks[0].Kind != c.kind {
			t.Fatalf("%s: kinks %v, want one of kind %v", c.src, ks, c.kind)
		}
		td, _ := p.NewTaylorDD(3)
		tb, _ := p.NewTaylorBig(3, 120)
		for i, slope := range []float64{1, 2} { // u = t, w = 2t
			v := td.Var(i)
			clear(v)
			v[1] = dd.From(slope)
			for _, x := range tb.Var(i) {
				x.SetInt64(0)
			}
			tb.Var(i)[1].SetFloat64(slope)
		}
		for si, s := range []int8{0, 1, -1} {
			td.SetSide(0, s)
			tb.SetSide(0, s)
			td.Run()
			for k := 0; k <= 3; k++ {
				tb.order(k)
			}
			got := td.Out(0)[1].Float64()
			gotB, _ := tb.Out(0)[1].Float64()
			if got != c.slope[si] || gotB != c.slope[si] {
				t.Errorf("%s side %d: slope dd %g, big %g, want %g (exact identity)", c.src, s, got, gotB, c.slope[si])
			}
			sw := make([]dd.Float, 4)
			td.Switch(0, sw)
			swB := make([]*big.Float, 4)
			tb.Switch(0, swB)
			if f, _ := swB[1].Float64(); sw[1].Float64() != c.sw1 || f != c.sw1 {
				t.Errorf("%s: switching slope dd %g, big %g, want %g", c.src, sw[1].Float64(), f, c.sw1)
			}
		}
		if c.kind == KinkCut && !(td.Cut(0) && tb.Cut(0)) {
			t.Errorf("%s: second argument -1 at the point, want Cut true", c.src)
		}
	}
}
