package enclose

import (
	"context"
	"encoding/json"
	"math"
	"math/big"
	"os"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/integrate"
)

// lorenzFormulas is Lorenz (1963) at sigma = 10, rho = 28 and beta = the
// float64 nearest 8/3, as the reference file uses.
func lorenzFormulas() *Formulas {
	return &Formulas{
		States: []string{"x", "y", "z"},
		Rates:  []string{"sigma*(y-x)", "x*(rho-z)-y", "x*y-beta*z"},
		Params: []string{"sigma", "rho", "beta"},
		Values: []float64{10, 28, 8.0 / 3},
	}
}

// contains reports whether [lo, hi] holds v exactly.
func contains(lo, hi float64, v *big.Float) bool {
	return new(big.Float).SetFloat64(lo).Cmp(v) <= 0 && new(big.Float).SetFloat64(hi).Cmp(v) >= 0
}

// TestLinearEnclosesExpm: for y' = M y the exact solution is expm(M t) y0
// (gonum mat.Dense.Exp, a Padé approximant with scaling and squaring,
// accurate to about 1e-15 relative here). Every step's box must hold it
// (up to gonum's own error, linearLibTol), and its width stays within a
// small factor of the rounding floor: one unit in the last place of the
// largest component per step taken (each step rounds the state once; the
// rotation neither grows nor shrinks what was rounded, the damped
// component only shrinks it).
func TestLinearEnclosesExpm(t *testing.T) {
	// linearLibTol allows for expm's own rounding: a few units in the last
	// place of components up to 2 (Padé with scaling and squaring,
	// common practice), far below the widths (about 2e-14).
	const linearLibTol = 2e-15
	// linearFloorFactor: measured 1.5 (amd64); allowed 8, room for the
	// rounding of the Lohner step's products.
	const linearFloorFactor = 8
	f := &Formulas{
		States: []string{"u", "v", "w"},
		Rates:  []string{"2*v", "-2*u", "-0.3*w"},
	}
	m := mat.NewDense(3, 3, []float64{0, 2, 0, -2, 0, 0, 0, 0, -0.3})
	y0 := []float64{1, 0.5, 2}
	res, err := Flow(context.Background(), f, 0, y0, 10, nil)
	require.NoError(t, err)
	require.Nil(t, res.Failure)
	var e mat.Dense
	worst := 0.0
	for k, st := range res.Steps {
		var mt mat.Dense
		mt.Scale(st.T, m)
		e.Exp(&mt)
		want := mat.NewVecDense(3, nil)
		want.MulVec(&e, mat.NewVecDense(3, y0))
		for i := range 3 {
			assert.Truef(t, st.Lo[i]-linearLibTol <= want.AtVec(i) && want.AtVec(i) <= st.Hi[i]+linearLibTol,
				"t=%g component %d: expm (gonum) gives %.17g outside [%.17g, %.17g]", st.T, i, want.AtVec(i), st.Lo[i], st.Hi[i])
		}
		floor := float64(max(k, 1)) * 0x1p-52 * 2 // ulp of components up to 2
		worst = max(worst, st.Width/floor)
	}
	t.Logf("%d steps; width at t=10: %.3g; worst width / floor: %.3g", len(res.Steps)-1, res.Steps[len(res.Steps)-1].Width, worst)
	assert.LessOrEqualf(t, worst, float64(linearFloorFactor), "width over the rounding floor (steps × ulp(2)), common practice for a neutral linear flow")
}

// TestLinearBoxImage: from a start box of half-width 1e-9 the enclosure
// holds the exact images (expm(M t) applied to every corner, gonum) and is
// no wider than the exact image's hull plus the rounding floor: for a
// linear flow the mean value form is exact, so Lohner's method has no
// wrapping to pay (Lohner 1987).
func TestLinearBoxImage(t *testing.T) {
	// boxLibTol: gonum's expm error on corners of size 2 (as above).
	const boxLibTol = 2e-15
	// boxSlack: the width over the exact hull's, allowed 1e-13 (the
	// rounding floor of TestLinearEnclosesExpm, measured ~2e-14, five
	// times).
	const boxSlack = 1e-13
	const rad = 1e-9
	f := &Formulas{
		States: []string{"u", "v", "w"},
		Rates:  []string{"2*v", "-2*u", "-0.3*w"},
	}
	m := mat.NewDense(3, 3, []float64{0, 2, 0, -2, 0, 0, 0, 0, -0.3})
	y0 := []float64{1, 0.5, 2}
	res, err := Flow(context.Background(), f, 0, y0, 10, &Settings{Radius: rad})
	require.NoError(t, err)
	require.Nil(t, res.Failure)
	for _, st := range res.Steps[1:] {
		var mt, e mat.Dense
		mt.Scale(st.T, m)
		e.Exp(&mt)
		lo := []float64{math.Inf(1), math.Inf(1), math.Inf(1)}
		hi := []float64{math.Inf(-1), math.Inf(-1), math.Inf(-1)}
		for corner := range 8 {
			c := make([]float64, 3)
			for i := range 3 {
				c[i] = y0[i] - rad
				if corner>>i&1 == 1 {
					c[i] = y0[i] + rad
				}
			}
			img := mat.NewVecDense(3, nil)
			img.MulVec(&e, mat.NewVecDense(3, c))
			for i := range 3 {
				v := img.AtVec(i)
				lo[i], hi[i] = min(lo[i], v), max(hi[i], v)
				require.Truef(t, st.Lo[i]-boxLibTol <= v && v <= st.Hi[i]+boxLibTol,
					"t=%g component %d: corner image (gonum expm) %.17g outside [%.17g, %.17g]", st.T, i, v, st.Lo[i], st.Hi[i])
			}
		}
		for i := range 3 {
			assert.LessOrEqualf(t, st.Hi[i]-st.Lo[i], hi[i]-lo[i]+boxSlack, "t=%g component %d: width over the exact image's hull", st.T, i)
		}
	}
}

// lorenzRef reads the 80-digit Lorenz values (beta = float64(8/3), start
// (1, 1, 1)) of integrate/testdata/lorenz.json, made by
// integrate/testdata/make_ref.py (mpmath 1.2.1, checked at 60 digits).
func lorenzRef(t *testing.T) map[string][]*big.Float {
	b, err := os.ReadFile("../integrate/testdata/lorenz.json")
	require.NoError(t, err)
	var r struct {
		Lorenz struct {
			BetaDouble struct {
				Values map[string][]string `json:"values"`
			} `json:"beta_double"`
		} `json:"lorenz"`
	}
	require.NoError(t, json.Unmarshal(b, &r))
	out := map[string][]*big.Float{}
	for k, vs := range r.Lorenz.BetaDouble.Values {
		for _, v := range vs {
			f, _, err := big.ParseFloat(v, 10, 300, big.ToNearestEven)
			require.NoError(t, err)
			out[k] = append(out[k], f)
		}
	}
	return out
}

// lorenzLambda is Lorenz's largest Lyapunov exponent, 0.9056 (J. C.
// Sprott, Chaos and Time-Series Analysis, Oxford 2003, App. A;
// REFERENCES.md Sect. 1a).
const lorenzLambda = 0.9056

// lorenzStretch returns ln σ_max(Φ(b, a))/(b - a), Φ the tangent map of
// Lorenz along the orbit from (1, 1, 1), from the variational equations
// solved by integrate.DormandPrince853 at rtol = atol = 1e-12 and the
// singular values of gonum's SVD.
func lorenzStretch(t *testing.T, a, b float64) float64 {
	const sig, rho, beta = 10.0, 28.0, 8.0 / 3
	f := func(_ float64, y, d []float64) {
		x, w, z := y[0], y[1], y[2]
		d[0], d[1], d[2] = sig*(w-x), x*(rho-z)-w, x*w-beta*z
		jac := [9]float64{-sig, sig, 0, rho - z, -1, -x, w, x, -beta}
		for i := range 3 {
			for j := range 3 {
				s := 0.0
				for m := range 3 {
					s += jac[i*3+m] * y[3+m*3+j]
				}
				d[3+i*3+j] = s
			}
		}
	}
	solve := func(t0, t1 float64, y []float64) []float64 {
		sol, err := integrate.Solve(context.Background(), integrate.Problem{F: f, T0: t0, Y0: y}, t1, integrate.DormandPrince853, &integrate.Settings{RelTol: 1e-12, AbsTol: 1e-12})
		require.NoError(t, err)
		return sol.At(t1, nil)
	}
	eye := []float64{1, 0, 0, 0, 1, 0, 0, 0, 1}
	ya := solve(0, a, append([]float64{1, 1, 1}, eye...))
	copy(ya[3:], eye)
	yb := solve(a, b, ya)
	var sv mat.SVD
	require.True(t, sv.Factorize(mat.NewDense(3, 3, yb[3:]), mat.SVDNone))
	return math.Log(sv.Values(nil)[0]) / (b - a)
}

// TestLorenzEnclosure: the Lohner enclosure of Lorenz from (1, 1, 1) holds
// the 80-digit reference at t = 10 and 20, stays narrower than 1e-3 up to
// t = 20, and its width grows like e^(lambda_1 t) over [5, 20]; the direct
// box method, run in the same test, blows up far earlier.
func TestLorenzEnclosure(t *testing.T) {
	// growthTol: the width's growth rate within 30% of lambda_1 (the
	// finite-time rate over 15 time units scatters about lambda_1 by
	// about that much; common practice).
	const growthTol = 0.3
	ref := lorenzRef(t)
	f := lorenzFormulas()
	res, err := Flow(context.Background(), f, 0, []float64{1, 1, 1}, 60, &Settings{Stops: []float64{10, 20}, GiveUp: 1})
	require.NoError(t, err)
	seen := 0
	for _, st := range res.Steps {
		key := map[float64]string{10: "10", 20: "20"}[st.T]
		if key == "" {
			continue
		}
		seen++
		t.Logf("width at t=%s: %.3g", key, st.Width)
		for i, v := range ref[key] {
			assert.Truef(t, contains(st.Lo[i], st.Hi[i], v), "t=%s component %d: reference %s (mpmath, lorenz.json) outside [%.17g, %.17g]", key, i, v.Text('g', 20), st.Lo[i], st.Hi[i])
		}
		if st.T == 20 {
			assert.Lessf(t, st.Width, 1e-3, "width at t=20: %g", st.Width)
		}
	}
	require.Equal(t, 2, seen, "steps land on t = 10 and 20")
	t3, ok3 := res.WidthAt(1e-3)
	t1, ok1 := res.WidthAt(1)
	require.True(t, ok3, "the width reaches 1e-3 before t = 60")
	assert.Greater(t, t3, 20.0)
	t.Logf("Lohner: %d steps (%d trial steps shortened), width 1e-3 at t=%.4g, 1 at t=%.4g (reached: %v), failure %+v", len(res.Steps)-1, res.Shrunk, t3, t1, ok1, res.Failure)

	// Least-squares slope of log(width) over t in [5, 20].
	var sx, sy, sxx, sxy, k float64
	for _, st := range res.Steps {
		if st.T >= 5 && st.T <= 20 {
			y := math.Log(st.Width)
			sx, sy, sxx, sxy, k = sx+st.T, sy+y, sxx+st.T*st.T, sxy+st.T*y, k+1
		}
	}
	rate := (k*sxy - sx*sy) / (k*sxx - sx*sx)
	t.Logf("growth rate of log width over [5, 20]: %.4f (lambda_1 = %.4f, Sprott 2003)", rate, lorenzLambda)
	assert.InDeltaf(t, lorenzLambda, rate, growthTol*lorenzLambda, "growth rate of the width vs lambda_1 (Sprott 2003)")
	// The orbit's own stretching over [5, 20]: ln σ_max of the tangent
	// map Φ(20, 5) over 15, from the variational equations solved in
	// float64 by integrate.DormandPrince853 at 1e-12 and gonum's SVD
	// (measured 0.587: this orbit stretches less than on average). The
	// width must not grow much faster than the dynamics do.
	ftle := lorenzStretch(t, 5, 20)
	t.Logf("stretching rate of the orbit over [5, 20]: %.4f", ftle)
	assert.InDeltaf(t, ftle, rate, growthTol*ftle, "growth rate of the width vs the orbit's stretching (DormandPrince853 + gonum SVD)")

	direct, err := Flow(context.Background(), f, 0, []float64{1, 1, 1}, 60, &Settings{Direct: true, GiveUp: 1})
	require.NoError(t, err)
	d3, _ := direct.WidthAt(1e-3)
	d1, okd := direct.WidthAt(1)
	require.True(t, okd, "the direct box blows up")
	require.NotNil(t, direct.Failure)
	t.Logf("direct box: width 1e-3 at t=%.4g, 1 at t=%.4g (Lohner: 1e-3 at %.4g)", d3, d1, t3)
	// The direct box passes width 1 before Lohner's reaches 1e-3, and at
	// less than a fifth of its time (measured 1.83 against 27.3).
	assert.Less(t, d1, t3/5, "the direct box blows up much earlier")
}

// TestFlowElementary: y' = exp(-y) from y(0) = 0 has y(t) = log(1 + t)
// (exact: e^y y' = 1). Every step's box holds math.Log1p(t), correctly
// rounded to within one ulp by Go's math library (common practice;
// log1pSlack allows two ulps of values up to 2.4).
func TestFlowElementary(t *testing.T) {
	const log1pSlack = 1e-15
	f := &Formulas{States: []string{"y"}, Rates: []string{"exp(-y)"}}
	res, err := Flow(context.Background(), f, 0, []float64{0}, 10, nil)
	require.NoError(t, err)
	require.Nil(t, res.Failure)
	for _, st := range res.Steps {
		want := math.Log1p(st.T)
		require.Truef(t, st.Lo[0]-log1pSlack <= want && want <= st.Hi[0]+log1pSlack, "t=%g: log(1+t) = %.17g outside [%.17g, %.17g]", st.T, want, st.Lo[0], st.Hi[0])
	}
	last := res.Steps[len(res.Steps)-1]
	t.Logf("%d steps, width at t=10: %.3g", len(res.Steps)-1, last.Width)
	assert.Less(t, last.Width, 1e-12, "a contracting flow keeps a narrow box")
}
