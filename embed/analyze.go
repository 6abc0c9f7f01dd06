package embed

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// Settings are the choices of Analyze. The zero value of a field means
// the rule or default its comment gives; every choice made is reported in
// Report.Choices.
type Settings struct {
	// Lag is the delay in samples; 0 chooses it (see Analyze).
	Lag int
	// Dim is the embedding dimension; 0 chooses it.
	Dim int
	// MaxDim is the largest dimension tried when choosing (default 8).
	MaxDim int
	// Theiler is the Theiler window in samples; 0 chooses it.
	Theiler int
	// Fraction is the forecast error, as a fraction of the standard
	// deviation, that ends the forecast horizon (default 0.5).
	Fraction float64
	// Surrogates is the number of IAAFT surrogates of the rank test
	// (default 19, a one-sided test at 5 %); negative skips the test.
	Surrogates int
	// SurrogatePoints is the most values (the first ones) the surrogate
	// test uses (default 4096): each IAAFT surrogate costs tens of
	// transforms and sorts of the series.
	SurrogatePoints int
	// Seed seeds the surrogates and the 0-1 test's frequencies.
	Seed uint64
}

// Defaults of Settings.
const (
	DefaultMaxDim          = 8
	DefaultSurrogates      = 19
	DefaultSurrogatePoints = 4096
	// fallbackDim is the dimension used when no dimension removes the
	// false neighbours (noise-like data): small enough for the k-d trees
	// to stay efficient.
	fallbackDim = 5
)

// Report is everything Analyze measured, with the choices that shaped it
// and notes where a method's assumptions look doubtful.
type Report struct {
	// N is the number of values, Dt the sampling interval.
	N  int
	Dt float64
	// Mean and SD are the series' mean and standard deviation.
	Mean, SD float64
	// Lag, Dim and Theiler are the embedding used (samples, count,
	// samples); Choices says how each was chosen.
	Lag, Dim, Theiler int
	Choices           Choices
	// The measurements; a nil one was skipped or failed (see Notes).
	MutualInfo      *MutualInfo
	Autocorrelation *Autocorrelation
	FNN             *FNN
	Cao             *Cao
	CorrDim         *CorrDim
	Rosenstein      *Divergence
	Kantz           *Divergence
	Forecast        *ForecastCurve
	Surrogate       *RankResult
	ZeroOne         *ZeroOne
	// ExponentHorizon is the lead time (time units) at which an error
	// of the one-step forecast's size, growing like exp(lambda·t) with
	// Rosenstein's lambda, reaches Forecast.Fraction of the spread:
	// Lead[1] + ln(Fraction / Error[1]) / lambda (Boffetta et al. 2002).
	// NaN when lambda is not positive or no forecast was made.
	ExponentHorizon float64
	// Notes say, in words, where an assumption fails or a result is weak.
	Notes []string
}

// Choices records how the embedding was chosen.
type Choices struct {
	Lag, Dim, Theiler string
}

// Analyze runs every measurement of the package on one series and returns
// one report:
//
//  1. The lag (unless Settings.Lag): 1 when the autocorrelation falls
//     below 1/e within one sample (a map, or a series sampled coarser than
//     its memory: the mutual information's minimum then lies in its noise
//     floor); otherwise the first minimum of the mutual information; when
//     that has none, the autocorrelation's 1/e time.
//  2. The Theiler window (unless set): the autocorrelation's first zero
//     (its 1/e time when there is no zero, the longest lag computed when
//     it stays above 1/e), at least 1 and at most n/20.
//  3. The dimension (unless set): the larger of the false-neighbour and
//     Cao dimensions up to MaxDim; when neither settles, 5, with a note.
//  4. With that embedding: the correlation dimension, the largest exponent
//     by Rosenstein's and Kantz's methods, the analogue forecast horizon
//     and the horizon the exponent predicts, the IAAFT surrogate rank test
//     of the prediction error one lag ahead, and the 0-1 test on the
//     series sampled every lag.
//
// A given lag and dimension that reach beyond the series are an
// ErrEmbedding error. A step that cannot run on this series (too short for
// it) leaves its field nil and says so in Notes; a failure of the lag or dimension
// choice, bad settings and cancellation return the error with the partial
// report.
func Analyze(ctx context.Context, s *Series, set *Settings) (*Report, error) {
	if s == nil {
		return nil, settingf("nil series")
	}
	var c Settings
	if set != nil {
		c = *set
	}
	if c.MaxDim == 0 {
		c.MaxDim = DefaultMaxDim
	}
	if c.Fraction == 0 {
		c.Fraction = DefaultForecastFraction
	}
	if c.Surrogates == 0 {
		c.Surrogates = DefaultSurrogates
	}
	if c.SurrogatePoints == 0 {
		c.SurrogatePoints = DefaultSurrogatePoints
	}
	switch {
	case c.Lag < 0:
		return nil, settingf("Settings.Lag = %d (want >= 0)", c.Lag)
	case c.Dim < 0 || c.Dim > 50:
		return nil, settingf("Settings.Dim = %d (want 0..50)", c.Dim)
	case c.MaxDim < 1 || c.MaxDim > 50:
		return nil, settingf("Settings.MaxDim = %d (want 1..50)", c.MaxDim)
	case c.Theiler < 0:
		return nil, settingf("Settings.Theiler = %d (want >= 0)", c.Theiler)
	case !(c.Fraction > 0 && c.Fraction < 2):
		return nil, settingf("Settings.Fraction = %g (want in (0, 2))", c.Fraction)
	case c.SurrogatePoints < MinLen:
		return nil, settingf("Settings.SurrogatePoints = %d (want >= %d)", c.SurrogatePoints, MinLen)
	}
	x := s.Values
	if c.Lag > 0 && c.Dim > 0 {
		if _, err := Embed(x, c.Lag, c.Dim); err != nil {
			return nil, err
		}
	}
	r := &Report{N: len(x), Dt: s.Dt, ExponentHorizon: math.NaN()}
	r.Mean, r.SD = moments(x)
	var err error
	if r.Autocorrelation, err = Autocorrelate(x, 0); err != nil {
		return r, err
	}
	if r.MutualInfo, err = AverageMutualInfo(x, 0); err != nil {
		return r, err
	}
	ac := r.Autocorrelation
	switch {
	case c.Lag > 0:
		r.Lag, r.Choices.Lag = c.Lag, "given"
	case ac.EFold == 1:
		r.Lag, r.Choices.Lag = 1, "1: the autocorrelation falls below 1/e within one sample"
	case r.MutualInfo.FirstMin > 0:
		r.Lag, r.Choices.Lag = r.MutualInfo.FirstMin, "first minimum of the mutual information"
	case ac.EFold > 0:
		r.Lag, r.Choices.Lag = ac.EFold, "the autocorrelation's 1/e time (the mutual information has no minimum)"
		r.note("the mutual information has no minimum up to lag %d", len(r.MutualInfo.Info)-1)
	default:
		return r, shortf("no lag: the autocorrelation stays above 1/e up to lag %d; the series is too short for its memory", len(ac.R)-1)
	}
	maxW := max(len(x)/20, 1)
	switch {
	case c.Theiler > 0:
		r.Theiler, r.Choices.Theiler = c.Theiler, "given"
	case ac.FirstZero > 0:
		r.Theiler, r.Choices.Theiler = min(ac.FirstZero, maxW), "the autocorrelation's first zero"
	case ac.EFold > 0:
		r.Theiler, r.Choices.Theiler = min(ac.EFold, maxW), "the autocorrelation's 1/e time (it has no zero)"
	default:
		r.Theiler, r.Choices.Theiler = min(max(len(ac.R)-1, 1), maxW), "the longest lag computed (the autocorrelation stays above 1/e)"
	}
	if ac.EFold == 0 {
		r.note("the autocorrelation stays above 1/e for %d samples: the series drifts (a trend, a random walk) or is sampled far finer than it changes; the measures below assume a stationary signal", len(ac.R)-1)
	}
	if err := r.chooseDim(ctx, x, c); err != nil {
		return r, err
	}
	if err := r.measure(ctx, s, c); err != nil {
		return r, err
	}
	return r, nil
}

func (r *Report) note(format string, a ...any) {
	r.Notes = append(r.Notes, fmt.Sprintf(format, a...))
}

// optional turns an error of an optional step into a note (too short, or
// an embedding beyond the series) and passes others on.
func (r *Report) optional(step string, err error) error {
	if err == nil {
		return nil
	}
	if errors.Is(err, ErrTooShort) || errors.Is(err, ErrEmbedding) {
		r.note("%s skipped: %s", step, strings.TrimPrefix(err.Error(), "embed: "))
		return nil
	}
	return fmt.Errorf("%s: %w", step, err)
}

func (r *Report) chooseDim(ctx context.Context, x []float64, c Settings) error {
	maxDim := c.MaxDim
	for maxDim > 1 {
		if _, err := Embed(x, r.Lag, maxDim+2); err == nil && len(x)-(maxDim+1)*r.Lag > 2*r.Theiler+MinLen {
			break
		}
		maxDim--
	}
	if maxDim < c.MaxDim {
		r.note("dimensions tried only up to %d: lag %d leaves too few points beyond", maxDim, r.Lag)
	}
	var err error
	if maxDim >= 1 {
		r.FNN, err = FalseNeighbours(ctx, x, r.Lag, maxDim, &FNNSettings{Theiler: r.Theiler})
		if err = r.optional("false neighbours", err); err != nil {
			return err
		}
		if r.FNN == nil || len(r.FNN.Fraction) < maxDim { // partial
			r.FNN = nil
		}
		r.Cao, err = CaoDimension(ctx, x, r.Lag, maxDim, r.Theiler)
		if err = r.optional("Cao's test", err); err != nil {
			return err
		}
	}
	if c.Dim > 0 {
		r.Dim, r.Choices.Dim = c.Dim, "given"
		return nil
	}
	d := 0
	if r.FNN != nil {
		d = r.FNN.Dimension
	}
	if r.Cao != nil {
		d = max(d, r.Cao.Dimension)
	}
	if d == 0 {
		r.Dim, r.Choices.Dim = min(fallbackDim, max(maxDim, 1)), "fallback: no dimension up to the largest tried removes the false neighbours"
		r.note("no embedding dimension up to %d settles (false neighbours stay, E1 stays below %g): the series behaves like noise or a high-dimensional system, and the measures at dimension %d mean little", maxDim, CaoSaturation, r.Dim)
		return nil
	}
	r.Dim, r.Choices.Dim = d, "the larger of the false-neighbour and Cao dimensions"
	return nil
}

func (r *Report) measure(ctx context.Context, s *Series, c Settings) error {
	x := s.Values
	var err error
	if r.Cao != nil && r.Cao.E2Spread < caoNoiseSpread {
		r.note("Cao's E2 stays within %g of 1 at every dimension: by this test the series cannot be told from noise", caoNoiseSpread)
	}
	r.CorrDim, err = CorrelationDimension(ctx, x, r.Lag, r.Dim, &CorrSettings{Theiler: r.Theiler})
	if err = r.optional("correlation dimension", err); err != nil {
		return err
	}
	if d := r.CorrDim; d != nil {
		switch {
		case !d.Found:
			r.note("correlation dimension: no scaling region with %d+ pairs below C = %g", DefaultCorrMinPairs, DefaultCorrMaxSum)
		case d.D2 > float64(r.Dim)-0.5:
			r.note("correlation dimension %.3g is close to the embedding dimension %d: the points fill the embedding, as noise does", d.D2, r.Dim)
		}
		if lim := 2 * detmath.Log(float64(len(x))) / detmath.Log(10); d.Found && d.D2 > lim {
			r.note("correlation dimension %.3g exceeds 2 log10 N = %.3g, the most %d points can resolve (Eckmann & Ruelle 1992)", d.D2, lim, len(x))
		}
	}
	div := &DivergenceSettings{Theiler: r.Theiler}
	r.Rosenstein, err = Rosenstein(ctx, s, r.Lag, r.Dim, div)
	if err = r.optional("Rosenstein's exponent", err); err != nil {
		return err
	}
	r.Kantz, err = Kantz(ctx, s, r.Lag, r.Dim, div)
	if err = r.optional("Kantz's exponent", err); err != nil {
		return err
	}
	for _, d := range []*Divergence{r.Rosenstein, r.Kantz} {
		if d != nil && !d.Found {
			r.note("%s: the divergence curve does not rise to a plateau; no exponent", d.Method)
		}
	}
	if a, b := r.Rosenstein, r.Kantz; a != nil && b != nil && a.Found && b.Found &&
		math.Abs(a.Lambda-b.Lambda) > 2*math.Sqrt(float64(a.LambdaErr*a.LambdaErr)+float64(b.LambdaErr*b.LambdaErr)) {
		r.note("the exponents of Rosenstein (%.3g ± %.2g) and Kantz (%.3g ± %.2g) disagree beyond their errors", a.Lambda, a.LambdaErr, b.Lambda, b.LambdaErr)
	}
	r.Forecast, err = Forecast(ctx, s, r.Lag, r.Dim, &ForecastSettings{Fraction: c.Fraction})
	if err = r.optional("forecast", err); err != nil {
		return err
	}
	if f := r.Forecast; f != nil {
		if !f.Found {
			r.note("the forecast error stays below %g of the spread up to the last lead computed (%g): the horizon is at least that", f.Fraction, f.Horizon)
		}
		if d := r.Rosenstein; d != nil && d.Found && d.Lambda > 0 && len(f.Error) > 1 && f.Error[1] > 0 && f.Error[1] < f.Fraction {
			r.ExponentHorizon = f.Lead[1] + detmath.Log(f.Fraction/f.Error[1])/d.Lambda
		}
	}
	if c.Surrogates > 0 {
		n := min(len(x), c.SurrogatePoints)
		r.Surrogate, err = SurrogateTest(ctx, x[:n], IAAFT, c.Surrogates, c.Seed, 0, PredictionError(r.Lag, r.Dim, r.Lag))
		if err = r.optional("surrogate test", err); err != nil {
			return err
		}
		if t := r.Surrogate; t != nil && !t.Rejected {
			r.note("the surrogate test does not reject a linear Gaussian process seen through a static transform (p = %.2g): the exponent, dimension and horizon need not mean chaos", t.P)
		}
	}
	r.ZeroOne, err = ZeroOneTest(ctx, x, &ZeroOneSettings{Stride: r.Lag, Seed: c.Seed})
	if err = r.optional("0-1 test", err); err != nil {
		return err
	}
	if z := r.ZeroOne; z != nil && z.K > 0.2 && z.K < 0.8 {
		r.note("the 0-1 test is undecided (K = %.2g): the series may be too short, oversampled, or weakly chaotic", z.K)
	}
	return nil
}

// caoNoiseSpread is the E2 spread below which a series counts as
// noise-like: white noise of a few thousand points stays within about 0.05
// of 1 (TestCaoNoise), deterministic series depart by far more (Cao 1997).
const caoNoiseSpread = 0.1
