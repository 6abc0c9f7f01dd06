package plumb_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
)

// circleRun is a run on a circle of radius 100 in (x, y) with times
// 0, dt, ..., n·dt, its x displaced by off(t): the distance from the
// unshifted circle is |off(t)|. The circle's spread is 100 (the rms
// distance from its centre), so a divergence grows freely up to a tenth of
// it, 10 (integrate.FitDivergence's ceiling).
func circleRun(label string, effect plumb.RunEffect, n int, dt float64, off func(t float64) float64) plumb.RecordedRun {
	r := plumb.RecordedRun{Label: label, Effect: effect, Names: []string{"x", "y"}, T: make([]float64, n+1), Y: make([]float64, 2*(n+1))}
	for k := range r.T {
		t := float64(k) * dt
		r.T[k] = t
		r.Y[2*k] = 100*math.Cos(t) + off(t)
		r.Y[2*k+1] = 100 * math.Sin(t)
	}
	return r
}

func zero(float64) float64 { return 0 }

// TestTrustRunsExponentialFit: a divergence d0·e^{λt} with multiplicative
// noise is recovered within its reported error. The exact identity is
// d(t) = d0·e^{λt}·e^{σε}; over many seeds the estimate must fall within
// one reported standard error about as often as a normal error would.
func TestTrustRunsExponentialFit(t *testing.T) {
	const (
		lambda = 0.9
		d0     = 1e-6
		sigma  = 0.1 // noise of log d
		n      = 400
		dt     = 0.05
		seeds  = 100
		// A calibrated standard error covers the truth in 68% of trials
		// at one standard error and 95% at two (normal errors); over 100
		// seeds the binomial scatter is about 5 and 2 points, so these
		// bounds sit about two such deviations below (common practice).
		// Measured: 74 and 95.
		minCover1 = 0.58
		minCover2 = 0.90
		// delta0 is the first divergence, 100 + d0·e^{σε} - 100 in
		// float64: exact up to two roundings of 100 (ulp 1.4e-14).
		delta0Tol = 3e-14
	)
	var in1, in2 int
	for seed := range seeds {
		rng := rand.New(rand.NewPCG(uint64(seed), 7))
		noise := make([]float64, n+1)
		for k := range noise {
			noise[k] = sigma * rng.NormFloat64()
		}
		runs := []plumb.RecordedRun{
			circleRun("ref", "", n, dt, zero),
			circleRun("nudged", plumb.VariesStart, n, dt, func(t float64) float64 {
				return d0 * math.Exp(lambda*t+noise[int(math.Round(t/dt))])
			}),
		}
		runs[0].Reference = true
		rep, err := plumb.TrustRuns(context.Background(), runs, &plumb.RecordedSettings{Tol: 1})
		require.NoError(t, err)
		require.NotNil(t, rep.Exponent)
		e := rep.Exponent
		require.Equal(t, "runs", e.Source)
		require.Equal(t, integrate.GrowthExponential, rep.Rungs[0].Growth, "seed %d", seed)
		if seed == 0 {
			require.Equal(t, []string{"nudged"}, rep.Recorded.ExponentFrom)
			assert.Contains(t, rep.Recorded.ExponentNote, "an estimate from the runs")
			// delta0 is measured at the start: d0·e^{σε_0}; the
			// prediction is ln(tol/delta0)/lambda_fit (Boffetta et al.
			// 2002), computed here from the report's own numbers.
			r := rep.Rungs[0]
			assert.InDeltaf(t, d0*math.Exp(noise[0]), r.Delta0, delta0Tol, "delta0 = the first divergence (exact up to rounding)")
			assert.InDeltaf(t, math.Log(1/r.Delta0)/e.Value, r.Predicted, 1e-9, "predicted horizon ln(tol/delta0)/lambda")
		}
		dev := math.Abs(e.Value - lambda)
		if dev <= e.StdErr {
			in1++
		}
		if dev <= 2*e.StdErr {
			in2++
		}
	}
	t.Logf("λ within 1 reported error in %d/%d seeds, within 2 in %d/%d", in1, seeds, in2, seeds)
	assert.GreaterOrEqualf(t, float64(in1)/seeds, minCover1, "coverage of 1 standard error")
	assert.GreaterOrEqualf(t, float64(in2)/seeds, minCover2, "coverage of 2 standard errors")
}

// TestTrustRunsPowerLaw: a divergence growing like t² (a regular flow's
// phase drift, exact identity d = c·t²) is classified as a power law and
// the report sees polynomial growth, with no exponent from the runs.
func TestTrustRunsPowerLaw(t *testing.T) {
	// The fitted power of an exact t² is 2 up to the envelope's first
	// skipped point and rounding (exact identity).
	const powerTol = 0.05
	runs := []plumb.RecordedRun{
		circleRun("ref", "", 400, 0.05, zero),
		circleRun("loose", plumb.VariesTolerance, 400, 0.05, func(t float64) float64 { return 1e-3 * t * t }),
	}
	runs[0].Reference = true
	rep, err := plumb.TrustRuns(context.Background(), runs, &plumb.RecordedSettings{Tol: 1})
	require.NoError(t, err)
	r := rep.Rungs[0]
	assert.Equal(t, integrate.GrowthPolynomial, r.Growth, "the one growth vocabulary: a power law is polynomial")
	assert.InDeltaf(t, 2, r.Power, powerTol, "power of d = c·t² (exact identity)")
	assert.Equal(t, integrate.GrowthPolynomial, rep.Growth)
	assert.Nil(t, rep.Exponent)
	assert.NotEmpty(t, rep.ExponentError)
	// d = 1e-3 t² reaches tol = 1 at t = sqrt(1000) = 31.62 > 20: the run
	// agrees over the whole span, using 1e-3·20² = 0.4 of the tolerance,
	// more than a tenth: trusted, without margin (exact identity).
	assert.False(t, r.Departed)
	assert.InDelta(t, 0.4, rep.TolUsed, 1e-12)
	assert.Equal(t, plumb.Trusted, rep.Verdict)
}

// TestTrustRunsRoundTrip: runs of the convection-loop demo made the way
// the built-in ladder makes them (DP5(4) at three tolerances, DP8(5,3)
// with 24-bit storage), recorded at the comparison grid's times, give the
// same agreement horizons as the built-in audit (TrustProblem, which refines its
// horizons on the continuous solutions) to the grid's spacing.
func TestTrustRunsRoundTrip(t *testing.T) {
	const (
		horizon = 30.0
		every   = horizon / 1000 // TrustProblem's default grid
	)
	p := model(t, "lorenz").Problem()
	ref := integrate.DefaultLadder(0, horizon).Reference
	rungs := []integrate.Rung{
		{Kind: integrate.KindTolerance, Method: integrate.DormandPrince54, RelTol: 1e-6, AbsTol: 1e-6},
		{Kind: integrate.KindTolerance, Method: integrate.DormandPrince54, RelTol: 1e-8, AbsTol: 1e-8},
		{Kind: integrate.KindPrecision, Rounding: integrate.Bits(24)},
	}
	rep, err := plumb.TrustProblem(context.Background(), p, horizon, &plumb.TrustSettings{
		Tol: 1, Ladder: &integrate.Ladder{Reference: ref, Rungs: rungs}, NoReversal: true, Lambda: lorenzLambda1})
	require.NoError(t, err)

	record := func(label string, m integrate.Method, tol float64) plumb.RecordedRun {
		sol, err := integrate.Solve(context.Background(), p, horizon, m, &integrate.Settings{RelTol: tol, AbsTol: tol, Every: every, DropSteps: true})
		require.NoError(t, err)
		r := plumb.RecordedRun{Label: label, Names: []string{"x", "y", "z"}}
		for _, s := range sol.Samples {
			r.T = append(r.T, s.T)
			r.Y = append(r.Y, s.Y...)
		}
		return r
	}
	runs := []plumb.RecordedRun{
		record("ref", integrate.DormandPrince853, 1e-12),
		record("tol6", integrate.DormandPrince54, 1e-6),
		record("tol8", integrate.DormandPrince54, 1e-8),
		record("bits24", integrate.Rounded(integrate.DormandPrince853, integrate.Bits(24)), 1e-12),
	}
	runs[0].Reference = true
	runs[1].Effect, runs[2].Effect, runs[3].Effect = plumb.VariesTolerance, plumb.VariesTolerance, plumb.VariesPrecision
	got, err := plumb.TrustRuns(context.Background(), runs, &plumb.RecordedSettings{Tol: 1, Lambda: lorenzLambda1})
	require.NoError(t, err)
	require.Len(t, got.Rungs, 3)
	assert.Equal(t, "reference", got.Recorded.Grid)
	for i, r := range got.Rungs {
		want := rep.Rungs[i]
		require.True(t, want.Departed, "%s departs in the built-in audit", want.Name)
		assert.True(t, r.Departed, r.Name)
		assert.InDeltaf(t, want.AgreesUntil, r.AgreesUntil, every, "%s: horizon from the records vs the built-in audit's (%s), to the grid spacing", r.Name, want.Name)
		assert.Equal(t, want.Effect, r.Effect)
		t.Logf("%s: %.4f (records) vs %.4f (built-in)", r.Name, r.AgreesUntil, want.AgreesUntil)
	}
	assert.InDelta(t, rep.TrustedUntil, got.TrustedUntil, every)
	assert.Equal(t, rep.LimitedBy, got.LimitedBy)
	assert.Equal(t, rep.Verdict, got.Verdict)
	assert.InDeltaf(t, rep.Spread, got.Spread, 1e-9*rep.Spread, "spread on the same grid")
}

// TestTrustRunsBadInput: each unusable set is refused before any work
// with an error naming the run.
func TestTrustRunsBadInput(t *testing.T) {
	mk := func(label string, ref bool, t0 float64, names ...string) plumb.RecordedRun {
		r := plumb.RecordedRun{Label: label, Source: label + ".csv", Reference: ref, Effect: plumb.VariesTolerance, Names: names}
		for k := range 10 {
			r.T = append(r.T, t0+float64(k))
			for range names {
				r.Y = append(r.Y, float64(k))
			}
		}
		return r
	}
	cases := []struct {
		name string
		runs []plumb.RecordedRun
		want []string
	}{
		{"one run only", []plumb.RecordedRun{mk("a", true, 0, "x")}, []string{`run 1 "a" (a.csv)`, "only run"}},
		{"disjoint spans", []plumb.RecordedRun{mk("a", true, 0, "x"), mk("b", false, 20, "x")}, []string{`run 2 "b" (b.csv)`, "does not overlap"}},
		{"missing column", []plumb.RecordedRun{mk("a", true, 0, "x", "y"), mk("b", false, 0, "x")}, []string{`run 2 "b" (b.csv)`, `column "y" is missing`}},
		{"no reference", []plumb.RecordedRun{mk("a", false, 0, "x"), mk("b", false, 0, "x")}, []string{"no run is marked as the reference"}},
		{"two references", []plumb.RecordedRun{mk("a", true, 0, "x"), mk("b", true, 0, "x")}, []string{`run 2 "b"`, "so is run 1"}},
		{"same label", []plumb.RecordedRun{mk("a", true, 0, "x"), mk("a", false, 0, "x")}, []string{`run 2 "a"`, "label of run 1"}},
		{"bad effect", []plumb.RecordedRun{mk("a", true, 0, "x"), func() plumb.RecordedRun { r := mk("b", false, 0, "x"); r.Effect = "luck"; return r }()}, []string{`effect "luck"`}},
		{"NaN", []plumb.RecordedRun{mk("a", true, 0, "x"), func() plumb.RecordedRun { r := mk("b", false, 0, "x"); r.Y[3] = math.NaN(); return r }()}, []string{`row 4, column "x"`}},
		{"times back", []plumb.RecordedRun{mk("a", true, 0, "x"), func() plumb.RecordedRun { r := mk("b", false, 0, "x"); r.T[5] = 1; return r }()}, []string{"row 6"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rep, err := plumb.TrustRuns(context.Background(), c.runs, &plumb.RecordedSettings{Tol: 1})
			require.Error(t, err)
			assert.Nil(t, rep)
			assert.True(t, errors.Is(err, plumb.ErrRuns), "errors.Is(ErrRuns): %v", err)
			for _, w := range c.want {
				assert.Contains(t, err.Error(), w)
			}
		})
	}
	// A horizon past the common span is refused: nothing is extrapolated.
	_, err := plumb.TrustRuns(context.Background(), []plumb.RecordedRun{mk("a", true, 0, "x"), mk("b", false, 2, "x")}, &plumb.RecordedSettings{Tol: 1, Horizon: 8})
	require.ErrorIs(t, err, plumb.ErrHorizon)
	assert.Contains(t, err.Error(), "[2, 9]")
}

// TestTrustRunsSameAsReference: a run equal to the reference to the last
// bit is flagged, and a failed run is reported while the others stand.
func TestTrustRunsSameAsReference(t *testing.T) {
	runs := []plumb.RecordedRun{
		circleRun("ref", "", 100, 0.05, zero),
		circleRun("ignored", plumb.VariesTolerance, 100, 0.05, zero),
		circleRun("loose", plumb.VariesTolerance, 100, 0.05, func(t float64) float64 { return 1e-3 * math.Exp(t) }),
		{Label: "crashed", Effect: plumb.VariesPrecision, Failure: &plumb.RunFailure{Why: "exited with status 3", ExitStatus: 3, StderrTail: "segfault"}},
	}
	runs[0].Reference = true
	rep, err := plumb.TrustRuns(context.Background(), runs, &plumb.RecordedSettings{Tol: 1})
	require.NoError(t, err)
	require.Len(t, rep.Recorded.Runs, 4)
	assert.True(t, rep.Recorded.Runs[1].SameAsReference)
	assert.False(t, rep.Recorded.Runs[2].SameAsReference)
	assert.Equal(t, 1, rep.Failed)
	assert.Equal(t, "exited with status 3", rep.Rungs[2].Error)
	// 1e-3·e^t = 1 at t = ln 1000 = 6.908 > 5: no departure within the
	// span [0, 5] (exact identity).
	assert.False(t, rep.Rungs[1].Departed)
	var b strings.Builder
	require.NoError(t, rep.Write(&b))
	for _, w := range []string{"equals the reference to the last bit", "run crashed failed: exited with status 3\n", "| segfault", "nothing is extrapolated", "caution:"} {
		assert.Contains(t, b.String(), w)
	}
}

// TestTrustRunsGridRestartAngle: with Every, runs are interpolated onto a
// uniform grid; a restart run begins later and its curve starts there; an
// angle column is compared modulo its period.
func TestTrustRunsGridRestartAngle(t *testing.T) {
	// The interpolant reproduces quadratics exactly (Bessel's slopes, de
	// Boor 1978, ch. IV), so on linear data the only error is rounding.
	const roundTol = 1e-12
	mk := func(label string, effect plumb.RunEffect, t0, dt float64, n int, phase float64) plumb.RecordedRun {
		r := plumb.RecordedRun{Label: label, Effect: effect, Names: []string{"a", "u"}}
		for k := range n {
			tt := t0 + float64(k)*dt
			r.T = append(r.T, tt)
			// a: an angle winding at rate 1, wrapped into [0, 2π); u linear.
			r.Y = append(r.Y, math.Mod(tt+phase, 2*math.Pi), 3*tt)
		}
		return r
	}
	runs := []plumb.RecordedRun{
		mk("ref", "", 0, 0.1, 101, 0),                    // t in [0, 10]
		mk("coarse", plumb.VariesMethod, 0, 0.25, 41, 0), // same motion, other times
		mk("late", plumb.VariesRestart, 4, 0.1, 61, 0.5), // from t = 4, angle off by 0.5
	}
	runs[0].Reference = true
	rep, err := plumb.TrustRuns(context.Background(), runs, &plumb.RecordedSettings{
		Tol: 1, Every: 0.5, Periods: map[string]float64{"a": 2 * math.Pi}, Distance: plumb.Distance{Observe: []string{"a"}}})
	require.NoError(t, err)
	rc := rep.Recorded
	assert.Equal(t, "every", rc.Grid)
	assert.Equal(t, 21, len(rep.Times)) // 0, 0.5, ..., 10
	assert.True(t, rc.Runs[0].Interpolated && rc.Runs[1].Interpolated)
	// The coarse run is the same motion: zero divergence up to the
	// interpolation of a wrapped angle (unwrapped first), to rounding.
	for k, d := range rep.Rungs[0].Divergence {
		assert.InDeltaf(t, 0, d, roundTol, "coarse run at t = %v", rep.Times[k])
	}
	// The late run starts at t = 4 (index 8) and differs by 0.5 in the
	// angle throughout, wrapped or not (exact identity).
	late := rep.Rungs[1]
	assert.Equal(t, 8, late.Start)
	assert.Equal(t, 4.0, late.RestartAt)
	for _, d := range late.Divergence {
		assert.InDelta(t, 0.5, d, roundTol)
	}
	assert.InDelta(t, 0.5, late.Delta0, roundTol, "delta0 measured at the restart")
	assert.Equal(t, []string{"a"}, []string{rep.Distance.Components[0].Name})
	assert.Equal(t, plumb.Trusted, rep.Verdict, "largest divergence 0.5 of tol 1")
}

// TestTrustFiles: runs read from files in the three formats give the same
// report as the same runs held in memory (runio's readers return the very
// doubles written: CSV with shortest round-trip numbers, exact identity).
func TestTrustFiles(t *testing.T) {
	dir := t.TempDir()
	ref := circleRun("ref", "", 200, 0.05, zero)
	loose := circleRun("loose", plumb.VariesTolerance, 200, 0.05, func(t float64) float64 { return 1e-4 * math.Exp(t) })
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		require.NoError(t, os.WriteFile(p, []byte(text), 0o644))
		return p
	}
	var csv, jsonl strings.Builder
	csv.WriteString("t,x,y\n")
	for k, tt := range ref.T {
		fmt.Fprintf(&csv, "%s,%s,%s\n", strconv.FormatFloat(tt, 'g', -1, 64), strconv.FormatFloat(ref.Y[2*k], 'g', -1, 64), strconv.FormatFloat(ref.Y[2*k+1], 'g', -1, 64))
	}
	for k, tt := range loose.T {
		fmt.Fprintf(&jsonl, "{\"t\": %s, \"x\": %s, \"y\": %s}\n", strconv.FormatFloat(tt, 'g', -1, 64), strconv.FormatFloat(loose.Y[2*k], 'g', -1, 64), strconv.FormatFloat(loose.Y[2*k+1], 'g', -1, 64))
	}
	files := []plumb.RunFile{
		{Path: write("ref.csv", csv.String()), Label: "ref", Reference: true},
		{Path: write("loose.jsonl", jsonl.String()), Label: "loose", Effect: plumb.VariesTolerance},
	}
	got, err := plumb.TrustFiles(context.Background(), files, plumb.RunReadOptions{}, &plumb.RecordedSettings{Tol: 1})
	require.NoError(t, err)
	ref.Reference = true
	want, err := plumb.TrustRuns(context.Background(), []plumb.RecordedRun{ref, loose}, &plumb.RecordedSettings{Tol: 1})
	require.NoError(t, err)
	assert.Equal(t, want.Rungs[0].Divergence, got.Rungs[0].Divergence)
	assert.Equal(t, want.TrustedUntil, got.TrustedUntil)
	// 1e-4·e^t = 1 at t = ln(1e4) = 9.21 (exact identity), to the grid.
	assert.InDelta(t, math.Log(1e4), got.TrustedUntil, 0.05)

	files[1].Path = write("bad.csv", "t,x,y\n0,1,2\n0.05,oops,3\n")
	_, err = plumb.TrustFiles(context.Background(), files, plumb.RunReadOptions{}, &plumb.RecordedSettings{Tol: 1})
	require.Error(t, err)
	assert.Contains(t, err.Error(), "bad.csv:3")
}

// TestTrustRunsToleranceBeyondReach: a tolerance above twice the
// reference's largest distance from its mean is flagged: runs that stay
// where the reference went cannot part by it. The reference alternates
// between x = -1 and x = 1 (mean 0, largest distance 1: exact identity).
func TestTrustRunsToleranceBeyondReach(t *testing.T) {
	mk := func(label string, scale float64) plumb.RecordedRun {
		r := plumb.RecordedRun{Label: label, Effect: plumb.VariesPlatform, Names: []string{"x"}}
		for k := range 20 {
			r.T = append(r.T, float64(k))
			r.Y = append(r.Y, scale*float64(1-2*(k%2)))
		}
		return r
	}
	runs := []plumb.RecordedRun{mk("ref", 1), mk("other", 0.5)}
	runs[0].Reference = true
	for _, c := range []struct {
		tol  float64
		note bool
	}{{1.99, false}, {2.01, true}} {
		rep, err := plumb.TrustRuns(context.Background(), runs, &plumb.RecordedSettings{Tol: c.tol})
		require.NoError(t, err)
		assert.Equal(t, c.note, rep.Recorded.ToleranceNote != "", "tol %v: %q", c.tol, rep.Recorded.ToleranceNote)
	}
}
