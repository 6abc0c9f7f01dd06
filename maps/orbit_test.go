package maps

import (
	"context"
	"errors"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/integrate"
)

func matNew(r, c int) *mat.Dense { return mat.NewDense(r, c, nil) }

// TestOrbit: the logistic map at r = 4 from 0.5 goes to 1 and then to the
// fixed point 0 (exact: 4·0.5·0.5 = 1, 4·1·0 = 0).
func TestOrbit(t *testing.T) {
	orbit, err := Orbit(context.Background(), logistic(4), []float64{0.5}, 3)
	require.NoError(t, err)
	assert.Equal(t, []float64{0.5, 1, 0, 0}, orbit)
}

// TestOrbitStops: an orbit that escapes stops before the first iterate
// that is not finite and keeps the iterates before it; bad input is
// refused.
func TestOrbitStops(t *testing.T) {
	orbit, err := Orbit(context.Background(), logistic(5), []float64{0.3}, 1000)
	var nf *NonFiniteError
	require.ErrorAs(t, err, &nf)
	require.ErrorIs(t, err, integrate.ErrNonFinite)
	assert.Len(t, orbit, nf.Iterate, "iterates 0..%d kept", nf.Iterate-1)

	cctx, cancel := context.WithCancel(context.Background())
	cancel()
	orbit, err = Orbit(cctx, logistic(4), []float64{0.3}, 5000)
	require.ErrorIs(t, err, context.Canceled)
	assert.Len(t, orbit, 1024, "canceled at the first check, after iterate 1023")

	for _, c := range []struct {
		name  string
		m     *Map
		x0    []float64
		steps int
		want  error
	}{
		{"nil map", nil, []float64{1}, 1, integrate.ErrSettings},
		{"short start", henon(), []float64{1}, 1, integrate.ErrDimension},
		{"negative steps", logistic(4), []float64{1}, -1, integrate.ErrSettings},
	} {
		_, err := Orbit(context.Background(), c.m, c.x0, c.steps)
		if !errors.Is(err, c.want) {
			t.Errorf("%s: error %v, want %v", c.name, err, c.want)
		}
	}
}

// TestLockstepAllocs: the per-iterate work of the audit (the reference's
// double-double map, a rung's map, storage rounding, distance, the curve
// and the fit) does not allocate once its storage has grown.
func TestLockstepAllocs(t *testing.T) {
	m := henon()
	a := newLockstep(m, DefaultRungs(10), henonStart, 10, 0.1, nil)
	run := a.runs[2]
	it := 0
	allocs := testing.AllocsPerRun(100, func() {
		_ = m.f.NextDD(a.cur, a.nxt)
		m.Next(run.x, run.y)
		run.store.Vec(run.y, run.y)
		d := refDist(run.y, a.nxt, nil, nil)
		run.out.Divergence = run.out.Divergence[:0] // no growth: one point reused
		run.fitX, run.fitY = run.fitX[:0], run.fitY[:0]
		run.record(it, d, a)
		it++
	})
	if allocs != 0 {
		t.Errorf("a rung's iterate allocates %v times", allocs)
	}
}

// BenchmarkAudit audits 200 iterates of the Hénon map: the reference orbit
// and the rungs.
func BenchmarkAudit(b *testing.B) {
	m := henon()
	s := &AuditSettings{Tol: 0.1}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Audit(context.Background(), m, henonStart, 200, s); err != nil {
			b.Fatal(err)
		}
	}
}
