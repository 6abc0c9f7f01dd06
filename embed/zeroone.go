package embed

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// ZeroOneSettings are the choices of the 0-1 test. The zero value of a
// field means its default.
type ZeroOneSettings struct {
	// Frequencies is the number of random frequencies c (default 100).
	Frequencies int
	// Stride keeps every Stride-th value (default 1): an oversampled flow
	// looks regular to the test, so sample it about once per
	// decorrelation time (Gottwald & Melbourne 2009).
	Stride int
	// MaxPoints is the most values used after striding, the first ones
	// (default 10000).
	MaxPoints int
	// Lags is the most displacement lags n at which the mean square
	// displacement is computed, spread evenly over 1..N/10 (default 100).
	Lags int
	// Seed seeds the draw of the frequencies.
	Seed uint64
}

// Defaults of ZeroOneSettings.
const (
	DefaultZeroOneFrequencies = 100
	DefaultZeroOneMaxPoints   = 10000
	DefaultZeroOneLags        = 100
	// ZeroOneMinPoints is the fewest values (after striding) the test
	// takes: Gottwald & Melbourne (2009) advise about a thousand.
	ZeroOneMinPoints = 1000
)

// ZeroOne is the result of the 0-1 test for chaos.
type ZeroOne struct {
	// K is the median of Kc over the frequencies: near 1 for chaotic
	// dynamics, near 0 for regular (periodic, quasi-periodic) dynamics.
	K float64
	// KLow and KHigh are the quartiles of Kc, a measure of its spread.
	KLow, KHigh float64
	// Kc[i] is the correlation for frequency C[i].
	Kc, C []float64
	// Points is the number of values used, Stride the sampling stride.
	Points, Stride int
}

// ZeroOneTest runs the 0-1 test for chaos of Gottwald & Melbourne in its
// correlation form (2009). For each of Frequencies values of c drawn
// uniformly from (pi/5, 4pi/5),
//
//	p(n) = sum_{j<=n} phi(j) cos(jc),   q(n) = sum_{j<=n} phi(j) sin(jc),
//	M(n) = mean_j [(p(j+n)-p(j))² + (q(j+n)-q(j))²],
//	D(n) = M(n) - (mean phi)² (1 - cos nc)/(1 - cos c),
//	Kc   = corr(n, D(n))  over n up to N/10,
//
// and K is the median of Kc. The subtraction of the oscillatory term and
// the median over c make K robust against resonances. Cost O(F·L·N) for F
// frequencies and L lags.
//
// References:
//
//	G. A. Gottwald, I. Melbourne, "A new test for chaos in deterministic
//	  systems", Proc. R. Soc. Lond. A 460 (2004) 603–611.
//	G. A. Gottwald, I. Melbourne, "On the implementation of the 0-1 test
//	  for chaos", SIAM J. Appl. Dyn. Syst. 8 (2009) 129–145.
func ZeroOneTest(ctx context.Context, x []float64, s *ZeroOneSettings) (*ZeroOne, error) {
	var set ZeroOneSettings
	if s != nil {
		set = *s
	}
	if set.Frequencies == 0 {
		set.Frequencies = DefaultZeroOneFrequencies
	}
	if set.Stride == 0 {
		set.Stride = 1
	}
	if set.MaxPoints == 0 {
		set.MaxPoints = DefaultZeroOneMaxPoints
	}
	if set.Lags == 0 {
		set.Lags = DefaultZeroOneLags
	}
	switch {
	case set.Frequencies < 1:
		return nil, settingf("ZeroOneSettings.Frequencies = %d (want >= 1)", set.Frequencies)
	case set.Stride < 1:
		return nil, settingf("ZeroOneSettings.Stride = %d (want >= 1)", set.Stride)
	case set.MaxPoints < ZeroOneMinPoints:
		return nil, settingf("ZeroOneSettings.MaxPoints = %d (want >= %d)", set.MaxPoints, ZeroOneMinPoints)
	case set.Lags < 3:
		return nil, settingf("ZeroOneSettings.Lags = %d (want >= 3)", set.Lags)
	}
	n := min((len(x)+set.Stride-1)/set.Stride, set.MaxPoints)
	if n < ZeroOneMinPoints {
		return nil, shortf("0-1 test: %d values after a stride of %d (want at least %d)", n, set.Stride, ZeroOneMinPoints)
	}
	phi := make([]float64, n)
	for i := range phi {
		phi[i] = x[i*set.Stride]
	}
	mean, sd := moments(phi)
	if sd == 0 {
		return nil, &InputError{Index: -1, Err: ErrConstant, Detail: "0-1 test needs a varying series"}
	}
	ncut := n / 10
	lags := make([]int, 0, set.Lags)
	for k := 0; k < set.Lags; k++ {
		l := 1 + k*(ncut-1)/(set.Lags-1)
		if len(lags) == 0 || l > lags[len(lags)-1] {
			lags = append(lags, l)
		}
	}
	xi := make([]float64, len(lags))
	for k, l := range lags {
		xi[k] = float64(l)
	}
	rng := rand.New(rand.NewPCG(set.Seed, 0x01))
	p := make([]float64, n+1)
	q := make([]float64, n+1)
	dn := make([]float64, len(lags))
	out := &ZeroOne{Points: n, Stride: set.Stride}
	for f := 0; f < set.Frequencies; f++ {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("embed: 0-1 test canceled at frequency %d of %d: %w", f, set.Frequencies, err)
		}
		c := math.Pi/5 + float64(rng.Float64()*(3*math.Pi/5))
		for j := 1; j <= n; j++ {
			sn, cs := detmath.Sincos(float64(j) * c)
			p[j] = p[j-1] + float64(phi[j-1]*cs)
			q[j] = q[j-1] + float64(phi[j-1]*sn)
		}
		_, cosc := detmath.Sincos(c)
		for k, l := range lags {
			var m float64
			cnt := n - ncut // the same count for every lag (Gottwald & Melbourne 2009, Sect. 3)
			for j := 1; j <= cnt; j++ {
				dp := p[j+l] - p[j]
				dq := q[j+l] - q[j]
				m += float64(dp*dp) + float64(dq*dq)
			}
			m /= float64(cnt)
			_, cosl := detmath.Sincos(float64(l) * c)
			dn[k] = m - float64(float64(mean*mean)*(1-cosl))/(1-cosc)
		}
		out.C = append(out.C, c)
		out.Kc = append(out.Kc, correlation(xi, dn))
	}
	sorted := slices.Clone(out.Kc)
	slices.Sort(sorted)
	out.K = quantile(sorted, 0.5)
	out.KLow = quantile(sorted, 0.25)
	out.KHigh = quantile(sorted, 0.75)
	return out, nil
}

// correlation returns Pearson's correlation of a and b (0 when either is
// constant).
func correlation(a, b []float64) float64 {
	ma, sa := moments(a)
	mb, sb := moments(b)
	if sa == 0 || sb == 0 {
		return 0
	}
	var s float64
	for i := range a {
		s += float64((a[i] - ma) * (b[i] - mb))
	}
	return s / float64(len(a)) / (sa * sb)
}

// quantile returns the q-quantile of sorted values by linear
// interpolation between order statistics (Hyndman & Fan 1996, type 7).
func quantile(sorted []float64, q float64) float64 {
	if len(sorted) == 0 {
		return math.NaN()
	}
	h := float64(float64(len(sorted)-1) * q)
	i := int(h)
	if i >= len(sorted)-1 {
		return sorted[len(sorted)-1]
	}
	return sorted[i] + float64((h-float64(i))*(sorted[i+1]-sorted[i]))
}
