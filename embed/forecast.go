package embed

import (
	"context"
	"fmt"
	"math"
)

// ForecastSettings are the choices of Forecast. The zero value of a field
// means its default.
type ForecastSettings struct {
	// Neighbours is the number of analogues averaged (default 4).
	Neighbours int
	// Leads is the longest lead time in samples (default min(n/10, 1000)).
	Leads int
	// References is the most points forecast, spread evenly (default
	// 2000).
	References int
	// Theiler excludes analogues closer in time than this many samples to
	// the point forecast (default: Leads, so that no analogue's future
	// overlaps the forecast's own).
	Theiler int
	// Fraction is the error, as a fraction of the series' standard
	// deviation, at which a forecast counts as lost (default 0.5).
	Fraction float64
}

// Defaults of ForecastSettings.
const (
	DefaultForecastNeighbours = 4
	DefaultForecastLeads      = 1000
	DefaultForecastRefs       = 2000
	DefaultForecastFraction   = 0.5
)

// ForecastCurve is the error of nearest-neighbour forecasts against lead
// time, and the lead at which it reaches a given fraction of the spread.
type ForecastCurve struct {
	// Dim and Lag are the embedding's; Dt the sampling interval.
	Dim, Lag int
	Dt       float64
	// Lead[h] = h·Dt; Error[h] is the root-mean-square forecast error
	// at that lead divided by the series' standard deviation (Error[0]
	// = 0: the present is known).
	Lead, Error []float64
	// References is the number of points forecast.
	References int
	// Fraction is the error level that ends the horizon.
	Fraction float64
	// Horizon is the first lead time (in time units) where Error reaches
	// Fraction, interpolated linearly between samples; HorizonSteps the
	// same in samples (rounded up). Found is false when the error stays
	// below Fraction up to the last lead computed (the horizon is then
	// at least Lead[len-1]).
	Horizon      float64
	HorizonSteps int
	Found        bool
}

// Forecast measures how far ahead the series can be forecast from its own
// past by the method of analogues: each reference point's delay vector
// (lag, dim) is matched with its Neighbours nearest delay vectors
// elsewhere in the series (outside the Theiler window, maximum norm, in a
// k-d tree), and the forecast h samples ahead is the mean of what followed
// them. The normalised error
//
//	E(h) = sqrt(mean_i (forecast_i(h) - x_{i+h})²) / sd(x)
//
// grows from the one-step error towards about 1 (a forecast no better than
// the mean); the horizon is the lead where it first reaches Fraction. This
// is the data's own trust horizon, made without any model; its start is
// set by the noise and the density of analogues, its growth by the largest
// exponent (the error grows like exp(lambda·t) while small).
//
// References:
//
//	E. N. Lorenz, "Atmospheric predictability as revealed by naturally
//	  occurring analogues", J. Atmos. Sci. 26 (1969) 636–646.
//	G. Sugihara, R. M. May, "Nonlinear forecasting as a way of
//	  distinguishing chaos from measurement error in time series", Nature
//	  344 (1990) 734–741.
//	J. D. Farmer, J. J. Sidorowich, "Predicting chaotic time series",
//	  Phys. Rev. Lett. 59 (1987) 845–848.
func Forecast(ctx context.Context, s *Series, lag, dim int, fs *ForecastSettings) (*ForecastCurve, error) {
	if s == nil {
		return nil, settingf("nil series")
	}
	x := s.Values
	var set ForecastSettings
	if fs != nil {
		set = *fs
	}
	if set.Neighbours == 0 {
		set.Neighbours = DefaultForecastNeighbours
	}
	if set.Leads == 0 {
		set.Leads = min(max(len(x)/10, 2), DefaultForecastLeads)
	}
	if set.References == 0 {
		set.References = DefaultForecastRefs
	}
	if set.Theiler == 0 {
		set.Theiler = set.Leads
	}
	if set.Fraction == 0 {
		set.Fraction = DefaultForecastFraction
	}
	switch {
	case set.Neighbours < 1 || set.Neighbours > 100:
		return nil, settingf("ForecastSettings.Neighbours = %d (want 1..100)", set.Neighbours)
	case set.Leads < 1:
		return nil, settingf("ForecastSettings.Leads = %d (want >= 1)", set.Leads)
	case set.References < 1:
		return nil, settingf("ForecastSettings.References = %d (want >= 1)", set.References)
	case set.Theiler < 0:
		return nil, settingf("ForecastSettings.Theiler = %d (want >= 0)", set.Theiler)
	case !(set.Fraction > 0 && set.Fraction < 2):
		return nil, settingf("ForecastSettings.Fraction = %g (want in (0, 2))", set.Fraction)
	}
	e, err := Embed(x, lag, dim)
	if err != nil {
		return nil, err
	}
	H := set.Leads
	m := e.Len() - H // points whose future is known H samples ahead
	if m < MinLen || m <= 2*set.Theiler+set.Neighbours {
		return nil, shortf("forecast: %d points have a future %d samples ahead in dimension %d, with a Theiler window of %d",
			max(m, 0), H, dim, set.Theiler)
	}
	_, sd := moments(x)
	if sd == 0 {
		return nil, &InputError{Index: -1, Err: ErrConstant, Detail: "forecast needs a varying series"}
	}
	t := newTree(e, m, maxNorm)
	k := set.Neighbours
	idx := make([]int, k)
	dist := make([]float64, k)
	sq := make([]float64, H+1)
	last := (dim - 1) * lag // the newest coordinate of a delay vector
	refs := min(set.References, m)
	used := 0
	for r := 0; r < refs; r++ {
		if r%64 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, fmt.Errorf("embed: forecast canceled after %d of %d points: %w", r, refs, err)
			}
		}
		q := int(int64(r) * int64(m) / int64(refs))
		got := t.kNearest(q, set.Theiler, k, idx, dist)
		if got == 0 {
			continue
		}
		used++
		for h := 1; h <= H; h++ {
			var f float64
			for _, j := range idx[:got] {
				f += x[j+last+h]
			}
			d := f/float64(got) - x[q+last+h]
			sq[h] += float64(d * d)
		}
	}
	if used == 0 {
		return nil, shortf("forecast: no point has an analogue outside the Theiler window of %d", set.Theiler)
	}
	out := &ForecastCurve{Dim: dim, Lag: lag, Dt: s.Dt, Lead: make([]float64, H+1), Error: make([]float64, H+1),
		References: used, Fraction: set.Fraction}
	for h := range out.Lead {
		out.Lead[h] = float64(h) * s.Dt
		out.Error[h] = math.Sqrt(sq[h]/float64(used)) / sd
	}
	for h := 1; h <= H; h++ {
		if out.Error[h] >= set.Fraction {
			a, b := out.Error[h-1], out.Error[h]
			frac := (set.Fraction - a) / (b - a)
			out.Horizon = (float64(h-1) + frac) * s.Dt
			out.HorizonSteps = h
			out.Found = true
			break
		}
	}
	if !out.Found {
		out.Horizon = out.Lead[H]
		out.HorizonSteps = H
	}
	return out, nil
}

// PredictionError returns the statistic "normalised root-mean-square
// error of nearest-neighbour forecasts lead samples ahead" for the given
// embedding, as a function for SurrogateTest: smaller means more
// predictable, so deterministic structure shows as a value below the
// surrogates' (Sugihara & May 1990; Theiler et al. 1992).
func PredictionError(lag, dim, lead int) Statistic {
	return func(ctx context.Context, x []float64) (float64, error) {
		s, err := NewSeries(x, 1)
		if err != nil {
			return 0, err
		}
		c, err := Forecast(ctx, s, lag, dim, &ForecastSettings{Leads: lead, Theiler: max(lead, lag*dim)})
		if err != nil {
			return 0, err
		}
		return c.Error[lead], nil
	}
}
