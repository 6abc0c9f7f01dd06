package embed

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// CorrSettings are the choices of CorrelationDimension. The zero value of
// a field means its default.
type CorrSettings struct {
	// Theiler excludes pairs closer in time than this many samples
	// (default 0: only a point with itself).
	Theiler int
	// Radii is the number of log-spaced radii (default 40).
	Radii int
	// MinRadius and MaxRadius bound the radii as fractions of the
	// series' range (defaults 1e-4 and 0.5); distances use the maximum
	// norm, in which the attractor's diameter is the range.
	MinRadius, MaxRadius float64
	// References is the most reference points (default 2000), spread
	// evenly over the series; each is paired with every point outside
	// its Theiler window.
	References int
	// MinPairs is the fewest pairs a radius needs to enter the fit
	// (default 100: a relative counting error of about 10 %).
	MinPairs int
	// MaxSum is the largest correlation sum that enters the fit
	// (default 0.1): above it the radii reach the attractor's size and
	// C(r) saturates.
	MaxSum float64
	// Decades is the span of the fitted region in decades of radius
	// (default 0.75).
	Decades float64
	// CoarseReferences is the number of reference points that count
	// pairs at every radius (default 200); the others count only up to
	// the radius where the coarse sum reaches 2·MaxSum (CorrDim.Cut).
	CoarseReferences int
}

// cutFactor: the full count runs to the radius where the coarse sum
// reaches cutFactor·MaxSum, so the whole fitted range (sums <= MaxSum)
// has every reference, with a margin for the coarse sum's sampling error.
const cutFactor = 2

// Defaults of CorrSettings.
const (
	DefaultCorrRadii      = 40
	DefaultCorrMinRadius  = 1e-4
	DefaultCorrMaxRadius  = 0.5
	DefaultCorrReferences = 2000
	DefaultCorrMinPairs   = 100
	DefaultCorrMaxSum     = 0.1
	DefaultCorrDecades    = 0.75
	DefaultCorrCoarseRefs = 200
)

func (s *CorrSettings) withDefaults() (CorrSettings, error) {
	var c CorrSettings
	if s != nil {
		c = *s
	}
	if c.Radii == 0 {
		c.Radii = DefaultCorrRadii
	}
	if c.MinRadius == 0 {
		c.MinRadius = DefaultCorrMinRadius
	}
	if c.MaxRadius == 0 {
		c.MaxRadius = DefaultCorrMaxRadius
	}
	if c.References == 0 {
		c.References = DefaultCorrReferences
	}
	if c.MinPairs == 0 {
		c.MinPairs = DefaultCorrMinPairs
	}
	if c.MaxSum == 0 {
		c.MaxSum = DefaultCorrMaxSum
	}
	if c.Decades == 0 {
		c.Decades = DefaultCorrDecades
	}
	if c.CoarseReferences == 0 {
		c.CoarseReferences = DefaultCorrCoarseRefs
	}
	switch {
	case c.Theiler < 0:
		return c, settingf("CorrSettings.Theiler = %d (want >= 0)", c.Theiler)
	case c.Radii < 4 || c.Radii > 1000:
		return c, settingf("CorrSettings.Radii = %d (want 4..1000)", c.Radii)
	case !(c.MinRadius > 0 && c.MinRadius < c.MaxRadius && c.MaxRadius <= 1):
		return c, settingf("CorrSettings.MinRadius = %g, MaxRadius = %g (want 0 < min < max <= 1)", c.MinRadius, c.MaxRadius)
	case c.References < 1:
		return c, settingf("CorrSettings.References = %d (want >= 1)", c.References)
	case c.MinPairs < 1:
		return c, settingf("CorrSettings.MinPairs = %d (want >= 1)", c.MinPairs)
	case !(c.MaxSum > 0 && c.MaxSum <= 1):
		return c, settingf("CorrSettings.MaxSum = %g (want in (0, 1])", c.MaxSum)
	case c.CoarseReferences < 1:
		return c, settingf("CorrSettings.CoarseReferences = %d (want >= 1)", c.CoarseReferences)
	case !(c.Decades > 0 && c.Decades < 10):
		return c, settingf("CorrSettings.Decades = %g (want in (0, 10))", c.Decades)
	}
	return c, nil
}

// CorrDim is a correlation dimension with the curve it was read from.
type CorrDim struct {
	// Dim and Lag are the embedding's.
	Dim, Lag int
	// Radii are the radii, increasing, in the series' units.
	Radii []float64
	// Sum[k] is the correlation sum C(Radii[k]): the fraction of pairs
	// (outside the Theiler window) closer than Radii[k].
	Sum []float64
	// Pairs[k] is the number of such pairs.
	Pairs []int64
	// Slopes[k] is the local slope d ln C / d ln r between radii k and
	// k+1 (NaN where a sum is zero); len(Radii)-1 entries.
	Slopes []float64
	// D2 is the slope of ln C against ln r over the fitted region, D2Err
	// its error: the larger of the fit's standard error and half the
	// spread of the local slopes inside the region.
	D2, D2Err float64
	// Fit is the fitted line (ln r, ln C) with the indices of the first
	// and last radius used.
	Fit Line
	// References is the number of reference points used, TotalPairs the
	// number of pairs the sums are fractions of, up to radius Cut; beyond
	// it the sums grow by what CoarseReferences reference points counted.
	References       int
	TotalPairs       int64
	Cut              int
	CoarseReferences int
	// Found is false when no region satisfied the rule; D2 is then NaN.
	Found bool
}

// CorrelationDimension estimates the correlation dimension D2 of the
// delay embedding (lag, dim) of x by the method of Grassberger & Procaccia
// (1983):
//
//	C(r) = #{pairs (i, j): |i-j| > theiler, ||y_i - y_j||_max <= r} / #pairs,
//	C(r) ~ r^D2 for small r.
//
// Pairs are counted from up to References reference points spread evenly
// over the series, each against every other point, in a k-d tree (gonum
// spatial/kdtree) searched only up to a radius: CoarseReferences of them
// count every radius, and the rest only up to the radius where the sum
// reaches twice MaxSum, past the fitted range. The cost is O(n log n) for
// the tree and O(R (log n + n·C(r))) for the searches, never the n² loop.
//
// Scaling-region rule: among windows of consecutive radii that span
// Decades decades, in which every radius has at least MinPairs pairs and a
// sum at most MaxSum, the window whose local slopes vary least (smallest
// max − min) is fitted by least squares; ties go to the smaller radii. The
// local slopes, the fitted region and the radii are returned so that the
// plateau can be checked by eye.
//
// Caution: N points resolve dimensions up to about 2 log10 N (Eckmann &
// Ruelle 1992); a D2 close to dim means the embedding is too small.
//
// References:
//
//	P. Grassberger, I. Procaccia, "Measuring the strangeness of strange
//	  attractors", Physica D 9 (1983) 189–208.
//	J. Theiler, "Spurious dimension from correlation algorithms applied to
//	  limited time-series data", Phys. Rev. A 34 (1986) 2427–2432.
//	J.-P. Eckmann, D. Ruelle, "Fundamental limitations for estimating
//	  dimensions and Lyapunov exponents in dynamical systems", Physica D
//	  56 (1992) 185–187.
func CorrelationDimension(ctx context.Context, x []float64, lag, dim int, s *CorrSettings) (*CorrDim, error) {
	set, err := s.withDefaults()
	if err != nil {
		return nil, err
	}
	e, err := Embed(x, lag, dim)
	if err != nil {
		return nil, err
	}
	m := e.Len()
	if m < MinLen || m <= 2*set.Theiler+2 {
		return nil, shortf("correlation dimension: %d points in dimension %d with a Theiler window of %d", m, dim, set.Theiler)
	}
	lo, hi := extent(x)
	span := hi - lo
	if span == 0 {
		return nil, &InputError{Index: -1, Err: ErrConstant, Detail: "correlation dimension needs a varying series"}
	}
	nr := set.Radii
	radii := make([]float64, nr)
	llo := detmath.Log(set.MinRadius * span)
	lhi := detmath.Log(set.MaxRadius * span)
	step := (lhi - llo) / float64(nr-1)
	for k := range radii {
		radii[k] = detmath.Exp(llo + float64(step*float64(k)))
	}
	t := newTree(e, m, maxNorm)
	refs := min(set.References, m)
	// Pass 1: a few references count every radius, to find where the
	// sums pass the fitted range; pass 2: every reference counts up to
	// that radius only (the pairs beyond it are most of the work and
	// serve only the picture of the saturation).
	coarse := min(set.CoarseReferences, refs)
	histC := make([]int64, nr)
	totalC, err := countPairs(ctx, t, coarse, m, set.Theiler, radii, histC)
	if err != nil {
		return nil, err
	}
	cut := nr - 1
	if coarse < refs {
		var cum int64
		for k := range histC {
			cum += histC[k]
			if float64(cum) >= float64(cutFactor*set.MaxSum)*float64(totalC) {
				cut = k
				break
			}
		}
	}
	hist := histC
	total := totalC
	if coarse < refs {
		hist = make([]int64, cut+1)
		if total, err = countPairs(ctx, t, refs, m, set.Theiler, radii[:cut+1], hist); err != nil {
			return nil, err
		}
	}
	out := &CorrDim{Dim: dim, Lag: lag, Radii: radii, Sum: make([]float64, nr), Pairs: make([]int64, nr),
		References: refs, TotalPairs: total, Cut: cut, CoarseReferences: coarse}
	var cum, cumC int64
	for k := range radii {
		cumC += histC[k]
		if k <= cut {
			cum += hist[k]
			out.Pairs[k] = cum
			out.Sum[k] = float64(cum) / float64(total)
			continue
		}
		// beyond the cut: the coarse pass's increments on top of the
		// full pass's sum at the cut (so the sums still increase)
		var atCut int64
		for _, h := range histC[:cut+1] {
			atCut += h
		}
		out.Pairs[k] = out.Pairs[cut] + (cumC - atCut)
		out.Sum[k] = out.Sum[cut] + float64(cumC-atCut)/float64(totalC)
	}
	lr := make([]float64, nr)
	lc := make([]float64, nr)
	for k := range radii {
		lr[k] = detmath.Log(radii[k])
		lc[k] = math.NaN()
		if out.Sum[k] > 0 {
			lc[k] = detmath.Log(out.Sum[k])
		}
	}
	out.Slopes = make([]float64, nr-1)
	for k := range out.Slopes {
		out.Slopes[k] = (lc[k+1] - lc[k]) / (lr[k+1] - lr[k])
	}
	out.D2, out.D2Err = math.NaN(), math.NaN()
	width := int(math.Ceil(set.Decades * detmath.Log(10) / step)) // in radius steps
	width = max(width, 2)
	bestSpread := math.Inf(1)
	for a := 0; a+width < nr; a++ {
		b := a + width
		if out.Pairs[a] < int64(set.MinPairs) || out.Sum[b] > set.MaxSum {
			continue
		}
		smin, smax := math.Inf(1), math.Inf(-1)
		for k := a; k < b; k++ {
			smin = min(smin, out.Slopes[k])
			smax = max(smax, out.Slopes[k])
		}
		if smax-smin < bestSpread {
			bestSpread = smax - smin
			out.Fit = fitLine(lr, lc, a, b)
			out.Found = true
		}
	}
	if out.Found {
		out.D2 = out.Fit.Slope
		out.D2Err = max(out.Fit.SlopeErr, bestSpread/2)
	}
	return out, nil
}

// countPairs counts, for refs reference points spread evenly over the m
// points, the points outside each one's Theiler window by distance bin
// (see countAround), and returns the number of pairs considered.
func countPairs(ctx context.Context, t *tree, refs, m, theiler int, edges []float64, hist []int64) (int64, error) {
	var total int64
	for r := 0; r < refs; r++ {
		if r%64 == 0 {
			if err := ctx.Err(); err != nil {
				return 0, fmt.Errorf("embed: correlation dimension canceled after %d of %d reference points: %w", r, refs, err)
			}
		}
		q := int(int64(r) * int64(m) / int64(refs))
		t.countAround(q, theiler, edges, hist)
		// points outside the window [q-theiler, q+theiler]
		total += int64(m - (min(q+theiler, m-1) - max(q-theiler, 0) + 1))
	}
	return total, nil
}
