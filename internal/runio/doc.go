// Package runio reads runs, trajectories computed by any program, so that
// plumb can audit simulations it did not compute: a user's own code run
// again at another tolerance, in single precision, restarted, or from a
// nudged start.
//
// A Run holds strictly increasing times T and, row by row, the values of
// named state columns in one flat row-major slice Y, with the per-column
// angle periods and comparison scales the caller declared (carried, not
// applied: values stay as read).
//
// # Formats
//
//   - CSV (ReadCSV): a header row of names, then rows of decimal numbers.
//     The time column is chosen by name (default: the first column), the
//     state columns by name (default: all others).
//   - NumPy .npy (ReadNPY), format versions 1.0, 2.0 and 3.0: a 2-D array of
//     float64 or float32, little- or big-endian, C or Fortran order. The
//     time is a column (named by Options.Names, or by its 0-based index
//     "0", "1", ...), or a separate 1-D array (Options.Times).
//   - JSON Lines (ReadJSONL): one object per line, either
//     {"t": 0.5, "y": [1, 2, 3]} or {"t": 0.5, "x": 1, "v": 2}; the time
//     field is "t" unless Options.Time says otherwise.
//
// Each reader takes an io.Reader (a file, a pipe, stdin); Open chooses the
// reader by the file's extension (.csv, .npy, .jsonl or .ndjson). WriteCSV
// writes a run that ReadCSV reads back to the same bits. NPYWriter writes
// a 2-D float64 .npy array row by row without holding the rows; ReadNPY
// reads it back to the same bits. Its header's row count is either given
// up front or, on a file, patched in on Close; a pipe with no count given
// is refused (ErrNoSeek).
//
// Only finite numbers are accepted: NaN, Inf, text, an empty cell, a
// number beyond the float64 range are errors, as are rows of the wrong
// length and times that do not strictly increase.
//
// # Comparing runs
//
// Resample puts several runs on one grid over the intersection of their
// spans, never extrapolating; runs written at the same times are copied
// exactly, others are interpolated by piecewise cubic Hermite pieces with
// Bessel's slopes (gonum's interp.PiecewiseCubic), angle columns after
// unwrapping. gonum's interpolant is not checked for fused multiply-adds
// (see DEVELOPERS.md): interpolated values may differ in the last bit
// between amd64 and arm64, which moves a measured divergence by rounding,
// not by a chaotic amplification; runs at the same times avoid it.
//
// # Errors
//
// Every error is an *Error that names the input (File) and, where they
// apply, the Line (CSV, JSON Lines), the Row and byte Offset (.npy), the
// 1-based Column and the Field (column name or JSON field), and wraps a
// sentinel for errors.Is: ErrSyntax, ErrNumber, ErrRagged, ErrTimeOrder,
// ErrColumn, ErrUnsupported, ErrTruncated, ErrEmpty, ErrOptions, ErrSpan;
// the writer's own are ErrNoSeek and ErrRowCount (plain wrapped errors).
// A reader that fails after its header returns the rows read before the
// failure with the error (for .npy in Fortran order, none: every row
// misses a later column). Nothing in the input can make a reader panic;
// the readers are fuzzed.
//
// # Memory
//
// Text is read line by line from a 64 KiB buffer (a longer line is gathered
// in one reused slice) and parsed in place into the growing []float64
// results: no line becomes a string, and parsing a row allocates nothing,
// so memory is the float64 data (times and chosen columns) plus one line,
// and transiently up to twice the data while a slice grows. A .npy body is
// read in 64 KiB chunks straight into the result, which is allocated once
// at the announced size when the input is a file whose size covers it.
// Unchosen columns are skipped, not stored. A header cannot make a reader
// allocate for data that is not there.
package runio
