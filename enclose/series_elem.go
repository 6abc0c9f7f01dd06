package enclose

import (
	"github.com/plumbdyn/plumb/internal/expr"
	"github.com/plumbdyn/plumb/internal/ival"
)

// elementary refuses the elementary functions: their interval enclosures
// are not available yet.
func (s *series) elementary(i int, in expr.Instr, u, v, w []ival.Interval, k int, fk ival.Interval) error {
	return s.boxError(in, ErrDomain, "no interval enclosure of this function yet")
}
