package maps

import (
	"context"
	"errors"
	"math"
	"math/cmplx"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/integrate"
)

// moebius is the Möbius function μ(n) (exact, by trial division).
func moebius(n int) int {
	mu := 1
	for q := 2; q*q <= n; q++ {
		if n%q == 0 {
			n /= q
			if n%q == 0 {
				return 0
			}
			mu = -mu
		}
	}
	if n > 1 {
		mu = -mu
	}
	return mu
}

// cyclesOfDoubling is the number of cycles of least period p of a map whose
// p-th iterate has 2^p fixed points (the logistic map at r = 4, conjugate to
// the tent map): by Möbius inversion of 2^p = Σ_{d|p} d·N(d) (exact).
func cyclesOfDoubling(p int) int {
	s := 0
	for d := 1; d <= p; d++ {
		if p%d == 0 {
			s += moebius(p/d) * (1 << d)
		}
	}
	return s / p
}

// TestCyclesLogisticFour: at r = 4 the logistic map has exactly the number
// of cycles of each period p <= 12 that Möbius inversion of 2^p gives (1 2
// 1 3 6 9 18 30 56 99 186 335 for p = 1 (two fixed points, 0 and 3/4),
// ...), every one unstable: its multiplier is ±2^p (exact: the conjugacy
// x = sin²(πθ/2) to the tent map, whose slope is ±2, keeps multipliers of
// cycles off the end points; the fixed point 0 has f'(0) = 4), and every
// point is a root of f^p(x) = x.
func TestCyclesLogisticFour(t *testing.T) {
	// Roots are polished to a few ulps; the image of a point of a cycle of
	// period 12 with multiplier 2^12 carries about 4096 ulps.
	const rootTol = 1e-11
	top := 12
	if testing.Short() {
		top = 9
	}
	m := logistic(4)
	for p := 1; p <= top; p++ {
		cs, err := Cycles(context.Background(), m, p, &CycleSettings{Low: []float64{0}, High: []float64{1}})
		require.NoError(t, err)
		require.Equalf(t, cyclesOfDoubling(p), len(cs), "period %d: count by Möbius inversion of 2^p (exact)", p)
		seen := map[float64]bool{}
		for _, c := range cs {
			require.Equal(t, p, c.Period)
			require.Len(t, c.Points, p)
			assert.Falsef(t, c.Stable, "period %d cycle at %v: every cycle of the r = 4 map is unstable (exact)", p, c.Points[0])
			want := math.Ldexp(1, p) // |multiplier| = 2^p (exact, by conjugacy)
			if p == 1 && c.Points[0][0] == 0 {
				want = 4 // f'(0) = r
			}
			assert.InDeltaf(t, want, math.Abs(c.Multiplier), want*1e-6,
				"period %d cycle at %v: |multiplier| 2^p (exact, by conjugacy to the tent map)", p, c.Points[0])
			for i, x := range c.Points {
				assert.Falsef(t, seen[x[0]], "point %v in two cycles", x[0])
				seen[x[0]] = true
				nx := []float64{0}
				m.Next(x, nx)
				assert.InDeltaf(t, c.Points[(i+1)%p][0], nx[0], rootTol, "period %d: f maps each point to the next (exact identity)", p)
			}
		}
	}
}

// TestCyclesHenonFixed: the Hénon map's fixed points are
// x = (-(1-b) ± sqrt((1-b)² + 4a)) / (2a), y = b·x, with eigenvalues
// λ = -a·x ± sqrt(a²x² + b) (closed form; Hénon 1976); at a = 1.4, b = 0.3
// both are saddles.
func TestCyclesHenonFixed(t *testing.T) {
	const a, b = 1.4, 0.3
	// Newton's method ends within a few ulps of the root; eigenvalues from
	// gonum's Eigen carry a few ulps of the 2×2 matrix.
	const tol = 1e-12
	cs, err := Cycles(context.Background(), henon(), 1, &CycleSettings{Low: []float64{-2, -1}, High: []float64{2, 1}, Starts: 200})
	require.NoError(t, err)
	require.Len(t, cs, 2, "two fixed points (closed form, Hénon 1976)")
	disc := math.Sqrt((1-b)*(1-b) + 4*a)
	for i, x := range []float64{(-(1 - b) - disc) / (2 * a), (-(1 - b) + disc) / (2 * a)} {
		c := cs[i]
		assert.InDeltaf(t, x, c.Points[0][0], tol, "fixed point x (closed form)")
		assert.InDeltaf(t, b*x, c.Points[0][1], tol, "fixed point y = b·x (closed form)")
		s := math.Sqrt(a*a*x*x + b)
		want := []float64{-a*x + s, -a*x - s}
		if math.Abs(want[1]) > math.Abs(want[0]) {
			want[0], want[1] = want[1], want[0]
		}
		require.Len(t, c.Eigenvalues, 2)
		for k := range want {
			assert.InDeltaf(t, want[k], real(c.Eigenvalues[k]), tol, "eigenvalue %d, -a·x ± sqrt(a²x²+b) (closed form)", k)
			assert.InDeltaf(t, 0, imag(c.Eigenvalues[k]), tol, "real eigenvalues (closed form: a²x²+b > 0)")
		}
		assert.False(t, c.Stable, "a saddle (closed form: one |λ| > 1)")
		assert.InDelta(t, cmplx.Abs(c.Eigenvalues[0]), c.Modulus, 0, "modulus is the largest |λ| (definition)")
	}
}

// TestCyclesStableTwo: the logistic map at r = 3.2 has one 2-cycle, stable,
// with multiplier 4 + 2r - r² = 0.16 (closed form of the 2-cycle; May 1976).
func TestCyclesStableTwo(t *testing.T) {
	const r = 3.2
	const tol = 1e-12 // a polished root of a well-conditioned cycle
	cs, err := Cycles(context.Background(), logistic(r), 2, &CycleSettings{Low: []float64{0}, High: []float64{1}})
	require.NoError(t, err)
	require.Len(t, cs, 1)
	assert.True(t, cs[0].Stable)
	assert.InDelta(t, 4+2*r-r*r, cs[0].Multiplier, tol, "multiplier 4 + 2r - r² (closed form)")
	// Points (r+1 ∓ sqrt((r+1)(r-3)))/(2r) (closed form).
	q := math.Sqrt((r + 1) * (r - 3))
	assert.InDelta(t, (r+1-q)/(2*r), cs[0].Points[0][0], tol, "lower point of the 2-cycle (closed form)")
	assert.InDelta(t, (r+1+q)/(2*r), cs[0].Points[1][0], tol, "upper point of the 2-cycle (closed form)")
}

// TestCyclesRefuses: bad input is an error that names the field.
func TestCyclesRefuses(t *testing.T) {
	ctx := context.Background()
	_, err := Cycles(ctx, logistic(4), 0, &CycleSettings{Low: []float64{0}, High: []float64{1}})
	assert.ErrorIs(t, err, integrate.ErrSettings)
	_, err = Cycles(ctx, logistic(4), 3, &CycleSettings{Low: []float64{1}, High: []float64{0}})
	var se *integrate.SettingError
	require.True(t, errors.As(err, &se))
	assert.Equal(t, "Low[0]", se.Field)
	_, err = Cycles(ctx, logistic(4), 3, nil)
	assert.ErrorIs(t, err, integrate.ErrSettings)
	_, err = Cycles(ctx, nil, 3, nil)
	assert.ErrorIs(t, err, integrate.ErrSettings)
}
