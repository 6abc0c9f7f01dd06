package runio

import (
	"errors"
	"math"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// runOf samples f at the times ts into a one-column run named "x".
func runOf(src string, ts []float64, f func(float64) float64) *Run {
	r := &Run{Source: src, TimeName: "t", Names: []string{"x"}, T: ts,
		Periods: []float64{0}, Scales: []float64{1}}
	for _, t := range ts {
		r.Y = append(r.Y, f(t))
	}
	return r
}

func uniform(t0, t1 float64, n int) []float64 {
	ts := make([]float64, n+1)
	for i := range ts {
		ts[i] = t0 + (t1-t0)*float64(i)/float64(n)
	}
	return ts
}

func TestResampleSameTimesIsExact(t *testing.T) {
	ts := uniform(0, 1, 10)
	a := runOf("a", ts, func(t float64) float64 { return t * t })
	b := runOf("b", ts, func(t float64) float64 { return 1 / (1 + t) })
	c, err := Resample([]*Run{a, b}, nil, Grid{})
	require.NoError(t, err)
	// Exact identity: equal times need no interpolation, values are copied.
	assert.Equal(t, ts, c.T)
	assert.Equal(t, a.Y, c.Y[0])
	assert.Equal(t, b.Y, c.Y[1])
	assert.Equal(t, []bool{false, false}, c.Interpolated)
}

func TestResampleQuadraticExact(t *testing.T) {
	// Exact identity: Bessel's slopes are the slopes of a quadratic through
	// any three of its points, so the cubic Hermite pieces reproduce it.
	// Tolerance: a few roundings of values of size ~10.
	const tol = 1e-13
	q := func(t float64) float64 { return float64(3*t*t) - 2*t + 1 }
	a := runOf("a", []float64{0, 0.1, 0.35, 0.4, 0.9, 1.3, 1.31, 2}, q)
	b := runOf("b", uniform(0, 2, 7), q)
	c, err := Resample([]*Run{b, a}, nil, Grid{})
	require.NoError(t, err)
	require.True(t, c.Interpolated[1])
	for k, tt := range c.T {
		assert.InDeltaf(t, q(tt), c.Y[1][k], tol, "quadratic at t=%v (exact identity)", tt)
	}
}

func TestResampleThirdOrder(t *testing.T) {
	// A smooth function sampled with step h: the interpolation error of a
	// cubic Hermite with second-order slopes falls as h^3 (de Boor 1978,
	// ch. IV). Measured order from h to h/4 must be near 3.
	const lo, hi = 2.7, 3.4 // the asymptotic order 3, with room for pre-asymptotic terms
	f := func(t float64) float64 { return 1 / (1 + float64(t*t)) }
	fine := uniform(0, 2, 997)
	var errs []float64
	for _, n := range []int{40, 80, 160} {
		coarse := runOf("coarse", uniform(0, 2, n), f)
		c, err := Resample([]*Run{runOf("fine", fine, f), coarse}, nil, Grid{})
		require.NoError(t, err)
		m := 0.0
		for k, tt := range c.T {
			m = math.Max(m, math.Abs(c.Y[1][k]-f(tt)))
		}
		errs = append(errs, m)
		t.Logf("n=%d max error %.3g", n, m)
	}
	for i := 1; i < len(errs); i++ {
		order := math.Log2(errs[i-1] / errs[i])
		assert.GreaterOrEqualf(t, order, lo, "measured order %v (errors %v)", order, errs)
		assert.LessOrEqualf(t, order, hi, "measured order %v (errors %v)", order, errs)
	}
}

func TestResampleSpanIsIntersection(t *testing.T) {
	lin := func(t float64) float64 { return 2 * t }
	a := runOf("a", uniform(0, 10, 100), lin)
	b := runOf("b", uniform(2, 12, 37), lin)
	c, err := Resample([]*Run{a, b}, nil, Grid{Step: 0.3})
	require.NoError(t, err)
	assert.Equal(t, 2.0, c.T0)
	assert.Equal(t, 10.0, c.T1)
	assert.Equal(t, 2.0, c.T[0])
	assert.Equal(t, 10.0, c.T[len(c.T)-1], "the step grid ends on T1")
	for _, tt := range c.T {
		require.True(t, tt >= c.T0 && tt <= c.T1, "never extrapolated")
	}
	// Exact identity (up to rounding): a line is reproduced.
	const tol = 1e-12
	for r := range c.Y {
		for k, tt := range c.T {
			assert.InDelta(t, 2*tt, c.Y[r][k], tol)
		}
	}
	// The default grid is the first run's times inside the span.
	c, err = Resample([]*Run{a, b}, nil, Grid{})
	require.NoError(t, err)
	assert.Equal(t, a.T[20:101], c.T)
	assert.False(t, c.Interpolated[0])
}

func TestResampleAngle(t *testing.T) {
	// A phase turning at rate 3, stored wrapped into [0, 1): interpolating
	// the raw values across a wrap would cut through the middle; unwrapped,
	// the result equals 3t modulo 1.
	const period = 1.0
	const tol = 1e-12 // a line is reproduced exactly up to rounding
	wrap := func(t float64) float64 { v := 3 * t; return v - math.Floor(v) }
	a := runOf("a", uniform(0, 2, 50), wrap)
	b := runOf("b", uniform(0, 2, 77), wrap)
	a.Periods[0], b.Periods[0] = period, period
	c, err := Resample([]*Run{a, b}, nil, Grid{})
	require.NoError(t, err)
	assert.Equal(t, []float64{period}, c.Periods)
	for k, tt := range c.T {
		d := c.Y[1][k] - wrap(tt)
		d -= math.Round(d / period)
		assert.InDeltaf(t, 0, d, tol, "phase at t=%v", tt)
	}
}

func TestResampleErrors(t *testing.T) {
	lin := func(t float64) float64 { return t }
	a := runOf("a.csv", uniform(0, 1, 10), lin)
	far := runOf("far.csv", uniform(2, 3, 10), lin)
	other := runOf("b.csv", uniform(0, 1, 10), lin)
	other.Names = []string{"v"}
	one := runOf("one.csv", []float64{0.5}, lin)
	per := runOf("p.csv", uniform(0, 1, 10), lin)
	per.Periods = []float64{2}
	per2 := runOf("q.csv", uniform(0, 1, 10), lin)
	per2.Periods = []float64{3}
	tests := []struct {
		name  string
		runs  []*Run
		cols  []string
		grid  Grid
		kind  error
		file  string
		field string
	}{
		{name: "disjoint", runs: []*Run{a, far}, kind: ErrSpan, file: "run 2 (far.csv)"},
		{name: "column missing", runs: []*Run{a, other}, kind: ErrColumn, file: "run 2 (b.csv)", field: "x"},
		{name: "chosen column missing", runs: []*Run{a, a}, cols: []string{"z"}, kind: ErrColumn, file: "run 1 (a.csv)", field: "z"},
		{name: "one row", runs: []*Run{a, one}, kind: ErrSpan, file: "run 2 (one.csv)"},
		{name: "periods disagree", runs: []*Run{per, per2}, kind: ErrColumn, file: "run 2 (q.csv)", field: "x"},
		{name: "grid outside", runs: []*Run{a}, grid: Grid{Times: []float64{0.5, 1.5}}, kind: ErrSpan, file: "grid"},
		{name: "grid not increasing", runs: []*Run{a}, grid: Grid{Times: []float64{0.5, 0.5}}, kind: ErrTimeOrder, file: "grid"},
		{name: "bad step", runs: []*Run{a}, grid: Grid{Step: -1}, kind: ErrOptions, file: "grid"},
		{name: "no runs", kind: ErrSpan},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Resample(tc.runs, tc.cols, tc.grid)
			require.ErrorIs(t, err, tc.kind)
			var e *Error
			require.True(t, errors.As(err, &e))
			if tc.file != "" {
				assert.Equal(t, tc.file, e.File)
			}
			assert.Equal(t, tc.field, e.Field)
		})
	}
}
