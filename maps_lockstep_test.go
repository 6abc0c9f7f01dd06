package plumb

import (
	"context"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// A long map audit keeps each curve within MapCurvePoints points, and what
// it reads off the runs does not depend on the horizon: runs from the same
// start are the same bits whatever the span (exact identity of
// deterministic runs), so departures, growth fits and the trusted iterate
// equal those of a short audit, and each point of the long curve is the
// largest of the short curve's values over its Stride iterates.
func TestTrustMapLongHorizonBounded(t *testing.T) {
	const long = 3*MapCurvePoints + 17
	s, _ := Model("logistic")
	set := &MapTrustSettings{Tol: 0.1, Lambda: 0.6931471805599453, Rungs: DefaultMapRungs(200)[:3]}
	short, err := TrustMap(context.Background(), s, 200, set)
	require.NoError(t, err)
	full, err := TrustMap(context.Background(), s, long, set)
	require.NoError(t, err)

	require.Equal(t, 1, short.Stride)
	require.Equal(t, 4, full.Stride, "the smallest power of two keeping %d iterates within %d points", long+1, MapCurvePoints)
	assert.Equal(t, short.TrustedUntil, full.TrustedUntil)
	assert.Equal(t, short.TolUsed, full.TolUsed)
	assert.Equal(t, short.LimitingRung, full.LimitingRung)
	for i, r := range full.Rungs {
		sr := short.Rungs[i]
		assert.LessOrEqual(t, len(r.Divergence), MapCurvePoints, r.Name)
		assert.Equal(t, (long+4)/4, len(r.Divergence), r.Name)
		assert.Equal(t, sr.AgreesUntil, r.AgreesUntil, r.Name)
		assert.Equal(t, sr.DepartsAt, r.DepartsAt, r.Name)
		assert.Equal(t, sr.Growth, r.Growth, r.Name)
		assert.Equal(t, sr.Rate, r.Rate, r.Name)
		for k := 0; 4*k+3 < len(sr.Divergence); k++ {
			want := max(sr.Divergence[4*k], sr.Divergence[4*k+1], sr.Divergence[4*k+2], sr.Divergence[4*k+3])
			require.Equalf(t, want, r.Divergence[k], "%s: point %d is the largest over iterates %d..%d", r.Name, k, 4*k, 4*k+3)
		}
	}
}

// A stable cycle never reaches the tolerance, so its growth fit runs over
// the whole horizon: past mapFitPoints points it thins to every other
// point, keeping iterates at a doubled spacing, and still sees rounding
// noise (the logistic map at r = 3.2 has a stable 2-cycle, multiplier
// 4+2r-r² = -0.16, exact).
func TestTrustMapFitThins(t *testing.T) {
	s, _ := Model("logistic")
	require.NoError(t, s.Set("r", 3.2))
	steps := 2*mapFitPoints + 100
	ev, _ := s.DoubleDoubleEvaluator()
	m, _ := s.Map()
	a := newMapLockstep(ev, m, []MapRung{{Name: "float64", Kind: integrate.KindPrecision}}, s.Start(), steps, nil, 0.01)
	require.NoError(t, a.run(context.Background()))
	run := a.runs[0]
	require.LessOrEqual(t, len(run.fitX), mapFitPoints)
	require.Equal(t, 4, run.fitStep, "two thinnings for %d points", steps)
	for i, x := range run.fitX {
		require.Zerof(t, int(x)%run.fitStep, "point %d at iterate %v is off the spacing %d", i, x, run.fitStep)
	}
	rep, err := TrustMap(context.Background(), s, steps, &MapTrustSettings{Tol: 0.01, Lambda: 0.1})
	require.NoError(t, err)
	assert.Equal(t, "bounded", rep.Growth)
	assert.Equal(t, steps, rep.TrustedUntil)
}
