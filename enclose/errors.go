package enclose

import (
	"errors"
	"fmt"
)

// Sentinel errors; test with errors.Is.
var (
	// ErrKink: a corner (abs, min, max), a jump (sign, step), a branch
	// point (sqrt, a real power) or atan2's cut can be reached inside the
	// box: the solution need not be analytic there and no Taylor
	// enclosure is claimed.
	ErrKink = errors.New("enclose: a kink or jump of the formulas lies in the box")
	// ErrDomain: a formula is undefined or unbounded somewhere in the box
	// (a divisor or a log's argument that can be 0, a tangent's pole).
	ErrDomain = errors.New("enclose: a formula is undefined somewhere in the box")
	// ErrSettings: a setting is out of range.
	ErrSettings = errors.New("enclose: invalid setting")
	// ErrFormulas: the formulas do not parse or do not fit the states.
	ErrFormulas = errors.New("enclose: bad formulas")
)

// BoxError says which function of the formulas is not analytic, or not
// defined, over an interval box, and why.
type BoxError struct {
	// Func is the function or operation as formulas spell it ("abs",
	// "sqrt", "division", "^-1").
	Func string
	// Reason says what can happen in the box.
	Reason string
	// Err is ErrKink or ErrDomain.
	Err error
}

func (e *BoxError) Error() string {
	return fmt.Sprintf("enclose: %s: %s", e.Func, e.Reason)
}

// Unwrap returns ErrKink or ErrDomain.
func (e *BoxError) Unwrap() error { return e.Err }

// SettingError names the setting that is out of range; it wraps
// ErrSettings.
type SettingError struct {
	// Field is the Settings field's name.
	Field string
	// Value is its value, printed.
	Value string
	// Reason says what range is valid.
	Reason string
}

func (e *SettingError) Error() string {
	return fmt.Sprintf("enclose: Settings.%s = %s: %s: %v", e.Field, e.Value, e.Reason, ErrSettings)
}

// Unwrap returns ErrSettings.
func (e *SettingError) Unwrap() error { return ErrSettings }
