package plumb

import (
	"fmt"
)

// check returns an error wrapping ErrNoSystem for a nil or zero System.
func (s *System) check(what string) error {
	if s == nil || (s.flow == nil && s.form == nil) {
		return fmt.Errorf("plumb: %s of a nil or zero System (make one with Model or LoadSystem): %w", what, ErrNoSystem)
	}
	return nil
}

// noEvaluator is the error of a method called on a nil or zero evaluator.
func noEvaluator(what string) error {
	return fmt.Errorf("plumb: %s of a nil or zero value (make one with the System's method): %w", what, ErrNoSystem)
}
