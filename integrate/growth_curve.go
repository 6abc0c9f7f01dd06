package integrate

import "math"

// FitDivergence fits the growth laws of Growth to a divergence curve d
// sampled at the times t (len(d) <= len(t)), as Audit does for each rung:
// the growth range is the envelope (running maximum) of d after tStart, its
// first plateau skipped, up to the first point at or above a tenth of
// spread, the reference's size (where the divergence saturates at the
// attractor's size, as in Audit; spread <= 0 means no ceiling). Fewer than eight points in that range give
// GrowthUnknown with Points set. Callers that compare runs they did not
// compute (recorded trajectories) use it to fit the same laws.
//
// Cost: O(len(d)) time, O(points) memory.
//
// References:
//
//	G. Boffetta, M. Cencini, M. Falcioni, A. Vulpiani, Predictability: a way
//	  to characterize complexity, Phys. Rep. 356 (2002) 367–474, Sect. 3.
func FitDivergence(t, d []float64, tStart, spread float64) Growth {
	if len(d) > len(t) {
		d = d[:len(t)]
	}
	ceil := saturationFraction * spread
	if !(ceil > 0) {
		ceil = math.Inf(1)
	}
	return fitGrowth(t, d, tStart, ceil)
}
