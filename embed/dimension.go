package embed

import (
	"context"
	"fmt"
	"math"
)

// FNN is the result of the false-nearest-neighbour test for dimensions
// 1 .. len(Fraction).
type FNN struct {
	// Fraction[d-1] is the fraction of points whose nearest neighbour in
	// dimension d is false by either criterion.
	Fraction []float64
	// Points[d-1] is the number of points tested in dimension d.
	Points []int
	// Dimension is the smallest d whose fraction is at most
	// FNNSettings.Threshold; 0 when none is.
	Dimension int
}

// FNNSettings are the choices of the false-nearest-neighbour test. The
// zero value of a field means its default.
type FNNSettings struct {
	// RTol is the first criterion's threshold on the growth of the
	// distance when one coordinate is added, relative to the distance
	// (default 15; Kennel et al. report results insensitive above 10).
	RTol float64
	// ATol is the second criterion's threshold on the distance in d+1
	// dimensions relative to the series' standard deviation (default 2).
	ATol float64
	// Threshold is the false fraction at or below which a dimension is
	// taken as enough (default 0.01, common practice).
	Threshold float64
	// Theiler excludes neighbours closer in time than this many samples
	// (default 0: none).
	Theiler int
}

// Defaults of FNNSettings.
const (
	DefaultFNNRTol      = 15
	DefaultFNNATol      = 2
	DefaultFNNThreshold = 0.01
)

func (s *FNNSettings) withDefaults() (FNNSettings, error) {
	var c FNNSettings
	if s != nil {
		c = *s
	}
	for _, f := range []struct {
		name string
		v    *float64
		def  float64
	}{{"RTol", &c.RTol, DefaultFNNRTol}, {"ATol", &c.ATol, DefaultFNNATol}, {"Threshold", &c.Threshold, DefaultFNNThreshold}} {
		if *f.v == 0 {
			*f.v = f.def
		}
		if !(*f.v > 0) || math.IsInf(*f.v, 1) {
			return c, settingf("FNNSettings.%s = %g (want finite and > 0)", f.name, *f.v)
		}
	}
	if c.Theiler < 0 {
		return c, settingf("FNNSettings.Theiler = %d (want >= 0)", c.Theiler)
	}
	return c, nil
}

// FalseNeighbours runs the false-nearest-neighbour test of Kennel, Brown &
// Abarbanel (1992) for dimensions 1 .. maxDim at the given lag. In
// dimension d each point i (that has a coordinate d+1) gets its nearest
// neighbour j (Euclidean, outside the Theiler window, at a distance
// R_d > 0, found in a k-d tree) and is false when
//
//	|x[i+d·lag] - x[j+d·lag]| / R_d > RTol        (criterion 1), or
//	R_{d+1} / R_A > ATol                          (criterion 2),
//
// with R_A the standard deviation of the series. Criterion 2 catches
// neighbours that are near only because the data are noisy or the
// attractor is small compared with its spread.
//
// Cost O(n log n) per dimension.
//
// References:
//
//	M. B. Kennel, R. Brown, H. D. I. Abarbanel, "Determining embedding
//	  dimension for phase-space reconstruction using a geometrical
//	  construction", Phys. Rev. A 45 (1992) 3403–3411.
func FalseNeighbours(ctx context.Context, x []float64, lag, maxDim int, s *FNNSettings) (*FNN, error) {
	set, err := s.withDefaults()
	if err != nil {
		return nil, err
	}
	if maxDim < 1 {
		return nil, settingf("false neighbours: largest dimension %d (want >= 1)", maxDim)
	}
	if _, err := Embed(x, lag, maxDim+1); err != nil {
		return nil, err
	}
	_, ra := moments(x)
	if ra == 0 {
		return nil, &InputError{Index: -1, Err: ErrConstant, Detail: "false neighbours need a varying series"}
	}
	out := &FNN{}
	for d := 1; d <= maxDim; d++ {
		if err := ctx.Err(); err != nil {
			return out, fmt.Errorf("embed: false neighbours canceled at dimension %d: %w", d, err)
		}
		e, _ := Embed(x, lag, d)
		m := len(x) - d*lag // points with a coordinate d+1
		if m < 2+2*set.Theiler {
			return out, shortf("false neighbours: %d points in dimension %d", m, d)
		}
		t := newTree(e, m, euclideanNorm)
		falseN, tested := 0, 0
		for i := 0; i < m; i++ {
			j, rd := t.nearest(i, set.Theiler)
			if j < 0 {
				continue
			}
			tested++
			extra := math.Abs(x[i+d*lag] - x[j+d*lag])
			rd1 := math.Sqrt(float64(rd*rd) + float64(extra*extra))
			if extra/rd > set.RTol || rd1/ra > set.ATol {
				falseN++
			}
		}
		if tested == 0 {
			return out, shortf("false neighbours: no neighbour outside the Theiler window in dimension %d", d)
		}
		f := float64(falseN) / float64(tested)
		out.Fraction = append(out.Fraction, f)
		out.Points = append(out.Points, tested)
		if out.Dimension == 0 && f <= set.Threshold {
			out.Dimension = d
		}
	}
	return out, nil
}

// Cao holds Cao's E1 and E2 for dimensions 1 .. len(E1).
type Cao struct {
	// E1[d-1] = E(d+1)/E(d): near 1 once d is enough.
	E1 []float64
	// E2[d-1] = E*(d+1)/E*(d): near 1 for every d when the series is
	// random, away from 1 for some d when it is deterministic.
	E2 []float64
	// Dimension is the smallest d with E1(d) >= CaoSaturation; 0 when
	// none is.
	Dimension int
	// E2Spread is the largest |E2(d) - 1|: small for noise.
	E2Spread float64
}

// CaoSaturation is the E1 at which a dimension counts as enough: E1 stops
// growing towards 1 beyond the minimal dimension (Cao 1997); 0.9 leaves
// room for the slow approach of finite data (common practice).
const CaoSaturation = 0.9

// CaoDimension computes Cao's E1(d) and E2(d), d = 1 .. maxDim, at the
// given lag, with the maximum norm: for each point i of the
// d-dimensional embedding (that has a coordinate d+1), n(i) is its
// nearest neighbour (outside the Theiler window, at a distance > 0) and
//
//	a(i,d) = ||y_i(d+1) - y_n(d+1)|| / ||y_i(d) - y_n(d)||,
//	E(d)   = mean_i a(i,d),      E1(d) = E(d+1)/E(d),
//	E*(d)  = mean_i |x[i+d·lag] - x[n(i)+d·lag]|,  E2(d) = E*(d+1)/E*(d).
//
// Cost O(n log n) per dimension (maxDim+1 dimensions).
//
// References:
//
//	L. Cao, "Practical method for determining the minimum embedding
//	  dimension of a scalar time series", Physica D 110 (1997) 43–50.
func CaoDimension(ctx context.Context, x []float64, lag, maxDim, theiler int) (*Cao, error) {
	if maxDim < 1 {
		return nil, settingf("Cao: largest dimension %d (want >= 1)", maxDim)
	}
	if theiler < 0 {
		return nil, settingf("Cao: Theiler window %d (want >= 0)", theiler)
	}
	if _, err := Embed(x, lag, maxDim+2); err != nil {
		return nil, err
	}
	E := make([]float64, 0, maxDim+1)
	Es := make([]float64, 0, maxDim+1)
	// The same points (those with coordinate maxDim+2) are used in every
	// dimension, so that the ratios compare like with like.
	m := len(x) - (maxDim+1)*lag
	if m < 2+2*theiler {
		return nil, shortf("Cao: %d points in dimension %d", m, maxDim+1)
	}
	for d := 1; d <= maxDim+1; d++ {
		if err := ctx.Err(); err != nil {
			return nil, fmt.Errorf("embed: Cao canceled at dimension %d: %w", d, err)
		}
		e, _ := Embed(x, lag, d)
		t := newTree(e, m, maxNorm)
		var sa, ss float64
		cnt := 0
		for i := 0; i < m; i++ {
			j, rd := t.nearest(i, theiler)
			if j < 0 {
				continue
			}
			extra := math.Abs(x[i+d*lag] - x[j+d*lag])
			sa += max(rd, extra) / rd
			ss += extra
			cnt++
		}
		if cnt == 0 {
			return nil, shortf("Cao: no neighbour outside the Theiler window in dimension %d", d)
		}
		E = append(E, sa/float64(cnt))
		Es = append(Es, ss/float64(cnt))
	}
	c := &Cao{}
	for d := 0; d < maxDim; d++ {
		c.E1 = append(c.E1, E[d+1]/E[d])
		e2 := math.NaN()
		if Es[d] > 0 {
			e2 = Es[d+1] / Es[d]
		}
		c.E2 = append(c.E2, e2)
		if c.Dimension == 0 && c.E1[d] >= CaoSaturation {
			c.Dimension = d + 1
		}
		if !math.IsNaN(e2) {
			c.E2Spread = max(c.E2Spread, math.Abs(e2-1))
		}
	}
	return c, nil
}
