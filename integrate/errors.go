package integrate

import (
	"errors"
	"fmt"
)

// Sentinel errors. Every error returned by this package wraps one of them, so
// callers can test with errors.Is.
var (
	// ErrSettings reports an invalid field of Settings.
	ErrSettings = errors.New("invalid setting")
	// ErrDimension reports slices whose lengths do not match the problem.
	ErrDimension = errors.New("dimension mismatch")
	// ErrNonFinite reports a NaN or infinite value in the initial state, a
	// parameter, or a value returned by the vector field.
	ErrNonFinite = errors.New("non-finite value")
	// ErrSpan reports an empty or non-finite time span (t1 == t0, NaN, Inf).
	ErrSpan = errors.New("invalid time span")
	// ErrStepUnderflow reports a step size that fell below the smallest
	// step allowed (Settings.MinStep or the rounding limit at t).
	ErrStepUnderflow = errors.New("step size underflow")
	// ErrStepBudget reports that Settings.MaxSteps steps were taken before the end.
	ErrStepBudget = errors.New("step budget exhausted")
	// ErrMethod reports a method that cannot be used on the problem, for
	// example a symplectic splitting on a problem without separable parts.
	ErrMethod = errors.New("method not applicable")
	// ErrNoDense reports a request for dense output from a Solution that did
	// not keep its steps.
	ErrNoDense = errors.New("dense output not kept")
	// ErrFieldChanged reports that Solution.At, rebuilding a step after
	// Solve returned, found that the vector field no longer computes what
	// it computed during the solve (it depends on state changed since).
	ErrFieldChanged = errors.New("vector field changed since the solve")
)

// StepError says where stepping failed: the time reached, the step size
// tried last, and the cause.
type StepError struct {
	T   float64 // time of the last accepted state
	H   float64 // step size tried last
	Err error   // the cause; wraps a sentinel
}

func (e *StepError) Error() string {
	return fmt.Sprintf("integrate: at t=%g (h=%g): %v", e.T, e.H, e.Err)
}

// Unwrap returns the cause.
func (e *StepError) Unwrap() error { return e.Err }

// FieldError reports a non-finite value produced by the vector field (or found
// in the state) at time T in component Index.
type FieldError struct {
	T     float64 // time at which the value was produced
	Index int     // component index; -1 when no single component is known
	Value float64 // the offending value (NaN or ±Inf)
	What  string  // "initial state", "derivative", "state", "error estimate"
}

func (e *FieldError) Error() string {
	if e.Index < 0 {
		return fmt.Sprintf("%s is %v at t=%g", e.What, e.Value, e.T)
	}
	return fmt.Sprintf("%s component %d is %v at t=%g", e.What, e.Index, e.Value, e.T)
}

// Unwrap returns ErrNonFinite.
func (e *FieldError) Unwrap() error { return ErrNonFinite }

// SettingError reports an invalid field of a settings struct: which field,
// the value given and why it was refused, so that a caller (the CLI) can
// name its own spelling of the field. Its text is
//
//	PKG: TYPE.FIELD = VALUE: REASON: invalid setting
//
// ("integrate: Settings.RelTol = -1: must be finite and >= 0: invalid
// setting"). Unwrap returns Err: ErrSettings for this package's Settings,
// the owning package's sentinel for a struct of another package that
// shares a rule of this one (lyap.Settings.RelTol).
type SettingError struct {
	// Pkg and Type name the struct as the caller wrote it: "integrate"
	// and "Settings" for integrate.Settings.
	Pkg, Type string
	// Field is the field's name, with an index where it has one
	// ("RelTols[2]").
	Field string
	// Value is the value given.
	Value any
	// Reason says what the field must be.
	Reason string
	// Err is the sentinel the error wraps.
	Err error
}

func (e *SettingError) Error() string {
	return fmt.Sprintf("%s: %s.%s = %v: %s: %v", e.Pkg, e.Type, e.Field, e.Value, e.Reason, e.Err)
}

// Unwrap returns the sentinel.
func (e *SettingError) Unwrap() error { return e.Err }

func settingErr(field string, v any, why string) error {
	return &SettingError{Pkg: "integrate", Type: "Settings", Field: field, Value: v, Reason: why, Err: ErrSettings}
}
