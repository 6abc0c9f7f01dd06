package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
)

var solveCmd = &command{
	name:    "solve",
	summary: "integrate a system and write its samples and crossings",
	doc: `Integrate a system from --t0 to --t1 with error control and write the
state every --dt (or at every accepted step with --dt 0), with the times at
which a state component crosses a value (--cross-state x=0).

Rows are written as they are computed, in every format, so memory stays
flat whatever the span (crossings, far fewer, are kept until the end; --plot
keeps the samples to draw them). The table and CSV give 10 and 17
significant digits; JSON, JSON Lines and CSV hold the shortest decimals that
read back to the same bits. --format json writes one object, what is known
at the end last; JSON keys: plumb_version, arch, command, system (with the
parameters as used), settings (echoed), units, samples, crossings, status,
error (null unless the run failed or was canceled), end, final, stats.
--format jsonl writes one line of the keys before samples, then one line
{"t": T, "y": [...]} per sample, then one line of the keys after them.
--format npy writes NumPy's .npy: the samples as an N x (1+d) float64 array,
the time first; the status and error go to stderr (with the exit status),
crossings are refused (write them with csv, json or jsonl). On a file the
row count is set at the end; on a pipe it is the grid's, announced up
front, and rows a run did not reach are NaN; --dt 0 (a count known only at
the end) needs a file.

The step budget (--max-steps) follows the span unless given: the default
run's budget per unit of time, so a longer span never stops short for want
of steps; a fixed step that cannot finish within a given budget is refused
before the run.

A map (a built-in model of kind map, such as henon or logistic: 'plumb
models' lists them all; or a system file of kind map) is iterated instead:
--steps N writes the iterates n = 0..N (angles reduced to [0, period)); the
table and CSV have the columns n and the states; map JSON keys:
plumb_version, arch, command, system, settings, units, status, error, end,
final, orbit; --format jsonl writes the keys before orbit on the first
line, one line {"n": N, "x": [...]} per iterate, then the keys after it;
--format npy the iterates as an N x (1+d) array, n first. --plot draws the
orbit as dots (the first two components against each other; for one
component x_(n+1) against x_n). The time and integrator flags are for flows
only.

On Ctrl-C, or when the integration fails, the samples computed so far are
still written; the exit status is then 1.`,
	model:   "lorenz",
	formats: []string{"table", "json", "csv", "jsonl", "npy"},
	plots:   true,
	setup:   setupSolve,
}

// solveFlags are the flags of plumb solve beyond the shared ones.
type solveFlags struct {
	t0, t1, dt float64
	rtol, atol float64
	method     string
	h          float64
	maxSteps   int
	cross      crossList
	sense      string
	rows       string
	steps      int
	// axes names two state components: --plot then draws the second
	// against the first (a projection of the orbit) instead of the
	// states against time.
	axes     string
	axisList []string
	// format is --format, for the map side (maps.go), which writes
	// jsonl and npy through orbitRows.
	format string
}

// Defaults of plumb solve, echoed in every result.
const (
	solveT1 = 20   // a few dozen Lyapunov times of the convection demo
	solveDt = 0.01 // sampling interval
	// solveRtol and solveAtol are the tightest tolerance rung of plumb
	// trust's default ladder, so that the default run is one the audit
	// vouches for: at the SDK's default (integrate.DefaultRelTol, 1e-6)
	// the audit of the convection demo parts from the reference at
	// t = 18.3 < solveT1 (plumb trust --horizon 20), at 1e-10 it agrees
	// to the end.
	solveRtol = integrate.TightRelTol
	solveAtol = integrate.TightRelTol
	// maxSamples bounds the rows one solve writes; beyond it --dt is
	// surely a typo.
	maxSamples = 10_000_000
)

func setupSolve(fs *flag.FlagSet, sh *shared) func(context.Context, *call) error {
	f := &solveFlags{}
	finiteVar(fs, &f.t0, "t0", 0, "start time `T0`, the time of the start state")
	finiteVar(fs, &f.t1, "t1", solveT1, "end time `T1`; below --t0 integrates backwards")
	finiteVar(fs, &f.dt, "dt", solveDt, "sampling interval `DT`; 0 writes every accepted step instead")
	finiteVar(fs, &f.rtol, "rtol", solveRtol, "relative tolerance `RTOL` of the local error test; by default the tightest tolerance rung of 'plumb trust', 0 means the SDK's "+formatFloat(integrate.DefaultRelTol))
	finiteVar(fs, &f.atol, "atol", solveAtol, "absolute tolerance `ATOL` of the local error test, in state units; 0 means the SDK's "+formatFloat(integrate.DefaultAbsTol))
	fs.StringVar(&f.method, "method", methods[0].name, methodHelp())
	finiteVar(fs, &f.h, "step", 0, "step size `H` of a fixed-step method (-h is help)")
	fs.IntVar(&f.maxSteps, "max-steps", 0, "at most `N` attempted steps; the run fails beyond them (default 0: the budget follows the span, "+formatFloat(stepsPerTime)+" steps per unit of time, at least "+strconv.Itoa(integrate.DefaultMaxSteps)+", and for a fixed step at least the steps its span needs; a fixed step that cannot finish within a given N is refused before the run)")
	fs.Var(&f.cross, "cross-state", "find the times at which a state crosses a value, given as `NAME=VALUE` (repeatable)")
	fs.StringVar(&f.sense, "cross-sense", "either", "`SENSE` of the crossings that count: rising, falling or either")
	fs.StringVar(&f.rows, "rows", "samples", "`ROWS` that --format csv writes: samples or crossings")
	fs.IntVar(&f.steps, "steps", mapSteps, "iterate a map `N` times, writing iterates 0..N (maps only)")
	fs.StringVar(&f.axes, "axes", "", "two state `NAMES` X,Y: --plot draws Y against X, a projection of the orbit, instead of the states against time (a map's default is its first two states)")
	return func(ctx context.Context, cl *call) error { return f.run(ctx, cl) }
}

// solveSettingFlags names the flag that sets each integrate.Settings field
// plumb solve sets.
var solveSettingFlags = map[string]string{"RelTol": "rtol", "AbsTol": "atol", "MaxSteps": "max-steps", "Every": "dt"}

// crossSpec is one --cross-state NAME=VALUE.
type crossSpec struct {
	state string
	value float64
}

// crossList is the repeatable --cross-state flag.
type crossList []crossSpec

func (l *crossList) String() string {
	if l == nil {
		return ""
	}
	parts := make([]string, len(*l))
	for i, c := range *l {
		parts[i] = c.label()
	}
	return strings.Join(parts, ",")
}

// Set parses NAME=VALUE.
func (l *crossList) Set(s string) error {
	name, val, ok := strings.Cut(s, "=")
	name = strings.TrimSpace(name)
	if !ok || name == "" {
		return fmt.Errorf("want NAME=VALUE, e.g. x=0")
	}
	v, err := parseFinite(val)
	if err != nil {
		return fmt.Errorf("state %s: %v", name, err)
	}
	*l = append(*l, crossSpec{state: name, value: v})
	return nil
}

func (c crossSpec) label() string { return c.state + "=" + formatFloat(c.value) }

var senses = map[string]integrate.Sense{"either": integrate.Either, "rising": integrate.Rising, "falling": integrate.Falling}

// solveJSON is the --format json result of plumb solve: what is known
// before the run, the samples as they are computed, then what is known
// at the end. The keys come in that order so that the document streams.
type solveJSON struct {
	solveHeadJSON
	// Samples holds the state at the sampling times (or accepted steps).
	Samples []sampleJSON `json:"samples"`
	solveTailJSON
}

// solveHeadJSON opens a solve result: what is known before the run (the
// first line of --format jsonl).
type solveHeadJSON struct {
	header
	// System is the system integrated, with the parameters as used.
	System systemJSON `json:"system"`
	// Settings echoes the flags that shaped the run, defaults included.
	Settings solveSettingsJSON `json:"settings"`
	// Units says in what units the numbers are.
	Units solveUnitsJSON `json:"units"`
}

// solveTailJSON closes a solve result: what is known at the end (the last
// line of --format jsonl).
type solveTailJSON struct {
	// Crossings holds the located crossings in time order.
	Crossings []crossingJSON `json:"crossings"`
	// Status is completed, canceled or failed.
	Status string `json:"status"`
	// Error says why a run that did not complete stopped (null when it
	// completed).
	Error errText `json:"error"`
	// End is the last time reached and Final the state there.
	End   float64   `json:"end"`
	Final []float64 `json:"final"`
	// Stats counts the work done.
	Stats statsJSON `json:"stats"`
}

// solveSettingsJSON echoes the settings of a solve, defaults included.
type solveSettingsJSON struct {
	T0 float64 `json:"t0"`
	T1 float64 `json:"t1"`
	// Dt is the sampling interval; 0 means the samples are the accepted steps.
	Dt float64 `json:"dt"`
	// Sampling is "grid" (t0 + i*dt, and t1) or "steps".
	Sampling string  `json:"sampling"`
	RelTol   float64 `json:"rtol"`
	AbsTol   float64 `json:"atol"`
	// Method is the --method name, MethodName its published name.
	Method     string `json:"method"`
	MethodName string `json:"method_name"`
	// Step is the step size h of a fixed-step method, 0 for adaptive ones.
	Step       float64          `json:"step"`
	MaxSteps   int              `json:"max_steps"`
	CrossState []crossStateJSON `json:"cross_state"`
	CrossSense string           `json:"cross_sense"`
}

// crossStateJSON is one --cross-state: the state and the value it crosses.
type crossStateJSON struct {
	State string  `json:"state"`
	Value float64 `json:"value"`
}

// solveUnitsJSON says in what units the numbers of a solve result are.
type solveUnitsJSON struct {
	Time  string `json:"time"`
	State string `json:"state"`
	RTol  string `json:"rtol"`
	ATol  string `json:"atol"`
}

var solveUnits = solveUnitsJSON{
	Time:  "the model's time unit (t0, t1, dt, step, end, samples[].t, crossings[].t)",
	State: "each state component in the model's own unit (start, final, samples[].y, crossings[].y)",
	RTol:  "dimensionless",
	ATol:  "state units",
}

// statsJSON counts the work of a solve (counts only: deterministic).
type statsJSON struct {
	Evaluations int `json:"evaluations"`
	Accepted    int `json:"accepted_steps"`
	Rejected    int `json:"rejected_steps"`
	NonFinite   int `json:"non_finite_rejections"`
	// Stiff is true when the stiffness test fired, from StiffAt on.
	Stiff   bool     `json:"stiff"`
	StiffAt *float64 `json:"stiff_at,omitempty"`
}

// sampleJSON is the state Y at time T.
type sampleJSON struct {
	T float64   `json:"t"`
	Y []float64 `json:"y"`
}

// crossingJSON is one located crossing: the state Y at time T.
type crossingJSON struct {
	// Crossing is the --cross-state it belongs to, e.g. "x=0".
	Crossing string    `json:"crossing"`
	Sense    string    `json:"sense"`
	T        float64   `json:"t"`
	Y        []float64 `json:"y"`
}

// solveRun is a solve: its settings, then as it runs the samples written,
// and at the end the solution and why it stopped.
type solveRun struct {
	f     *solveFlags
	sys   *plumb.System
	m     method
	im    integrate.Method
	sol   *integrate.Solution
	cross []crossSpec
	n     int                // samples (or accepted steps with --dt 0) written
	rows  []integrate.Sample // the samples, kept only for --plot
	err   error              // why the run did not complete
}

func (f *solveFlags) run(ctx context.Context, cl *call) error {
	if err := choice("cross-sense", f.sense, "either", "rising", "falling"); err != nil {
		return err
	}
	if err := choice("rows", f.rows, "samples", "crossings"); err != nil {
		return err
	}
	if cl.sh.given["rows"] && cl.sh.format != "csv" {
		return usagef("--rows %s: only --format csv chooses its rows (table and json hold both)", f.rows)
	}
	if f.rows == "crossings" && len(f.cross) == 0 {
		return usagef("--rows crossings: give --cross-state NAME=VALUE to say which crossings")
	}
	sys, err := cl.sh.loadSystem(cl.sh.model)
	if err != nil {
		return err
	}
	if err := f.pickAxes(cl, sys); err != nil {
		return err
	}
	if sys.Kind() == plumb.KindMap {
		f.format = cl.sh.format
		if f.format == "npy" && isTerminal(cl.rawStdout) && !isDevNull(cl.rawStdout) {
			return usagef("--format npy writes binary data, not for a terminal: redirect stdout to a file (plumb solve --format npy > orbit.npy)")
		}
		return f.runMap(ctx, cl, sys)
	}
	if cl.sh.given["steps"] {
		return usagef("--steps %d: %s is a %s; --steps counts the iterates of a map (a flow runs from --t0 to --t1)", f.steps, sys.Name, sys.Kind())
	}
	m, im, err := pickMethod(f.method, f.h, cl.sh.given["step"])
	if err != nil {
		return err
	}
	if err := m.fits(sys); err != nil {
		return err
	}
	if f.t1 == f.t0 {
		return usagef("--t1 %s equals --t0: the time span is empty", formatFloat(f.t1))
	}
	span := math.Abs(f.t1 - f.t0)
	if f.dt > 0 && span/f.dt > maxSamples {
		return usagef("--dt %s: would write %.3g samples over a span of %s (at most %d)", formatFloat(f.dt), span/f.dt, formatFloat(span), maxSamples)
	}
	if err := f.budget(m, span, cl.sh.given["max-steps"]); err != nil {
		return err
	}
	if cl.sh.format == "npy" && len(f.cross) > 0 {
		return usagef("--cross-state %s: --format npy holds the samples only; write the crossings with --format csv --rows crossings, json or jsonl", f.cross.String())
	}
	var crossings []integrate.Crossing
	for _, c := range f.cross {
		i := stateIndex(sys, c.state)
		if i < 0 {
			return usagef("--cross-state %s: model %s has no state %q (states: %s)", c.label(), sys.Name, c.state, strings.Join(sys.States, ", "))
		}
		v := c.value
		crossings = append(crossings, integrate.Crossing{
			Name:  c.label(),
			G:     func(_ float64, y []float64) float64 { return y[i] - v },
			Sense: senses[f.sense],
		})
	}

	p := sys.Problem()
	p.T0 = f.t0
	s := &integrate.Settings{
		RelTol: f.rtol, AbsTol: f.atol, MaxSteps: f.maxSteps,
		Every: f.dt, DropSteps: true, Crossings: crossings,
	}
	if err := s.Validate(); err != nil {
		return settingUsage(err, solveSettingFlags)
	}
	// Echo the tolerances the run uses (0 stands for the SDK's default).
	eff := s.WithDefaults()
	f.rtol, f.atol = eff.RelTol, eff.AbsTol
	r := &solveRun{f: f, sys: sys, m: m, im: im, cross: f.cross}
	sink, err := r.newSink(cl, integrate.SampleCount(f.t0, f.t1, s))
	if err != nil {
		return err
	}
	keep := cl.sh.plot != ""
	return cl.runJob(ctx, job{
		what:    "the integration of " + sys.Name,
		refusal: "the integrator refused the settings",
		span:    &[2]float64{f.t0, f.t1},
		reword:  m.reword(sys),
		run: func(ctx context.Context, progress func(float64)) (*outcome, error) {
			s.Progress = progress
			sol, err := integrate.Stream(ctx, p, f.t1, im, s, func(t float64, y []float64) error {
				r.n++
				if keep {
					r.rows = append(r.rows, integrate.Sample{T: t, Y: append([]float64(nil), y...)})
				}
				return sink.sample(t, y)
			})
			if sol == nil {
				// Nothing was stepped: the input was refused or the field failed at the start.
				return nil, err
			}
			r.sol, r.err = sol, err
			return r.result(span, sink), nil
		},
	})
}

// budget sets --max-steps when it was not given (or given as 0) so that
// it follows the span: the default run's budget per unit of time, and for
// a fixed step at least the steps its span needs. A budget given that a
// fixed step cannot finish within is refused before any work.
func (f *solveFlags) budget(m method, span float64, given bool) error {
	if f.maxSteps < 0 {
		return nil // the settings' check words it
	}
	need := 0.0
	if m.fixed {
		need = math.Ceil(span / f.h)
	}
	if given && f.maxSteps > 0 {
		if m.fixed && need > float64(f.maxSteps) {
			return usagef("--max-steps %d: a fixed step of %s takes %.0f steps over the span of %s; raise --max-steps to at least that, take a larger --step, or leave --max-steps out", f.maxSteps, formatFloat(f.h), need, formatFloat(span))
		}
		return nil
	}
	need++ // a last step of a sliver, where rounding leaves one
	b := math.Max(float64(integrate.DefaultMaxSteps), math.Ceil(span*stepsPerTime))
	b = math.Max(b, need)
	if b > maxBudget {
		return usagef("--t1 %s: a span of %s needs a step budget beyond %.3g steps; integrate a shorter span", formatFloat(f.t1), formatFloat(span), float64(maxBudget))
	}
	f.maxSteps = int(b)
	return nil
}

// The default step budget of a flow follows the span: the SDK's default
// budget for the default span, per unit of time.
const (
	stepsPerTime = float64(integrate.DefaultMaxSteps) / solveT1
	// maxBudget keeps the budget an exact int on every platform (and
	// beyond any run that could finish).
	maxBudget = min(1<<52, math.MaxInt)
)

// result is the run ready to finish writing: the error worded with what
// was written; span is |t1 - t0|.
func (r *solveRun) result(span float64, sink solveSink) *outcome {
	f, sol := r.f, r.sol
	finish := func(w io.Writer) error { return sink.finish(r) }
	res := &outcome{
		tail:  finish,
		chart: r.chart,
		done:  count(r.n, "sample") + ", " + count(len(sol.Hits), "crossing") + ", " + count(sol.Stats.Accepted, "step"),
	}
	// A JSON Lines result ends with its own status record: a partial
	// --out file needs no mark beside it.
	_, res.marked = sink.(*jsonlSink)
	if sol.Stats.Stiff {
		res.warnings = append(res.warnings, fmt.Sprintf("the run looks stiff from t=%g on: the step size is limited by stability, not accuracy", sol.Stats.StiffAt))
	}
	if err := r.err; err != nil {
		if werr := sink.failed(); werr != nil {
			// The output broke: say that, not that the integration failed.
			res.err = fmt.Errorf("writing the results failed at t=%g: %w", sol.End, werr)
			return res
		}
		what := "failed"
		if sol.Status == integrate.Canceled {
			what = "was canceled"
		}
		err = fmt.Errorf("integrating %s from t=%g to %g %s at t=%g (%s up to there written): %w",
			r.sys.Name, f.t0, f.t1, what, sol.End, count(r.n, "sample"), err)
		if r.m.fixed && errors.Is(err, integrate.ErrStepBudget) {
			// A fixed step has no tolerance to loosen: the span fixes the count.
			need := math.Ceil(span / f.h)
			err = &hintError{err: err, hint: fmt.Sprintf("a fixed step of %s takes %.0f steps over the span of %s: raise --max-steps to at least that, or take a larger --step", formatFloat(f.h), need, formatFloat(span))}
		}
		res.err = err
	}
	return res
}

// stateIndex returns the index of the named state, or -1.
func stateIndex(sys *plumb.System, name string) int {
	for i, n := range sys.States {
		if n == name {
			return i
		}
	}
	return -1
}

// head is what a solve result says before the run.
func (r *solveRun) head() solveHeadJSON {
	out := solveHeadJSON{
		header: newHeader("solve"),
		System: describe(r.sys),
		Settings: solveSettingsJSON{
			T0: r.f.t0, T1: r.f.t1, Dt: r.f.dt, Sampling: "grid",
			RelTol: r.f.rtol, AbsTol: r.f.atol,
			Method: r.m.name, MethodName: r.im.Name(), Step: r.f.h,
			MaxSteps: r.f.maxSteps, CrossState: []crossStateJSON{}, CrossSense: r.f.sense,
		},
		Units: solveUnits,
	}
	out.Units.Time = out.System.timeUnit(solveUnits.Time)
	if r.f.dt == 0 {
		out.Settings.Sampling = "steps"
	}
	for _, c := range r.cross {
		out.Settings.CrossState = append(out.Settings.CrossState, crossStateJSON{State: c.state, Value: c.value})
	}
	return out
}

// tail is what a solve result says at the end.
func (r *solveRun) tail() solveTailJSON {
	sol := r.sol
	out := solveTailJSON{
		Status: sol.Status.String(),
		End:    sol.End, Final: sol.Final,
		Stats: statsJSON{
			Evaluations: sol.Stats.Evaluations, Accepted: sol.Stats.Accepted,
			Rejected: sol.Stats.Rejected, NonFinite: sol.Stats.NonFinite, Stiff: sol.Stats.Stiff,
		},
		Crossings: make([]crossingJSON, len(sol.Hits)),
	}
	if r.err != nil {
		out.Error = errText(r.err.Error())
	}
	if sol.Stats.Stiff {
		at := sol.Stats.StiffAt
		out.Stats.StiffAt = &at
	}
	for i, h := range sol.Hits {
		out.Crossings[i] = crossingJSON{Crossing: r.cross[h.Which].label(), Sense: h.Sense.String(), T: h.T, Y: h.Y}
	}
	return out
}

// pickAxes checks --axes: two distinct states of sys, and a --plot to
// draw them on.
func (f *solveFlags) pickAxes(cl *call, sys *plumb.System) error {
	if !cl.sh.given["axes"] {
		return nil
	}
	if cl.sh.plot == "" {
		return usagef("--axes %s: give --plot FILE too; it names that picture's axes", f.axes)
	}
	list, err := nameList("axes", f.axes, sys)
	if err != nil {
		return err
	}
	if len(list) != 2 {
		return usagef("--axes %s: name two states, X,Y (states: %s)", f.axes, strings.Join(sys.States, ", "))
	}
	f.axisList = list
	return nil
}

// chart draws the state components against time, or with --axes X,Y the
// path of (X, Y).
func (r *solveRun) chart() *lineChart {
	if len(r.f.axisList) == 2 {
		return r.projection()
	}
	c := &lineChart{
		Title:  fmt.Sprintf("%s: state against time", r.sys.Title),
		XLabel: "t",
		YLabel: "state",
	}
	ts := make([]float64, len(r.rows))
	for i, s := range r.rows {
		ts[i] = s.T
	}
	for k, n := range r.sys.States {
		ys := make([]float64, len(r.rows))
		for i, s := range r.rows {
			ys[i] = s.Y[k]
		}
		c.Series = append(c.Series, series{Name: n, X: ts, Y: ys})
	}
	return c
}

// projection draws the samples' path in the plane of the two --axes
// components, labelled with their names and units.
func (r *solveRun) projection() *lineChart {
	ix, iy := stateIndex(r.sys, r.f.axisList[0]), stateIndex(r.sys, r.f.axisList[1])
	d := describe(r.sys)
	s := series{Name: "path, t = " + formatFloat(r.f.t0) + " to " + formatFloat(r.f.t1), X: make([]float64, len(r.rows)), Y: make([]float64, len(r.rows))}
	for i, smp := range r.rows {
		s.X[i], s.Y[i] = smp.Y[ix], smp.Y[iy]
	}
	return &lineChart{
		Title:  fmt.Sprintf("%s: %s against %s", r.sys.Title, r.f.axisList[1], r.f.axisList[0]),
		XLabel: withUnit(d.States[ix].Name, d.States[ix].Unit),
		YLabel: withUnit(d.States[iy].Name, d.States[iy].Unit),
		Series: []series{s},
	}
}
