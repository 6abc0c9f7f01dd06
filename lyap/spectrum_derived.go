package lyap

import (
	"math"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// NoiseFactor is how far an exponent must stand from zero before it counts
// as positive (see Spectrum.BeyondNoise): more than NoiseFactor standard
// errors (about 95% one-sided for batch means over DefaultBlocks blocks),
// and more than NoiseFactor·ln(D)/D after averaging over a length D (common
// practice).
const NoiseFactor = 2

// Bound says what a measure derived from a spectrum is for the system: its
// value, or only a lower bound on it because the exponents not estimated
// could raise it.
type Bound string

// The bounds a derived measure can carry.
const (
	// BoundExact: the exponents not estimated cannot change the measure
	// (or every exponent was estimated).
	BoundExact Bound = "exact"
	// BoundLower: the exponents not estimated could raise the measure.
	BoundLower Bound = "lower"
)

// derivable reports whether the spectrum has exponents to derive measures
// from: at least one, all finite.
func (s *Spectrum) derivable() bool {
	if s == nil || len(s.Exponents) == 0 {
		return false
	}
	for _, v := range s.Exponents {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}

// partial reports whether the spectrum may lack exponents of the system:
// fewer than Dim were estimated, or Dim does not match the exponents held
// (zero, as in a Spectrum built by hand), which is taken as partial so that
// no measure is claimed exact without grounds.
func (s *Spectrum) partial() bool { return s.Dim != len(s.Exponents) }

// KaplanYorke returns the Kaplan–Yorke dimension of the exponents held (see
// the function KaplanYorke) and whether it is the system's or a lower
// bound on it. With k < Dim exponents whose partial sums are all >= 0 the
// dimension is k, and the next exponent, not estimated, decides how far
// above k it lies: BoundLower. ok is false when there are no exponents or
// one is NaN or infinite.
func (s *Spectrum) KaplanYorke() (d float64, b Bound, ok bool) {
	if !s.derivable() {
		return 0, "", false
	}
	d = KaplanYorke(s.Exponents)
	b = BoundExact
	if s.partial() && d == float64(len(s.Exponents)) {
		b = BoundLower
	}
	return d, b, true
}

// Entropy returns the sum of the positive exponents held (see the function
// Entropy) and whether it is the system's sum or a lower bound on it. With
// k < Dim exponents all positive, the exponents not estimated could be
// positive too: BoundLower. Once an estimated exponent is <= 0 the rest,
// which are smaller, add nothing: BoundExact. ok is false when there are no
// exponents or one is NaN or infinite.
func (s *Spectrum) Entropy() (h float64, b Bound, ok bool) {
	if !s.derivable() {
		return 0, "", false
	}
	h = Entropy(s.Exponents)
	b = BoundExact
	if s.partial() && minimum(s.Exponents) > 0 {
		b = BoundLower
	}
	return h, b, true
}

// Top returns the index of the largest exponent held, or -1 when there is
// none or one is NaN or infinite. Exponents are sorted largest first, so
// Top is 0 for every Spectrum this package returns; it is the largest
// value, not the position, that counts.
func (s *Spectrum) Top() int {
	if !s.derivable() {
		return -1
	}
	top := 0
	for i, v := range s.Exponents {
		if v > s.Exponents[top] {
			top = i
		}
	}
	return top
}

// LyapunovTime returns 1/lambda_max, the time (or number of iterations) in
// which a small error grows by the factor e at the largest exponent held,
// and true; or 0 and false when no exponent is positive (or Top is -1).
// Whether lambda_max stands clear of noise is BeyondNoise's question.
func (s *Spectrum) LyapunovTime() (float64, bool) {
	top := s.Top()
	if top < 0 || !(s.Exponents[top] > 0) {
		return 0, false
	}
	return LyapunovTime(s.Exponents[top]), true
}

// BeyondNoise reports whether the largest exponent stands clear of zero:
// positive, more than NoiseFactor standard errors, and more than
// NoiseFactor·ln(D)/D after averaging over the length D = Duration (D > 1).
// The second test is about what merely polynomial growth leaves in an
// exponent over a finite run (the shear of a regular orbit grows like t,
// whose finite-time exponent is ln(t)/t). Without it a positive estimate
// is no sign of chaos. False when there are no standard errors (fewer than
// two completed blocks).
//
// References:
//
//	B. Schmeiser, Batch size effects in the analysis of simulation output,
//	  Operations Research 30 (1982) 556–568 (batch means).
func (s *Spectrum) BeyondNoise() bool {
	top := s.Top()
	if top < 0 || top >= len(s.StdErr) {
		return false
	}
	l, d := s.Exponents[top], s.Duration
	return l > 0 && l > NoiseFactor*s.StdErr[top] && d > 1 && l > NoiseFactor*detmath.Log(d)/d
}

func minimum(v []float64) float64 {
	m := math.Inf(1)
	for _, x := range v {
		m = math.Min(m, x)
	}
	return m
}
