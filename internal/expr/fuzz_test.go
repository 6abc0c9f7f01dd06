package expr

import (
	"errors"
	"math/big"
	"strings"
	"testing"

	"github.com/plumbdyn/plumb/internal/dd"
)

// The limits of the fuzzed graphs: small enough that the fuzzer reaches
// them, large enough for every seed formula and its derivatives.
const (
	fuzzNodes = 4000
	fuzzWork  = 20000
)

// FuzzParse checks that no input panics the parser, the printer, the
// differentiator or the evaluators; that every error is a *ParseError with
// a position inside the input; and that parse(format(e)) == e. The graph
// has limits (SetLimits), so refusals with ErrTooLarge are exercised too.
func FuzzParse(f *testing.F) {
	for _, s := range formulas {
		f.Add(s)
	}
	for _, s := range []string{"", "(", "x +", "sin(", "1e", "2x", "x^-y^-z", "--x", "atan2(x,,y)", "é + x", "1/0", "0/0*x",
		"- - -+- x", strings.Repeat("(", 1001) + "x", strings.Repeat("x*", 5000) + "y", strings.Repeat("x^", 1001) + "2"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, src string) {
		g := NewGraph(testVars)
		g.SetLimits(fuzzNodes, fuzzWork)
		e, err := g.Parse(src)
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("Parse(%q): error %v is not a *ParseError", src, err)
			}
			if pe.Pos < 0 || pe.Pos > len(src) || pe.Line < 1 || pe.Col < 1 {
				t.Fatalf("Parse(%q): bad position %d (%d:%d)", src, pe.Pos, pe.Line, pe.Col)
			}
			if !errors.Is(err, ErrSyntax) && !errors.Is(err, ErrUnknown) && !errors.Is(err, ErrArity) && !errors.Is(err, ErrTooLarge) {
				t.Fatalf("Parse(%q): error %v wraps no sentinel", src, err)
			}
			return
		}
		out := g.Format(e)
		e2, err := g.Parse(out)
		if err != nil || e2 != e {
			t.Fatalf("Parse(%q) printed as %q, which reads back as %v (%v)", src, out, e2, err)
		}
		// A fresh graph reads the printed text to a node that prints the same.
		g2 := NewGraph(testVars)
		if e3, err := g2.Parse(out); err != nil || g2.Format(e3) != out {
			t.Fatalf("Parse(%q) printed as %q; a fresh graph prints it as %q (%v)", src, out, g2.Format(e3), err)
		}
		if g.Len() > 2000 {
			return // keep derivatives of huge inputs out of the fuzzer's time
		}
		outs := []Expr{e}
		for v := range testVars {
			d, err := g.Derivative(e, v)
			if err != nil {
				if !errors.Is(err, ErrTooLarge) {
					t.Fatalf("Derivative of %q: %v, want nil or ErrTooLarge", src, err)
				}
				return
			}
			outs = append(outs, d)
		}
		p := g.Compile(outs)
		vars := []float64{0.3, 1.1, -0.7, 2, 0.5, -1.5}
		p.NewFloat64().Eval(vars, make([]float64, len(outs)))
		de := p.NewDD()
		for i, v := range vars {
			de.Vars()[i] = dd.From(v)
		}
		de.Run(make([]dd.Float, len(outs)))
		if p.Len() < 200 {
			be, err := p.NewBig(64)
			if err != nil {
				t.Fatal(err)
			}
			for i, v := range vars {
				be.Vars()[i].SetFloat64(v)
			}
			be.Run(make([]*big.Float, len(outs)))
		}
	})
}
