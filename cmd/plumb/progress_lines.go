package main

import (
	"io"
	"math"
	"time"
)

// The --progress modes. auto draws the bar when stderr is a terminal and
// nothing otherwise; --quiet means none.
const (
	progressAuto  = "auto"
	progressBarOn = "bar"
	progressLines = "lines"
	progressNone  = "none"
)

// barDelay is how long a run goes before its bar appears: a run that ends
// sooner draws nothing, so that quick commands leave the terminal alone.
var barDelay = time.Second

// progressMode resolves --progress and --quiet into bar, lines or none.
func progressMode(sh *shared, stderr io.Writer) (string, error) {
	if err := choice("progress", sh.progress, progressAuto, progressBarOn, progressLines, progressNone); err != nil {
		return "", err
	}
	switch {
	case sh.quiet && sh.given["progress"] && sh.progress != progressNone:
		return "", usagef("--progress %s and --quiet: --quiet silences progress too; give one of them", sh.progress)
	case sh.quiet:
		return progressNone, nil
	case sh.progress == progressAuto && isTerminal(stderr):
		return progressBarOn, nil
	case sh.progress == progressAuto:
		return progressNone, nil
	}
	return sh.progress, nil
}

// progressRecord is one line of --progress lines: a JSON object on one
// line of stderr. Every stderr line that starts with "{" is one of these;
// warnings, the wall time and errors are plain text lines that start with
// "plumb ". A run writes a "start" event, a "progress" event whenever the
// whole percentage done or the stage changes, and an "end" event with the
// status. done and total are in the run's own units (time for a flow,
// iterates for a map, parameter points for a scan, the fraction of the
// audit for trust); both are null for a run that reports no progress.
type progressRecord struct {
	// Command is the plumb command running ("solve").
	Command string `json:"command"`
	// Event is start, progress or end.
	Event string `json:"event"`
	// Stage names the part of the run: "run" for a run of one part, the
	// audit's "exponent" (the estimate of the largest exponent) and
	// "audit" (the runs compared) for trust.
	Stage string `json:"stage"`
	// Done is how far the run got, Total where it ends.
	Done  *float64 `json:"done"`
	Total *float64 `json:"total"`
	// Fraction is done / total in [0, 1] (null with them).
	Fraction *float64 `json:"fraction"`
	// ElapsedS is the wall time since the run began, in seconds.
	ElapsedS float64 `json:"elapsed_s"`
	// Status is on the end event only: completed, canceled or failed.
	Status string `json:"status,omitempty"`
}

// progressLinesWriter writes the records of --progress lines.
type progressLinesWriter struct {
	w      io.Writer
	cmd    string
	span   *[2]float64
	stage  func() string // nil: "run"
	start  time.Time
	shown  int    // last whole percentage written, -1 before the first
	shownS string // the stage last written
	done   float64
	failed bool // a write to stderr failed: write no more
}

// stageName is the stage the run is in.
func (p *progressLinesWriter) stageName() string {
	if p.stage != nil {
		if s := p.stage(); s != "" {
			return s
		}
	}
	return "run"
}

// record writes one record; the end event carries status.
func (p *progressLinesWriter) record(event, status string) {
	if p.failed {
		return
	}
	p.shownS = p.stageName()
	r := progressRecord{Command: p.cmd, Event: event, Stage: p.shownS, Status: status,
		ElapsedS: now().Sub(p.start).Seconds()}
	if p.span != nil {
		done, total := p.done-p.span[0], p.span[1]-p.span[0]
		frac := 0.0
		if total > 0 {
			frac = math.Max(0, math.Min(1, done/total))
		}
		r.Done, r.Total, r.Fraction = &done, &total, &frac
	}
	if err := writeJSONLine(p.w, r); err != nil {
		p.failed = true
	}
}

// at takes the run's progress: t in the units of span.
func (p *progressLinesWriter) at(t float64) {
	if p.span == nil || math.IsNaN(t) {
		return
	}
	total := p.span[1] - p.span[0]
	pct := 100
	if total > 0 {
		pct = int(math.Max(0, math.Min(1, (t-p.span[0])/total)) * 100)
	}
	if pct == p.shown && p.stageName() == p.shownS {
		return
	}
	p.shown, p.done = pct, t
	p.record("progress", "")
}

// progress is the progress display of one run: a bar, lines or nothing.
type progress struct {
	bar   *progressBar
	lines *progressLinesWriter
}

// startProgress begins the display of a run over span (nil: the run
// reports no progress) that began at start; stage (nil: none) names the
// stage it is in.
func (cl *call) startProgress(span *[2]float64, stage func() string, start time.Time) *progress {
	p := &progress{}
	switch cl.progress {
	case progressBarOn:
		if span != nil {
			p.bar = newProgressBar(cl.stderr, "plumb "+cl.cmd.name, span[0], span[1])
		}
	case progressLines:
		p.lines = &progressLinesWriter{w: cl.stderr, cmd: cl.cmd.name, span: span, stage: stage, start: start, shown: -1}
		if span != nil {
			p.lines.done = span[0]
		}
		p.lines.record("start", "")
	}
	return p
}

// at is the callback the run reports to, nil when nothing is shown (so
// that a run skips the bookkeeping).
func (p *progress) at() func(float64) {
	switch {
	case p.bar != nil:
		return p.bar.at
	case p.lines != nil && p.lines.span != nil:
		return p.lines.at
	}
	return nil
}

// finish ends the display: the bar is cleared, the lines end with a
// record of how the run ended (err: why it stopped, nil when it completed).
func (p *progress) finish(err error) {
	if p.bar != nil {
		p.bar.clear()
	}
	if p.lines != nil {
		status, _ := runStatus(err)
		p.lines.record("end", status)
	}
}
