package maps

import (
	"context"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/integrate"
)

// Feigenbaum's constants (K. Briggs, Math. Comp. 57 (1991) 435–439;
// REFERENCES.md §4, the first digits agree in every source).
const (
	feigenbaumDelta = 4.669201609102990
	feigenbaumAlpha = 2.502907875095893
)

// TestPeriodDoublingLogistic: the superstable parameters of the logistic
// map against REFERENCES.md §4 (computed with 40-digit mpmath, Newton on
// f^(2^n)(½) = ½), and δ to 7 significant digits and α to 6 from them.
func TestPeriodDoublingLogistic(t *testing.T) {
	// Each R_k is the float64 nearest a root of f^(2^k)(½) - ½ iterated in
	// double-double: within a few ulps (4.4e-16) of the 40-digit values.
	const rTol = 2e-15
	// 7 significant digits of δ = 4.669202 and 6 of α = 2.50291: half a unit
	// in the last digit.
	const deltaTol, alphaTol = 5e-7, 5e-6
	c, err := PeriodDoubling(context.Background(), logisticFamily, 0.5, [2]float64{2, 3.2}, 12)
	require.NoError(t, err)
	want := []float64{2, 1 + math.Sqrt(5), 3.4985616993277015200, 3.5546408627688248654, 3.5666673798562685140,
		3.5692435316371103378, 3.5697952937499446205, 3.5699134654223485148, 3.5699387742333054878,
		3.5699441946080649332, 3.5699453554864685809}
	for k, w := range want {
		assert.InDeltaf(t, w, c.Superstable[k], rTol, "R_%d (REFERENCES.md §4, mpmath 40 digits)", k)
	}
	t.Logf("delta %.10f alpha %.10f", c.LastDelta(), c.LastAlpha())
	// Period-doubling points r_1 = 3, r_2 = 1 + √6 (closed forms) and
	// r_3..r_8 (REFERENCES.md §4, mpmath: Newton on f^p(x) = x,
	// (f^p)'(x) = -1). Float64 iteration with difference quotients in
	// Newton's method: 1e-12 leaves room for the 2^k-fold rounding.
	const doublingTol = 1e-12
	wantDoubling := []float64{3, 1 + math.Sqrt(6), 3.5440903595519228536, 3.5644072660954325978,
		3.5687594195438264313, 3.5696916098013967143, 3.5698912593781204873, 3.5699340183739764012}
	for k, w := range wantDoubling {
		assert.InDeltaf(t, w, c.Doubling[k+1], doublingTol, "r_%d (REFERENCES.md §4)", k+1)
	}
	assert.InDeltaf(t, feigenbaumDelta, c.LastDelta(), deltaTol, "δ to 7 significant digits (Briggs 1991)")
	assert.InDeltaf(t, feigenbaumAlpha, c.LastAlpha(), alphaTol, "α to 6 significant digits (Briggs 1991)")
	_, err = PeriodDoubling(context.Background(), logisticFamily, 0.5, [2]float64{2, 3.2}, 1)
	assert.ErrorIs(t, err, integrate.ErrSettings)
}

// TestOnsetPeriodThree: the logistic map's period-3 window opens by a
// tangent bifurcation at r = 1 + √8 (exact; P. Saha, S. H. Strogatz, Math.
// Mag. 68 (1995) 42–47, from memory), found to 1e-10.
func TestOnsetPeriodThree(t *testing.T) {
	const onsetTol = 1e-10 // the slice's bar; Newton on the exact conditions reaches 1e-14
	r, x, err := Onset(context.Background(), logisticFamily, 3, 3.8, 3.9, 50, &CycleSettings{Low: []float64{0}, High: []float64{1}})
	require.NoError(t, err)
	assert.InDelta(t, 1+math.Sqrt(8), r, onsetTol, "r = 1 + √8 (exact)")
	m := logistic(r)
	fp, d := iterDeriv(m, x, 3)
	assert.InDelta(t, x, fp, 1e-9, "x lies on the 3-cycle born there (exact identity)")
	assert.InDelta(t, 1, d, 1e-6, "multiplier +1 at a tangent bifurcation (exact)")
	// At a period doubling the birth conditions are degenerate: refused,
	// not answered wrongly.
	_, _, err = Onset(context.Background(), logisticFamily, 2, 2.9, 3.1, 8, &CycleSettings{Low: []float64{0}, High: []float64{1}})
	assert.ErrorIs(t, err, ErrNoConvergence)
}
