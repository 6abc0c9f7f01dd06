package maps

import (
	"context"
	"errors"
	"math"
	"math/big"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/lyap"
)

// henonStart is a point near the Hénon attractor (from memory: the usual
// start of the catalog).
var henonStart = []float64{0.1, 0.1}

// The logistic map at r = 4 doubles small differences on average: its
// Lyapunov exponent is ln 2 per iterate (exact; May 1976). With about
// 1.1e-16 of float64 rounding, the float64 orbit leaves the double-double
// one within tol = 0.1 after about ln(0.1/1.1e-16)/ln 2 ≈ 50 iterates
// (Hammel, Yorke & Grebogi 1988, intro), 24-bit storage about 29 iterates
// earlier.
func TestAuditLogisticHorizons(t *testing.T) {
	// One orbit's departure scatters with the finite-time exponent: a
	// factor 1.5 on the horizon and 25% on the difference cover it.
	const factor, diffTol = 1.5, 0.25
	const eps, tol = 1.1e-16, 0.1
	res, err := Audit(context.Background(), logistic(4), []float64{0.3}, 200, &AuditSettings{Tol: tol})
	require.NoError(t, err)
	require.Len(t, res.Rungs, 4)
	f64, b24 := res.Rungs[0], res.Rungs[2]
	require.True(t, f64.Departed && b24.Departed)
	want := math.Log(tol/eps) / math.Ln2
	assert.InDeltaf(t, want, float64(f64.DepartsAt), (factor-1)*want, "float64 departs near ln(tol/eps)/ln 2 (Hammel et al. 1988)")
	assert.InDeltaf(t, 29.0, float64(f64.DepartsAt-b24.DepartsAt), diffTol*29, "24 bits departs 29 doublings earlier (exact: 53-24 bits)")
	assert.Equal(t, b24.AgreesUntil, res.Trusted)
	assert.Equal(t, 2, res.Limit)
	assert.Equal(t, integrate.GrowthExponential, f64.Growth.Kind)
	assert.InDeltaf(t, math.Ln2, f64.Growth.Rate, 0.1, "growth rate near ln 2 (exact exponent, May 1976); 0.1 for one orbit's scatter")
	res.Predict(math.Ln2)
	p := res.Rungs[0]
	assert.InDeltaf(t, math.Log(tol/p.Delta0)/math.Ln2, p.Predicted, 1e-9, "start + ln(tol/delta0)/lambda (definition), start 0")
	assert.InDeltaf(t, float64(p.DepartsAt), p.Predicted, (factor-1)*want, "the prediction lands near the measured departure (Boffetta et al. 2002, Sect. 2.1)")
	res.Predict(0)
	assert.Zero(t, res.Rungs[0].Predicted, "no exponent, no prediction")
	for _, r := range res.Rungs {
		if r.Rung.Kind == integrate.KindRestart {
			assert.Equal(t, int(integrate.RestartFraction*200), r.Start)
		}
	}
}

// The Hénon map's double-double reference agrees with the float64 orbit at
// first (identity of the same formula in two precisions), and the result
// is the same bits on a second run (determinism).
func TestAuditHenonDeterministic(t *testing.T) {
	a, err := Audit(context.Background(), henon(), henonStart, 150, &AuditSettings{Tol: 0.1})
	require.NoError(t, err)
	b, err := Audit(context.Background(), henon(), henonStart, 150, &AuditSettings{Tol: 0.1})
	require.NoError(t, err)
	require.Equal(t, a.Trusted, b.Trusted)
	for i := range a.Rungs {
		assert.Equal(t, a.Rungs[i].Divergence, b.Rungs[i].Divergence, a.Rungs[i].Rung.Name)
		if a.Rungs[i].Rung.Kind == integrate.KindPrecision {
			// 24-bit storage rounds the start by up to 2^-24 relative.
			assert.Less(t, a.Rungs[i].Divergence[0], 1e-7, "%s: the start differs by a rounding", a.Rungs[i].Rung.Name)
		}
	}
}

// A long audit keeps each curve within CurvePoints points, and what it
// reads off the runs does not depend on the horizon: runs from the same
// start are the same bits whatever the span (exact identity of
// deterministic runs), so departures, growth fits and the trusted iterate
// equal those of a short audit, and each point of the long curve is the
// largest of the short curve's values over its Stride iterates.
func TestAuditLongHorizonBounded(t *testing.T) {
	const long = 3*CurvePoints + 17
	set := &AuditSettings{Tol: 0.1, Rungs: DefaultRungs(200)[:3]}
	x0 := []float64{0.3}
	short, err := Audit(context.Background(), logistic(4), x0, 200, set)
	require.NoError(t, err)
	full, err := Audit(context.Background(), logistic(4), x0, long, set)
	require.NoError(t, err)

	require.Equal(t, 1, short.Stride)
	require.Equal(t, 4, full.Stride, "the smallest power of two keeping %d iterates within %d points", long+1, CurvePoints)
	assert.Equal(t, short.Trusted, full.Trusted)
	assert.Equal(t, short.MaxDivergence, full.MaxDivergence)
	assert.Equal(t, short.Limit, full.Limit)
	for i, r := range full.Rungs {
		sr := short.Rungs[i]
		name := r.Rung.Name
		assert.LessOrEqual(t, len(r.Divergence), CurvePoints, name)
		assert.Equal(t, (long+4)/4, len(r.Divergence), name)
		assert.Equal(t, sr.AgreesUntil, r.AgreesUntil, name)
		assert.Equal(t, sr.DepartsAt, r.DepartsAt, name)
		assert.Equal(t, sr.Growth, r.Growth, name)
		for k := 0; 4*k+3 < len(sr.Divergence); k++ {
			want := max(sr.Divergence[4*k], sr.Divergence[4*k+1], sr.Divergence[4*k+2], sr.Divergence[4*k+3])
			require.Equalf(t, want, r.Divergence[k], "%s: point %d is the largest over iterates %d..%d", name, k, 4*k, 4*k+3)
		}
	}
}

// A stable cycle never reaches the tolerance, so its growth fit runs over
// the whole horizon: past fitPoints points it thins to every other point,
// keeping iterates at a doubled spacing, and still sees rounding noise
// (the logistic map at r = 3.2 has a stable 2-cycle, multiplier
// 4+2r-r² = -0.16, exact).
func TestAuditFitThins(t *testing.T) {
	m := logistic(3.2)
	steps := 2*fitPoints + 100
	a := newLockstep(m, []Rung{{Name: "float64", Kind: integrate.KindPrecision}}, []float64{0.3}, steps, 0.01, nil)
	require.NoError(t, a.run(context.Background()))
	run := a.runs[0]
	require.LessOrEqual(t, len(run.fitX), fitPoints)
	require.Equal(t, 4, run.fitStep, "two thinnings for %d points", steps)
	for i, x := range run.fitX {
		require.Zerof(t, int(x)%run.fitStep, "point %d at iterate %v is off the spacing %d", i, x, run.fitStep)
	}
	res, err := Audit(context.Background(), m, []float64{0.3}, steps, &AuditSettings{Tol: 0.01})
	require.NoError(t, err)
	for _, r := range res.Rungs {
		assert.Equal(t, integrate.GrowthBounded, r.Growth.Kind, r.Rung.Name)
	}
	assert.Equal(t, steps, res.Trusted)
}

// TestAuditRelative: a relative tolerance is a fraction of the reference
// orbit's spread (definition), and a fixed point has none.
func TestAuditRelative(t *testing.T) {
	res, err := Audit(context.Background(), henon(), henonStart, 100, &AuditSettings{Tol: 0.1, Relative: true})
	require.NoError(t, err)
	require.Greater(t, res.Spread, 0.0)
	assert.Equal(t, 0.1*res.Spread, res.Tol, "tol = 0.1·spread (definition)")
	// The logistic map's fixed point 1 - 1/r (exact) never moves.
	res, err = Audit(context.Background(), logistic(2), []float64{0.5}, 50, &AuditSettings{Tol: 0.1, Relative: true})
	require.ErrorIs(t, err, integrate.ErrSettings)
	require.NotNil(t, res)
	assert.Empty(t, res.Rungs)
}

func TestAuditErrors(t *testing.T) {
	ctx := context.Background()
	h := henon()
	noDD, _ := New(2, Funcs{Next: func(x, dst []float64) { copy(dst, x) }}, nil)
	ok := &AuditSettings{Tol: 0.1}
	cases := []struct {
		name  string
		m     *Map
		x0    []float64
		steps int
		s     *AuditSettings
		want  error
	}{
		{"nil map", nil, henonStart, 10, ok, integrate.ErrSettings},
		{"no double-double form", noDD, henonStart, 10, ok, integrate.ErrSettings},
		{"short start", h, []float64{1}, 10, ok, integrate.ErrDimension},
		{"NaN start", h, []float64{math.NaN(), 0}, 10, ok, integrate.ErrNonFinite},
		{"no steps", h, henonStart, 0, ok, ErrSteps},
		{"too many steps", h, henonStart, MaxSteps + 1, ok, ErrSteps},
		{"nil settings", h, henonStart, 10, nil, integrate.ErrSettings},
		{"zero tol", h, henonStart, 10, &AuditSettings{}, integrate.ErrSettings},
		{"short scales", h, henonStart, 10, &AuditSettings{Tol: 1, Scales: []float64{1}}, integrate.ErrDimension},
		{"zero scales", h, henonStart, 10, &AuditSettings{Tol: 1, Scales: []float64{0, 0}}, integrate.ErrSettings},
		{"empty rungs", h, henonStart, 10, &AuditSettings{Tol: 1, Rungs: []Rung{}}, integrate.ErrLadder},
		{"late restart", h, henonStart, 10, &AuditSettings{Tol: 1, Rungs: []Rung{{Name: "r", Kind: integrate.KindRestart, RestartAt: 10, Restart: integrate.Places(3)}}}, integrate.ErrLadder},
		{"method rung", h, henonStart, 10, &AuditSettings{Tol: 1, Rungs: []Rung{{Name: "m", Kind: integrate.KindMethod}}}, integrate.ErrLadder},
		{"bad bits", h, henonStart, 10, &AuditSettings{Tol: 1, Rungs: []Rung{{Name: "b", Kind: integrate.KindPrecision, Storage: integrate.Bits(99)}}}, integrate.ErrSettings},
	}
	for _, c := range cases {
		res, err := Audit(ctx, c.m, c.x0, c.steps, c.s)
		if !errors.Is(err, c.want) || res != nil {
			t.Errorf("%s: result %v, error %v; want nil and %v", c.name, res != nil, err, c.want)
		}
	}
	// An orbit that leaves the finite numbers: the logistic map at r = 5
	// escapes to -Inf; the reference fails and the result is partial.
	res, err := Audit(ctx, logistic(5), []float64{0.3}, 100, ok)
	require.ErrorIs(t, err, integrate.ErrNonFinite)
	require.NotNil(t, res)
	assert.Less(t, res.Reached, 100)
	// Canceled before the work: partial result with the context's error.
	cctx, cancel := context.WithCancel(ctx)
	cancel()
	res, err = Audit(cctx, h, henonStart, 100, ok)
	require.ErrorIs(t, err, context.Canceled)
	require.NotNil(t, res)
}

// TestWrapAngleDD checks the double-double reduction against math/big's
// exact x - k·p (reference library: math/big).
func TestWrapAngleDD(t *testing.T) {
	p := 2 * math.Pi
	for _, x := range []float64{7, -0.5, 100.25, -1e6, 3, 6.283185307179586, 1e-20} {
		got := wrapAngleDD(dd.Float{Hi: x, Lo: x * 1e-18}, p)
		xb := new(big.Float).SetPrec(200).SetFloat64(x)
		xb.Add(xb, new(big.Float).SetFloat64(x*1e-18))
		k := math.Floor((x + x*1e-18) / p)
		want := new(big.Float).SetPrec(200).Sub(xb, new(big.Float).SetPrec(200).Mul(big.NewFloat(k), big.NewFloat(p)))
		if w, _ := want.Float64(); w < 0 || w >= p {
			continue // k off by one in float64: the case the loop corrects; checked by the range check below
		}
		diff, _ := new(big.Float).Sub(got.Big(), want).Float64()
		// double-double keeps about 1e-32 relative; the reduction is exact.
		if math.Abs(diff) > 1e-30*math.Max(1, math.Abs(x)) {
			t.Errorf("wrap(%v) differs from big by %g", x, diff)
		}
		if got.Hi < 0 || got.Hi >= p {
			t.Errorf("wrap(%v) = %v, outside [0, p)", x, got.Hi)
		}
	}
}

// TestWrapAngle: the reduction lands in [0, p) and differs from x by a
// whole number of periods (exact identity: math.Mod is exact).
func TestWrapAngle(t *testing.T) {
	const p = 2 * math.Pi
	for _, x := range []float64{0, 1, -1, 7, -7, 1e6, -1e-300, p} {
		got := WrapAngle(x, p)
		require.GreaterOrEqual(t, got, 0.0)
		require.Less(t, got, p)
		k := math.Round((x - got) / p)
		assert.InDeltaf(t, x, got+k*p, 1e-9*math.Max(1, math.Abs(x)), "x = %v: a whole number of periods away (identity)", x)
	}
}

// TestMapZero: a zero or nil Map does nothing and lyap refuses it.
func TestMapZero(t *testing.T) {
	var m Map
	x := []float64{1, 2}
	m.Next(x, x)
	m.Jacobian(x, nil)
	assert.Equal(t, []float64{1, 2}, x)
	_, err := lyap.MapExponents(context.Background(), &m, nil, 1, nil)
	require.ErrorIs(t, err, lyap.ErrDimension)
	var nilMap *Map
	assert.Zero(t, nilMap.Dim())
	_, err = New(0, Funcs{}, nil)
	require.ErrorIs(t, err, integrate.ErrSettings)
	_, err = New(1, Funcs{Next: func(x, dst []float64) {}}, []float64{-1})
	require.ErrorIs(t, err, integrate.ErrSettings)
}

// TestMapJacobianBlock: a matrix of another size gets the overlapping
// block of the Jacobian (the Hénon Jacobian, exact entries).
func TestMapJacobianBlock(t *testing.T) {
	h := henon()
	small := matNew(1, 1)
	h.Jacobian([]float64{0.5, 0}, small)
	assert.Equal(t, -1.4, small.At(0, 0), "-2·a·x at a = 1.4, x = 0.5 (exact)")
}

// TestSelectRungs: selecting kinds of DefaultRungs keeps exactly those
// rungs in order (DefaultRungs as documented: three precision rungs and a
// restart at RestartFraction·steps), and WithRestart moves only the
// restart, leaving the original as it was.
func TestSelectRungs(t *testing.T) {
	def := DefaultRungs(100)
	require.Len(t, def, 4)
	assert.Len(t, Select(def, integrate.KindPrecision), 3)
	assert.Equal(t, []Rung{def[3]}, Select(def, integrate.KindRestart))
	assert.Empty(t, Select(def, integrate.KindMethod))
	moved := WithRestart(def, 30, integrate.Places(2))
	assert.Equal(t, 30, moved[3].RestartAt)
	assert.Equal(t, integrate.Places(2), moved[3].Restart)
	assert.Equal(t, int(integrate.RestartFraction*100), def[3].RestartAt, "the original keeps its restart (definition)")
	assert.Equal(t, def[:3], moved[:3])
}
