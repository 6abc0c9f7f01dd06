package embed

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// DivergenceSettings are the choices of Rosenstein and Kantz. The zero
// value of a field means its default.
type DivergenceSettings struct {
	// Theiler excludes neighbours closer in time than this many samples
	// (Rosenstein et al. use the mean period; default 0).
	Theiler int
	// Steps is the number of steps the pairs are followed (default
	// min(n/10, 1000)).
	Steps int
	// References is the most reference points, spread evenly (default
	// 2000).
	References int
	// Radius is Kantz's neighbourhood radius as a fraction of the series'
	// range (default 0.01); unused by Rosenstein.
	Radius float64
	// RiseFrom and RiseTo bound the fitted region as fractions of the
	// rise of the curve from its start to its plateau (defaults 0.1 and
	// 0.6).
	RiseFrom, RiseTo float64
}

// Defaults of DivergenceSettings.
const (
	DefaultDivSteps      = 1000
	DefaultDivReferences = 2000
	DefaultKantzRadius   = 0.01
	DefaultRiseFrom      = 0.1
	DefaultRiseTo        = 0.6
)

func (s *DivergenceSettings) withDefaults(n int) (DivergenceSettings, error) {
	var c DivergenceSettings
	if s != nil {
		c = *s
	}
	if c.Steps == 0 {
		c.Steps = min(max(n/10, 10), DefaultDivSteps)
	}
	if c.References == 0 {
		c.References = DefaultDivReferences
	}
	if c.Radius == 0 {
		c.Radius = DefaultKantzRadius
	}
	if c.RiseFrom == 0 {
		c.RiseFrom = DefaultRiseFrom
	}
	if c.RiseTo == 0 {
		c.RiseTo = DefaultRiseTo
	}
	switch {
	case c.Theiler < 0:
		return c, settingf("DivergenceSettings.Theiler = %d (want >= 0)", c.Theiler)
	case c.Steps < 4:
		return c, settingf("DivergenceSettings.Steps = %d (want >= 4)", c.Steps)
	case c.References < 1:
		return c, settingf("DivergenceSettings.References = %d (want >= 1)", c.References)
	case !(c.Radius > 0 && c.Radius <= 1):
		return c, settingf("DivergenceSettings.Radius = %g (want in (0, 1])", c.Radius)
	case !(c.RiseFrom >= 0 && c.RiseFrom < c.RiseTo && c.RiseTo <= 1):
		return c, settingf("DivergenceSettings.RiseFrom = %g, RiseTo = %g (want 0 <= from < to <= 1)", c.RiseFrom, c.RiseTo)
	}
	return c, nil
}

// Divergence is a curve of the mean log distance between initially close
// states against the time since, and the largest Lyapunov exponent read
// from its linear part.
type Divergence struct {
	// Method is "rosenstein" or "kantz".
	Method string
	// Dim and Lag are the embedding's; Dt the sampling interval.
	Dim, Lag int
	Dt       float64
	// Time[k] = k·Dt; LogDist[k] the mean log distance after k steps
	// (NaN where no pair survives).
	Time, LogDist []float64
	// Count[k] is the number of pairs (Rosenstein) or reference points
	// (Kantz) averaged at step k.
	Count []int
	// Lambda is the slope of LogDist against Time over the fitted region,
	// in 1/time unit; LambdaErr the larger of the fit's standard error
	// and half the difference of the slopes of its two halves.
	Lambda, LambdaErr float64
	// Fit is the fitted line, with the first and last step used.
	Fit Line
	// Found is false when the curve did not rise enough to fit; Lambda
	// is then NaN.
	Found bool
}

// Rosenstein estimates the largest Lyapunov exponent of the delay
// embedding (lag, dim) of s by the method of Rosenstein, Collins & De Luca
// (1993): each reference point i is paired with its nearest neighbour j
// (Euclidean, outside the Theiler window), and
//
//	y(k) = mean_i ln ||y_{i+k} - y_{j+k}||,   lambda = dy/d(k·Dt)
//
// in the linear region (see fitRise). References are spread evenly
// over the series; cost O(R (log n + Steps)).
//
// References:
//
//	M. T. Rosenstein, J. J. Collins, C. J. De Luca, "A practical method
//	  for calculating largest Lyapunov exponents from small data sets",
//	  Physica D 65 (1993) 117–134.
func Rosenstein(ctx context.Context, s *Series, lag, dim int, set *DivergenceSettings) (*Divergence, error) {
	return divergence(ctx, s, lag, dim, set, false)
}

// Kantz estimates the largest Lyapunov exponent of the delay embedding
// (lag, dim) of s by the method of Kantz (1994): for each reference point
// n, U_n holds the points within Radius (a fraction of the range, maximum
// norm, outside the Theiler window), and
//
//	S(k) = mean_n ln( mean_{m in U_n} ||y_{n+k} - y_{m+k}|| ),
//	lambda = dS/d(k·Dt)
//
// in the linear region (see fitRise). Averaging over a neighbourhood
// before the logarithm makes it less sensitive to noise than Rosenstein's
// single neighbour. Reference points without neighbours are skipped.
//
// References:
//
//	H. Kantz, "A robust method to estimate the maximal Lyapunov exponent
//	  of a time series", Phys. Lett. A 185 (1994) 77–87.
func Kantz(ctx context.Context, s *Series, lag, dim int, set *DivergenceSettings) (*Divergence, error) {
	return divergence(ctx, s, lag, dim, set, true)
}

func divergence(ctx context.Context, s *Series, lag, dim int, ds *DivergenceSettings, kantz bool) (*Divergence, error) {
	if s == nil {
		return nil, settingf("nil series")
	}
	x := s.Values
	set, err := ds.withDefaults(len(x))
	if err != nil {
		return nil, err
	}
	e, err := Embed(x, lag, dim)
	if err != nil {
		return nil, err
	}
	K := set.Steps
	m := e.Len() - K // points that can be followed K steps
	if m < MinLen || m <= 2*set.Theiler+2 {
		return nil, shortf("divergence: %d points can be followed %d steps in dimension %d with a Theiler window of %d", max(m, 0), K, dim, set.Theiler)
	}
	nm := euclideanNorm
	method := "rosenstein"
	if kantz {
		nm = maxNorm
		method = "kantz"
	}
	t := newTree(e, m, nm)
	lo, hi := extent(x)
	eps := set.Radius * (hi - lo)
	sum := make([]float64, K+1)
	cnt := make([]int, K+1)
	acc := make([]float64, K+1)
	var nb []int
	refs := min(set.References, m)
	for r := 0; r < refs; r++ {
		if r%64 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("embed: %s canceled after %d of %d reference points: %w", method, r, refs, err)
			}
		}
		q := int(int64(r) * int64(m) / int64(refs))
		if !kantz {
			j, _ := t.nearest(q, set.Theiler)
			if j < 0 {
				continue
			}
			for k := 0; k <= K; k++ {
				if d := t.dist(q+k, j+k); d > 0 {
					sum[k] += detmath.Log(d)
					cnt[k]++
				}
			}
			continue
		}
		nb = t.within(q, set.Theiler, m, eps, nb[:0])
		if len(nb) == 0 {
			continue
		}
		clear(acc)
		for _, j := range nb {
			for k := 0; k <= K; k++ {
				acc[k] += t.dist(q+k, j+k)
			}
		}
		for k := 0; k <= K; k++ {
			if acc[k] > 0 {
				sum[k] += detmath.Log(acc[k] / float64(len(nb)))
				cnt[k]++
			}
		}
	}
	out := &Divergence{Method: method, Dim: dim, Lag: lag, Dt: s.Dt,
		Time: make([]float64, K+1), LogDist: make([]float64, K+1), Count: cnt}
	for k := range out.Time {
		out.Time[k] = float64(k) * s.Dt
		out.LogDist[k] = math.NaN()
		if cnt[k] > 0 {
			out.LogDist[k] = sum[k] / float64(cnt[k])
		}
	}
	out.Lambda, out.LambdaErr = math.NaN(), math.NaN()
	if cnt[0] == 0 {
		return out, shortf("%s: no reference point has a neighbour", method)
	}
	if l, ok := fitRise(out.Time, out.LogDist, set.RiseFrom, set.RiseTo); ok {
		out.Fit, out.Found = l, true
		out.Lambda = l.Slope
		out.LambdaErr = max(l.SlopeErr, halvesSpread(out.Time, out.LogDist, l.First, l.Last))
	}
	return out, nil
}

// fitRise fits the linear part of a divergence curve y(t). Rule: the
// plateau is the mean of the last quarter of the curve; the region runs
// from the first step where y has risen by the fraction from of the rise
// y(0) → plateau to the last step, before the curve first reaches the
// fraction to, that stays below it. At least 3 points are needed; a curve
// that does not rise (plateau <= y(0)) has no region.
func fitRise(ts, ys []float64, from, to float64) (Line, bool) {
	n := len(ys)
	var ps float64
	np := 0
	for _, v := range ys[n-n/4:] {
		if !math.IsNaN(v) {
			ps += v
			np++
		}
	}
	if np == 0 || math.IsNaN(ys[0]) {
		return Line{}, false
	}
	plateau := ps / float64(np)
	rise := plateau - ys[0]
	if !(rise > 0) {
		return Line{}, false
	}
	lo, hi := -1, -1
	for k, v := range ys {
		if math.IsNaN(v) {
			break
		}
		if v >= ys[0]+float64(to*rise) {
			break
		}
		if lo < 0 && v >= ys[0]+float64(from*rise) {
			lo = k
		}
		if lo >= 0 {
			hi = k
		}
	}
	if lo < 0 || hi-lo < 2 {
		return Line{}, false
	}
	return fitLine(ts, ys, lo, hi), true
}
