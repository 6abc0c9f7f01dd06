package main

// plumb trust on runs computed by another program: files named by --run,
// or a program launched once per rung by --exec (trust_exec.go). Both end
// in plumb.TrustRuns and write the same table, JSON, CSV and chart as the
// built-in audit.

import (
	"context"
	"flag"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"github.com/plumbdyn/plumb"
)

// runsFlags are the flags of plumb trust that audit recorded runs.
type runsFlags struct {
	runs      runList
	timeCol   string
	names     string
	periods   paramList
	every     float64
	runFormat string
	exec      execFlags
}

// addRunsFlags registers the recorded-runs flags on fs.
func addRunsFlags(fs *flag.FlagSet, r *runsFlags) {
	fs.Var(&r.runs, "run", "audit a run another program wrote, given as `SPEC` EFFECT[:LABEL]=PATH (repeatable): EFFECT is ref (the run the others are compared with; exactly one) or "+
		strings.Join(effectNames(), ", ")+"; PATH is .csv, .npy, .jsonl or - (stdin, see --run-format); LABEL defaults to the file's base name")
	fs.StringVar(&r.timeCol, "time-column", "", "the time column `NAME` of --run files (default: the first CSV column, \"t\" in JSON Lines, column 0 of .npy)")
	fs.StringVar(&r.names, "names", "", "comma-separated `LIST` of the names of the columns of .npy runs (the time's too) or of the \"y\" array of JSON Lines runs")
	fs.Var(&r.periods, "period", "column NAME of the runs is an angle with period P, given as `NAME=P` (repeatable; differences are wrapped)")
	finiteVar(fs, &r.every, "every", 0, "compare the runs on a grid every `DT` apart, interpolating them (default: the reference run's own times)")
	fs.StringVar(&r.runFormat, "run-format", "csv", "format `F` of a run read from stdin (--run EFFECT=-): csv, npy or jsonl")
	addExecFlags(fs, &r.exec)
}

// effectNames are the effects --run takes besides ref.
func effectNames() []string {
	out := make([]string, len(plumb.RunEffects))
	for i, e := range plumb.RunEffects {
		out[i] = string(e)
	}
	return out
}

// runSpec is one --run EFFECT[:LABEL]=PATH.
type runSpec struct {
	ref    bool
	effect plumb.RunEffect
	label  string
	path   string
}

// runList is the repeatable --run flag.
type runList []runSpec

func (l *runList) String() string {
	if l == nil {
		return ""
	}
	parts := make([]string, len(*l))
	for i, r := range *l {
		e := string(r.effect)
		if r.ref {
			e = "ref"
		}
		parts[i] = e + ":" + r.label + "=" + r.path
	}
	return strings.Join(parts, ",")
}

// Set parses EFFECT[:LABEL]=PATH.
func (l *runList) Set(s string) error {
	head, path, ok := strings.Cut(s, "=")
	if !ok || strings.TrimSpace(path) == "" {
		return fmt.Errorf("want EFFECT[:LABEL]=PATH, e.g. ref=tight.csv or tol:loose=loose.csv")
	}
	eff, label, _ := strings.Cut(head, ":")
	eff, label = strings.TrimSpace(eff), strings.TrimSpace(label)
	spec := runSpec{label: label, path: path}
	switch eff {
	case "ref", "reference":
		spec.ref = true
	default:
		e, ok := plumb.ParseRunEffect(eff)
		if !ok {
			return fmt.Errorf("effect %q: want ref or one of %s", eff, strings.Join(effectNames(), ", "))
		}
		spec.effect = e
	}
	if spec.label == "" {
		base := filepath.Base(path)
		spec.label = strings.TrimSuffix(base, filepath.Ext(base))
		if strings.TrimSpace(spec.label) == "" {
			spec.label = base // a name that is all extension, ".0"
		}
		if path == "-" {
			spec.label = "stdin"
		}
	}
	*l = append(*l, spec)
	return nil
}

// runsModeConflicts are the flags of the built-in audit that mean nothing
// for recorded runs.
var runsModeConflicts = []string{"model", "file", "set", "start", "rungs", "exact", "restart-at", "restart-places", "method", "rtol", "atol", "step", "max-steps"}

// active reports whether the command line asks for an audit of recorded
// runs.
func (r *runsFlags) active(cl *call) bool {
	return len(r.runs) > 0 || cl.sh.given["exec"]
}

// readOptions are the --time-column and --column-names choices.
func (r *runsFlags) readOptions() plumb.RunReadOptions {
	opt := plumb.RunReadOptions{Time: r.timeCol}
	if r.names != "" {
		for _, n := range strings.Split(r.names, ",") {
			opt.Names = append(opt.Names, strings.TrimSpace(n))
		}
	}
	return opt
}

// runRecorded audits recorded runs: the --run files, or the runs of
// --exec.
func (f *trustFlags) runRecorded(ctx context.Context, cl *call) error {
	r := &f.recorded
	for _, name := range runsModeConflicts {
		if cl.sh.given[name] {
			what := "--run"
			if cl.sh.given["exec"] {
				what = "--exec"
			}
			return usagef("--%s: does not apply to the audit of recorded runs (%s)", name, what)
		}
	}
	if len(r.runs) > 0 && cl.sh.given["exec"] {
		return usagef("--run and --exec: give the runs as files or as a program to launch, not both")
	}
	if !cl.sh.given["exec"] {
		if err := r.exec.checkUnused(cl); err != nil {
			return err
		}
	}
	if !(f.tol > 0) {
		return usagef("--tol %s: must be > 0", formatFloat(f.tol))
	}
	if cl.sh.given["horizon"] && !(f.horizon > 0) {
		return usagef("--horizon %s: must be > 0", formatFloat(f.horizon))
	}
	if !(r.every >= 0) {
		return usagef("--every %s: must be >= 0", formatFloat(r.every))
	}
	if err := choice("run-format", r.runFormat, "csv", "npy", "jsonl"); err != nil {
		return err
	}
	settings := &plumb.RecordedSettings{Tol: f.tol, Relative: f.relative, Every: r.every}
	if cl.sh.given["horizon"] {
		settings.Horizon = f.horizon
	}
	if cl.sh.given["observe"] {
		for _, name := range strings.Split(f.dist.observe, ",") {
			if name = strings.TrimSpace(name); name == "" {
				return usagef("--observe %q: an empty name in the list", f.dist.observe)
			}
			settings.Distance.Observe = append(settings.Distance.Observe, name)
		}
	}
	for _, s := range f.dist.scales.paramList {
		settings.Distance.Scales = append(settings.Distance.Scales, plumb.Scale{Name: s.name, Value: s.value})
	}
	if len(r.periods) > 0 {
		settings.Periods = map[string]float64{}
		for _, p := range r.periods {
			settings.Periods[p.name] = p.value
		}
	}
	observe, scales := settings.Distance.Observe, []scaleJSON{}
	for _, s := range settings.Distance.Scales {
		scales = append(scales, scaleJSON{Name: s.Name, Value: s.Value})
	}
	echo := runsSettingsJSON{Tol: f.tol, Relative: f.relative, Horizon: settings.Horizon, Every: r.every, Scales: scales}
	if cl.sh.given["exec"] {
		echo.Exec = r.exec.echo()
		sh, err := cl.resolveShard(r.exec.shard)
		if err != nil {
			return err
		}
		if !sh.Whole() {
			return f.runExecShard(ctx, cl, sh)
		}
	}
	return cl.runJob(ctx, trustJob(auditJob{
		what:     "the audit of the runs",
		compared: "run",
		part:     "run",
		audit: func(ctx context.Context, _ func(plumb.Stage, int, int)) (*plumb.Report, error) {
			var err error
			var rep *plumb.Report
			if cl.sh.given["exec"] {
				rep, echo.Runs, err = f.runExec(ctx, cl, settings)
				return rep, err
			}
			var runs []plumb.RecordedRun
			if runs, echo.Runs, err = r.readCtx(ctx, cl); err != nil {
				return nil, err
			}
			return plumb.TrustRuns(ctx, runs, settings)
		},
		wrap: func(rep *plumb.Report, runErr error) any {
			e := echo
			if e.Observe = observe; len(e.Observe) == 0 {
				for _, c := range rep.Distance.Components {
					e.Observe = append(e.Observe, c.Name)
				}
			}
			return newTrustJSON(nil, e, trustUnits, rep, runErr)
		},
		head: func(w io.Writer) error {
			_, err := fmt.Fprintf(w, "runs: %s\n", count(len(echo.Runs), "run"))
			return err
		},
		warnings: runsWarnings,
	}))
}

// runsWarnings are the warnings of an audit of recorded runs: a run equal
// to the reference, a run that failed.
func runsWarnings(rep *plumb.Report) []string {
	if rep.Recorded == nil {
		return nil
	}
	var out []string
	for _, rr := range rep.Recorded.Runs {
		if rr.SameAsReference {
			out = append(out, fmt.Sprintf("run %q equals the reference to the last bit: what it varies (%s) probably did nothing", rr.Label, rr.Effect))
		}
		if rr.Failure != nil {
			out = append(out, fmt.Sprintf("run %q failed: %s", rr.Label, rr.Failure.Why))
		}
	}
	return out
}

// readCtx reads the --run files beside the command, so that Ctrl-C ends a
// read that blocks (a FIFO waiting for its writer) or takes long.
func (r *runsFlags) readCtx(ctx context.Context, cl *call) ([]plumb.RecordedRun, []runJSON, error) {
	type read struct {
		runs  []plumb.RecordedRun
		specs []runJSON
		err   error
	}
	done := make(chan read, 1) // buffered: an abandoned read does not leak a blocked send
	go func() {
		runs, specs, err := r.read(cl)
		done <- read{runs, specs, err}
	}()
	select {
	case d := <-done:
		return d.runs, d.specs, d.err
	case <-ctx.Done():
		return nil, nil, fmt.Errorf("reading the --run files: stopped before they were read: %w", ctx.Err())
	}
}

// read reads the --run files (and stdin for PATH -).
func (r *runsFlags) read(cl *call) ([]plumb.RecordedRun, []runJSON, error) {
	opt := r.readOptions()
	var runs []plumb.RecordedRun
	var specs []runJSON
	stdin := false
	for _, s := range r.runs {
		var run plumb.RecordedRun
		var err error
		if s.path == "-" {
			if stdin {
				return nil, nil, usagef("--run %s: stdin can be read once only", s.path)
			}
			stdin = true
			run, err = plumb.ReadRun(cl.stdin, r.runFormat, "stdin", opt)
		} else {
			run, err = plumb.OpenRun(s.path, opt)
		}
		if err != nil {
			return nil, nil, usagef("--run %s: %w", runSpecText(s), err)
		}
		run.Label, run.Effect, run.Reference = s.label, s.effect, s.ref
		runs = append(runs, run)
		specs = append(specs, runJSON{Label: s.label, Effect: effectText(s), Path: s.path})
	}
	return runs, specs, nil
}

func effectText(s runSpec) string {
	if s.ref {
		return "reference"
	}
	return string(s.effect)
}

func runSpecText(s runSpec) string {
	e := string(s.effect)
	if s.ref {
		e = "ref"
	}
	return e + ":" + s.label + "=" + s.path
}

// runsSettingsJSON echoes the settings of an audit of recorded runs.
type runsSettingsJSON struct {
	// Runs are the runs as given (--run), or as launched (--exec).
	Runs     []runJSON `json:"runs"`
	Tol      float64   `json:"tol"`
	Relative bool      `json:"relative"`
	// Horizon is --horizon, 0 when the whole common span is audited.
	Horizon float64 `json:"horizon"`
	// Every is --every, 0 for the reference's own times.
	Every   float64     `json:"every"`
	Observe []string    `json:"observe"`
	Scales  []scaleJSON `json:"scales"`
	// Exec echoes --exec and its flags, when given.
	Exec *execJSON `json:"exec,omitempty"`
}

// runJSON is one run as given.
type runJSON struct {
	Label  string `json:"label"`
	Effect string `json:"effect"`
	Path   string `json:"path,omitempty"`
	// Args is the command line of a launched run.
	Args []string `json:"args,omitempty"`
}
