package expr

import (
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// 0/x is not 0 where x = 0 (IEEE 754: 0/0 is NaN), so the graph keeps the
// division instead of folding it away, and the singularity reaches the
// evaluator, where the integrators report a non-finite value.
func TestZeroOverXKept(t *testing.T) {
	g := NewGraph([]string{"t", "x", "y"})
	e, err := g.Parse("0/x + y")
	require.NoError(t, err)
	ev := g.Compile([]Expr{e}).NewFloat64()
	vars := ev.Vars()
	out := make([]float64, 1)

	vars[1], vars[2] = 2, 3
	ev.Run(out)
	assert.Equal(t, 3.0, out[0], "0/2 + 3 = 3 (exact)")

	vars[1] = 0
	ev.Run(out)
	assert.True(t, math.IsNaN(out[0]), "0/0 + 3 is NaN (IEEE 754), got %v", out[0])
}

// A derivative with respect to a variable an expression does not use is 0
// (exact identity), and the quotient rule drops the term with a zero
// factor rather than leave 0/b behind; the formulas the rules build are
// those of calculus: d(x/y)/dx = 1/y, d(x/y)/dy = -x/y², d(2^y)/dy =
// 2^y·log 2.
func TestQuotientRuleTerms(t *testing.T) {
	g := NewGraph([]string{"t", "x", "y"})
	q, err := g.Parse("x/y")
	require.NoError(t, err)
	p, err := g.Parse("2^y")
	require.NoError(t, err)
	outs := []Expr{g.Diff(q, 1), g.Diff(q, 2), g.Diff(p, 2), g.Diff(q, 0)}
	assert.Equal(t, "1/y", g.Format(outs[0]))
	ev := g.Compile(outs).NewFloat64()
	vars := ev.Vars()
	vars[1], vars[2] = 3, 2
	got := make([]float64, len(outs))
	ev.Run(got)
	assert.Equal(t, 0.5, got[0], "1/y at y=2 (exact)")
	assert.Equal(t, -0.75, got[1], "-x/y² at x=3, y=2 (exact)")
	assert.InDelta(t, 4*math.Ln2, got[2], 1e-15, "2^y·log 2 at y=2")
	assert.Equal(t, 0.0, got[3], "no dependence on t (exact)")
}
