package embed

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// SurrogateKind chooses how surrogate series are made.
type SurrogateKind int

const (
	// PhaseRandomised keeps the power spectrum (hence the
	// autocorrelation) and draws the Fourier phases at random: the
	// null hypothesis of a linear Gaussian process (Theiler et al. 1992).
	PhaseRandomised SurrogateKind = iota + 1
	// IAAFT keeps the values exactly (a permutation of the series) and
	// the power spectrum approximately: the null hypothesis of a linear
	// Gaussian process seen through a static, possibly nonlinear,
	// measurement function (Schreiber & Schmitz 1996).
	IAAFT
)

// String returns the kind's name as written in reports.
func (k SurrogateKind) String() string {
	switch k {
	case PhaseRandomised:
		return "phase_randomised"
	case IAAFT:
		return "iaaft"
	}
	return fmt.Sprintf("SurrogateKind(%d)", int(k))
}

// IAAFTMaxIter is the most iterations of IAAFT; it stops earlier when an
// iteration leaves the rank order unchanged (Schreiber & Schmitz 1996).
const IAAFTMaxIter = 500

// Surrogate is one surrogate series.
type Surrogate struct {
	// Values is the surrogate, as long as the series used (see
	// FFTLength).
	Values []float64
	// SpectrumErr is the relative root-mean-square difference between
	// the surrogate's Fourier amplitudes and the series':
	// sqrt(sum (|S_k| - |X_k|)²) / sqrt(sum |X_k|²), the mean excluded.
	// Zero (to rounding) for phase-randomised surrogates.
	SpectrumErr float64
	// Iterations is the number of IAAFT iterations (0 for phase
	// randomisation).
	Iterations int
}

// FFTLength returns the largest length <= n whose only prime factors are
// 2, 3 and 5: surrogates are made from the first FFTLength(n) values, so
// that the transform is fast (a prime length costs O(n²)). It drops less
// than 7 % of the values for n >= 100 (common practice).
func FFTLength(n int) int {
	for m := n; m > 1; m-- {
		r := m
		for _, p := range []int{2, 3, 5} {
			for r%p == 0 {
				r /= p
			}
		}
		if r == 1 {
			return m
		}
	}
	return n
}

// surrogateMaker holds the transform and workspaces for one series.
type surrogateMaker struct {
	x      []float64
	fft    *realFFT
	amp    []float64    // |X_k|
	sorted []float64    // x sorted
	coef   []complex128 // workspace
	rank   []int
	prev   []int
	order  []ranked
}

func newSurrogateMaker(x []float64) (*surrogateMaker, error) {
	n := FFTLength(len(x))
	if n < MinLen {
		return nil, shortf("surrogates: %d values (want at least %d)", len(x), MinLen)
	}
	x = x[:n]
	g := &surrogateMaker{x: x, fft: newRealFFT(n)}
	g.coef = g.fft.Coefficients(nil, x)
	g.amp = make([]float64, len(g.coef))
	for k, c := range g.coef {
		g.amp[k] = math.Sqrt(float64(real(c)*real(c)) + float64(imag(c)*imag(c)))
	}
	g.sorted = slices.Clone(x)
	slices.Sort(g.sorted)
	if g.sorted[0] == g.sorted[n-1] {
		return nil, &InputError{Index: -1, Err: ErrConstant, Detail: "surrogates need a varying series"}
	}
	g.rank = make([]int, n)
	g.prev = make([]int, n)
	return g, nil
}

// phases replaces each coefficient's phase by a uniform random one (the
// mean and, for even n, the Nyquist term keep theirs, which are real).
func (g *surrogateMaker) randomPhases(rng *rand.Rand) {
	n := len(g.x)
	for k := 1; k < len(g.coef); k++ {
		if n%2 == 0 && k == len(g.coef)-1 {
			continue
		}
		sn, cs := detmath.Sincos(2 * math.Pi * rng.Float64())
		g.coef[k] = complex(g.amp[k]*cs, g.amp[k]*sn)
	}
	g.coef[0] = complex(g.amp[0]*sign(real(g.coef[0])), 0)
}

func sign(v float64) float64 {
	if v < 0 {
		return -1
	}
	return 1
}

// make returns one surrogate of the given kind.
func (g *surrogateMaker) make(kind SurrogateKind, rng *rand.Rand) Surrogate {
	n := len(g.x)
	out := make([]float64, n)
	if kind == PhaseRandomised {
		g.coef = g.fft.Coefficients(g.coef, g.x)
		g.randomPhases(rng)
		g.fft.Sequence(out, g.coef)
		for i := range out {
			out[i] /= float64(n)
		}
		return Surrogate{Values: out, SpectrumErr: g.spectrumErr(out)}
	}
	// IAAFT: start from a random shuffle of the values.
	copy(out, g.x)
	rng.Shuffle(n, func(i, j int) { out[i], out[j] = out[j], out[i] })
	g.ranks(out, g.prev)
	s := Surrogate{Values: out}
	for it := 1; it <= IAAFTMaxIter; it++ {
		s.Iterations = it
		// impose the amplitudes, keeping the phases
		g.coef = g.fft.Coefficients(g.coef, out)
		for k, c := range g.coef {
			a := math.Sqrt(float64(real(c)*real(c)) + float64(imag(c)*imag(c)))
			if a == 0 {
				g.coef[k] = complex(g.amp[k], 0)
				continue
			}
			r := g.amp[k] / a
			g.coef[k] = complex(real(c)*r, imag(c)*r)
		}
		g.fft.Sequence(out, g.coef)
		// impose the values, keeping the rank order
		g.ranks(out, g.rank)
		for i, r := range g.rank {
			out[i] = g.sorted[r]
		}
		if slices.Equal(g.rank, g.prev) {
			break
		}
		g.rank, g.prev = g.prev, g.rank
	}
	s.SpectrumErr = g.spectrumErr(out)
	return s
}

// ranks writes into dst the rank of each value of v (ties by index).
func (g *surrogateMaker) ranks(v []float64, dst []int) {
	if len(g.order) != len(v) {
		g.order = make([]ranked, len(v))
	}
	for i, x := range v {
		g.order[i] = ranked{x, i}
	}
	slices.SortFunc(g.order, func(a, b ranked) int {
		switch {
		case a.v < b.v:
			return -1
		case a.v > b.v:
			return 1
		}
		return a.i - b.i
	})
	for r, o := range g.order {
		dst[o.i] = r
	}
}

// ranked is a value with its position, for sorting.
type ranked struct {
	v float64
	i int
}

// spectrumErr is Surrogate.SpectrumErr for s.
func (g *surrogateMaker) spectrumErr(s []float64) float64 {
	c := g.fft.Coefficients(nil, s)
	var num, den float64
	for k := 1; k < len(c); k++ {
		a := math.Sqrt(float64(real(c[k])*real(c[k])) + float64(imag(c[k])*imag(c[k])))
		d := a - g.amp[k]
		num += float64(d * d)
		den += float64(g.amp[k] * g.amp[k])
	}
	if den == 0 {
		return 0
	}
	return math.Sqrt(num / den)
}

// Surrogates returns count surrogates of x of the given kind, made from the
// first FFTLength(len(x)) values with the random stream seeded by seed.
// The transforms are the package's own (fft.go: every product rounded
// before it is added, twiddles from internal/detmath), so surrogates have
// the same bits on every architecture; IAAFT's final rank-ordering step
// makes its values exact copies of the series' values.
//
// References:
//
//	J. Theiler, S. Eubank, A. Longtin, B. Galdrikian, J. D. Farmer,
//	  "Testing for nonlinearity in time series: the method of surrogate
//	  data", Physica D 58 (1992) 77–94.
//	T. Schreiber, A. Schmitz, "Improved surrogate data for nonlinearity
//	  tests", Phys. Rev. Lett. 77 (1996) 635–638.
func Surrogates(ctx context.Context, x []float64, kind SurrogateKind, count int, seed uint64) ([]Surrogate, error) {
	if kind != PhaseRandomised && kind != IAAFT {
		return nil, settingf("surrogate kind %v", kind)
	}
	if count < 1 {
		return nil, settingf("surrogate count %d (want >= 1)", count)
	}
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, &InputError{Index: i, Err: ErrNonFinite, Detail: fmt.Sprint(v)}
		}
	}
	g, err := newSurrogateMaker(x)
	if err != nil {
		return nil, err
	}
	rng := rand.New(rand.NewPCG(seed, 0x5177))
	out := make([]Surrogate, 0, count)
	for i := 0; i < count; i++ {
		if err := ctx.Err(); err != nil {
			return out, fmt.Errorf("embed: surrogates canceled after %d of %d: %w", i, count, err)
		}
		out = append(out, g.make(kind, rng))
	}
	return out, nil
}

// Statistic is a number computed from a series, for SurrogateTest.
type Statistic func(ctx context.Context, x []float64) (float64, error)

// RankResult is the outcome of a surrogate rank test.
type RankResult struct {
	// Kind and Count say which surrogates were made, and how many.
	Kind  SurrogateKind
	Count int
	// Value is the statistic of the series (its first FFTLength values),
	// Surrogates the statistic of each surrogate.
	Value      float64
	Surrogates []float64
	// Rank is the number of surrogates whose statistic is at or below
	// Value (0: the series is the smallest of all).
	Rank int
	// P is the one-sided p-value (Rank+1)/(Count+1): the chance, under the
	// null hypothesis, that the series ranks this low or lower.
	P float64
	// Rejected reports P <= Alpha: the series is more predictable than
	// the null hypothesis allows.
	Rejected bool
	Alpha    float64
	// SpectrumErr is the largest SpectrumErr of the surrogates.
	SpectrumErr float64
}

// SurrogateTest ranks stat of x among stat of count surrogates (one-sided:
// small values of stat mean structure, as for PredictionError) and rejects
// the null hypothesis when the series ranks in the lowest alpha: with
// count = 19 and alpha = 0.05 it must be below all surrogates. alpha <= 0
// means 1/(count+1).
//
// References:
//
//	J. Theiler et al., Physica D 58 (1992) 77–94 (the rank test).
//	T. Schreiber, A. Schmitz, "Surrogate time series", Physica D 142
//	  (2000) 346–382.
func SurrogateTest(ctx context.Context, x []float64, kind SurrogateKind, count int, seed uint64, alpha float64, stat Statistic) (*RankResult, error) {
	if stat == nil {
		return nil, settingf("nil statistic")
	}
	if alpha <= 0 {
		alpha = 1 / float64(count+1)
	}
	if !(alpha < 1) {
		return nil, settingf("alpha %g (want in (0, 1))", alpha)
	}
	surr, err := Surrogates(ctx, x, kind, count, seed)
	if err != nil {
		return nil, err
	}
	n := len(surr[0].Values)
	v, err := stat(ctx, x[:n])
	if err != nil {
		return nil, fmt.Errorf("embed: statistic of the series: %w", err)
	}
	res := &RankResult{Kind: kind, Count: count, Value: v, Alpha: alpha}
	for i, s := range surr {
		sv, err := stat(ctx, s.Values)
		if err != nil {
			return res, fmt.Errorf("embed: statistic of surrogate %d: %w", i, err)
		}
		res.Surrogates = append(res.Surrogates, sv)
		if sv <= v {
			res.Rank++
		}
		res.SpectrumErr = max(res.SpectrumErr, s.SpectrumErr)
	}
	res.P = float64(res.Rank+1) / float64(count+1)
	res.Rejected = res.P <= alpha
	return res, nil
}
