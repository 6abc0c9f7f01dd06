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

func settingErr(field string, v any, why string) error {
	return fmt.Errorf("integrate: Settings.%s = %v: %s: %w", field, v, why, ErrSettings)
}
