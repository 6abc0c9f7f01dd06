package embed

import (
	"errors"
	"fmt"
	"strings"
)

// Sentinel errors, usable with errors.Is. Every error the package returns
// wraps one of them and says which input or setting was wrong.
var (
	// ErrTooShort: the series has fewer points than the method needs.
	ErrTooShort = errors.New("series too short")
	// ErrConstant: the series does not vary, so no distance or spread
	// can be measured on it.
	ErrConstant = errors.New("constant series")
	// ErrNonFinite: a value is NaN or infinite.
	ErrNonFinite = errors.New("non-finite value")
	// ErrNonUniform: the given times are not equally spaced.
	ErrNonUniform = errors.New("non-uniform sampling")
	// ErrEmbedding: the lag and dimension reach beyond the series.
	ErrEmbedding = errors.New("embedding beyond the series")
	// ErrSettings: a setting is out of its valid range.
	ErrSettings = errors.New("invalid setting")
	// ErrSyntax: a cell of a text input is not a number, or the input is
	// not shaped as expected (header, column count).
	ErrSyntax = errors.New("syntax error")
	// ErrColumn: the requested column is not in the input.
	ErrColumn = errors.New("no such column")
)

// InputError says where in a user's input a problem is: a 1-based Line and
// Column of a text file, or the 0-based Index of a value in a series
// (Line is 0 when it does not apply, Index is -1 when it does not).
type InputError struct {
	// Source names the input (a path, or "input").
	Source string
	// Line and Column locate a cell of a text input (1-based; 0 when
	// not known).
	Line, Column int
	// Index is the 0-based position of a value in the series; -1 when
	// not known.
	Index int
	// Detail says what was found.
	Detail string
	// Err is the sentinel.
	Err error
}

// Error returns "embed: SOURCE: line L, column C: ERR: DETAIL" (or "value
// I" for a position in a series) with the parts that are known.
func (e *InputError) Error() string {
	var parts []string
	if e.Source != "" {
		parts = append(parts, e.Source)
	}
	switch {
	case e.Line > 0 && e.Column > 0:
		parts = append(parts, fmt.Sprintf("line %d, column %d", e.Line, e.Column))
	case e.Line > 0:
		parts = append(parts, fmt.Sprintf("line %d", e.Line))
	case e.Index >= 0:
		parts = append(parts, fmt.Sprintf("value %d", e.Index))
	}
	parts = append(parts, e.Err.Error())
	if e.Detail != "" {
		parts = append(parts, e.Detail)
	}
	return "embed: " + strings.Join(parts, ": ")
}

// Unwrap returns the sentinel.
func (e *InputError) Unwrap() error { return e.Err }

// settingf returns an error wrapping ErrSettings that names the setting.
func settingf(format string, a ...any) error {
	return fmt.Errorf("embed: %s: %w", fmt.Sprintf(format, a...), ErrSettings)
}

// shortf returns an error wrapping ErrTooShort that says what needed more.
func shortf(format string, a ...any) error {
	return fmt.Errorf("embed: %s: %w", fmt.Sprintf(format, a...), ErrTooShort)
}
