package plumb

import (
	"context"
	"fmt"
	"io"

	"github.com/plumbdyn/plumb/internal/runio"
)

// RunReadOptions choose what OpenRun and ReadRun read. The zero value reads
// every column, with the first one (CSV), "t" (JSON Lines) or column "0"
// (.npy) as the time.
type RunReadOptions struct {
	// Time names the time column (CSV header name, JSON field, .npy column
	// name); empty means the format's default.
	Time string
	// Columns names the state columns to keep, in this order; nil keeps
	// every column but the time.
	Columns []string
	// Names names the columns of a .npy array (the time column included
	// when it is one of them), or the entries of a JSON Lines "y" array;
	// nil means "0", "1", ... and "y0", "y1", ....
	Names []string
	// TimesFile is a separate 1-D .npy array of times, for a .npy run.
	TimesFile string
}

func (o RunReadOptions) runio(source string) runio.Options {
	return runio.Options{Source: source, Time: o.Time, Columns: o.Columns, Names: o.Names, TimesFile: o.TimesFile}
}

// OpenRun reads one run from the file at path in the format its extension
// names: CSV (.csv: a header row of names, then rows of numbers), NumPy
// (.npy: a 2-D float64 or float32 array, C or Fortran order) or JSON Lines
// (.jsonl, .ndjson: {"t": 0.5, "y": [...]} or named fields per line). The
// run's Source is path; set its Label, Effect and Reference before
// TrustRuns. Errors name the file, line or row, and column; on an error
// after the header, the rows read before it come with it.
func OpenRun(path string, opt RunReadOptions) (RecordedRun, error) {
	r, err := runio.Open(path, opt.runio(path))
	return recordedFrom(path, r), wrapRead(err)
}

// ReadRun reads one run from r in format ("csv", "npy" or "jsonl"), for
// input that is no file (stdin, a pipe); source names it in errors.
func ReadRun(r io.Reader, format, source string, opt RunReadOptions) (RecordedRun, error) {
	var f runio.Format
	switch format {
	case "csv":
		f = runio.CSV
	case "npy":
		f = runio.NPY
	case "jsonl", "ndjson":
		f = runio.JSONL
	default:
		return RecordedRun{Source: source}, fmt.Errorf("plumb: run %s: format %q (want csv, npy or jsonl): %w", source, format, ErrRuns)
	}
	o := opt.runio(source)
	if opt.TimesFile != "" {
		return RecordedRun{Source: source}, fmt.Errorf("plumb: run %s: a separate times file needs OpenRun: %w", source, ErrRuns)
	}
	run, err := runio.Read(r, f, o)
	return recordedFrom(source, run), wrapRead(err)
}

func recordedFrom(source string, r *runio.Run) RecordedRun {
	out := RecordedRun{Source: source}
	if r != nil {
		out.Names, out.T, out.Y = r.Names, r.T, r.Y
	}
	return out
}

func wrapRead(err error) error {
	if err == nil {
		return nil
	}
	return fmt.Errorf("plumb: %w", err)
}

// RunFile names one run in a file for TrustFiles: its path, label (empty:
// the path), effect, whether it is the reference, and its perturbation size
// when known (see RecordedRun).
type RunFile struct {
	Path      string
	Label     string
	Effect    RunEffect
	Reference bool
	Delta0    float64
}

// TrustFiles reads each run with OpenRun (every file with opt) and audits
// them with TrustRuns: the one call behind plumb trust --run. A file that
// cannot be read is an error naming it (with the line or row and column),
// before any comparison.
func TrustFiles(ctx context.Context, files []RunFile, opt RunReadOptions, s *RecordedSettings) (*Report, error) {
	runs := make([]RecordedRun, len(files))
	for i, f := range files {
		r, err := OpenRun(f.Path, opt)
		if err != nil {
			return nil, fmt.Errorf("plumb: run %d (%s): %w", i+1, f.Path, err)
		}
		r.Label, r.Effect, r.Reference, r.Delta0 = f.Label, f.Effect, f.Reference, f.Delta0
		if r.Label == "" {
			r.Label = f.Path
		}
		runs[i] = r
	}
	return TrustRuns(ctx, runs, s)
}
