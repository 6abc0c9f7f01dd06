package runio

import (
	"errors"
	"strconv"
	"strings"
)

// Sentinel errors. Every error the readers return is an *Error wrapping one
// of these, so callers can test the kind with errors.Is and the place with
// errors.As.
var (
	// ErrSyntax: the input is not in the format (a bad header, a bad JSON
	// line, a broken .npy header).
	ErrSyntax = errors.New("malformed input")
	// ErrNumber: a cell or field that must hold a finite number does not
	// (text, NaN, Inf, an empty cell, a number out of range).
	ErrNumber = errors.New("not a finite number")
	// ErrRagged: a row has a different number of cells (or a different
	// length of "y") than the first.
	ErrRagged = errors.New("wrong number of values")
	// ErrTimeOrder: the times are not strictly increasing.
	ErrTimeOrder = errors.New("times not strictly increasing")
	// ErrColumn: a column or field named in the options, or needed by a
	// comparison, is missing, duplicated or chosen twice.
	ErrColumn = errors.New("bad column")
	// ErrUnsupported: a valid input this package does not read (a .npy
	// dtype other than float64/float32, an unknown file extension).
	ErrUnsupported = errors.New("unsupported input")
	// ErrTruncated: the input ends before the data its header announces.
	ErrTruncated = errors.New("input ends early")
	// ErrEmpty: the input holds no data rows.
	ErrEmpty = errors.New("no data rows")
	// ErrOptions: the Options are inconsistent (a period that is not
	// positive, names that do not match the columns).
	ErrOptions = errors.New("bad options")
	// ErrSpan: runs cannot be compared on a common span (disjoint spans,
	// too few points, grid times outside the common span).
	ErrSpan = errors.New("no common span")
	// ErrNoSeek: NewNPYWriter was given no row count and an output that
	// cannot seek back to patch the header (a pipe, a terminal). Give the
	// count up front or write to a file.
	ErrNoSeek = errors.New(".npy output of unknown length needs a seekable file (a pipe or terminal cannot be patched)")
	// ErrRowCount: an NPYWriter was given more or fewer rows than the
	// count it announced.
	ErrRowCount = errors.New("row count differs from the announced shape")
)

// Error says where an input went wrong. Fields that do not apply are zero.
type Error struct {
	// File names the input: the path given to Open, Options.Source, or
	// "input" when neither is set.
	File string
	// Line is the 1-based line of a CSV or JSON Lines input.
	Line int
	// Row is the 1-based data row of a .npy input.
	Row int
	// Column is the 1-based column (CSV cell, .npy column).
	Column int
	// Field is the column name or JSON field, when known.
	Field string
	// Offset is the byte offset in a .npy input, when known.
	Offset int64
	// Err is one of the sentinels above.
	Err error
	// Detail says what was found.
	Detail string
}

// Error formats the place, the kind and what was found, for example
// `runio: run.csv:12: column 3 "z": not a finite number: found "NaN"`.
func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString("runio: ")
	b.WriteString(e.File)
	if e.Line > 0 {
		b.WriteString(":")
		b.WriteString(strconv.Itoa(e.Line))
	}
	b.WriteString(": ")
	if e.Row > 0 {
		b.WriteString("row ")
		b.WriteString(strconv.Itoa(e.Row))
		b.WriteString(": ")
	}
	switch {
	case e.Column > 0 && e.Field != "":
		b.WriteString("column ")
		b.WriteString(strconv.Itoa(e.Column))
		b.WriteString(" ")
		b.WriteString(strconv.Quote(e.Field))
		b.WriteString(": ")
	case e.Column > 0:
		b.WriteString("column ")
		b.WriteString(strconv.Itoa(e.Column))
		b.WriteString(": ")
	case e.Field != "":
		b.WriteString("field ")
		b.WriteString(strconv.Quote(e.Field))
		b.WriteString(": ")
	}
	if e.Offset > 0 {
		b.WriteString("byte ")
		b.WriteString(strconv.FormatInt(e.Offset, 10))
		b.WriteString(": ")
	}
	b.WriteString(e.Err.Error())
	if e.Detail != "" {
		b.WriteString(": ")
		b.WriteString(e.Detail)
	}
	return b.String()
}

// Unwrap returns the sentinel.
func (e *Error) Unwrap() error { return e.Err }

// found quotes a piece of input for an error message, shortened to a
// readable length.
func found(b []byte) string {
	const max = 40
	if len(b) > max {
		return "found " + strconv.Quote(string(b[:max])) + "..."
	}
	return "found " + strconv.Quote(string(b))
}
