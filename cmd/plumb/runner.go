package main

import (
	"context"
	"errors"
	"fmt"
	"io"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/embed"
	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
	"github.com/plumbdyn/plumb/maps"
)

// job is one command's computation, described so that runJob can drive the
// sequence every command shares: the progress bar, the run, the check of a
// run that computed nothing, the result in the chosen --format, the --plot,
// the warnings and the wall time.
type job struct {
	// what names the computation in a failure to start: "starting <what>
	// failed" ("the integration of lorenz").
	what string
	// refusal opens the message of a run whose input the SDK refused
	// before any work ("the integrator refused the settings").
	refusal string
	// span is the progress bar's range [span[0], span[1]] in the units the
	// run reports; nil draws no bar.
	span *[2]float64
	// run computes. progress, when not nil, takes how far the run got.
	// It returns the result to write, or nil and the error when nothing
	// was computed.
	run func(ctx context.Context, progress func(float64)) (*outcome, error)
	// stage, when not nil, names the stage the run is in, for --progress
	// lines ("" or nil: "run"); it is called from the progress callback.
	stage func() string
	// reword, when not nil, may turn the error of a run that computed
	// nothing into the command's own usage error (a method that does not
	// fit the model); nil from it leaves the error to the refusals table.
	reword func(err error) error
}

// outcome is what a run computed (all of it, or the part done before it
// stopped), ready to write.
type outcome struct {
	// json makes the --format json document (only when it is asked for:
	// a long run's document holds a copy of every row); table writes the
	// readable table; csv (nil when the command writes no CSV) the CSV;
	// jsonl (nil when the command writes none) --format jsonl.
	json  func() any
	table func(w io.Writer) error
	csv   func(w io.Writer) error
	jsonl func(w io.Writer) error
	// tail, when not nil, finishes a result whose start the run has
	// already written as it went (in every format), instead of the above.
	tail func(w io.Writer) error
	// chart, when not nil, draws the --plot picture; nil from it draws
	// nothing (no curve to draw). draw, for a picture that is not one
	// chart (panels, a projection), saves it to the --plot file instead.
	chart func() *lineChart
	draw  func(name string, size plotSize) error
	// files are further files the command writes beside the result (an
	// animation), each after the --plot picture.
	files []extraFile
	// warnings go to stderr after the result (unless --quiet).
	warnings []string
	// done says what was done, for the wall-time line ("" writes none).
	done string
	// err is why the run stopped early, worded for the user; the result
	// holds what was done before.
	err error
	// marked: the written result says by itself how the run ended (a
	// stream that ends with its own status record), so a partial --out
	// file needs no other mark and goes in place, whatever the format.
	marked bool
}

// extraFile is a file a command writes besides its result and --plot: the
// flag and name that asked for it, and how to write it (whole, through
// writeFileAtomic).
type extraFile struct {
	flag, name string
	write      func() error
}

// runJob runs j and writes its result; the error it returns decides the
// exit status (see report).
func (cl *call) runJob(ctx context.Context, j job) error {
	start := now()
	prog := cl.startProgress(j.span, j.stage, start)
	res, err := j.run(ctx, prog.at())
	if res != nil {
		prog.finish(res.err)
	} else {
		prog.finish(err)
	}
	if res == nil {
		return startFailure(j, err)
	}
	if werr := cl.writeResult(res); werr != nil {
		return fmt.Errorf("writing the results failed: %w", werr)
	}
	if werr := cl.resultWritten(res); werr != nil {
		return fmt.Errorf("writing the results failed: %w", werr)
	}
	if perr := cl.drawPlot(res); perr != nil {
		return fmt.Errorf("drawing --plot %s failed: %w", cl.sh.plot, perr)
	}
	for _, f := range res.files {
		if ferr := f.write(); ferr != nil {
			return fmt.Errorf("writing --%s %s failed: %w", f.flag, f.name, ferr)
		}
	}
	for _, w := range res.warnings {
		cl.warnf("%s", w)
	}
	if res.done != "" {
		cl.wallTime(start, res.done)
	}
	return res.err
}

// drawPlot saves res's picture to the --plot file, when one is asked for
// and res has one.
func (cl *call) drawPlot(res *outcome) error {
	switch {
	case cl.sh.plot == "":
		return nil
	case res.draw != nil:
		return res.draw(cl.sh.plot, cl.sh.plotSize)
	case res.chart != nil:
		if c := res.chart(); c != nil {
			return c.save(cl.sh.plot, cl.sh.plotSize)
		}
	}
	return nil
}

// writeResult writes res in the chosen --format.
func (cl *call) writeResult(res *outcome) error {
	switch {
	case res.tail != nil:
		return res.tail(cl.stdout)
	case cl.sh.format == "json":
		return writeJSON(cl.stdout, res.json())
	case cl.sh.format == "csv" && res.csv != nil:
		return res.csv(cl.stdout)
	case cl.sh.format == "jsonl" && res.jsonl != nil:
		return res.jsonl(cl.stdout)
	}
	return res.table(cl.stdout)
}

// startFailure is the error of job j when its run computed nothing: a
// usage error the run itself worded (a flag found wrong only once the run
// began, such as a file it reads), the command's own wording (j.reword), a
// usage error when the refusals table says the input was refused, else a
// failure.
func startFailure(j job, err error) error {
	var ue *usageError
	switch {
	case err == nil:
		return fmt.Errorf("starting %s failed: no result and no error (a bug in plumb)", j.what)
	case errors.As(err, &ue):
		return err
	}
	if j.reword != nil {
		if e := j.reword(err); e != nil {
			return e
		}
	}
	if refused(err) {
		return usagef("%s: %v", j.refusal, err)
	}
	return fmt.Errorf("starting %s failed: %w", j.what, err)
}

// refusals are the SDK's errors that say the caller's input was refused
// before any work: settings out of range, a bad span or count, wrong
// dimensions, a method that does not fit. A run that computed nothing and
// fails with one of them is bad usage (exit 2, the message names what was
// wrong); every other error, and every error once work began, is a failed
// computation (exit 1). This table is the one place that decides.
var refusals = []error{
	integrate.ErrSettings,
	integrate.ErrSpan,
	integrate.ErrDimension,
	integrate.ErrMethod,
	integrate.ErrLadder,
	lyap.ErrSettings,
	lyap.ErrCount,
	lyap.ErrDimension,
	plumb.ErrHorizon,
	maps.ErrSteps,
	plumb.ErrTolerance,
	plumb.ErrRuns,
	plumb.ErrUnknown,
	plumb.ErrShard,
	embed.ErrEmbedding,
	embed.ErrSettings,
}

// refused reports whether err is in the refusals table.
func refused(err error) bool {
	for _, r := range refusals {
		if errors.Is(err, r) {
			return true
		}
	}
	return false
}
