package runio

import (
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// Run is one trajectory: strictly increasing times and, at each time, the
// values of the state columns.
type Run struct {
	// Source names the input (a path, Options.Source or "input").
	Source string
	// TimeName is the name of the time column or field.
	TimeName string
	// Names are the state columns, in the order of Y's columns.
	Names []string
	// T holds the times, strictly increasing.
	T []float64
	// Y holds the states, flat and row-major: row i is
	// Y[i*len(Names) : (i+1)*len(Names)].
	Y []float64
	// Periods[j] > 0 marks column j as an angle with that period; 0 means
	// an ordinary quantity. The values are kept as read.
	Periods []float64
	// Scales[j] is the scale of column j for comparisons (1 unless set).
	Scales []float64
}

// Len returns the number of rows.
func (r *Run) Len() int { return len(r.T) }

// Dim returns the number of state columns.
func (r *Run) Dim() int { return len(r.Names) }

// Row returns the state at row i, a view into Y.
func (r *Run) Row(i int) []float64 {
	d := len(r.Names)
	return r.Y[i*d : (i+1)*d : (i+1)*d]
}

// Index returns the position of the named state column, or -1.
func (r *Run) Index(name string) int {
	for j, n := range r.Names {
		if n == name {
			return j
		}
	}
	return -1
}

// Options choose what to read. The zero value reads every column, with the
// first one (CSV), "t" (JSON Lines) or column "0" (.npy) as the time.
type Options struct {
	// Source names the input in errors and in Run.Source. Open sets it to
	// the path when empty; otherwise "input".
	Source string
	// Time names the time column (CSV header name, JSON field, .npy column
	// name). Empty means the first column for CSV and .npy, "t" for JSON
	// Lines.
	Time string
	// Columns names the state columns to keep, in this order. Nil means
	// every column but the time, in input order.
	Columns []string
	// Names names the columns of a .npy array (including the time column
	// when it is one of them), or the entries of the "y" array of JSON
	// Lines. Nil means "0", "1", ... for .npy and "y0", "y1", ... for "y".
	Names []string
	// Times, for .npy only, is a separate 1-D .npy array of times; every
	// column of the main array is then a state column and Time must be
	// empty.
	Times io.Reader
	// TimesFile is the path of such an array, for Open.
	TimesFile string
	// Periods maps a state column to its angle period (finite, > 0).
	Periods map[string]float64
	// Scales maps a state column to its comparison scale (finite, > 0).
	Scales map[string]float64
}

func (o *Options) source() string {
	if o.Source == "" {
		return "input"
	}
	return o.Source
}

// Format is an input format.
type Format int

// The formats.
const (
	CSV Format = iota + 1
	NPY
	JSONL
)

// String returns the format's usual name.
func (f Format) String() string {
	switch f {
	case CSV:
		return "CSV"
	case NPY:
		return ".npy"
	case JSONL:
		return "JSON Lines"
	}
	return "Format(" + strconv.Itoa(int(f)) + ")"
}

// FormatOf chooses the format from a path's extension: .csv; .npy;
// .jsonl, .ndjson. Any other extension is an error wrapping ErrUnsupported.
func FormatOf(path string) (Format, error) {
	switch strings.ToLower(filepath.Ext(path)) {
	case ".csv":
		return CSV, nil
	case ".npy":
		return NPY, nil
	case ".jsonl", ".ndjson":
		return JSONL, nil
	}
	return 0, &Error{File: path, Err: ErrUnsupported,
		Detail: fmt.Sprintf("extension %q (want .csv, .npy, .jsonl or .ndjson)", filepath.Ext(path))}
}

// Read reads one run in the given format.
func Read(r io.Reader, f Format, opt Options) (*Run, error) {
	switch f {
	case CSV:
		return ReadCSV(r, opt)
	case NPY:
		return ReadNPY(r, opt)
	case JSONL:
		return ReadJSONL(r, opt)
	}
	return nil, &Error{File: opt.source(), Err: ErrUnsupported, Detail: f.String()}
}

// Open reads the run in the file at path, in the format its extension
// names (see FormatOf). For .npy, Options.TimesFile, when set, is opened as
// the separate array of times.
func Open(path string, opt Options) (*Run, error) {
	f, err := FormatOf(path)
	if err != nil {
		return nil, err
	}
	if opt.Source == "" {
		opt.Source = path
	}
	if opt.TimesFile != "" {
		if f != NPY {
			return nil, &Error{File: path, Err: ErrOptions, Detail: "a separate times file goes with .npy input only"}
		}
		tf, err := os.Open(opt.TimesFile)
		if err != nil {
			return nil, fmt.Errorf("runio: %w", err)
		}
		defer tf.Close()
		opt.Times = tf
	}
	in, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("runio: %w", err)
	}
	defer in.Close()
	return Read(in, f, opt)
}

// layout maps the input's columns onto the run: col[i] is -1 for a column
// that is skipped, -2 for the time, or the state index.
type layout struct {
	col      []int
	timeCol  int // index into the input's columns, -1 when the time is elsewhere
	names    []string
	timeName string
}

const (
	skipCol = -1
	timeCol = -2
)

// plan resolves the options against the input's column names. defTime is
// the time column's index when opt.Time is empty (-1: no time column).
func plan(file string, all []string, opt *Options, defTime int) (*layout, error) {
	lay := &layout{col: make([]int, len(all)), timeCol: -1}
	pos := make(map[string]int, len(all))
	for i, n := range all {
		if _, dup := pos[n]; dup {
			return nil, &Error{File: file, Column: i + 1, Field: n, Err: ErrColumn, Detail: "name appears twice"}
		}
		pos[n] = i
		lay.col[i] = skipCol
	}
	switch {
	case opt.Time != "":
		i, ok := pos[opt.Time]
		if !ok {
			return nil, &Error{File: file, Field: opt.Time, Err: ErrColumn, Detail: "time column not found"}
		}
		lay.timeCol = i
	case defTime >= 0:
		if defTime >= len(all) {
			return nil, &Error{File: file, Err: ErrEmpty, Detail: "no columns"}
		}
		lay.timeCol = defTime
	}
	if lay.timeCol >= 0 {
		lay.col[lay.timeCol] = timeCol
		lay.timeName = all[lay.timeCol]
	}
	if opt.Columns == nil {
		for i, n := range all {
			if i != lay.timeCol {
				lay.col[i] = len(lay.names)
				lay.names = append(lay.names, n)
			}
		}
	} else {
		for _, n := range opt.Columns {
			i, ok := pos[n]
			if !ok {
				return nil, &Error{File: file, Field: n, Err: ErrColumn, Detail: "column not found"}
			}
			if lay.col[i] != skipCol {
				return nil, &Error{File: file, Column: i + 1, Field: n, Err: ErrColumn, Detail: "chosen twice (or as both time and state)"}
			}
			lay.col[i] = len(lay.names)
			lay.names = append(lay.names, n)
		}
	}
	if len(lay.names) == 0 {
		return nil, &Error{File: file, Err: ErrColumn, Detail: "no state columns"}
	}
	return lay, nil
}

// newRun makes the run with its names and carried periods and scales.
func newRun(file, timeName string, names []string, opt *Options) (*Run, error) {
	r := &Run{Source: file, TimeName: timeName, Names: names,
		Periods: make([]float64, len(names)), Scales: make([]float64, len(names))}
	for j := range r.Scales {
		r.Scales[j] = 1
	}
	set := func(m map[string]float64, dst []float64, what string) error {
		for name, v := range m {
			j := r.Index(name)
			if j < 0 {
				return &Error{File: file, Field: name, Err: ErrColumn, Detail: what + " given for a column that is not a state column"}
			}
			if !(v > 0) || math.IsInf(v, 0) {
				return &Error{File: file, Field: name, Err: ErrOptions, Detail: fmt.Sprintf("%s %v must be finite and > 0", what, v)}
			}
			dst[j] = v
		}
		return nil
	}
	if err := set(opt.Periods, r.Periods, "period"); err != nil {
		return nil, err
	}
	if err := set(opt.Scales, r.Scales, "scale"); err != nil {
		return nil, err
	}
	return r, nil
}

// grow returns s extended by n elements, growing capacity geometrically
// but never past limit elements in total when limit > 0 (the size a header
// announced), so a known size is allocated once and exactly.
func grow(s []float64, n, limit int) []float64 {
	need := len(s) + n
	if need <= cap(s) {
		return s[:need]
	}
	c := 2 * cap(s)
	if c < 1024 {
		c = 1024
	}
	if c < need {
		c = need
	}
	if limit >= need && c > limit {
		c = limit
	}
	t := make([]float64, need, c)
	copy(t, s)
	return t
}
