package maps

import (
	"fmt"

	"github.com/plumbdyn/plumb/integrate"
)

// NextDD writes f(x) in double-double arithmetic (Funcs.NextDD) into dst,
// periodic components reduced to [0, period), so that a *Map serves the
// double-double refinement of lyap.ShadowMap. Errors: a map without a
// double-double form (integrate.ErrSettings), or the error of
// Funcs.NextDD. Both slices should have length Dim.
func (m *Map) NextDD(x, dst []DoubleDouble) error {
	if m == nil || m.f.NextDD == nil {
		return fmt.Errorf("maps: the map has no double-double form (Funcs.NextDD): %w", integrate.ErrSettings)
	}
	if err := m.f.NextDD(x, dst); err != nil {
		return err
	}
	for i, p := range m.periods {
		if p > 0 && i < len(dst) {
			dst[i] = wrapAngleDD(dst[i], p)
		}
	}
	return nil
}
