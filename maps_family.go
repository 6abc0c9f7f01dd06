package plumb

import (
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/maps"
)

// Family returns the system's map as a function of the named parameters,
// the others kept at their current values (copied now): the input of
// maps.Scan, maps.PeriodDoubling and maps.Onset. The family is safe for
// concurrent use and every call makes a Map of the caller's own. Errors: a
// system that is not a map (ErrKind), no names or a repeated one
// (integrate.ErrSettings), an unknown name (ErrUnknown); the family's own
// calls fail on parameter values that are not finite
// (integrate.ErrNonFinite) or of the wrong count (integrate.ErrDimension).
func (s *System) Family(names ...string) (maps.Family, error) {
	if err := s.check("Family"); err != nil {
		return nil, err
	}
	if s.kind != KindMap {
		return nil, fmt.Errorf("plumb: %s is a %s, not a map: %w", s.Name, s.kind, ErrKind)
	}
	if len(names) == 0 {
		return nil, fmt.Errorf("plumb: a family needs at least one parameter name: %w", integrate.ErrSettings)
	}
	idx := make([]int, len(names))
	for k, name := range names {
		idx[k] = -1
		for i, p := range s.pinfo {
			if p.Name == name {
				idx[k] = i
			}
		}
		if idx[k] < 0 {
			known := make([]string, len(s.pinfo))
			for i, p := range s.pinfo {
				known[i] = p.Name
			}
			return nil, fmt.Errorf("plumb: model %s has no parameter %q (parameters: %v): %w", s.Name, name, known, ErrUnknown)
		}
		for j := range k {
			if names[j] == name {
				return nil, fmt.Errorf("plumb: parameter %q named twice: %w", name, integrate.ErrSettings)
			}
		}
	}
	base := *s
	base.params = append([]float64(nil), s.params...)
	return func(p []float64) (*maps.Map, error) {
		if len(p) != len(idx) {
			return nil, fmt.Errorf("plumb: %d values for the %d parameters %v: %w", len(p), len(idx), names, integrate.ErrDimension)
		}
		c := base
		c.params = append([]float64(nil), base.params...)
		for k, i := range idx {
			if math.IsNaN(p[k]) || math.IsInf(p[k], 0) {
				return nil, fmt.Errorf("plumb: parameter %s = %v: %w", names[k], p[k], integrate.ErrNonFinite)
			}
			c.params[i] = p[k]
		}
		return c.Map()
	}, nil
}
