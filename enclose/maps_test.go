package enclose

import (
	"context"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/internal/dd"
)

// henonFormulas is Hénon's map (Hénon 1976) at a = 1.4, b = 0.3.
func henonFormulas() *Formulas {
	return &Formulas{
		States: []string{"x", "y"},
		Rates:  []string{"1 + y - a*x^2", "b*x"},
		Params: []string{"a", "b"},
		Values: []float64{1.4, 0.3},
		Map:    true,
	}
}

// TestHenonEnclosure: the Lohner enclosure of Hénon's orbit from (0.1,
// 0.1) holds the double-double orbit (internal/dd, about 32 digits, the
// same float64 parameters) at every iterate and stays narrower than 1e-3
// for at least 40 iterates; the direct box blows up sooner.
func TestHenonEnclosure(t *testing.T) {
	// ddSlack: the double-double orbit's own error after 60 iterates,
	// about 1e-32·e^(0.42·60) ≈ 1e-21 (Hénon's lambda_1 = 0.41922,
	// Sprott 2003), below every box's width (>= 1e-16).
	const ddSlack = 1e-20
	f := henonFormulas()
	x0 := []float64{0.1, 0.1}
	const iterates = 60
	res, err := Map(context.Background(), f, x0, iterates, &Settings{GiveUp: 1})
	require.NoError(t, err)
	x, y := dd.From(x0[0]), dd.From(x0[1])
	a, b := dd.From(1.4), dd.From(0.3)
	for k, st := range res.Steps {
		require.Equal(t, float64(k), st.T)
		for i, v := range []dd.Float{x, y} {
			w := v.Float64()
			assert.Truef(t, st.Lo[i]-ddSlack <= w && w <= st.Hi[i]+ddSlack, "iterate %d component %d: double-double orbit %.17g outside [%.17g, %.17g]", k, i, w, st.Lo[i], st.Hi[i])
		}
		x, y = dd.Sub(dd.Add(dd.From(1), y), dd.Mul(a, dd.Mul(x, x))), dd.Mul(b, x)
	}
	require.Len(t, res.Steps, iterates+1, "failure: %+v", res.Failure)
	assert.GreaterOrEqual(t, res.Horizon, 40.0, "width below 1e-3 for at least 40 iterates")
	k3, _ := res.WidthAt(1e-3)
	direct, err := Map(context.Background(), f, x0, iterates, &Settings{GiveUp: 1, Direct: true})
	require.NoError(t, err)
	d3, ok := direct.WidthAt(1e-3)
	t.Logf("Lohner: horizon %g iterates, width at 40: %.3g, at 60: %.3g, 1e-3 at %g; direct box: 1e-3 at %g (%v)", res.Horizon, res.Steps[40].Width, res.Steps[60].Width, k3, d3, ok)
	assert.True(t, ok && d3 < res.Horizon, "the direct box passes 1e-3 before Lohner's horizon")
}
