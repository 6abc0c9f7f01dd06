package owncode

import (
	"context"
	"math"
	"strconv"
	"testing"
	"time"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
)

// Settings of the audit through launched programs.
const (
	auditT1  = 30.0 // long enough for the rtol 1e-6 run to part (near t = 17)
	auditTol = 1.0  // a difference of 1 in the loop's units is visible on a plot
	// partingAgreement is the brief's bound: the programs' horizons and
	// plumb's own stand within 15% of each other.
	partingAgreement = 0.15
)

// TestTrustProgramParts launches each student's program through
// plumb.RunProgram and plumb.TrustRuns (the SDK behind plumb trust --exec)
// at rtol = atol = 1e-6 and 1e-10, and checks that the rtol 1e-6 run parts
// from the 1e-10 reference where plumb's own Dormand–Prince 5(4) runs at
// the same two tolerances part from each other, within 15%, once the
// difference of the two methods' errors is accounted for.
//
// The relation relied on: a perturbation of size delta grows on average as
// delta·e^(lambda·t) (Boffetta et al. 2002, Phys. Rep. 356, Sect. 2.1), so
// two runs part at t ≈ ln(tol/delta)/lambda, with delta set by the looser
// run's error in its first steps. At the same tolerance two methods commit
// errors in a ratio C (different orders and error constants:
// Bogacki–Shampine 3(2) advancing with its third-order solution against
// Dormand–Prince 5(4) advancing with its fifth), which moves the parting
// time by ln(C)/lambda. C is measured independently, as the ratio of the
// two rtol 1e-6 runs' largest errors up to t = 2 against DP5(4) at rtol
// 1e-12; lambda = 0.9056 (Sprott 2003, App. A). Unadjusted, the horizons
// differ by about 30% (measured: 7.49 for both programs against 10.56 for
// DP5(4); C ≈ 14, which moves it to 7.67), which the test logs.
func TestTrustProgramParts(t *testing.T) {
	const lorenzLambda = 0.9056 // Sprott 2003, App. A
	ps := programs(t)
	// plumb's own: DP5(4) at the same tolerances, written at the same
	// times, audited the same way.
	own := func(tol float64) plumb.RecordedRun {
		sol, err := integrate.Solve(context.Background(), integrate.Problem{F: lorenz, Y0: start}, auditT1, integrate.DormandPrince54,
			&integrate.Settings{RelTol: tol, AbsTol: tol, Every: dt, DropSteps: true})
		require.NoError(t, err)
		r := plumb.RecordedRun{Label: "dp54 " + strconv.FormatFloat(tol, 'g', -1, 64), Effect: plumb.VariesTolerance, Names: []string{"x", "y", "z"}}
		for _, s := range sol.Samples {
			r.T = append(r.T, s.T)
			r.Y = append(r.Y, s.Y...)
		}
		return r
	}
	ref := reference(t, start)
	mine := []plumb.RecordedRun{own(1e-10), own(1e-6)}
	mine[0].Reference = true
	settings := &plumb.RecordedSettings{Tol: auditTol}
	ownRep, err := plumb.TrustRuns(context.Background(), mine, settings)
	require.NoError(t, err)
	require.True(t, ownRep.Rungs[0].Departed)
	want := ownRep.Rungs[0].AgreesUntil
	ownErr := earlyErr(mine[1], ref)

	for _, p := range ps {
		t.Run(p.name, func(t *testing.T) {
			prog := plumb.Program{
				Args: append(p.cmd().Args, "--rtol", "{rtol}", "--atol", "{atol}", "--out", "{out}",
					"--t1", strconv.FormatFloat(auditT1, 'g', -1, 64), "--dt", strconv.FormatFloat(dt, 'g', -1, 64)),
				Tols: []float64{1e-10, 1e-6}, Jobs: 2, Timeout: 5 * time.Minute,
			}
			runs, plan, err := plumb.RunProgram(context.Background(), prog)
			require.NoError(t, err)
			require.Len(t, plan, 2)
			for _, r := range runs {
				require.Nil(t, r.Failure, r.Label)
			}
			rep, err := plumb.TrustRuns(context.Background(), runs, settings)
			require.NoError(t, err)
			require.Len(t, rep.Rungs, 1)
			r := rep.Rungs[0]
			require.True(t, r.Departed, "the rtol 1e-6 run parts before t = %v", auditT1)
			c := earlyErr(runs[1], ref) / ownErr
			adjusted := want - math.Log(c)/lorenzLambda
			t.Logf("%s: rtol 1e-6 parts from rtol 1e-10 at t = %.3f; plumb's DP5(4) at t = %.3f (%.0f%% apart); error ratio C = %.3g, so DP5(4)'s time less ln(C)/lambda = %.3f",
				p.name, r.AgreesUntil, want, 100*math.Abs(r.AgreesUntil-want)/want, c, adjusted)
			assert.InEpsilonf(t, adjusted, r.AgreesUntil, partingAgreement,
				"parting time of the %s program against plumb's DP5(4) at the same tolerances, less ln(C)/lambda (Boffetta et al. 2002)", p.name)
			assert.False(t, rep.Recorded.Runs[1].SameAsReference)
			assert.Equal(t, integrate.GrowthExponential, r.Growth)
		})
	}
}

// earlyErr is the largest error of run r up to t1 = 2 against ref, relative
// to the largest magnitude of the state.
func earlyErr(r plumb.RecordedRun, ref *integrate.Solution) float64 {
	worst, size := 0.0, 0.0
	want := make([]float64, 3)
	for i, tt := range r.T {
		if tt > t1 {
			break
		}
		ref.At(tt, want)
		for j, v := range r.Y[3*i : 3*i+3] {
			worst = math.Max(worst, math.Abs(v-want[j]))
			size = math.Max(size, math.Abs(want[j]))
		}
	}
	return worst / size
}

// TestTrustProgramIgnoredKnob: a knob the program does not pass on (a
// --vary value appended as an argument the program reads as a repeated
// flag with the same value) gives a run equal to the reference to the
// last bit, which the report flags.
func TestTrustProgramIgnoredKnob(t *testing.T) {
	ps := programs(t)
	p := ps[0]
	prog := plumb.Program{
		Args: append(p.cmd().Args, "--rtol", "1e-8", "--atol", "1e-8", "--out", "{out}", "--t1", "5", "{dt}"),
		Vary: []plumb.Vary{{Name: "dt", Effect: plumb.VariesOther, Values: []string{"--dt=0.01", ""}}},
	}
	// The program does not know "--dt=0.01" (it wants "--dt 0.01"): the
	// reference's value makes it fail with status 2, which fails the audit.
	_, _, err := plumb.TrustProgram(context.Background(), prog, &plumb.RecordedSettings{Tol: 1})
	require.ErrorIs(t, err, plumb.ErrProgram)
	assert.Contains(t, err.Error(), "exited with status 2")

	// Now a knob the program ignores: --perturb 0 and --perturb -0 start
	// from the same values, bit for bit (1 + 0 == 1 + -0 exactly).
	prog.Args = append(p.cmd().Args, "--rtol", "1e-8", "--atol", "1e-8", "--out", "{out}", "--t1", "5", "--perturb", "{nudge}")
	prog.Vary = []plumb.Vary{{Name: "nudge", Effect: plumb.VariesStart, Values: []string{"0", "-0", "1e-6"}}}
	rep, _, err := plumb.TrustProgram(context.Background(), prog, &plumb.RecordedSettings{Tol: 1})
	require.NoError(t, err)
	require.Len(t, rep.Recorded.Runs, 3)
	assert.True(t, rep.Recorded.Runs[1].SameAsReference, "nudge -0")
	assert.False(t, rep.Recorded.Runs[2].SameAsReference, "nudge 1e-6")
	// The nudged run's delta0 is measured at t = 0: |start|·1e-6, the
	// start (-5, -6, 22) having norm sqrt(25+36+484) (exact identity, up
	// to the rounding of the products).
	assert.InEpsilon(t, 1e-6*math.Sqrt(545), rep.Rungs[1].Delta0, 1e-6)
}
