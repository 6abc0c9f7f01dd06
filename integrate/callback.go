package integrate

import (
	"errors"
	"fmt"
	"runtime/debug"
)

// ErrCallback reports that a function the caller supplied (the vector field,
// the Jacobian, a crossing function, the progress function) panicked; the
// panic is recovered into a *CallbackError that wraps it.
var ErrCallback = errors.New("callback panicked")

// The callbacks a CallbackError can name.
const (
	CallbackField       = "vector field"
	CallbackJacobian    = "Jacobian"
	CallbackCrossing    = "crossing function"
	CallbackProgress    = "progress function"
	CallbackSample      = "sample function"
	CallbackMap         = "map"
	CallbackMapJacobian = "map Jacobian"
)

// CallbackError is a panic in a caller's function, recovered: which
// function, at what time, and the value it panicked with. Solve returns it
// with the partial solution (up to the last step whose results are
// complete); NewStepper before any step.
type CallbackError struct {
	// Callback names the function (CallbackField, CallbackJacobian, ...).
	Callback string
	// T is the time of the call for crossing and progress functions and in
	// package lyap; for the vector field and Jacobian inside a step it is
	// the start of the step being tried (the stage times lie within it).
	// For maps it counts iterations.
	T float64
	// Value is the value passed to panic.
	Value any
	// Stack is the goroutine's stack where the panic was recovered.
	Stack []byte
}

// Error names the callback, the time and the panic value.
func (e *CallbackError) Error() string {
	return fmt.Sprintf("integrate: the %s panicked at t=%g: %v", e.Callback, e.T, e.Value)
}

// Unwrap returns ErrCallback, and the panic value when it is an error (a
// runtime error such as an index out of range, for example).
func (e *CallbackError) Unwrap() []error {
	if err, ok := e.Value.(error); ok {
		return []error{ErrCallback, err}
	}
	return []error{ErrCallback}
}

// Recovered returns the CallbackError for the panic value v of callback
// name at time t. Packages that run callbacks in their own loops (lyap)
// call it from their deferred recover.
func Recovered(name string, t float64, v any) *CallbackError {
	return &CallbackError{Callback: name, T: t, Value: v, Stack: debug.Stack()}
}

// jacobianPhase is implemented by schemes that call Problem.Jac, to say
// whether a call is in progress.
type jacobianPhase interface {
	inJacobian() bool
}

// recovered turns a panic in a callback during stepping into an error,
// naming the callback by what the Stepper (and the crossing finder cf, if
// any) was doing.
func (st *Stepper) recovered(v any, cf *crossFinder) *CallbackError {
	switch {
	case cf != nil && cf.inG:
		return Recovered(CallbackCrossing, cf.gT, v)
	case st.inProgress:
		return Recovered(CallbackProgress, st.t, v)
	}
	if j, ok := st.sc.(jacobianPhase); ok && j.inJacobian() {
		return Recovered(CallbackJacobian, st.t, v)
	}
	return Recovered(CallbackField, st.t, v)
}

// errNoStepper is the error of a Stepper not made by NewStepper.
var errNoStepper = fmt.Errorf("integrate: a zero or nil Stepper (make one with NewStepper): %w", ErrSettings)
