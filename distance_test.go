package plumb

import (
	"context"
	"errors"
	"github.com/plumbdyn/plumb/maps"
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/lyap"
)

// TestDistancePerComponent resolves names into per-component scales and
// refuses every bad entry by field, index and name.
func TestDistancePerComponent(t *testing.T) {
	states := []string{"x", "y", "z"}
	inf, nan := math.Inf(1), math.NaN()
	for _, c := range []struct {
		name  string
		d     Distance
		want  []float64 // nil: the plain distance
		field string    // non-empty: the error's field
		index int
		item  string
		err   error
	}{
		{name: "zero value", d: Distance{}},
		{name: "all observed at 1", d: Distance{Observe: []string{"z", "x", "y"}, Scales: []Scale{{"y", 1}}}},
		{name: "one observed", d: Distance{Observe: []string{"y"}}, want: []float64{0, 1, 0}},
		{name: "scales", d: Distance{Observe: []string{"x", "z"}, Scales: []Scale{{"z", 10}, {"x", 2}}}, want: []float64{2, 0, 10}},
		{name: "scale without observe", d: Distance{Scales: []Scale{{"y", 0.5}}}, want: []float64{1, 0.5, 1}},
		{name: "unknown observed", d: Distance{Observe: []string{"x", "q"}}, field: "Observe", index: 1, item: "q", err: ErrUnknown},
		{name: "empty name", d: Distance{Observe: []string{""}}, field: "Observe", index: 0, item: "", err: ErrUnknown},
		{name: "observed twice", d: Distance{Observe: []string{"x", "y", "x"}}, field: "Observe", index: 2, item: "x", err: integrate.ErrSettings},
		{name: "unknown scaled", d: Distance{Scales: []Scale{{"w", 2}}}, field: "Scales", index: 0, item: "w", err: ErrUnknown},
		{name: "scaled twice", d: Distance{Scales: []Scale{{"x", 2}, {"x", 3}}}, field: "Scales", index: 1, item: "x", err: integrate.ErrSettings},
		{name: "zero scale", d: Distance{Scales: []Scale{{"x", 0}}}, field: "Scales", item: "x", err: integrate.ErrSettings},
		{name: "negative scale", d: Distance{Scales: []Scale{{"y", 1}, {"x", -2}}}, field: "Scales", index: 1, item: "x", err: integrate.ErrSettings},
		{name: "NaN scale", d: Distance{Scales: []Scale{{"z", nan}}}, field: "Scales", item: "z", err: integrate.ErrSettings},
		{name: "Inf scale", d: Distance{Scales: []Scale{{"z", inf}}}, field: "Scales", item: "z", err: integrate.ErrSettings},
		{name: "scale of an unobserved component", d: Distance{Observe: []string{"x"}, Scales: []Scale{{"z", 2}}}, field: "Scales", item: "z", err: ErrUnknown},
	} {
		t.Run(c.name, func(t *testing.T) {
			got, err := c.d.PerComponent(states)
			if c.field == "" {
				require.NoError(t, err)
				require.Equal(t, c.want, got)
				return
			}
			require.Nil(t, got)
			var de *DistanceError
			require.Truef(t, errors.As(err, &de), "error %v is no *DistanceError", err)
			require.Equal(t, c.field, de.Field)
			require.Equal(t, c.index, de.Index)
			require.Equal(t, c.item, de.Name)
			require.ErrorIs(t, err, c.err)
			require.Contains(t, err.Error(), "Distance."+c.field)
		})
	}
}

// TestDistanceReportString: the line the summaries print.
func TestDistanceReportString(t *testing.T) {
	states := []string{"x", "y", "z"}
	for _, c := range []struct {
		scales, periods []float64
		want            string
	}{
		{nil, nil, "Euclidean over x, y, z"},
		{[]float64{2, 0, 10}, nil, "Euclidean over x, z with scales x/2, z/10 (y not compared)"},
		{[]float64{0, 1, 0}, nil, "Euclidean over y (x, z not compared)"},
		{nil, []float64{0, 6.25, 0}, "Euclidean over x, y, z; angles wrapped: y"},
	} {
		rep := newDistanceReport(states, c.scales, c.periods)
		require.Equal(t, c.want, rep.String())
		require.Equal(t, c.scales == nil, rep.FullState)
	}
}

// lorenzLadder is a small ladder: a tolerance rung and a restart.
func lorenzLadder() *integrate.Ladder {
	l := integrate.DefaultLadder(0, 25)
	l.Rungs = []integrate.Rung{
		{Name: "tol 1e-6", Kind: integrate.KindTolerance, Method: integrate.DormandPrince54, RelTol: 1e-6, AbsTol: 1e-6},
		{Name: "restart", Kind: integrate.KindRestart, RestartAt: 10, Restart: integrate.Places(3)},
	}
	return &l
}

// TestTrustScaleIdentity: scale 2 on every component at tolerance 1 is the
// audit at tolerance 2 without scales, with the float64 reference run
// (Trust) and with the multiprecision one (TrustSystem, whose precision
// follows the tolerance in the audit's distance): ||d/2|| > 1 exactly when
// ||d|| > 2, and ||d/2|| = ||d||/2 exactly in binary floating point (exact
// identity).
func TestTrustScaleIdentity(t *testing.T) {
	sys, err := Model("lorenz")
	require.NoError(t, err)
	half := Distance{Scales: []Scale{{"x", 2}, {"y", 2}, {"z", 2}}}
	for _, c := range []struct {
		name  string
		trust func(*TrustSettings) (*Report, error)
	}{
		{"float64 reference", func(s *TrustSettings) (*Report, error) {
			return TrustProblem(context.Background(), sys.Problem(), 25, s)
		}},
		{"multiprecision reference", func(s *TrustSettings) (*Report, error) {
			return sys.Trust(context.Background(), 25, s)
		}},
	} {
		t.Run(c.name, func(t *testing.T) {
			plain, err := c.trust(&TrustSettings{Tol: 2, Ladder: lorenzLadder(), Lambda: 0.9056, States: sys.States})
			require.NoError(t, err)
			scaled, err := c.trust(&TrustSettings{Tol: 1, Ladder: lorenzLadder(), Lambda: 0.9056, States: sys.States, Distance: half})
			require.NoError(t, err)
			require.True(t, plain.Distance.FullState)
			require.False(t, scaled.Distance.FullState)
			require.Equal(t, plain.TrustedUntil, scaled.TrustedUntil, "trusted until (exact identity)")
			require.Equal(t, plain.PredictedHorizon, scaled.PredictedHorizon, "prediction: tol and delta0 both halve (exact identity)")
			require.Equal(t, plain.Spread/2, scaled.Spread, "spread (exact identity)")
			for i, pr := range append([]RungReport{plain.Reference}, plain.Rungs...) {
				sr := append([]RungReport{scaled.Reference}, scaled.Rungs...)[i]
				require.Equalf(t, pr.AgreesUntil, sr.AgreesUntil, "rung %s (exact identity)", pr.Name)
				require.Equalf(t, pr.Departed, sr.Departed, "rung %s", pr.Name)
				require.Len(t, sr.Divergence, len(pr.Divergence))
				for k := range pr.Divergence {
					if pr.Divergence[k]/2 != sr.Divergence[k] {
						t.Fatalf("rung %s point %d: %v, want half of %v (exact identity)", pr.Name, k, sr.Divergence[k], pr.Divergence[k])
					}
				}
			}
			require.True(t, plain.Rungs[0].Departed, "the tolerance rung must depart for the check to bite")
		})
	}
}

// TestTrustObserveSubset: observing x alone is reported, and the audit's
// curves are |x_rung - x_ref| of the same runs as the full audit's: never
// above the full-state distance (exact identity: |dx| <= ||d||).
func TestTrustObserveSubset(t *testing.T) {
	sys, err := Model("lorenz")
	require.NoError(t, err)
	p := sys.Problem()
	full, err := TrustProblem(context.Background(), p, 25, &TrustSettings{Tol: 1, Ladder: lorenzLadder(), Lambda: 0.9056, States: sys.States})
	require.NoError(t, err)
	x, err := TrustProblem(context.Background(), p, 25, &TrustSettings{Tol: 1, Ladder: lorenzLadder(), Lambda: 0.9056, States: sys.States, Distance: Distance{Observe: []string{"x"}}})
	require.NoError(t, err)
	require.Equal(t, "Euclidean over x (y, z not compared)", x.Distance.String())
	require.Equal(t, []string{"y", "z"}, x.Distance.Omitted)
	for i := range full.Rungs {
		for k, d := range x.Rungs[i].Divergence {
			require.LessOrEqualf(t, d, full.Rungs[i].Divergence[k], "rung %s point %d: |dx| <= ||d|| (exact identity)", full.Rungs[i].Name, k)
		}
		require.GreaterOrEqual(t, x.Rungs[i].AgreesUntil, full.Rungs[i].AgreesUntil)
	}
	var b strings.Builder
	require.NoError(t, x.Write(&b))
	require.Contains(t, b.String(), "distance: Euclidean over x (y, z not compared)\n")
	require.Contains(t, b.String(), "(delta0 in the same distance)")
}

// TestTrustDistanceRefused: a bad Distance or state names are refused
// before any work, with no report.
func TestTrustDistanceRefused(t *testing.T) {
	sys, err := Model("lorenz")
	require.NoError(t, err)
	bad := Distance{Observe: []string{"x", "w"}}
	rep, err := TrustProblem(context.Background(), sys.Problem(), 10, &TrustSettings{Tol: 1, States: sys.States, Distance: bad})
	require.Nil(t, rep)
	require.ErrorIs(t, err, ErrUnknown)
	rep, err = sys.Trust(context.Background(), 10, &TrustSettings{Tol: 1, Distance: bad})
	require.Nil(t, rep)
	require.ErrorIs(t, err, ErrUnknown)
	// Without States the components are y[0], y[1], y[2].
	rep, err = TrustProblem(context.Background(), sys.Problem(), 10, &TrustSettings{Tol: 1, Distance: Distance{Observe: []string{"x"}}})
	require.Nil(t, rep)
	require.ErrorIs(t, err, ErrUnknown)
	require.Contains(t, err.Error(), "y[0], y[1], y[2]")
	rep, err = TrustProblem(context.Background(), sys.Problem(), 10, &TrustSettings{Tol: 1, States: []string{"x"}})
	require.Nil(t, rep)
	require.ErrorIs(t, err, integrate.ErrDimension)
	h, err := Model("henon")
	require.NoError(t, err)
	mrep, err := h.Trust(context.Background(), 50, &TrustSettings{Tol: 0.1, Distance: Distance{Scales: []Scale{{"x", -1}}}})
	require.Nil(t, mrep)
	require.ErrorIs(t, err, integrate.ErrSettings)
}

// TestTrustMapObserveByHand: observing x of the Hénon map, the float64
// rung's divergence is |x_n - x_ref,n| of the float64 orbit and the
// double-double orbit computed here, the difference taken in double-double
// as the audit documents, and its last agreeing iterate is the last before
// that first exceeds tol (exact identity: same orbits, same arithmetic).
func TestTrustMapObserveByHand(t *testing.T) {
	const steps, tol = 120, 0.1
	sys, err := Model("henon")
	require.NoError(t, err)
	rungs := []maps.Rung{{Name: "float64", Kind: integrate.KindPrecision}}
	rep, err := sys.Trust(context.Background(), steps, &TrustSettings{Tol: tol, MapRungs: rungs, Lambda: henonLambda1, Distance: Distance{Observe: []string{"x"}}})
	require.NoError(t, err)
	ev, err := sys.ddEval()
	require.NoError(t, err)
	m, err := sys.Map()
	require.NoError(t, err)
	x := sys.Start()
	ref, next := make([]dd.Float, len(x)), make([]dd.Float, len(x))
	for i, v := range x {
		ref[i] = dd.From(v)
	}
	r := rep.Rungs[0]
	require.Len(t, r.Divergence, steps+1)
	departs := -1
	for n := 0; n <= steps; n++ {
		d := math.Abs(dd.Sub(dd.From(x[0]), ref[0]).Float64())
		require.Equalf(t, d, r.Divergence[n], "iterate %d: |x - x_ref| (exact identity)", n)
		if departs < 0 && d > tol {
			departs = n
		}
		m.Next(x, x)
		require.NoError(t, ev.Eval(dd.Float{}, ref, next))
		ref, next = next, ref
	}
	require.Positive(t, departs, "the float64 orbit must depart within %d iterates for the check to bite", steps)
	require.True(t, r.Departed)
	require.Equal(t, departs, r.DepartsAt, "first iterate beyond tol (exact identity)")
	require.Equal(t, float64(departs-1), r.AgreesUntil)
	require.Equal(t, "Euclidean over x (y not compared)", rep.Distance.String())
}

// TestTrustMapScaleIdentity: for a map too, scale 2 on every component at
// tolerance 1 is the audit at tolerance 2, and with Relative the same
// fraction (exact identity, as for flows). On the standard map, whose
// components are angles, the differences are wrapped before they are
// divided: the curves past the departure, of the size of the period, hold
// the identity only in that order.
func TestTrustMapScaleIdentity(t *testing.T) {
	for _, c := range []struct {
		model    string
		steps    int
		relative bool
	}{
		{"henon", 150, false},
		{"henon", 150, true},
		{"standard", 200, false},
	} {
		sys, err := Model(c.model)
		require.NoError(t, err)
		var half []Scale
		for _, n := range sys.States {
			half = append(half, Scale{n, 2})
		}
		plainTol, scaledTol := 2.0, 1.0
		if c.relative {
			plainTol, scaledTol = 0.05, 0.05
		}
		plain, err := sys.Trust(context.Background(), float64(c.steps), &TrustSettings{Tol: plainTol, Relative: c.relative, Lambda: 0.4})
		require.NoError(t, err)
		scaled, err := sys.Trust(context.Background(), float64(c.steps), &TrustSettings{Tol: scaledTol, Relative: c.relative, Lambda: 0.4, Distance: Distance{Scales: half}})
		require.NoError(t, err)
		require.Equalf(t, plain.TrustedUntil, scaled.TrustedUntil, "%s", c.model)
		require.Equalf(t, plain.PredictedHorizon, scaled.PredictedHorizon, "%s prediction: tol and delta0 both halve (exact identity)", c.model)
		require.Equalf(t, plain.TolAbs/2, scaled.TolAbs, "%s absolute tolerance (exact identity)", c.model)
		departed := false
		for i, pr := range plain.Rungs {
			sr := scaled.Rungs[i]
			require.Equalf(t, pr.AgreesUntil, sr.AgreesUntil, "%s rung %s (exact identity)", c.model, pr.Name)
			require.Equalf(t, pr.DepartsAt, sr.DepartsAt, "%s rung %s (exact identity)", c.model, pr.Name)
			require.Equalf(t, pr.Delta0/2, sr.Delta0, "%s rung %s delta0 (exact identity)", c.model, pr.Name)
			for k := range pr.Divergence {
				if pr.Divergence[k]/2 != sr.Divergence[k] {
					t.Fatalf("%s rung %s iterate %d: %v, want half of %v (exact identity)", c.model, pr.Name, k, sr.Divergence[k], pr.Divergence[k])
				}
			}
			departed = departed || pr.Departed
		}
		require.Truef(t, departed, "%s: some rung must depart for the check to bite", c.model)
	}
}

// TestTrustPeriodicScaleIdentity: the crane's double pendulum, two angles
// and two rates, with scale 2 on every component at tolerance 0.05 is the
// audit at 0.1 unscaled; the angle differences are wrapped before they are
// divided (exact identity: wrapping d/2 by the period would differ once a
// difference passes half a period).
func TestTrustPeriodicScaleIdentity(t *testing.T) {
	sys, err := Model("double-pendulum")
	require.NoError(t, err)
	var half []Scale
	for _, n := range sys.States {
		half = append(half, Scale{n, 2})
	}
	l := integrate.DefaultLadder(0, 20)
	l.Rungs = l.Rungs[:1]
	plain, err := TrustProblem(context.Background(), sys.Problem(), 20, &TrustSettings{Tol: 0.1, Ladder: &l, Lambda: 1, Periods: sys.Periods(), States: sys.States})
	require.NoError(t, err)
	scaled, err := TrustProblem(context.Background(), sys.Problem(), 20, &TrustSettings{Tol: 0.05, Ladder: &l, Lambda: 1, Periods: sys.Periods(), States: sys.States, Distance: Distance{Scales: half}})
	require.NoError(t, err)
	require.True(t, plain.Rungs[0].Departed, "the rung must depart for the check to bite")
	require.Equal(t, plain.TrustedUntil, scaled.TrustedUntil, "exact identity")
	big := false
	for k, d := range plain.Rungs[0].Divergence {
		require.Equalf(t, d/2, scaled.Rungs[0].Divergence[k], "point %d (exact identity)", k)
		big = big || d > math.Pi
	}
	require.True(t, big, "the divergence must pass half a period for the wrap order to matter")
	require.Contains(t, scaled.Distance.String(), "angles wrapped: theta1, theta2")
}

// TestSetStartValue: one component by name is the same start as the whole
// vector given to SetStart (exact identity); bad names and values are
// refused and change nothing.
func TestSetStartValue(t *testing.T) {
	a, err := Model("lorenz")
	require.NoError(t, err)
	b, err := Model("lorenz")
	require.NoError(t, err)
	require.NoError(t, a.SetStartValue("y", 0.8))
	want := b.Start()
	want[1] = 0.8
	require.NoError(t, b.SetStart(want))
	require.Equal(t, b.Start(), a.Start())
	require.Equal(t, b.Problem().Y0, a.Problem().Y0)

	err = a.SetStartValue("q", 1)
	require.ErrorIs(t, err, ErrUnknown)
	require.Contains(t, err.Error(), "states: x, y, z")
	require.ErrorIs(t, a.SetStartValue("x", math.NaN()), integrate.ErrNonFinite)
	require.ErrorIs(t, a.SetStartValue("x", math.Inf(-1)), integrate.ErrNonFinite)
	require.Equal(t, want, a.Start(), "a refused value changes nothing")
}

// TestTrustSystemFallbackNames: when TrustSystem falls back to Trust (here
// because the exponent estimate refuses its settings), the distance still
// names the system's components.
func TestTrustSystemFallbackNames(t *testing.T) {
	sys, err := Model("lorenz")
	require.NoError(t, err)
	rep, err := sys.Trust(context.Background(), 15, &TrustSettings{
		Tol: 1, Ladder: lorenzLadder(), NoReversal: true,
		Exponent: &lyap.Settings{Duration: -1},
		Distance: Distance{Observe: []string{"z"}},
	})
	require.NoError(t, err)
	require.NotEmpty(t, rep.ExponentError, "the estimate must fail for the fallback to be taken")
	require.Nil(t, rep.Exact)
	require.Equal(t, "Euclidean over z (x, y not compared)", rep.Distance.String())
}
