package integrate

import (
	"fmt"
	"math"
)

// checkScales validates AuditSettings.Scales for a state of n components:
// nil, or n finite entries >= 0 of which at least one is > 0.
func checkScales(scales []float64, n int) error {
	if scales == nil {
		return nil
	}
	if len(scales) != n {
		return fmt.Errorf("integrate: AuditSettings.Scales has length %d, state has %d: %w", len(scales), n, ErrDimension)
	}
	observed := false
	for i, v := range scales {
		if !positiveFinite(v) {
			return auditErr(fmt.Sprintf("Scales[%d]", i), v, "must be finite and >= 0")
		}
		observed = observed || v > 0
	}
	if !observed {
		return auditErr("Scales", scales, "every scale is zero, so no component is compared")
	}
	return nil
}

// AbsWeight converts an absolute size given per component in the state's
// units (an absolute tolerance, a rounding to decimal places) into the
// audit's distance: the root-mean-square of 1/scale over the observed
// components, 1 when scales is nil.
func AbsWeight(scales []float64) float64 {
	if scales == nil {
		return 1
	}
	var s float64
	k := 0
	for _, v := range scales {
		if v > 0 {
			w := 1 / v
			s += float64(w * w)
			k++
		}
	}
	if k == 0 {
		return 1
	}
	return math.Sqrt(s / float64(k))
}
