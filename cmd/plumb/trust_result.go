package main

// The result of plumb trust, the same for every kind of audit (a flow, a
// map, recorded runs): one JSON wrapper around plumb.Report, the table, the
// warnings, and the job that runs an audit on the runner.

import (
	"context"
	"fmt"
	"io"

	"github.com/plumbdyn/plumb"
)

// trustJSON is the --format json result of plumb trust: the header, the
// system and settings, then every field of plumb.Report (its own arch and
// plumb_version are shadowed by the header's, which name this build). The
// header is spelled out, not embedded, because the report has the same
// keys at the same depth. S is the settings' echo: trustSettingsJSON for a
// flow or a map, runsSettingsJSON for recorded runs.
type trustJSON[S any] struct {
	PlumbVersion string `json:"plumb_version"`
	Arch         string `json:"arch"`
	Command      string `json:"command"`
	// System is the system audited, with the parameters as used (absent
	// for recorded runs, which name no system).
	System *systemJSON `json:"system,omitempty"`
	// Settings echoes the flags that shaped the audit, defaults included.
	Settings S `json:"settings"`
	// Units says in what units the numbers are.
	Units trustUnitsJSON `json:"units"`
	// Status is completed, canceled or failed; Error says why (null when
	// completed).
	Status string  `json:"status"`
	Error  errText `json:"error"`
	// TrustedUntil shadows the report's: null when the audit did not
	// finish (verdict incomplete), which answers nothing.
	TrustedUntil *float64 `json:"trusted_until"`
	*plumb.Report
}

// newTrustJSON wraps rep, the report of an audit that ended with runErr.
func newTrustJSON[S any](sys *plumb.System, settings S, units trustUnitsJSON, rep *plumb.Report, runErr error) *trustJSON[S] {
	out := &trustJSON[S]{PlumbVersion: version, Arch: goarch, Command: "trust", Settings: settings, Units: units, Report: rep}
	if sys != nil {
		d := describe(sys)
		out.System = &d
	}
	out.Status, out.Error = runStatus(runErr)
	if rep.Verdict != plumb.Incomplete {
		out.TrustedUntil = &rep.TrustedUntil
	}
	return out
}

// trustSettingsJSON echoes the settings of the audit of a flow or a map.
type trustSettingsJSON struct {
	// Horizon is the audited span: time units for a flow, iterates for a
	// map.
	Horizon  float64  `json:"horizon"`
	Tol      float64  `json:"tol"`
	Relative bool     `json:"relative"`
	Rungs    []string `json:"rungs"`
	// RestartAt and RestartPlaces shape the restart rung (absent when
	// --rungs leaves it out).
	RestartAt     float64 `json:"restart_at,omitempty"`
	RestartPlaces int     `json:"restart_places,omitempty"`
	// Exact: the runs were compared with a multiprecision reference (see
	// the report's exact_reference).
	Exact bool `json:"exact"`
	// Every is the spacing of a flow's comparison grid (horizon/1000);
	// absent for a map, compared at every iterate (see stride).
	Every float64 `json:"every,omitempty"`
	// Observe names the compared components (--observe, default all);
	// Scales are the --scale values as given.
	Observe []string    `json:"observe"`
	Scales  []scaleJSON `json:"scales"`
	// Method, RelTol, AbsTol and Step name your own run when it was given
	// (--method, --rtol, --atol, --step); the report's your_run audits it.
	Method string  `json:"method,omitempty"`
	RelTol float64 `json:"rtol,omitempty"`
	AbsTol float64 `json:"atol,omitempty"`
	Step   float64 `json:"step,omitempty"`
	// Prove is the width of the validated enclosure (--prove), absent
	// without one.
	Prove float64 `json:"prove,omitempty"`
}

// trustUnitsJSON says in what units the numbers of a trust result are.
type trustUnitsJSON struct {
	Time     string `json:"time"`
	Distance string `json:"distance"`
	Tol      string `json:"tol"`
	Exponent string `json:"exponent"`
	TolUsed  string `json:"tol_used"`
}

// trustUnits are the units of a flow's audit and of recorded runs.
var trustUnits = trustUnitsJSON{
	Time:     "the model's time unit (t0, horizon, trusted_until, predicted_horizon, float64_horizon, times, agrees_until, predicted, restart_at)",
	Distance: "Euclidean norm of a state difference over the observed components, each divided by its scale, angles wrapped (see distance; tol_abs, spread, divergence, delta0, reversal.miss)",
	Tol:      "the distance's units, or with relative a fraction of spread",
	Exponent: "per unit time, natural log (exponent.value, exponent.std_err, rungs[].rate, rate_err); float64_per_bit in time units per bit",
	TolUsed:  "fraction of tol_abs",
}

// mapTrustUnits are the units of a map's audit: its times are iterates.
var mapTrustUnits = trustUnitsJSON{
	Time:     "iterates from the start (horizon, steps, trusted_until, predicted_horizon, times, agrees_until, departs_at, predicted, restart_at); rungs[].start is an index into times",
	Distance: "Euclidean norm of a state difference over the observed components, each divided by its scale, angles wrapped (see distance; tol_abs, spread, magnitude, divergence, delta0)",
	Tol:      "the distance's units, or with relative a fraction of spread",
	Exponent: "per iterate, natural log (exponent.value, exponent.std_err, rungs[].rate, rate_err); exponent.lyapunov_time in iterates",
	TolUsed:  "fraction of tol_abs",
}

// auditJob is one audit for trustJob.
type auditJob struct {
	// what names the audit in messages ("the audit of lorenz").
	what string
	// compared is what the wall-time line counts, the reference included
	// ("run", "orbit").
	compared string
	// part is what the message of an audit that stopped counts as
	// completed ("run"; "" for "rung").
	part string
	// progress: the audit reports its stages (plumb.TrustSettings.Progress);
	// proof: one of them is the enclosure of --prove.
	progress bool
	proof    bool
	// audit runs it; stage, when not nil, takes its progress.
	audit func(ctx context.Context, stage func(plumb.Stage, int, int)) (*plumb.Report, error)
	// wrap makes the JSON of a report that ended with runErr (a
	// *trustJSON).
	wrap func(rep *plumb.Report, runErr error) any
	// head writes the table's first line.
	head func(w io.Writer) error
	// warnings are the audit's own warnings on stderr (trustWarnings
	// adds the ones every audit has).
	warnings func(rep *plumb.Report) []string
}

// trustJob is the runner's job of audit a: the progress of its two stages,
// the result in every format, the chart, the warnings.
func trustJob(a auditJob) job {
	var stage plumb.Stage // the stage last reported, for --progress lines
	j := job{
		what:    a.what,
		refusal: "the audit refused its input",
		stage:   func() string { return string(stage) },
		run: func(ctx context.Context, progress func(float64)) (*outcome, error) {
			rep, err := a.audit(ctx, stageProgress(progress, a.proof, &stage))
			if rep == nil {
				return nil, err
			}
			return trustOutcome(a, rep, err), nil
		},
	}
	if a.progress {
		j.span = &[2]float64{0, 1}
	}
	return j
}

// stageProgress maps the audit's stages onto the runner's progress from 0
// to 1: half for the audit runs, half for the exponent estimate, which
// takes about as long; with proof, a third each and a third for the
// enclosure, which comes last. The first two may come in either order
// (System.Trust estimates the exponent first, to choose the reference's
// precision). current, when not nil, is set to each stage reported before
// progress is called. Nil progress gives nil.
func stageProgress(progress func(float64), proof bool, current *plumb.Stage) func(plumb.Stage, int, int) {
	if progress == nil {
		return nil
	}
	var audit, expo, prove float64
	return func(stage plumb.Stage, done, total int) {
		if current != nil {
			*current = stage
		}
		switch stage {
		case plumb.StageAudit:
			if total > 0 {
				audit = float64(done) / float64(total)
			}
		case plumb.StageExponent:
			expo = float64(done)
		case plumb.StageProof:
			if total > 0 {
				prove = float64(done) / float64(total)
			}
		}
		if proof {
			progress((audit + expo + prove) / 3)
			return
		}
		progress(0.5*audit + 0.5*expo)
	}
}

// trustOutcome is the report rep of audit a, which ended with runErr,
// ready to write.
func trustOutcome(a auditJob, rep *plumb.Report, runErr error) *outcome {
	res := &outcome{
		json: func() any { return a.wrap(rep, runErr) },
		table: func(w io.Writer) error {
			if err := a.head(w); err != nil {
				return err
			}
			return rep.Write(w)
		},
		csv: func(w io.Writer) error { return trustCSV(w, rep) },
		chart: func() *lineChart {
			if len(rep.Rungs) == 0 {
				return nil
			}
			return trustChart(rep)
		},
		warnings: trustWarnings(rep),
		done:     count(len(rep.Rungs)+1, a.compared) + " compared, verdict " + string(rep.Verdict),
	}
	if a.warnings != nil {
		res.warnings = append(res.warnings, a.warnings(rep)...)
	}
	if runErr != nil {
		status, _ := runStatus(runErr)
		part := a.part
		if part == "" {
			part = "rung"
		}
		res.err = fmt.Errorf("%s %s (%s completed, written): %w", a.what, statusVerb(status), count(len(rep.Rungs), part), runErr)
	}
	return res
}

// trustWarnings are the warnings every audit's report may call for: a rung
// that stopped early, a multiprecision reference set aside, an exponent
// that could not be estimated.
func trustWarnings(rep *plumb.Report) []string {
	var out []string
	if rep.Recorded == nil {
		for _, r := range rep.Rungs {
			if r.Error == "" {
				continue
			}
			if rep.Steps > 0 { // a map
				out = append(out, fmt.Sprintf("rung %q stopped early, its curve ends there: %s", r.Name, r.Error))
				continue
			}
			out = append(out, fmt.Sprintf("rung %q failed at t=%g, its curve ends there: %s", r.Name, r.AgreesUntil, r.Error))
		}
	}
	if rep.Exact != nil && rep.Exact.SetAside != "" {
		out = append(out, "the multiprecision reference was set aside, every run is compared with the float64 reference run instead: "+rep.Exact.SetAside)
	}
	if rep.ExponentError != "" && rep.Recorded == nil {
		out = append(out, "the largest Lyapunov exponent could not be estimated, so nothing is predicted: "+rep.ExponentError)
	}
	return out
}

// systemHead writes the table's first line for an audit of sys.
func systemHead(sys *plumb.System) func(w io.Writer) error {
	return func(w io.Writer) error {
		_, err := fmt.Fprintf(w, "system: %s\n", describe(sys).heading())
		return err
	}
}
