package maps

import (
	"context"
	"math"
	"sort"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// TestSharkovskyOrder: exhaustive properties of the order on all pairs (and
// triples) below a bound (Sharkovsky 1964, as stated by Li & Yorke 1975):
// a strict total order; 3 before everything; the powers of two last, in
// decreasing order; and the first periods listed as the theorem lists them.
func TestSharkovskyOrder(t *testing.T) {
	const bound = 300
	isPow2 := func(n int) bool { return n&(n-1) == 0 }
	for p := 1; p < bound; p++ {
		assert.False(t, SharkovskyBefore(p, p), "irreflexive")
		assert.True(t, Forces(p, p), "a cycle forces its own period")
		for q := 1; q < bound; q++ {
			if p == q {
				continue
			}
			if SharkovskyBefore(p, q) == SharkovskyBefore(q, p) {
				t.Fatalf("%d and %d: exactly one comes first (total, antisymmetric)", p, q)
			}
			if p == 3 {
				require.Truef(t, SharkovskyBefore(3, q), "3 forces %d (Li & Yorke 1975)", q)
			}
			if q == 1 {
				require.Truef(t, SharkovskyBefore(p, 1), "%d forces a fixed point", p)
			}
			switch {
			case isPow2(p) && isPow2(q):
				require.Equalf(t, p > q, SharkovskyBefore(p, q), "powers of two in decreasing order: %d, %d", p, q)
			case isPow2(q):
				require.Truef(t, SharkovskyBefore(p, q), "%d (not a power of two) before the power of two %d", p, q)
			}
		}
	}
	const tri = 80
	for p := 1; p < tri; p++ {
		for q := 1; q < tri; q++ {
			for r := 1; r < tri; r++ {
				if SharkovskyBefore(p, q) && SharkovskyBefore(q, r) && !SharkovskyBefore(p, r) {
					t.Fatalf("not transitive: %d, %d, %d", p, q, r)
				}
			}
		}
	}
	ns := make([]int, 24)
	for i := range ns {
		ns[i] = i + 1
	}
	sort.Slice(ns, func(a, b int) bool { return SharkovskyBefore(ns[a], ns[b]) })
	want := []int{3, 5, 7, 9, 11, 13, 15, 17, 19, 21, 23, 6, 10, 14, 18, 22, 12, 20, 24, 16, 8, 4, 2, 1}
	assert.Equal(t, want, ns, "1..24 in Sharkovsky's order (Sharkovsky 1964)")
	assert.Equal(t, []int{1, 2, 4}, ForcedPeriods(4, 100), "4 forces 2 and 1 only (Sharkovsky 1964)")
	assert.Equal(t, []int{1, 2, 4, 6, 8, 10, 12}, ForcedPeriods(6, 12), "6 = 2·3 forces the even periods and the powers of two")
	assert.False(t, Forces(0, 3))
}

// TestConfirmForcedLogistic: inside the period-3 window (r = 3.83 > 1 + √8)
// the logistic map has cycles of every period up to 12 (forced by 3,
// Li & Yorke 1975), and before it (r = 3.5, where the attracting orbit has
// period 4) the cycles of periods 4, 2, 1 exist while period 3 does not yet
// (the window opens at 1 + √8, exact).
func TestConfirmForcedLogistic(t *testing.T) {
	box := &CycleSettings{Low: []float64{0}, High: []float64{1}}
	checks, err := ConfirmForced(context.Background(), logistic(3.83), 3, 12, box)
	require.NoError(t, err)
	require.Len(t, checks, 12)
	for _, c := range checks {
		assert.Greaterf(t, c.Cycles, 0, "period %d forced by 3 (Sharkovsky 1964)", c.Period)
	}
	checks, err = ConfirmForced(context.Background(), logistic(3.5), 4, 12, box)
	require.NoError(t, err)
	require.Len(t, checks, 3)
	for _, c := range checks {
		assert.Greaterf(t, c.Cycles, 0, "period %d forced by 4", c.Period)
	}
	cs, err := Cycles(context.Background(), logistic(3.5), 3, box)
	require.NoError(t, err)
	assert.Empty(t, cs, "no 3-cycle below r = 1 + √8 = %v (exact)", 1+math.Sqrt(8))
	_, err = ConfirmForced(context.Background(), logistic(3.5), 3, 12, box)
	assert.ErrorIs(t, err, ErrNoConvergence)
}
