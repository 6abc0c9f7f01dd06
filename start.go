package plumb

import (
	"fmt"
	"math"
	"strings"

	"github.com/plumbdyn/plumb/integrate"
)

// SetStartValue changes one component of the initial state, named as in
// States; the others keep their values. An unknown name is an error
// wrapping ErrUnknown that lists the state names; a value that is not
// finite wraps integrate.ErrNonFinite. The value is taken as given (an
// angle is not reduced to its period).
func (s *System) SetStartValue(name string, v float64) error {
	i := -1
	for k, st := range s.States {
		if st == name {
			i = k
		}
	}
	if i < 0 || i >= len(s.y0) {
		return fmt.Errorf("plumb: %s has no state %q (states: %s): %w", s.Name, name, strings.Join(s.States, ", "), ErrUnknown)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Errorf("plumb: start %s = %v: %w", name, v, integrate.ErrNonFinite)
	}
	s.y0[i] = v
	return nil
}
