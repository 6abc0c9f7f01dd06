package embed

import (
	"github.com/plumbdyn/plumb/internal/detmath"
)

// DefaultMaxLag bounds the lags AverageMutualInfo and Autocorrelate try by
// default: each lag costs a pass over the series, and a series whose
// memory outlasts 2000 samples is sampled far finer than its dynamics
// need (common practice: decimate it first).
const DefaultMaxLag = 2000

// MutualInfo is the average mutual information between x(t) and x(t+lag),
// lag = 0 .. len(Info)-1, with the first minimum that chooses the delay.
type MutualInfo struct {
	// Info[l] is the mutual information at lag l samples, in nats.
	Info []float64
	// Bins is the number of equal-width bins per axis (the binning rule
	// is in AverageMutualInfo's comment).
	Bins int
	// FirstMin is the lag (samples) of the first local minimum, 0 when the
	// information keeps falling up to the last lag computed.
	FirstMin int
}

// AMIBins returns the number of equal-width bins per axis that
// AverageMutualInfo uses for n points: Sturges' rule, ceil(log2 n) + 1,
// at least 4 (common practice: enough bins to resolve the shape of the
// distribution, few enough that the n pairs fill the bins² cells).
func AMIBins(n int) int {
	b := 1
	for (1 << (b - 1)) < n {
		b++
	}
	return max(b, 4)
}

// AverageMutualInfo returns the average mutual information of the pairs
// (x[i], x[i+lag]) for lag = 0 .. maxLag, stopping early once the first
// minimum is found and the curve has been followed to twice its lag (at
// least 10 lags further). maxLag <= 0 means len(x)/4, at most
// DefaultMaxLag.
//
// Binning rule: the range [min x, max x] of the whole series is cut into
// b = AMIBins(n) equal-width bins (Sturges' rule), the same for both
// axes and every lag; probabilities are bin counts over the number of
// pairs. I(l) = sum p_ij ln(p_ij / (p_i p_j)) with the marginals p_i, p_j
// of the pairs used at that lag. The first minimum is the first l > 0 with
// I(l-1) > I(l) <= I(l+1).
//
// Cost O(n + b²) per lag; one workspace of b² counts.
//
// References:
//
//	A. M. Fraser, H. L. Swinney, "Independent coordinates for strange
//	  attractors from mutual information", Phys. Rev. A 33 (1986) 1134–1140.
//	H. A. Sturges, "The choice of a class interval", J. Am. Stat. Assoc. 21
//	  (1926) 65–66.
func AverageMutualInfo(x []float64, maxLag int) (*MutualInfo, error) {
	n := len(x)
	if n < MinLen {
		return nil, shortf("mutual information: %d values (want at least %d)", n, MinLen)
	}
	if maxLag <= 0 {
		maxLag = min(n/4, DefaultMaxLag)
	}
	maxLag = min(maxLag, n-MinLen)
	lo, hi := extent(x)
	if lo == hi {
		return nil, &InputError{Index: -1, Err: ErrConstant, Detail: "mutual information needs a varying series"}
	}
	b := AMIBins(n)
	bin := make([]int32, n)
	w := (hi - lo) / float64(b)
	for i, v := range x {
		k := int((v - lo) / w)
		bin[i] = int32(min(max(k, 0), b-1))
	}
	joint := make([]int64, b*b)
	pa := make([]int64, b)
	pb := make([]int64, b)
	mi := &MutualInfo{Bins: b}
	for l := 0; l <= maxLag; l++ {
		clear(joint)
		clear(pa)
		clear(pb)
		m := n - l
		for i := 0; i < m; i++ {
			a, c := bin[i], bin[i+l]
			joint[int(a)*b+int(c)]++
			pa[a]++
			pb[c]++
		}
		var s float64
		fm := float64(m)
		for a := 0; a < b; a++ {
			if pa[a] == 0 {
				continue
			}
			for c := 0; c < b; c++ {
				j := joint[a*b+c]
				if j == 0 {
					continue
				}
				// p_ac ln(p_ac/(p_a p_c)) = (j/m) ln(j m / (n_a n_c))
				r := float64(j) * fm / (float64(pa[a]) * float64(pb[c]))
				s += float64(float64(j) / fm * detmath.Log(r))
			}
		}
		mi.Info = append(mi.Info, s)
		if mi.FirstMin == 0 && l >= 2 && mi.Info[l-2] > mi.Info[l-1] && mi.Info[l-1] <= s {
			mi.FirstMin = l - 1
		}
		if mi.FirstMin > 0 && l >= max(2*mi.FirstMin, mi.FirstMin+10) {
			break
		}
	}
	return mi, nil
}

// Autocorrelation is the normalised autocorrelation of a series and the
// two lags read from it.
type Autocorrelation struct {
	// R[l] is the autocorrelation at lag l samples (R[0] = 1).
	R []float64
	// EFold is the first lag where R falls to 1/e or below; 0 if it does
	// not within the lags computed.
	EFold int
	// FirstZero is the first lag where R is zero or negative; 0 if none.
	FirstZero int
}

// Autocorrelate returns the autocorrelation
//
//	R(l) = sum_{i<n-l} (x_i - m)(x_{i+l} - m) / sum_i (x_i - m)²
//
// (the biased estimator, so |R| <= 1), computed directly for l = 0, 1, ...
// until it has passed both 1/e and zero, or maxLag (<= 0: len(x)/4, at
// most DefaultMaxLag).
// Cost O(n) per lag.
//
// References:
//
//	G. E. P. Box, G. M. Jenkins, Time Series Analysis: Forecasting and
//	  Control, Holden-Day 1970 (the estimator).
func Autocorrelate(x []float64, maxLag int) (*Autocorrelation, error) {
	n := len(x)
	if n < MinLen {
		return nil, shortf("autocorrelation: %d values (want at least %d)", n, MinLen)
	}
	if maxLag <= 0 {
		maxLag = min(n/4, DefaultMaxLag)
	}
	maxLag = min(maxLag, n-2)
	m, sd := moments(x)
	if sd == 0 {
		return nil, &InputError{Index: -1, Err: ErrConstant, Detail: "autocorrelation needs a varying series"}
	}
	var c0 float64
	for _, v := range x {
		d := v - m
		c0 += float64(d * d)
	}
	ac := &Autocorrelation{R: []float64{1}}
	efold := detmath.Exp(-1)
	for l := 1; l <= maxLag; l++ {
		var c float64
		for i := 0; i+l < n; i++ {
			c += float64((x[i] - m) * (x[i+l] - m))
		}
		r := c / c0
		ac.R = append(ac.R, r)
		if ac.EFold == 0 && r <= efold {
			ac.EFold = l
		}
		if ac.FirstZero == 0 && r <= 0 {
			ac.FirstZero = l
		}
		if ac.EFold > 0 && ac.FirstZero > 0 {
			break
		}
	}
	return ac, nil
}
