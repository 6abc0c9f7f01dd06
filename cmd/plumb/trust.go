package main

import (
	"context"
	"errors"
	"flag"
	"slices"
	"strings"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
)

var trustCmd = &command{
	name:    "trust",
	summary: "audit how far ahead a run can be trusted (the main job)",
	doc: `Audit how far ahead a computed trajectory of a system can be believed.
The system is integrated over --horizon time units on a ladder of rungs,
each changing one numerical choice, and every rung is compared with the
reference (Dormand–Prince 8(5,3) at rtol = atol = 1e-12):

  tol        Dormand–Prince 5(4) at rtol = atol = 1e-6, 1e-8, 1e-10
  method     Dormand–Prince 8(5,3) at 1e-8; RK4 at an eighth of the
             reference's mean step
  precision  the reference with its state stored at 24 bits (float32)
             and at 40 bits
  restart    the reference restarted at --restart-at from its state
             rounded to --restart-places decimals, as from a printout

A rung agrees until its distance from the reference (Euclidean, angles
wrapped) first exceeds --tol. The run is trusted up to the earliest such
time; the rung that sets it names the effect that limits it. Beside each
measured horizon stands the one predicted from the largest Lyapunov
exponent, ln(tol/delta0)/lambda.

--observe x,z takes the distance over the named components only (the
quantities being forecast), and --scale z=10 divides a component's
difference by 10 before the norm, so that components in different units
compare. --tol, --relative, delta0 and the prediction then use that
distance, which the report names on its "distance" line (JSON: distance).

With --exact (the default) and a system with formulas, the reference is
a multiprecision Taylor run instead, and the tightest float64 run is one
more rung: its digits follow from lambda, the span and --tol; on a long
horizon it is kept accurate until every run from the start has departed
from it, then continued in double-double (later restarts start from
that continuation).

With --method, --rtol, --atol or --step, the audit is of your own run:
that run (dp54 at Solve's tolerances unless told otherwise) is a rung of
its own, and the ladder is built around it: its tolerances 100 times
tighter and looser (half and twice the step for a fixed-step method),
another method of similar accuracy, its state stored at 40 and 24 bits,
and a restart. The trusted horizon and the verdict are then your run's,
with what tightening it buys; in JSON, your_run names its rung.

With no flags it audits the built-in convection loop (lorenz, sigma=10,
rho=28, beta=8/3) to t=50 at tolerance 1. --format json writes the whole
report as one object; JSON keys: plumb_version, arch, command, system,
settings, units, status, error (null unless the audit failed or was
canceled), trusted_until (null unless the audit finished), t0, horizon,
tol, relative, tol_abs, spread, distance, limited_by (when a rung departs),
limiting_rung (when a rung departs), predicted_horizon (when predicted),
verdict, tol_used, growth, float64_horizon (when extrapolated),
float64_per_bit (when extrapolated), exponent (when estimated or given),
exponent_error (when the estimate failed), tightest, rungs, times,
failed, exact_reference (when --exact applies), reversal (when checked),
shadow (when --shadow), proof (when --prove), caution. tightest and each rung have a name for people, an id for
programs, their agrees_until and their divergence curve on times.
--format csv writes the divergence curves: t, then one column per run,
headed by its id, which stays the same from run to run: tightest (with
--exact, where it has a curve), tol_1e-06, tol_1e-08, tol_1e-10,
method_dp853, method_rk4, precision_24bit, precision_40bit, restart. --plot draws them on a log axis with
the tolerance and the Lyapunov prediction.

--shadow also asks whether a true orbit of the model stays near the run
audited, though the run is wrong pointwise: a map's float64 orbit is
refined in double-double after Hammel, Yorke & Grebogi, a flow's run (your
run, or dp54 at Solve's tolerances) by multiple shooting with a time
rescaling in least squares. The report's shadow line (JSON: shadow)
gives the distance, how far the shadow reaches, and, where it stops short,
why (a near-tangency of stable and unstable directions, or a refinement
that fails).

--prove WIDTH also proves where the model's exact solution lies: boxes
in interval arithmetic around the audited start, carried by Taylor
series of the formulas with a rigorous remainder and Lohner's wrapping
control (a map: its formulas and their Jacobian in intervals). The
report's proof lines (JSON: proof) give the width against time, the
proven horizon (proven_until: the width stays below WIDTH at every step
up to it) beside the estimated one, and where and why the enclosure
stopped (width blow-up, Picard test, step underflow, a kink or jump
of the formulas in the box). Systems with formulas only: every
built-in model and every system file. A proof concerns the model's
equations as written and their float64 parameters, not the real system.

A trust horizon, like a shadow, is a statement about the numerical model,
not a safety certificate for the real system; safety-critical use follows the field's
own codes and licensed review.

A map (a built-in model of kind map, such as henon or logistic: 'plumb
models' lists them all; or a system file of kind map) is audited iterate by
iterate instead: the reference is its orbit in double-double arithmetic
(about 32 digits), the rungs are float64 itself, storage at 40 and 24 bits
(precision) and a restart at 0.8 of the horizon (restart); --horizon counts
iterates (default 100), --tol defaults to 0.1, --restart-at is an iterate,
and the exponent is per iterate; map JSON keys: plumb_version, arch,
command, system, settings, units, status, error, trusted_until, t0,
horizon, steps, tol, relative, tol_abs, spread, magnitude, distance,
limited_by (when a rung departs), limiting_rung (when a rung departs),
predicted_horizon (when predicted), verdict, tol_used, growth, exponent
(when estimated), exponent_error (when the estimate failed), rungs, times,
stride, failed, exact_reference (the double-double orbit), shadow (when
--shadow), proof (when --prove), caution, time_unit (iterate: every time is
an iterate). --format csv writes n, then one column per rung, headed by its
id: precision_float64, precision_40bit, precision_24bit, restart. Past 4096
iterates each curve keeps at most 4096 points: a row (and a point of a
rung's divergence in JSON) is the largest distance over stride iterates
from n.

On Ctrl-C, or when the reference run fails, the rungs completed so far are
still written; the exit status is then 1.

Runs made by another program are audited with --run EFFECT[:LABEL]=PATH,
once per run: exactly one with EFFECT ref (the run you trust most), the
others tolerance, method, precision, restart, start (a nudged start),
platform or other. PATH is CSV (a header row; the time is the first column
or --time-column), .npy or JSON Lines ({"t": .., "y": [..]} or named
fields), or - for stdin (--run-format). The runs are compared on the
reference's own times (--every DT: a uniform grid, runs interpolated) over
the intersection of their spans (--horizon cuts it; nothing is
extrapolated); --observe, --scale and --period NAME=P (angles) choose the
distance. The exponent is then fitted to the divergence curves (of the
start runs where there are any): an estimate from the runs. A run equal to
the reference to the last bit is flagged: what it varies did nothing.

--exec COMMAND launches your own program once per rung instead (no
shell): {rtol} and {atol} take each of --tols (the smallest is the
reference's), {perturb} is 0 or --perturb (the nudged-start rung), {out}
is a fresh file the program writes and plumb reads back (--out-ext), and
--vary NAME=EFFECT:V1,V2 adds {NAME} (V1 the reference's). --jobs runs at
a time, each stopped after --time-limit; a run that fails, times out or
writes nothing is a failed rung with its exit status and stderr, and the
others stand. For example:

  plumb trust --exec './convection --rtol {rtol} --atol {atol}
    --perturb {perturb} --out {out} {store}' --vary store=precision:,--float32

The JSON of an audit of runs holds plumb_version, arch, command,
settings, units, status, error, trusted_until and the report's fields as
above, with recorded (span, grid and each run: source, rows,
interpolated, same_as_reference, failure) in place of exact_reference and
reversal. Runs that share a bug agree with each other: this audit
measures numerical effects, not the model's correctness.`,
	model:   "lorenz",
	formats: []string{"table", "json", "csv"},
	plots:   true,
	setup:   setupTrust,
}

// Defaults of plumb trust.
const (
	trustHorizon       = 50 // a few dozen Lyapunov times of the demo: well past its horizon
	trustTol           = 1  // a difference of 1 in the demo's units is visible on a plot
	trustRestartPlaces = 3  // a printout with three decimals
)

// rungGroupName is the --rungs name of the rungs of one kind: the kind
// itself, "tol" for the tolerance rungs.
func rungGroupName(k integrate.RungKind) string {
	if k == integrate.KindTolerance {
		return "tol"
	}
	return k.String()
}

// rungGroupNames are the names --rungs takes for a flow, one per kind of
// integrate.DefaultLadder, in the ladder's order.
func rungGroupNames() []string {
	var out []string
	for _, k := range integrate.DefaultLadder(0, 1).Kinds() {
		out = append(out, rungGroupName(k))
	}
	return out
}

// trustFlags are the flags of plumb trust beyond the shared ones.
type trustFlags struct {
	horizon, tol  float64
	relative      bool
	rungs         string
	restartAt     float64
	restartPlaces int
	exact         bool
	dist          distanceFlags
	maxSteps      int
	// The caller's own run (--method, --rtol, --atol, --step).
	method     string
	rtol, atol float64
	h          float64
	// recorded audits runs made by another program (trust_runs.go).
	recorded runsFlags
	// shadow asks for the shadow of the audited run (--shadow).
	shadow bool
	// prove is the width of the validated enclosure asked for (--prove),
	// 0 for none.
	prove float64
}

// yourRunFlags are the flags that name the caller's own run.
var yourRunFlags = []string{"method", "rtol", "atol", "step"}

func setupTrust(fs *flag.FlagSet, sh *shared) func(context.Context, *call) error {
	f := &trustFlags{}
	finiteVar(fs, &f.horizon, "horizon", trustHorizon, "audit the time span `T` from the start (> 0)")
	finiteVar(fs, &f.tol, "tol", trustTol, "the divergence `TOL` between runs that is still acceptable, in state units (> 0)")
	fs.BoolVar(&f.exact, "exact", true, "compare every run, the tightest float64 one too, with a multiprecision Taylor reference (systems with formulas: every built-in flow and every file); --exact=false takes the tightest float64 run as the reference")
	fs.BoolVar(&f.relative, "relative", false, "read --tol as a fraction of the attractor's size (the reference run's root-mean-square spread)")
	fs.StringVar(&f.rungs, "rungs", strings.Join(rungGroupNames(), ","), "comma-separated `LIST` of the rungs to compare with the reference: "+strings.Join(rungGroupNames(), ", "))
	finiteVar(fs, &f.restartAt, "restart-at", 0, "time `T` of the restart rung, inside the audited span (default 0.8 of --horizon)")
	fs.IntVar(&f.restartPlaces, "restart-places", trustRestartPlaces, "the restart rung rounds the state to `K` decimal places")
	addDistanceFlags(fs, &f.dist)
	fs.StringVar(&f.method, "method", methods[0].name, "the integration `METHOD` of your own run, which is then audited (see 'plumb help solve'; with --rtol, --atol or --step alone, dp54)")
	finiteVar(fs, &f.rtol, "rtol", integrate.DefaultRelTol, "relative tolerance `RTOL` of your own run (audited around it); 0 means the SDK's "+formatFloat(integrate.DefaultRelTol))
	finiteVar(fs, &f.atol, "atol", integrate.DefaultAbsTol, "absolute tolerance `ATOL` of your own run, in state units; 0 means the SDK's "+formatFloat(integrate.DefaultAbsTol))
	finiteVar(fs, &f.h, "step", 0, "step size `H` of your own run's fixed-step method (-h is help)")
	fs.IntVar(&f.maxSteps, "max-steps", integrate.DefaultMaxSteps, "at most `N` attempted steps per run (long horizons need more: the reference takes about 80 per time unit on the demo)")
	addRunsFlags(fs, &f.recorded)
	fs.BoolVar(&f.shadow, "shadow", false, "also look for a true orbit of the model near the audited run, and say how close it stays and up to when")
	finiteVar(fs, &f.prove, "prove", 0, "also enclose the audited trajectory in intervals and prove up to when its width stays below `WIDTH` (state units, > 0; systems with formulas)")
	return func(ctx context.Context, cl *call) error { return f.run(ctx, cl) }
}

// ladder builds the audit ladder the flags ask for on [t0, t0+horizon].
func (f *trustFlags) ladder(cl *call, t0 float64) (integrate.Ladder, []string, error) {
	t1 := t0 + f.horizon
	def := integrate.DefaultLadder(t0, t1)
	kinds, want, err := pickRungs(cl, f.rungs, def.Kinds(), "run")
	if err != nil {
		return integrate.Ladder{}, nil, err
	}
	at := t0 + float64(integrate.RestartFraction*f.horizon)
	if cl.sh.given["restart-at"] {
		at = f.restartAt
		if !(at > t0 && at < t1) {
			return integrate.Ladder{}, nil, usagef("--restart-at %s: must lie strictly inside the audited span (%s, %s)", formatFloat(at), formatFloat(t0), formatFloat(t1))
		}
	}
	places := integrate.Places(f.restartPlaces)
	if err := places.Validate(); err != nil {
		return integrate.Ladder{}, nil, usagef("--restart-places %d: %v", f.restartPlaces, err)
	}
	if run, ok, err := f.yourRun(cl); err != nil {
		return integrate.Ladder{}, nil, err
	} else if ok {
		// The SDK validates the run and builds the ladder around it; the
		// run itself is always compared.
		if def, err = integrate.RunLadder(t0, t1, run); err != nil {
			return integrate.Ladder{}, nil, usagef("--%s: %v", strings.Join(givenOf(cl, yourRunFlags), ", --"), err)
		}
	}
	return def.Select(kinds...).WithRestart(at, places), want, nil
}

// pickRungs reads --rungs (list) against the kinds the audit has, in their
// order: the kinds chosen and their names as given. "reference", "ref" and
// plumb.TightestID name the reference, which is always there; what is the
// audited thing ("run" or "orbit") fills the messages.
func pickRungs(cl *call, list string, kinds []integrate.RungKind, what string) ([]integrate.RungKind, []string, error) {
	names := make([]string, len(kinds))
	for i, k := range kinds {
		names[i] = rungGroupName(k)
	}
	var chosen []integrate.RungKind
	var want []string
	seen := map[string]bool{}
	for _, name := range strings.Split(list, ",") {
		name = strings.TrimSpace(name)
		i := slices.Index(names, name)
		switch {
		case name == "" || name == "reference" || name == "ref" || name == plumb.TightestID:
			// Always there: it is what the rungs are compared with.
			continue
		case i < 0:
			return nil, nil, usagef("--rungs %s: unknown rung %q (known: %s)", list, name, strings.Join(names, ", "))
		case seen[name]:
			return nil, nil, usagef("--rungs %s: %q is named twice", list, name)
		}
		seen[name] = true
		want = append(want, name)
		chosen = append(chosen, kinds[i])
	}
	if len(want) == 0 {
		return nil, nil, usagef("--rungs %q leaves only the reference %s: an audit compares at least one rung with it (choose from %s)", list, what, strings.Join(names, ", "))
	}
	if !seen["restart"] && (cl.sh.given["restart-at"] || cl.sh.given["restart-places"]) {
		return nil, nil, usagef("--restart-at and --restart-places set the restart rung, which --rungs %s leaves out", list)
	}
	return chosen, want, nil
}

// yourRun is the caller's own run named by --method, --rtol, --atol and
// --step; ok is false when none of them was given.
func (f *trustFlags) yourRun(cl *call) (run integrate.Rung, ok bool, err error) {
	if len(givenOf(cl, yourRunFlags)) == 0 {
		return run, false, nil
	}
	m, im, err := pickMethod(f.method, f.h, cl.sh.given["step"])
	if err != nil {
		return run, false, err
	}
	if m.fixed {
		return integrate.Rung{Fixed: m.make, Step: f.h}, true, nil
	}
	// The SDK's rules, its defaults for zeros (as in every command).
	s := &integrate.Settings{RelTol: f.rtol, AbsTol: f.atol}
	if err := s.Validate(); err != nil {
		return run, false, settingUsage(err, trustSettingFlags)
	}
	eff := s.WithDefaults()
	return integrate.Rung{Method: im, RelTol: eff.RelTol, AbsTol: eff.AbsTol}, true, nil
}

// trustSettingFlags names the flag that sets each integrate.Settings field
// of your own run.
var trustSettingFlags = map[string]string{"RelTol": "rtol", "AbsTol": "atol"}

// givenOf lists the flags of names given on the command line.
func givenOf(cl *call, names []string) []string {
	var out []string
	for _, n := range names {
		if cl.sh.given[n] {
			out = append(out, n)
		}
	}
	return out
}

// trustGrid is the number of intervals of the comparison grid (the audit's
// default, horizon/1000).
const trustGrid = 1000

func (f *trustFlags) run(ctx context.Context, cl *call) error {
	if cl.sh.given["shard"] && !cl.sh.given["exec"] {
		return usagef("--shard %s: applies to --exec runs only (the built-in audit is not split)", f.recorded.exec.shard)
	}
	if f.recorded.active(cl) {
		if f.shadow {
			return usagef("--shadow: shadows a run plumb makes itself, not runs read with --run or made with --exec")
		}
		if cl.sh.given["prove"] {
			return usagef("--prove: encloses a system's formulas, not runs read with --run or made with --exec")
		}
		return f.runRecorded(ctx, cl)
	}
	if !(f.horizon > 0) {
		return usagef("--horizon %s: must be > 0", formatFloat(f.horizon))
	}
	if !(f.tol > 0) {
		return usagef("--tol %s: must be > 0", formatFloat(f.tol))
	}
	if cl.sh.given["prove"] && !(f.prove > 0) {
		return usagef("--prove %s: must be > 0", formatFloat(f.prove))
	}
	sys, err := cl.sh.loadSystem(cl.sh.model)
	if err != nil {
		return err
	}
	dist, err := f.dist.distance(cl, sys)
	if err != nil {
		return err
	}
	if sys.Kind() == plumb.KindMap {
		return f.runMap(ctx, cl, sys, dist)
	}
	p := sys.Problem()
	if m, ok := findMethod(f.method); ok && len(givenOf(cl, yourRunFlags)) > 0 {
		if err := m.fits(sys); err != nil {
			return err
		}
	}
	ladder, names, err := f.ladder(cl, p.T0)
	if err != nil {
		return err
	}
	if f.maxSteps < 1 {
		return usagef("--max-steps %d: must be >= 1", f.maxSteps)
	}
	settings := &plumb.TrustSettings{Tol: f.tol, Relative: f.relative, Ladder: &ladder, Distance: dist, MaxSteps: f.maxSteps, NoExact: !f.exact, Shadow: f.shadow, Prove: f.prove}
	echo := trustSettingsJSON{
		Horizon: f.horizon, Tol: f.tol, Relative: f.relative, Rungs: names,
		Exact: f.exact && sys.HasFormulas(), Every: f.horizon / trustGrid, Prove: f.prove,
	}
	echo.Observe, echo.Scales = echoDistance(sys, dist)
	for _, r := range ladder.Rungs {
		if r.Kind == integrate.KindRestart {
			echo.RestartAt, echo.RestartPlaces = r.RestartAt, f.restartPlaces
		}
	}
	if run, ok, _ := f.yourRun(cl); ok {
		echo.Method = f.method
		if run.Fixed != nil {
			echo.Step = run.Step
		} else {
			echo.RelTol, echo.AbsTol = run.RelTol, run.AbsTol
		}
	}
	units := trustUnits
	units.Time = describe(sys).timeUnit(trustUnits.Time)
	return cl.runJob(ctx, f.systemJob(sys, f.horizon, settings, "run", func(rep *plumb.Report, runErr error) any {
		return newTrustJSON(sys, echo, units, rep, runErr)
	}))
}

// systemJob is the job of auditing sys with System.Trust over horizon
// (time units, or iterates for a map), reporting its stages; compared
// names what the wall-time line counts, wrap makes the JSON. A relative
// tolerance that the reference run leaves without a size (a fixed point
// has no spread) is a usage error naming --relative.
func (f *trustFlags) systemJob(sys *plumb.System, horizon float64, settings *plumb.TrustSettings, compared string, wrap func(*plumb.Report, error) any) job {
	return trustJob(auditJob{
		what:     "the audit of " + sys.Name,
		compared: compared,
		progress: true,
		proof:    settings.Prove > 0,
		audit: func(ctx context.Context, stage func(plumb.Stage, int, int)) (*plumb.Report, error) {
			settings.Progress = stage
			rep, err := sys.Trust(ctx, horizon, settings)
			if rep != nil && err != nil && f.relative && errors.Is(err, integrate.ErrSettings) && len(rep.Rungs) == 0 {
				// Found only once the reference run has been made.
				return nil, usagef("--relative: %v; give --tol in state units instead", err)
			}
			return rep, err
		},
		wrap: wrap,
		head: systemHead(sys),
	})
}
