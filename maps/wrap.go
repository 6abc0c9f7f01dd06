package maps

import (
	"math"

	"github.com/plumbdyn/plumb/internal/dd"
)

// WrapPeriodic reduces every component x[i] with periods[i] > 0 to
// [0, periods[i]). math.Mod is exact, so the reduction adds no rounding
// error beyond the one addition that brings a negative remainder up.
func WrapPeriodic(x, periods []float64) {
	for i, p := range periods {
		if p > 0 && i < len(x) {
			x[i] = WrapAngle(x[i], p)
		}
	}
}

// WrapAngle reduces x to [0, p) for p > 0.
func WrapAngle(x, p float64) float64 {
	r := math.Mod(x, p)
	if r < 0 {
		r += p
		if r >= p { // a tiny negative r rounds up to p
			r = 0
		}
	}
	return r
}

// wrapAngleDD reduces the double-double x to [0, p) for a float64 period p:
// x - k·p with k = floor(x/p), where k·p is formed exactly (dd.MulFloat of an
// integer-valued k and p is exact while |k| < 2^53), so that the reduction
// keeps the double-double's accuracy.
func wrapAngleDD(x dd.Float, p float64) dd.Float {
	k := math.Floor(x.Float64() / p)
	if k == 0 {
		if x.Hi < 0 {
			k = -1
		} else {
			return x
		}
	}
	r := dd.Sub(x, dd.MulFloat(dd.From(k), p))
	for range 2 { // the float64 quotient may be off by one either way
		if r.Hi < 0 {
			r = dd.Add(r, dd.From(p))
		} else if dd.Cmp(r, dd.From(p)) >= 0 {
			r = dd.Sub(r, dd.From(p))
		}
	}
	return r
}

// wrappedDiff is the difference d of two values of a component with period
// p (p <= 0: none) reduced to [-p/2, p/2].
func wrappedDiff(d, p float64) float64 {
	if p <= 0 {
		return d
	}
	d = math.Mod(d, p)
	if d > p/2 {
		d -= p
	} else if d < -p/2 {
		d += p
	}
	return d
}
