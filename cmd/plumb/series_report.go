package main

import (
	"fmt"
	"io"
	"math"
	"strconv"

	"github.com/plumbdyn/plumb/embed"
)

// seriesJSON is the --format json result of plumb series.
type seriesJSON struct {
	header
	// Source is the file read ("stdin" for -).
	Source string `json:"source"`
	// Settings echoes the flags, defaults included.
	Settings seriesSettingsJSON `json:"settings"`
	// Status is completed, canceled or failed; Error says why not
	// completed (null when it did).
	Status string  `json:"status"`
	Error  errText `json:"error"`
	// Series describes the values read.
	Series *seriesStatsJSON `json:"series,omitempty"`
	// Embedding is the delay embedding used and how it was chosen.
	Embedding *embeddingJSON `json:"embedding,omitempty"`
	// Delay holds the curves the lag was read from.
	Delay *delayJSON `json:"delay,omitempty"`
	// Dimension holds the false-neighbour fractions and Cao's E1, E2.
	Dimension *dimensionJSON `json:"dimension,omitempty"`
	// CorrelationDimension is D2 with its correlation sums.
	CorrelationDimension *corrDimJSON `json:"correlation_dimension,omitempty"`
	// Exponent holds the largest exponent from divergence curves.
	Exponent *exponentJSON `json:"exponent,omitempty"`
	// Forecast is the forecast error against lead time and the horizons.
	Forecast *forecastJSON `json:"forecast,omitempty"`
	// SurrogateTest is the rank test against IAAFT surrogates.
	SurrogateTest *surrogateJSON `json:"surrogate_test,omitempty"`
	// ZeroOne is the 0-1 test for chaos.
	ZeroOne *zeroOneJSON `json:"zero_one,omitempty"`
	// Notes say where a method's assumptions look doubtful.
	Notes []string `json:"notes"`
	// Caution says what a horizon from data is not.
	Caution string `json:"caution"`
}

type seriesSettingsJSON struct {
	Column     string  `json:"column"`
	Time       string  `json:"time"`
	Dt         float64 `json:"dt"`
	Lag        int     `json:"lag"`
	Dim        int     `json:"dim"`
	MaxDim     int     `json:"max_dim"`
	Theiler    int     `json:"theiler"`
	Fraction   float64 `json:"fraction"`
	Surrogates int     `json:"surrogates"`
	Seed       uint64  `json:"seed"`
}

type seriesStatsJSON struct {
	N    int     `json:"n"`
	Dt   float64 `json:"dt"`
	Mean num     `json:"mean"`
	SD   num     `json:"sd"`
}

type embeddingJSON struct {
	// Lag and Theiler are in samples.
	Lag         int    `json:"lag"`
	Dim         int    `json:"dim"`
	Theiler     int    `json:"theiler"`
	LagRule     string `json:"lag_rule"`
	DimRule     string `json:"dim_rule"`
	TheilerRule string `json:"theiler_rule"`
}

type delayJSON struct {
	// MutualInfo[l] is the mutual information (nats) at lag l samples.
	MutualInfo []num `json:"mutual_info"`
	Bins       int   `json:"bins"`
	// FirstMinimum is 0 when there is none.
	FirstMinimum         int   `json:"first_minimum"`
	Autocorrelation      []num `json:"autocorrelation"`
	AutocorrelationEFold int   `json:"autocorrelation_efold"`
	AutocorrelationZero  int   `json:"autocorrelation_zero"`
}

type dimensionJSON struct {
	// FalseFraction[d-1] is the false-neighbour fraction at dimension d.
	FalseFraction []num `json:"false_fraction"`
	FalseDim      int   `json:"false_dim"`
	CaoE1         []num `json:"cao_e1"`
	CaoE2         []num `json:"cao_e2"`
	CaoDim        int   `json:"cao_dim"`
	E2Spread      num   `json:"e2_spread"`
}

type corrDimJSON struct {
	D2         num   `json:"d2"`
	D2Error    num   `json:"d2_error"`
	Found      bool  `json:"found"`
	FitFrom    num   `json:"fit_from_radius"`
	FitTo      num   `json:"fit_to_radius"`
	Radii      []num `json:"radii"`
	Sums       []num `json:"sums"`
	References int   `json:"references"`
}

type exponentJSON struct {
	// Units of lambda: natural log per time unit of --dt or --time.
	Units      string          `json:"units"`
	Rosenstein *divergenceJSON `json:"rosenstein"`
	Kantz      *divergenceJSON `json:"kantz"`
}

type divergenceJSON struct {
	Lambda      num   `json:"lambda"`
	LambdaError num   `json:"lambda_error"`
	Found       bool  `json:"found"`
	FitFrom     num   `json:"fit_from_time"`
	FitTo       num   `json:"fit_to_time"`
	Time        []num `json:"time"`
	LogDistance []num `json:"log_distance"`
}

type forecastJSON struct {
	Fraction float64 `json:"fraction"`
	// Horizon is the lead (time units) where the error reaches Fraction;
	// Reached is false when it stays below up to the last lead.
	Horizon         num   `json:"horizon"`
	Reached         bool  `json:"reached"`
	ExponentHorizon num   `json:"exponent_horizon"`
	Lead            []num `json:"lead"`
	Error           []num `json:"error"`
}

type surrogateJSON struct {
	Kind        string `json:"kind"`
	Count       int    `json:"count"`
	Statistic   string `json:"statistic"`
	Value       num    `json:"value"`
	Surrogates  []num  `json:"surrogates"`
	Rank        int    `json:"rank"`
	P           num    `json:"p"`
	Rejected    bool   `json:"rejected"`
	SpectrumErr num    `json:"spectrum_error"`
}

type zeroOneJSON struct {
	K      num `json:"k"`
	KLow   num `json:"k_low"`
	KHigh  num `json:"k_high"`
	Stride int `json:"stride"`
	Points int `json:"points"`
}

const seriesCaution = "a forecast horizon from data describes the recorded signal, not a safety certificate for the real system; safety-critical use follows the field's own codes and licensed review"

func newSeriesJSON(source string, f *seriesFlags, s *embed.Series, r *embed.Report, err error) *seriesJSON {
	out := &seriesJSON{header: newHeader("series"), Source: source, Notes: []string{}, Caution: seriesCaution,
		Settings: seriesSettingsJSON{Column: f.column, Time: f.timeCol, Dt: s.Dt, Lag: f.lag, Dim: f.dim, MaxDim: f.maxDim,
			Theiler: f.theiler, Fraction: f.fraction, Surrogates: f.surrogates, Seed: f.seed}}
	out.Status, out.Error = runStatus(err)
	if r == nil {
		return out
	}
	out.Notes = append(out.Notes, r.Notes...)
	out.Series = &seriesStatsJSON{N: r.N, Dt: r.Dt, Mean: num(r.Mean), SD: num(r.SD)}
	if r.Dim > 0 {
		out.Embedding = &embeddingJSON{Lag: r.Lag, Dim: r.Dim, Theiler: r.Theiler,
			LagRule: r.Choices.Lag, DimRule: r.Choices.Dim, TheilerRule: r.Choices.Theiler}
	}
	if r.MutualInfo != nil && r.Autocorrelation != nil {
		out.Delay = &delayJSON{MutualInfo: nums(r.MutualInfo.Info), Bins: r.MutualInfo.Bins, FirstMinimum: r.MutualInfo.FirstMin,
			Autocorrelation: nums(r.Autocorrelation.R), AutocorrelationEFold: r.Autocorrelation.EFold, AutocorrelationZero: r.Autocorrelation.FirstZero}
	}
	if r.FNN != nil || r.Cao != nil {
		d := &dimensionJSON{FalseFraction: []num{}, CaoE1: []num{}, CaoE2: []num{}}
		if r.FNN != nil {
			d.FalseFraction, d.FalseDim = nums(r.FNN.Fraction), r.FNN.Dimension
		}
		if r.Cao != nil {
			d.CaoE1, d.CaoE2, d.CaoDim, d.E2Spread = nums(r.Cao.E1), nums(r.Cao.E2), r.Cao.Dimension, num(r.Cao.E2Spread)
		}
		out.Dimension = d
	}
	if c := r.CorrDim; c != nil {
		j := &corrDimJSON{D2: num(c.D2), D2Error: num(c.D2Err), Found: c.Found, FitFrom: num(nan), FitTo: num(nan),
			Radii: nums(c.Radii), Sums: nums(c.Sum), References: c.References}
		if c.Found {
			j.FitFrom, j.FitTo = num(c.Radii[c.Fit.First]), num(c.Radii[c.Fit.Last])
		}
		out.CorrelationDimension = j
	}
	if r.Rosenstein != nil || r.Kantz != nil {
		out.Exponent = &exponentJSON{Units: "1/time unit (natural log)", Rosenstein: divJSON(r.Rosenstein), Kantz: divJSON(r.Kantz)}
	}
	if fc := r.Forecast; fc != nil {
		out.Forecast = &forecastJSON{Fraction: fc.Fraction, Horizon: num(fc.Horizon), Reached: fc.Found,
			ExponentHorizon: num(r.ExponentHorizon), Lead: nums(fc.Lead), Error: nums(fc.Error)}
	}
	if t := r.Surrogate; t != nil {
		out.SurrogateTest = &surrogateJSON{Kind: t.Kind.String(), Count: t.Count,
			Statistic: "error of nearest-neighbour forecasts one lag ahead, over the standard deviation",
			Value:     num(t.Value), Surrogates: nums(t.Surrogates), Rank: t.Rank, P: num(t.P), Rejected: t.Rejected, SpectrumErr: num(t.SpectrumErr)}
	}
	if z := r.ZeroOne; z != nil {
		out.ZeroOne = &zeroOneJSON{K: num(z.K), KLow: num(z.KLow), KHigh: num(z.KHigh), Stride: z.Stride, Points: z.Points}
	}
	return out
}

var nan = math.NaN()

func divJSON(d *embed.Divergence) *divergenceJSON {
	if d == nil {
		return nil
	}
	j := &divergenceJSON{Lambda: num(d.Lambda), LambdaError: num(d.LambdaErr), Found: d.Found, FitFrom: num(nan), FitTo: num(nan),
		Time: nums(d.Time), LogDistance: nums(d.LogDist)}
	if d.Found {
		j.FitFrom, j.FitTo = num(d.Time[d.Fit.First]), num(d.Time[d.Fit.Last])
	}
	return j
}

// writeSeriesTable writes the report for people: one line per quantity,
// its value, error and the choice behind it.
func writeSeriesTable(w io.Writer, o *seriesJSON) error {
	tw := newTable(w)
	p := func(format string, a ...any) { fmt.Fprintf(tw, format+"\n", a...) }
	p("source\t%s", o.Source)
	if s := o.Series; s != nil {
		p("values\t%d, dt %s, mean %s, sd %s", s.N, short(float64(s.Dt)), short(float64(s.Mean)), short(float64(s.SD)))
	}
	if e := o.Embedding; e != nil {
		p("lag\t%s (%s time units)\t%s", count(e.Lag, "sample"), short(float64(e.Lag)*o.Series.Dt), e.LagRule)
		p("dimension\t%d\t%s", e.Dim, e.DimRule)
		p("theiler window\t%s\t%s", count(e.Theiler, "sample"), e.TheilerRule)
	}
	if d := o.Dimension; d != nil {
		p("false neighbours\t%s\tfraction at dimension 1, 2, ...", list(d.FalseFraction))
		p("Cao E1\t%s", list(d.CaoE1))
		p("Cao E2\t%s\tlargest |E2 - 1| = %s (near 0 for noise)", list(d.CaoE2), short(float64(d.E2Spread)))
	}
	if c := o.CorrelationDimension; c != nil {
		p("correlation dimension D2\t%s ± %s\tradii %s to %s, %d reference points", short(float64(c.D2)), short(float64(c.D2Error)),
			short(float64(c.FitFrom)), short(float64(c.FitTo)), c.References)
	}
	if e := o.Exponent; e != nil {
		for _, m := range []struct {
			name string
			d    *divergenceJSON
		}{{"largest exponent (Rosenstein)", e.Rosenstein}, {"largest exponent (Kantz)", e.Kantz}} {
			if m.d == nil {
				continue
			}
			p("%s\t%s ± %s /time\tfitted over t = %s to %s", m.name, short(float64(m.d.Lambda)), short(float64(m.d.LambdaError)),
				short(float64(m.d.FitFrom)), short(float64(m.d.FitTo)))
		}
	}
	if f := o.Forecast; f != nil {
		reach := ""
		if !f.Reached {
			reach = "at least "
		}
		p("forecast horizon (data)\t%s%s time units\terror of nearest-neighbour forecasts reaches %s of the sd", reach, short(float64(f.Horizon)), short(f.Fraction))
		p("forecast horizon (exponent)\t%s time units\tone-step error grown at Rosenstein's exponent to the same level", short(float64(f.ExponentHorizon)))
	}
	if t := o.SurrogateTest; t != nil {
		verdict := "not rejected"
		if t.Rejected {
			verdict = "rejected"
		}
		p("surrogate test\t%s (p = %s)\t%d %s surrogates; null: linear Gaussian process, static transform; spectrum error %s",
			verdict, short(float64(t.P)), t.Count, t.Kind, short(float64(t.SpectrumErr)))
	}
	if z := o.ZeroOne; z != nil {
		p("0-1 test K\t%s\tquartiles %s, %s; every %d samples, %d points", short(float64(z.K)), short(float64(z.KLow)), short(float64(z.KHigh)), z.Stride, z.Points)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	for _, n := range o.Notes {
		if _, err := fmt.Fprintf(w, "note: %s\n", n); err != nil {
			return err
		}
	}
	_, err := fmt.Fprintf(w, "caution: %s\n", o.Caution)
	return err
}

// short is v with 4 significant digits, "-" for NaN.
func short(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "-"
	}
	return strconv.FormatFloat(v, 'g', 4, 64)
}

func list(v []num) string {
	if len(v) == 0 {
		return "-"
	}
	s := ""
	for i, x := range v {
		if i > 0 {
			s += " "
		}
		s += short(float64(x))
	}
	return s
}
