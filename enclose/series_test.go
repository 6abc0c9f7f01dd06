package enclose

import (
	"context"
	"errors"
	"math/big"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/internal/ival"
)

// flowSeries compiles one-state flow formulas and returns the field's
// interval series of order n.
func flowSeries(t *testing.T, rate string, n int) (*compiled, *series) {
	c, err := (&Formulas{States: []string{"y"}, Rates: []string{rate}}).compile()
	require.NoError(t, err)
	return c, newSeries(c.field, n)
}

// TestSeriesIdentities: interval Taylor coefficients of ODE solutions hold
// the exact ones, by exact identities: y' = y from y0 has y_k = y0/k!;
// y' = y^2 from y0 has y(t) = y0/(1 - y0 t), so y_k = y0^(k+1); y' = 1/y
// from 1 has y = sqrt(1 + 2t), whose coefficients are binomial(1/2, k)·2^k;
// y' = 3t^2 from 0 has y = t^3. Exact values in math/big.
func TestSeriesIdentities(t *testing.T) {
	const n = 15
	exact := func(k int, rule string, y0 float64) *big.Float {
		z := new(big.Float).SetPrec(400)
		switch rule {
		case "y":
			fact := new(big.Int).MulRange(1, int64(max(k, 1)))
			return z.Quo(z.SetFloat64(y0), new(big.Float).SetPrec(400).SetInt(fact))
		case "y^2":
			z.SetFloat64(1)
			for range k + 1 {
				z.Mul(z, big.NewFloat(y0))
			}
			return z
		case "1/y":
			// binomial(1/2, k)·2^k as a rational.
			r := big.NewRat(1, 1)
			for j := range k {
				r.Mul(r, big.NewRat(int64(1-2*j), int64(2*(j+1))))
				r.Mul(r, big.NewRat(2, 1))
			}
			return z.SetRat(r)
		case "3*t^2":
			if k == 3 {
				return z.SetFloat64(1)
			}
			return z.SetFloat64(0)
		}
		panic(rule)
	}
	for _, tc := range []struct {
		name, rule string
		y0         float64
	}{
		{"exp", "y", 0.7},
		{"pole", "y^2", 0.3},
		{"sqrt", "1/y", 1},
		{"time", "3*t^2", 0},
	} {
		t.Run(tc.name, func(t *testing.T) {
			c, s := flowSeries(t, tc.rule, n)
			require.NoError(t, s.ode(true, ival.Point(0), c.yslots, []ival.Interval{ival.Point(tc.y0)}))
			for k := 0; k <= n; k++ {
				v := s.c[c.yslots[0]][k]
				assert.Truef(t, contains(v.Lo, v.Hi, exact(k, tc.rule, tc.y0)), "coefficient %d: exact %s (math/big identity) outside [%.17g, %.17g]", k, exact(k, tc.rule, tc.y0).Text('g', 17), v.Lo, v.Hi)
			}
		})
	}
}

// TestSeriesKinks: a kink or jump that the box can reach is refused with
// ErrKink and the function named; away from it the branch is exact.
func TestSeriesKinks(t *testing.T) {
	for _, tc := range []struct {
		rate string
		box  ival.Interval
		err  error
		fn   string
	}{
		{"abs(y)", ival.New(-0.1, 0.2), ErrKink, "abs"},
		{"sign(y)", ival.New(-0.1, 0.2), ErrKink, "sign"},
		{"step(y - 1)", ival.New(0.5, 1.5), ErrKink, "step"},
		{"min(y, 1)", ival.New(0.5, 1.5), ErrKink, "min"},
		{"sqrt(y)", ival.New(0, 1), ErrKink, "sqrt"},
		{"1/y", ival.New(-1, 1), ErrDomain, "division"},
		{"abs(y)", ival.New(0.1, 0.2), nil, ""},
		{"max(y, 1)", ival.New(1.5, 2), nil, ""},
		{"sign(y)", ival.New(-2, -1), nil, ""},
	} {
		c, s := flowSeries(t, tc.rate, 4)
		err := s.ode(true, ival.Point(0), c.yslots, []ival.Interval{tc.box})
		if tc.err == nil {
			assert.NoErrorf(t, err, "%s over %v", tc.rate, tc.box)
			continue
		}
		require.ErrorIsf(t, err, tc.err, "%s over %v", tc.rate, tc.box)
		var be *BoxError
		require.True(t, errors.As(err, &be))
		assert.Equal(t, tc.fn, be.Func)
	}
	// sign(y) at y in [-2, -1]: y' = -1, so y_1 = -1 exactly (identity).
	c, s := flowSeries(t, "sign(y)", 3)
	require.NoError(t, s.ode(true, ival.Point(0), c.yslots, []ival.Interval{ival.New(-2, -1)}))
	assert.Equal(t, ival.Point(-1), s.c[c.yslots[0]][1])
}

// TestFlowKinkFailure: an enclosure whose box reaches a corner stops there
// with the reason, keeping what it proved.
func TestFlowKinkFailure(t *testing.T) {
	// y' = -abs(y) - 1 from 0.5 falls through 0 at t = log(1.5) ≈ 0.405.
	f := &Formulas{States: []string{"y"}, Rates: []string{"-abs(y) - 1"}}
	res, err := Flow(context.Background(), f, 0, []float64{0.5}, 2, nil)
	require.NoError(t, err)
	require.NotNil(t, res.Failure)
	assert.Equal(t, FailKink, res.Failure.Kind)
	assert.Contains(t, res.Failure.Reason, "abs")
	assert.Less(t, res.Failure.T, 0.41, "stops before the solution reaches 0 at t = ln 1.5 (exact)")
	assert.Greater(t, len(res.Steps), 1, "the steps before the kink are kept")
}

// TestFlowBadInput: bad formulas, starts, spans and settings are errors
// naming what was wrong, never panics.
func TestFlowBadInput(t *testing.T) {
	ctx := context.Background()
	good := lorenzFormulas()
	for _, tc := range []struct {
		name string
		f    *Formulas
		y0   []float64
		t1   float64
		s    *Settings
		want error
	}{
		{"nil formulas", nil, []float64{1}, 1, nil, ErrFormulas},
		{"parse", &Formulas{States: []string{"y"}, Rates: []string{"y*"}}, []float64{1}, 1, nil, ErrFormulas},
		{"unknown name", &Formulas{States: []string{"y"}, Rates: []string{"q*y"}}, []float64{1}, 1, nil, ErrFormulas},
		{"count", &Formulas{States: []string{"y", "z"}, Rates: []string{"y"}}, []float64{1, 1}, 1, nil, ErrFormulas},
		{"reserved", &Formulas{States: []string{"sin"}, Rates: []string{"1"}}, []float64{1}, 1, nil, ErrFormulas},
		{"start length", good, []float64{1, 1}, 1, nil, ErrFormulas},
		{"span", good, []float64{1, 1, 1}, -1, nil, ErrSettings},
		{"order", good, []float64{1, 1, 1}, 1, &Settings{Order: 1}, ErrSettings},
		{"tol", good, []float64{1, 1, 1}, 1, &Settings{Tol: -1}, ErrSettings},
		{"radius", good, []float64{1, 1, 1}, 1, &Settings{Radius: -1}, ErrSettings},
		{"map to Flow", henonFormulas(), []float64{1, 1}, 1, nil, ErrFormulas},
	} {
		res, err := Flow(ctx, tc.f, 0, tc.y0, tc.t1, tc.s)
		assert.ErrorIsf(t, err, tc.want, "%s", tc.name)
		assert.Nilf(t, res, "%s", tc.name)
	}
	_, err := Map(ctx, good, []float64{1, 1, 1}, 3, nil)
	assert.ErrorIs(t, err, ErrFormulas, "flow formulas to Map")
	_, err = Map(ctx, henonFormulas(), []float64{1, 1}, 0, nil)
	assert.ErrorIs(t, err, ErrSettings, "zero iterates")
}

// TestFlowCanceled: a canceled context ends the run with the partial
// result and an error wrapping context.Canceled.
func TestFlowCanceled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	res, err := Flow(ctx, lorenzFormulas(), 0, []float64{1, 1, 1}, 20, nil)
	require.ErrorIs(t, err, context.Canceled)
	require.NotNil(t, res)
	assert.Equal(t, FailCanceled, res.Failure.Kind)
	assert.Len(t, res.Steps, 1, "the start box is kept")
}

// TestStepAllocs: a Lohner step of a flow and of a map allocates nothing.
func TestStepAllocs(t *testing.T) {
	c, err := lorenzFormulas().compile()
	require.NoError(t, err)
	fr := newFlowRun(c, (&Settings{}).WithDefaults())
	_, err = fr.run(context.Background(), 0, []float64{1, 1, 1}, 0.1)
	require.NoError(t, err)
	tt := 0.1
	allocs := testing.AllocsPerRun(20, func() {
		tn, fail := fr.step(tt, tt+1)
		require.Nil(t, fail)
		tt = tn
	})
	assert.Zero(t, allocs, "flow step")

	mc, err := henonFormulas().compile()
	require.NoError(t, err)
	mr := newMapRun(mc, (&Settings{}).WithDefaults())
	_, err = mr.run(context.Background(), 0, []float64{0.1, 0.1}, 1)
	require.NoError(t, err)
	allocs = testing.AllocsPerRun(20, func() { require.Nil(t, mr.mapStep(0)) })
	assert.Zero(t, allocs, "map step")
}
