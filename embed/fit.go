package embed

import "math"

// Line is a least-squares straight line y = Intercept + Slope·x fitted to
// points First..Last (inclusive) of a curve, with the standard error of
// the slope from the residuals.
type Line struct {
	Slope, Intercept float64
	// SlopeErr is the standard error of the slope (0 for two points).
	SlopeErr float64
	// First and Last are the indices of the first and last point used.
	First, Last int
}

// fitLine fits y = a + b·x to xs[lo..hi], ys[lo..hi] (hi-lo >= 1) by
// ordinary least squares, summing in index order.
//
// References:
//
//	N. R. Draper, H. Smith, Applied Regression Analysis, 3rd ed., Wiley
//	  1998, ch. 1 (the slope and its standard error).
func fitLine(xs, ys []float64, lo, hi int) Line {
	n := float64(hi - lo + 1)
	var sx, sy float64
	for i := lo; i <= hi; i++ {
		sx += xs[i]
		sy += ys[i]
	}
	mx, my := sx/n, sy/n
	var sxx, sxy float64
	for i := lo; i <= hi; i++ {
		dx := xs[i] - mx
		sxx += float64(dx * dx)
		sxy += float64(dx * (ys[i] - my))
	}
	l := Line{First: lo, Last: hi}
	if sxx == 0 {
		return l
	}
	l.Slope = sxy / sxx
	l.Intercept = my - float64(l.Slope*mx)
	if n > 2 {
		var ss float64
		for i := lo; i <= hi; i++ {
			r := ys[i] - (l.Intercept + float64(l.Slope*xs[i]))
			ss += float64(r * r)
		}
		l.SlopeErr = math.Sqrt(ss / (n - 2) / sxx)
	}
	return l
}

// halvesSpread returns half the difference of the slopes fitted to the
// first and the second half of lo..hi: a measure of curvature that the
// residual-based standard error misses (common practice: a straight
// region gives the same slope on both halves). The halves share the
// middle point, so 5 points make two halves of 3; zero below 5 points.
func halvesSpread(xs, ys []float64, lo, hi int) float64 {
	if hi-lo+1 < 5 {
		return 0
	}
	mid := (lo + hi) / 2
	a := fitLine(xs, ys, lo, mid)
	b := fitLine(xs, ys, mid, hi)
	return math.Abs(a.Slope-b.Slope) / 2
}
