package expr

import (
	"errors"
	"runtime/debug"
	"strings"
	"testing"
)

// chain returns "x op x op ... op x" with n operators.
func chain(op string, n int) string {
	var b strings.Builder
	b.Grow(n*(len(op)+1) + 1)
	b.WriteString("x")
	for range n {
		b.WriteString(op)
		b.WriteString("x")
	}
	return b.String()
}

// chainOps is the length of the chains below: 100 000 operations make a
// path 100 000 nodes deep, which a recursive walk at a few hundred bytes a
// frame cannot take within the stack bound the test sets.
const chainOps = 100_000

// TestLongChains parses, prints, differentiates and compiles formulas that
// are one long chain of operations, under a stack bound of 4 MiB: every
// walk must be iterative (the parser nests only at parentheses, calls and
// exponents).
func TestLongChains(t *testing.T) {
	defer debug.SetMaxStack(debug.SetMaxStack(4 << 20))
	for _, op := range []string{"*", "+", "-", "/"} {
		g := NewGraph(testVars)
		src := chain(op, chainOps)
		e, err := g.Parse(src)
		if err != nil {
			t.Fatalf("chain of %q: %v", op, err)
		}
		if back, err := g.Parse(g.Format(e)); err != nil || back != e {
			t.Errorf("chain of %q: parse(format(e)) = %v (%v), want %v", op, back, err, e)
		}
		d := g.Diff(e, 1)
		p := g.Compile([]Expr{e, d})
		out := make([]float64, 2)
		vars := []float64{0, 1, 0, 0, 0, 0}
		if err := p.NewFloat64().Eval(vars, out); err != nil {
			t.Fatal(err)
		}
		// At x = 1 exactly (every operation exact): the chain x*...*x is 1
		// with derivative n+1; x+...+x is n+1 with derivative n+1; x-...-x
		// is 1-n with derivative 1-n; x/.../x is 1 with derivative 1-n.
		n := float64(chainOps)
		want := map[string][2]float64{"*": {1, n + 1}, "+": {n + 1, n + 1}, "-": {1 - n, 1 - n}, "/": {1, 1 - n}}[op]
		if out[0] != want[0] || out[1] != want[1] {
			t.Errorf("chain of %q at x = 1: value %v, derivative %v; want %v, %v (exact identity)", op, out[0], out[1], want[0], want[1])
		}
		if s := g.Slots(e); len(s) != 1 || s[0] != 1 {
			t.Errorf("chain of %q uses slots %v, want [1]", op, s)
		}
	}
}

// TestLimits checks that Parse and Derivative stop with ErrTooLarge at the
// limits of SetLimits, naming the limit.
func TestLimits(t *testing.T) {
	g := NewGraph(testVars)
	g.SetLimits(1000, 0)
	_, err := g.Parse(chain("*", 2000))
	var pe *ParseError
	if !errors.As(err, &pe) || !errors.Is(err, ErrTooLarge) || !strings.Contains(err.Error(), "1000 nodes") {
		t.Fatalf("parse past the node limit: %v, want a *ParseError wrapping ErrTooLarge naming the limit", err)
	}
	// x*x*...*x of 900 operations fits; its derivative needs two nodes
	// per operation and does not.
	g = NewGraph(testVars)
	g.SetLimits(1000, 0)
	e, err := g.Parse(chain("*", 900))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := g.Derivative(e, 1); !errors.Is(err, ErrTooLarge) {
		t.Errorf("derivative past the node limit: %v, want ErrTooLarge", err)
	}
	// The work limit counts the nodes the derivative walks visit.
	g = NewGraph(testVars)
	g.SetLimits(0, 1500)
	e, err = g.Parse(chain("+", 900))
	if err != nil {
		t.Fatal(err)
	}
	if _, err := g.Derivative(e, 1); err != nil {
		t.Errorf("first derivative within the work limit: %v", err)
	}
	if _, err := g.Derivative(e, 2); !errors.Is(err, ErrTooLarge) {
		t.Errorf("second derivative past the work limit: %v, want ErrTooLarge", err)
	}
	if _, err := g.Derivative(e, len(testVars)); err == nil {
		t.Error("derivative by a slot out of range: no error")
	}
}

// TestFormatMax checks that FormatMax gives Format's text when it fits and
// a prefix of it, marked as cut, when it does not.
func TestFormatMax(t *testing.T) {
	g := NewGraph(testVars)
	for _, src := range formulas {
		e, err := g.Parse(src)
		if err != nil {
			t.Fatal(err)
		}
		full := g.Format(e)
		if got, whole := g.FormatMax(e, len(full)); got != full || !whole {
			t.Errorf("FormatMax(%q, %d) = %q, %v; want the whole text", src, len(full), got, whole)
		}
		if len(full) > 10 {
			got, whole := g.FormatMax(e, 5)
			if whole || !strings.HasPrefix(full, got) || len(got) <= 5 {
				t.Errorf("FormatMax(%q, 5) = %q, %v; want a prefix longer than 5 bytes, cut", src, got, whole)
			}
		}
	}
}
