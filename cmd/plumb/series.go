package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/plumbdyn/plumb/embed"
	"github.com/plumbdyn/plumb/internal/runio"
)

var seriesCmd = &command{
	name:    "series",
	summary: "analyse a measured series: lag, dimension, D2, exponent, forecast horizon",
	doc: `Analyse one column of a CSV file or a 2-D NumPy .npy array (FILE, or - for
stdin, read as CSV) as a measured signal whose equations are unknown: the
delay (first minimum of the mutual information, or 1 for a series that
decorrelates within one sample), the embedding dimension (false nearest
neighbours and Cao's E1, E2), the correlation dimension D2 with its
scaling region, the largest Lyapunov exponent from divergence curves
(Rosenstein; Kantz), the forecast horizon of nearest-neighbour forecasts
(the lead where their error reaches --fraction of the spread) beside the
horizon the exponent predicts, a rank test against IAAFT surrogates, and
the 0-1 test for chaos. Every number comes with its error and the choice
that shaped it; notes say where a method's assumptions look doubtful
(noise, too few points).

A CSV file has a header of column names (or no header: columns are
numbered from 1); --column picks the data, --time a time column whose
steps must be equal (or give --dt). A .npy file's columns are numbered
from 1; its time is --time (default column 1). Empty cells, text and NaN
are errors naming the line and column. --format json writes one object;
JSON keys: plumb_version, arch, command, source, settings, status, error
(null unless the analysis failed), series (when read), embedding (when
chosen), delay (when computed), dimension (when computed),
correlation_dimension (when computed), exponent (when computed), forecast
(when computed), surrogate_test (when run), zero_one (when run), notes,
caution. --plot draws five panels: mutual information, false neighbours
with Cao's E1 and E2, correlation sums with the fitted region, divergence
curves with their fitted lines, forecast error against lead time
(1200x1350 pixels unless --plot-size says otherwise).

A forecast horizon from data describes the recorded signal, not a safety
certificate for the real system; safety-critical use follows the field's
own codes and licensed review.`,
	formats:    []string{"table", "json"},
	plots:      true,
	positional: "FILE",
	setup:      setupSeries,
}

// seriesFlags are the flags of plumb series beyond the shared ones.
type seriesFlags struct {
	column, timeCol string
	dt              float64
	lag, dim        int
	maxDim, theiler int
	fraction        float64
	surrogates      int
	seed            uint64
}

func setupSeries(fs *flag.FlagSet, sh *shared) func(context.Context, *call) error {
	f := &seriesFlags{}
	fs.StringVar(&f.column, "column", "", "the data column `NAME` (a header name or a number from 1; default the last column)")
	fs.StringVar(&f.timeCol, "time", "", "the time column `NAME`, whose steps must be equal (default: none; see --dt)")
	finiteVar(fs, &f.dt, "dt", 0, "sampling interval `DT` when there is no --time column (default 1)")
	fs.IntVar(&f.lag, "lag", 0, "delay `L` in samples (default: chosen from the mutual information)")
	fs.IntVar(&f.dim, "dim", 0, "embedding dimension `M` (default: chosen by false neighbours and Cao's test)")
	fs.IntVar(&f.maxDim, "max-dim", embed.DefaultMaxDim, "largest dimension `M` tried when choosing")
	fs.IntVar(&f.theiler, "theiler", 0, "Theiler window `W` in samples (default: the autocorrelation's first zero)")
	finiteVar(fs, &f.fraction, "fraction", embed.DefaultForecastFraction, "forecast error, as a fraction `F` of the standard deviation, that ends the forecast horizon")
	fs.IntVar(&f.surrogates, "surrogates", embed.DefaultSurrogates, "number `N` of IAAFT surrogates for the rank test (0 skips it)")
	fs.Uint64Var(&f.seed, "seed", 1, "`SEED` of the surrogates and the 0-1 test's frequencies")
	return func(ctx context.Context, cl *call) error { return f.run(ctx, cl) }
}

// fileArg returns the one FILE argument (execute has parsed the flags
// before and after it) and refuses the system flags, which a measured
// series has no use for.
func fileArg(cl *call) (string, error) {
	switch len(cl.args) {
	case 0:
		return "", usagef("want a FILE to analyse (a CSV file, or - for stdin)")
	case 1:
	default:
		return "", usagef("unexpected argument %q after FILE %s (one FILE at a time)", cl.args[1], cl.args[0])
	}
	file := cl.args[0]
	for _, name := range []string{"model", "file", "set", "start"} {
		if cl.sh.given[name] {
			return "", usagef("--%s: plumb series analyses a measured series, not a system", name)
		}
	}
	return file, nil
}

func (f *seriesFlags) check(cl *call) error {
	switch {
	case f.dt < 0 || cl.sh.given["dt"] && f.dt == 0:
		return usagef("--dt %g: want a sampling interval > 0", f.dt)
	case cl.sh.given["dt"] && f.timeCol != "":
		return usagef("--dt %g and --time %s: give one, the time column sets the interval", f.dt, f.timeCol)
	case f.lag < 0:
		return usagef("--lag %d: want a delay >= 1 sample (0 chooses it)", f.lag)
	case f.dim < 0 || f.dim > 50:
		return usagef("--dim %d: want 1..50 (0 chooses it)", f.dim)
	case f.maxDim < 1 || f.maxDim > 50:
		return usagef("--max-dim %d: want 1..50", f.maxDim)
	case f.theiler < 0:
		return usagef("--theiler %d: want >= 0 samples (0 chooses it)", f.theiler)
	case !(f.fraction > 0 && f.fraction < 2):
		return usagef("--fraction %g: want a fraction of the standard deviation in (0, 2)", f.fraction)
	case f.surrogates < 0 || f.surrogates > 999:
		return usagef("--surrogates %d: want 0..999", f.surrogates)
	}
	return nil
}

func (f *seriesFlags) run(ctx context.Context, cl *call) error {
	file, err := fileArg(cl)
	if err != nil {
		return err
	}
	if err := f.check(cl); err != nil {
		return err
	}
	var in io.Reader = cl.stdin
	source := "stdin"
	if file != "-" {
		fh, err := os.Open(file)
		if err != nil {
			return usagef("FILE %s: %v", file, errors.Unwrap(err))
		}
		defer fh.Close()
		in, source = fh, file
	}
	var s *embed.Series
	if strings.EqualFold(filepath.Ext(file), ".npy") {
		s, err = f.readNPY(in, source)
	} else {
		s, err = embed.ReadColumn(in, embed.ReadOptions{Source: source, Column: f.column, Time: f.timeCol, Dt: f.dt})
	}
	if err != nil {
		return readError(err)
	}
	set := &embed.Settings{Lag: f.lag, Dim: f.dim, MaxDim: f.maxDim, Theiler: f.theiler,
		Fraction: f.fraction, Surrogates: f.surrogates, Seed: f.seed}
	if f.surrogates == 0 {
		set.Surrogates = -1
	}
	return cl.runJob(ctx, job{
		what:    "the analysis of " + source,
		refusal: "the analysis refused the settings",
		reword: func(err error) error {
			if errors.Is(err, embed.ErrEmbedding) || errors.Is(err, embed.ErrSettings) {
				return usagef("--lag %d, --dim %d: %s", f.lag, f.dim, strings.TrimPrefix(err.Error(), "embed: "))
			}
			return nil
		},
		run: func(ctx context.Context, _ func(float64)) (*outcome, error) {
			r, err := embed.Analyze(ctx, s, set)
			if r == nil {
				return nil, err
			}
			return f.outcome(source, s, r, err), nil
		},
	})
}

// outcome is the analysis r of series s read from source, which ended
// with runErr, ready to write. The panels are drawn only for an analysis
// that finished (one that stopped early may have none to draw).
func (f *seriesFlags) outcome(source string, s *embed.Series, r *embed.Report, runErr error) *outcome {
	out := newSeriesJSON(source, f, s, r, runErr)
	res := &outcome{
		json:  func() any { return out },
		table: func(w io.Writer) error { return writeSeriesTable(w, out) },
		done:  count(s.Len(), "value") + " analysed",
	}
	if runErr != nil {
		res.err = fmt.Errorf("the analysis %s: %w", statusVerb(out.Status), runErr)
	} else {
		res.draw = func(name string, size plotSize) error { return saveSeriesPanels(name, size, r) }
	}
	return res
}

// readNPY reads a 2-D NumPy array (internal/runio): its columns are
// numbered from 1 as in a CSV file without a header; the time is --time
// (default column 1), the data --column (default the last).
func (f *seriesFlags) readNPY(in io.Reader, source string) (*embed.Series, error) {
	if f.dt != 0 {
		return nil, usagef("--dt %g: a .npy file's time column sets the interval (see --time)", f.dt)
	}
	index := func(flag, v string) (string, error) {
		k, err := strconv.Atoi(v)
		if err != nil || k < 1 {
			return "", usagef("--%s %s: a .npy file's columns are numbered from 1", flag, v)
		}
		return strconv.Itoa(k - 1), nil
	}
	opt := runio.Options{Source: source}
	var err error
	if f.timeCol != "" {
		if opt.Time, err = index("time", f.timeCol); err != nil {
			return nil, err
		}
	}
	if f.column != "" {
		col, err := index("column", f.column)
		if err != nil {
			return nil, err
		}
		opt.Columns = []string{col}
	}
	run, err := runio.ReadNPY(in, opt)
	if err != nil {
		return nil, err
	}
	k := run.Dim()
	if k == 0 {
		return nil, usagef("FILE %s: no data column beside the time column", source)
	}
	x := make([]float64, run.Len())
	for i := range x {
		x[i] = run.Y[i*k+k-1]
	}
	return embed.FromTimes(run.T, x)
}

// readError turns a reading error into a usage error (bad input: exit 2).
func readError(err error) error {
	var ie *embed.InputError
	var re *runio.Error
	var ue *usageError
	switch {
	case errors.As(err, &ue):
		return err
	case errors.As(err, &ie) || errors.Is(err, embed.ErrSettings) || errors.As(err, &re):
		return usagef("%s", strings.TrimPrefix(strings.TrimPrefix(err.Error(), "embed: "), "runio: "))
	}
	return err
}

// num is a float written as null in JSON when it is NaN or infinite.
type num float64

// MarshalJSON writes the shortest decimal, or null for NaN and ±Inf.
func (v num) MarshalJSON() ([]byte, error) {
	f := float64(v)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, f, 'g', -1, 64), nil
}

func nums(v []float64) []num {
	out := make([]num, len(v))
	for i, x := range v {
		out[i] = num(x)
	}
	return out
}
