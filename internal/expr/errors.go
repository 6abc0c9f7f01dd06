package expr

import (
	"errors"
	"fmt"
	"strings"
)

// Sentinel errors, wrapped by *ParseError; test with errors.Is.
var (
	// ErrSyntax reports a formula that does not follow the grammar.
	ErrSyntax = errors.New("syntax error")
	// ErrUnknown reports an identifier that is neither a variable of the
	// graph, a function, nor pi.
	ErrUnknown = errors.New("unknown name")
	// ErrArity reports a function called with the wrong number of arguments.
	ErrArity = errors.New("wrong number of arguments")
	// ErrTooLarge reports formulas, or derivatives of them, beyond the
	// limits set with Graph.SetLimits.
	ErrTooLarge = errors.New("formulas too large")
)

// ParseError is a formula error with its position. Pos is the byte offset in
// Src (0-based); Line and Col are 1-based, Col counted in runes.
type ParseError struct {
	Src       string
	Pos       int
	Line, Col int
	Msg       string
	Err       error // one of the sentinels
}

// Error gives the position and message on the first line, then the
// offending line of the formula with a caret under the position.
func (e *ParseError) Error() string {
	return fmt.Sprintf("expr: line %d, column %d: %s\n%s", e.Line, e.Col, e.Msg, e.Caret())
}

// Caret returns the formula's offending line and a line with a caret under
// the error's column, each indented by two spaces. A long line is cut to
// caretWindow runes on either side of the column, marked with "...".
func (e *ParseError) Caret() string {
	lines := strings.Split(e.Src, "\n")
	l := ""
	if e.Line-1 < len(lines) {
		l = lines[e.Line-1]
	}
	// Keep the shown line printable: tabs become spaces so the caret aligns.
	l = strings.ReplaceAll(l, "\t", " ")
	col := max(e.Col-1, 0)
	if r := []rune(l); len(r) > 2*caretWindow+1 {
		lo, hi := max(col-caretWindow, 0), min(col+caretWindow+1, len(r))
		l = string(r[lo:hi])
		col -= lo
		if lo > 0 {
			l = "..." + l
			col += 3
		}
		if hi < len(r) {
			l += "..."
		}
	}
	return "  " + l + "\n  " + strings.Repeat(" ", col) + "^"
}

// caretWindow is how many runes of a long formula line Caret shows on
// either side of the error.
const caretWindow = 40

// Unwrap returns the sentinel.
func (e *ParseError) Unwrap() error { return e.Err }

// newError makes a ParseError at byte offset pos of src.
func newError(src string, pos int, err error, format string, args ...any) *ParseError {
	if pos > len(src) {
		pos = len(src)
	}
	line, col := 1, 1
	for _, r := range src[:pos] {
		if r == '\n' {
			line++
			col = 1
		} else {
			col++
		}
	}
	return &ParseError{Src: src, Pos: pos, Line: line, Col: col, Msg: fmt.Sprintf(format, args...), Err: err}
}
