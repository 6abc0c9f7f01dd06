package plumb

import (
	"fmt"
	"strings"
)

// RunEffect is the numerical effect a recorded run varies against the
// reference run. The first four are the effects of the built-in ladder
// (integrate.RungKind's names); the others are what only the author of a
// program can vary.
type RunEffect string

// The effects of recorded runs.
const (
	// VariesTolerance: the same code at another error tolerance.
	VariesTolerance RunEffect = "tolerance"
	// VariesMethod: another integration method or step size.
	VariesMethod RunEffect = "method"
	// VariesPrecision: another floating-point precision (float32 storage,
	// other compiler flags for the arithmetic).
	VariesPrecision RunEffect = "precision"
	// VariesRestart: restarted from a checkpoint or printed values; the run
	// may begin after the others (its curve starts at its first time).
	VariesRestart RunEffect = "restart"
	// VariesStart: a start nudged in the last digits (a perturbed start);
	// its divergence measures the flow's own amplification, and the
	// exponent is fitted from these runs where there are any.
	VariesStart RunEffect = "start"
	// VariesPlatform: another machine, compiler, or library version.
	VariesPlatform RunEffect = "platform"
	// VariesOther: anything else.
	VariesOther RunEffect = "other"
)

// RunEffects lists the effects, in the order above.
var RunEffects = []RunEffect{VariesTolerance, VariesMethod, VariesPrecision, VariesRestart, VariesStart, VariesPlatform, VariesOther}

// ParseRunEffect returns the effect named s (one of RunEffects' names, or
// "tol" for tolerance); ok is false for any other name.
func ParseRunEffect(s string) (e RunEffect, ok bool) {
	if s == "tol" {
		return VariesTolerance, true
	}
	for _, e := range RunEffects {
		if string(e) == s {
			return e, true
		}
	}
	return "", false
}

// RecordedRun is one trajectory computed by any program: times and states,
// labelled, with the effect it varies. Exactly one run of an audit is the
// Reference (the one the caller trusts most: the tightest tolerance, the
// highest precision); every other run is compared with it.
type RecordedRun struct {
	// Label names the run in the report (unique, not empty).
	Label string
	// Source says where the run came from (a path, a command), for errors
	// and the report; it may be empty.
	Source string
	// Reference marks the run every other run is compared with.
	Reference bool
	// Effect is what the run varies; ignored for the reference.
	Effect RunEffect
	// Delta0, when known, is the size of the run's perturbation in the
	// audit's distance (the difference of the starts for a nudged start, of
	// the states at a restart); 0 means unknown, and for start and restart
	// runs the divergence at their first compared time is taken instead.
	Delta0 float64
	// Names are the state columns; T the strictly increasing, finite times;
	// Y the states, flat and row-major (row i is
	// Y[i*len(Names):(i+1)*len(Names)]), finite.
	Names []string
	T     []float64
	Y     []float64
	// Failure, when not nil, says why the run could not be made (a program
	// that failed, timed out or wrote nothing): the run is reported as a
	// failed rung, with no curve, and the others still stand. T and Y are
	// then ignored. A failed reference fails the audit.
	Failure *RunFailure
}

// RunFailure is why a recorded run could not be made.
type RunFailure struct {
	// Why says what went wrong, in a sentence.
	Why string `json:"why"`
	// ExitStatus is the program's exit status (-1: it did not exit by
	// itself, or never started).
	ExitStatus int `json:"exit_status"`
	// TimedOut: the program was stopped at its time limit.
	TimedOut bool `json:"timed_out,omitempty"`
	// StderrTail is the end of what the program wrote to stderr.
	StderrTail string `json:"stderr_tail,omitempty"`
}

// RecordedSettings controls TrustRuns. A nil *RecordedSettings is invalid:
// the tolerance is the caller's statement of what difference matters.
type RecordedSettings struct {
	// Tol is the divergence between runs the caller accepts, in the runs'
	// units (or, with Relative, as a fraction of the reference run's
	// spread). Must be finite and > 0; otherwise ErrTolerance.
	Tol      float64
	Relative bool
	// Distance chooses the compared columns (Observe, by name; nil: every
	// column of the reference) and their scales. Each compared column must
	// be in every run.
	Distance Distance
	// Periods gives the period of angle columns by name (wrapped
	// differences; interpolation unwraps them first).
	Periods map[string]float64
	// Every, when positive, is the spacing of the comparison grid, and
	// every run is interpolated onto it; zero takes the reference run's
	// own times, so that the reference is never interpolated (and runs
	// written at the same times are not either).
	Every float64
	// Horizon, when positive, is the span [T0, T0+Horizon] to audit, from
	// the start T0 of the common span; it must not reach past the common
	// span (nothing is extrapolated). Zero audits the whole common span.
	Horizon float64
	// Lambda, when positive, is used as the largest Lyapunov exponent;
	// otherwise it is fitted to the runs' divergence curves.
	Lambda float64
	// Progress, if not nil, is called with ("audit", done, total) as runs
	// are compared.
	Progress func(stage string, done, total int)
}

// RunsError names the run that made a set of runs unusable.
type RunsError struct {
	// Index is the run's position in the caller's slice (-1: the set as a
	// whole); Label and Source name it.
	Index  int
	Label  string
	Source string
	// Why says what is wrong.
	Why string
	// Err is the underlying error, if any (a resampling error).
	Err error
}

func (e *RunsError) Error() string {
	var b strings.Builder
	b.WriteString("plumb: runs: ")
	if e.Index >= 0 {
		fmt.Fprintf(&b, "run %d", e.Index+1)
		if e.Label != "" {
			fmt.Fprintf(&b, " %q", e.Label)
		}
		if e.Source != "" && e.Source != e.Label {
			fmt.Fprintf(&b, " (%s)", e.Source)
		}
		b.WriteString(": ")
	}
	b.WriteString(e.Why)
	if e.Err != nil {
		b.WriteString(": ")
		b.WriteString(e.Err.Error())
	}
	return b.String()
}

// Unwrap returns ErrRuns and the underlying error.
func (e *RunsError) Unwrap() []error {
	if e.Err != nil {
		return []error{ErrRuns, e.Err}
	}
	return []error{ErrRuns}
}

// RecordedReport is what an audit of recorded runs adds to the Report
// (Report.Recorded): the compared span and grid, and how each run was read.
type RecordedReport struct {
	// From and To bound the compared span: the intersection of the runs'
	// spans (a restart run may begin later), cut at the requested horizon.
	// Nothing outside it is estimated.
	From float64 `json:"from"`
	To   float64 `json:"to"`
	// SpanNote says so in words.
	SpanNote string `json:"span_note"`
	// Grid says on which times the runs were compared: "reference" (the
	// reference run's own times) or "every" (a uniform grid, Every apart).
	Grid  string  `json:"grid"`
	Every float64 `json:"every,omitempty"`
	// Interpolant names the interpolation of runs not written at the
	// grid's times.
	Interpolant string `json:"interpolant"`
	// ToleranceNote, when not empty, warns that the tolerance exceeds
	// twice the reference's largest distance from its mean: runs that
	// stay on the same attractor cannot part by it, and an agreement
	// proves little.
	ToleranceNote string `json:"tolerance_note,omitempty"`
	// ExponentFrom names the runs whose fitted growth rates make the
	// exponent (empty when the exponent was given or none could be
	// fitted); ExponentNote says it is an estimate from the runs.
	ExponentFrom []string `json:"exponent_from,omitempty"`
	ExponentNote string   `json:"exponent_note,omitempty"`
	// Runs describes each run, the reference first, then the rungs in
	// Report.Rungs' order.
	Runs []RecordedRunReport `json:"runs"`
}

// RecordedRunReport is one recorded run as the report describes it.
type RecordedRunReport struct {
	Label  string    `json:"label"`
	Source string    `json:"source,omitempty"`
	Effect RunEffect `json:"effect"`
	// Rows is the number of rows the run held; From and To its own span.
	Rows int     `json:"rows"`
	From float64 `json:"from"`
	To   float64 `json:"to"`
	// Interpolated: the run was not written at the grid's times and was
	// interpolated onto them.
	Interpolated bool `json:"interpolated"`
	// SameAsReference: every compared value equals the reference's to
	// the last bit. The knob the run varies probably did nothing (the
	// program ignored it).
	SameAsReference bool `json:"same_as_reference,omitempty"`
	// Failure says why the run could not be made, nil if it was.
	Failure *RunFailure `json:"failure,omitempty"`
}

// exponentFromRuns is ExponentEstimate.Source for an exponent fitted to the
// divergence curves of recorded runs.
const exponentFromRuns = "runs"
