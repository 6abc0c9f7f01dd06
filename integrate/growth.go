package integrate

import (
	"math"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// GrowthKind names the law that fits a divergence curve best; its value is
// the law as the reports write it (JSON as text), the same for one curve
// and for the vote over a ladder's rungs.
type GrowthKind string

const (
	// GrowthUndetermined: too few points to fit (fewer than minFitPoints
	// positive divergences before saturation). The zero GrowthKind reads
	// as it too (String).
	GrowthUndetermined GrowthKind = "undetermined"
	// GrowthExponential: log d is linear in t.
	GrowthExponential GrowthKind = "exponential"
	// GrowthPolynomial: log d is linear in log(t - t_start) (a power law).
	GrowthPolynomial GrowthKind = "polynomial"
	// GrowthBounded: the divergence does not grow: its envelope less than
	// doubles over the fitted range.
	GrowthBounded GrowthKind = "bounded"
)

// String returns "undetermined", "exponential", "polynomial" or "bounded"
// ("undetermined" for the zero GrowthKind).
func (g GrowthKind) String() string {
	if g == "" {
		return string(GrowthUndetermined)
	}
	return string(g)
}

// Growth is the fit of a divergence curve d(t) in its growth range: the grid
// points after the rung's start with 0 < d, up to the first one with d above
// a tenth of the reference's spread (beyond it the divergence saturates at
// the attractor's size). Two laws are fitted by least squares on log d,
//
//	exponential:  log d = a + Rate·t
//	power law:    log d = b + Power·log(t - t_start)
//
// and the one with the smaller residual sum of squares is chosen (both have
// two parameters). On a chaotic system Rate estimates the largest Lyapunov
// exponent; a finite-time value that scatters around it by the local growth
// fluctuations (Boffetta et al. 2002, Sect. 3).
type Growth struct {
	Kind             GrowthKind
	Rate, RateErr    float64 // exponential rate and its standard error (1/time)
	Power, PowerErr  float64 // power-law exponent and its standard error
	RSSExp, RSSPower float64 // residual sums of squares of the two fits
	From, To         float64 // the times of the first and last fitted points
	Points           int     // number of fitted points
}

// RoundoffFit extrapolates the precision rungs to float64 itself: the
// agreement horizons of the BinaryBits rungs that departed are fitted by a
// line in the number of bits p, horizon = a + Slope·p, and evaluated at
// p = 53. The slope predicted by the largest exponent is ln 2/lambda: each
// bit halves the initial error, which the flow doubles back in ln 2/lambda
// time units.
type RoundoffFit struct {
	Slope          float64 // fitted time units per bit
	PredictedSlope float64 // ln 2/lambda, 0 without an exponent (see Predict)
	Float64Horizon float64 // a + Slope·53
	Points         int     // number of precision rungs in the fit
}

// Fit parameters of the growth range.
const (
	// minFitPoints is the least number of points for a two-parameter fit
	// with a meaningful residual comparison (common practice).
	minFitPoints = 8
	// saturationFraction: the growth range ends where the divergence
	// reaches this fraction of the spread; beyond it the distance saturates
	// at the attractor's size (common practice).
	saturationFraction = 0.1
)

// fitGrowth picks the growth range of d(t) and fits the exponential and
// power laws to its envelope there (FitGrowth).
func fitGrowth(t, d []float64, tStart, ceil float64) Growth {
	var x, ly []float64
	// The envelope (running maximum) removes the orbit-scale oscillation of
	// the distance. Its first plateau is skipped: a perturbation's stable
	// part decays before the unstable part regrows past the start level.
	env, env0 := 0.0, 0.0
	rising := false
	for k := range d {
		env = math.Max(env, d[k])
		if t[k] <= tStart || env <= 0 {
			continue
		}
		if env0 == 0 {
			env0 = env
		}
		if !rising && k+1 < len(d) && math.Max(env, d[k+1]) <= env0 {
			continue
		}
		rising = true
		x = append(x, t[k])
		ly = append(ly, detmath.Log(env))
		if env >= ceil {
			break
		}
	}
	if len(x) < minFitPoints {
		return Growth{Kind: GrowthUndetermined, Points: len(x)}
	}
	return FitGrowth(x, ly, tStart)
}

// FitGrowth fits the two laws of Growth by ordinary least squares to the
// points (t[k], logEnv[k]), logEnv being the log of a divergence envelope
// and tStart the start of the divergence (every t[k] > tStart):
//
//	exponential:  logEnv = a + Rate·t
//	power law:    logEnv = b + Power·log(t - tStart)
//
// and names the law: GrowthBounded when logEnv rises by less than ln 2 from
// the first point to the last (less than a doubling), else the law with the
// smaller residual sum of squares if its slope is positive, else
// GrowthExponential. The caller picks the points (the growth range) and the
// fewest it accepts; Audit takes eight. Fewer than three points, or fewer
// values of logEnv than of t, give GrowthUndetermined with Points set and no fit.
//
// Cost: O(len(t)), one allocation.
//
// References:
//
//	G. Boffetta, M. Cencini, M. Falcioni, A. Vulpiani, Predictability: a way
//	  to characterize complexity, Phys. Rep. 356 (2002) 367–474, Sect. 3
//	  (the growth rate of a perturbation as a finite-time Lyapunov exponent).
func FitGrowth(t, logEnv []float64, tStart float64) Growth {
	g := Growth{Kind: GrowthUndetermined, Points: len(t)}
	if len(t) < 3 || len(logEnv) < len(t) {
		return g
	}
	ly := logEnv[:len(t)]
	lx := make([]float64, len(t))
	for k, tk := range t {
		lx[k] = detmath.Log(tk - tStart)
	}
	g.From, g.To = t[0], t[len(t)-1]
	g.Rate, g.RateErr, g.RSSExp = lineFit(t, ly)
	g.Power, g.PowerErr, g.RSSPower = lineFit(lx, ly)
	switch {
	case ly[len(ly)-1]-ly[0] < math.Ln2:
		// Less than a doubling over the whole range.
		g.Kind = GrowthBounded
	case g.RSSExp < g.RSSPower && g.Rate > 0:
		g.Kind = GrowthExponential
	case g.Power > 0:
		g.Kind = GrowthPolynomial
	default:
		g.Kind = GrowthExponential
	}
	return g
}

// lineFit is the ordinary least-squares line y = a + b·x: it returns the
// slope b, its standard error and the residual sum of squares.
func lineFit(x, y []float64) (b, se, rss float64) {
	n := float64(len(x))
	var mx, my float64
	for i := range x {
		mx += x[i]
		my += y[i]
	}
	mx /= n
	my /= n
	var sxx, sxy float64
	for i := range x {
		dx := x[i] - mx
		sxx += float64(dx * dx)
		sxy += float64(dx * (y[i] - my))
	}
	if sxx == 0 {
		return 0, math.Inf(1), 0
	}
	b = sxy / sxx
	a0 := my - float64(b*mx)
	for i := range x {
		r := y[i] - (a0 + float64(b*x[i]))
		rss += float64(r * r)
	}
	if len(x) > 2 {
		se = math.Sqrt(rss / (n - 2) / sxx)
	}
	return b, se, rss
}

// roundoffFit fits the horizons of the departed BinaryBits precision rungs
// against their bits.
func roundoffFit(rs []RungResult) *RoundoffFit {
	var x, y []float64
	for _, r := range rs {
		if r.Rung.Kind == KindPrecision && r.Rung.Rounding.Kind == BinaryBits && r.Departed && r.Err == nil {
			x = append(x, float64(r.Rung.Rounding.N))
			y = append(y, r.Horizon)
		}
	}
	if len(x) < 2 {
		return nil
	}
	b, _, _ := lineFit(x, y)
	if math.IsInf(b, 0) || math.IsNaN(b) {
		return nil
	}
	var mx, my float64
	for i := range x {
		mx += x[i]
		my += y[i]
	}
	mx /= float64(len(x))
	my /= float64(len(x))
	return &RoundoffFit{Slope: b, Float64Horizon: my + float64(b*(53-mx)), Points: len(x)}
}
