package expr

import (
	"math"
	"testing"

	"github.com/stretchr/testify/require"
)

// TestRunScatter: RunScatter places exactly the values Run gives (an exact
// identity: the same program on the same variables), at the places asked
// for, on the fast path and on the interpreter, and refuses a place list
// of the wrong length.
func TestRunScatter(t *testing.T) {
	g := NewGraph(testVars)
	var outs []Expr
	for _, src := range formulas {
		e, err := g.Parse(src)
		require.NoError(t, err, src)
		outs = append(outs, e)
	}
	p := g.Compile(outs)
	vars := []float64{0.3, 1.1, 0.7, 1.9, 0.8, 1.2}
	// Places in reverse order with gaps, so that a value written to the
	// wrong place shows.
	at := make([]int, len(outs))
	for k := range at {
		at[k] = 2 * (len(outs) - 1 - k)
	}
	for _, fast := range []bool{true, false} {
		ev := p.NewFloat64()
		require.NotNil(t, ev.rs, "these formulas take the fast path")
		if !fast {
			ev.rs = nil // the interpreter loop over e.r
		}
		copy(ev.Vars(), vars)
		want := make([]float64, len(outs))
		require.NoError(t, ev.Run(want))
		got := make([]float64, 2*len(outs))
		for i := range got {
			got[i] = math.NaN()
		}
		require.NoError(t, ev.RunScatter(got, at))
		for k, ij := range at {
			require.Equalf(t, math.Float64bits(want[k]), math.Float64bits(got[ij]), "fast %v: output %d (%s) at %d", fast, k, formulas[k], ij)
		}
		for i := 1; i < len(got); i += 2 {
			require.Truef(t, math.IsNaN(got[i]), "fast %v: place %d was not asked for but written", fast, i)
		}
		require.Error(t, ev.RunScatter(got, at[1:]))
	}
}
