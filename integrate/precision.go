package integrate

import (
	"fmt"
	"math"
	"strconv"
	"unsafe"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// RoundingKind says how a Rounding rounds a number.
type RoundingKind int

const (
	// NoRounding leaves numbers unchanged; it is the zero value.
	NoRounding RoundingKind = iota
	// BinaryBits rounds to N significand bits (counting the leading bit),
	// round to nearest, ties to even. N = 24 is float32's significand, N = 53
	// float64's own (no change).
	BinaryBits
	// SignificantDigits rounds to N significant decimal digits, as
	// strconv.FormatFloat(x, 'e', N-1, 64) prints them.
	SignificantDigits
	// DecimalPlaces rounds to N digits after the decimal point, as
	// strconv.FormatFloat(x, 'f', N, 64) prints them.
	DecimalPlaces
)

// Limits of Rounding.N per kind.
const (
	maxBits   = 53
	maxDigits = 17 // 17 significant digits restore every float64
	maxPlaces = 40
)

// Rounding is a rounding rule for states: the precision emulation of Rounded
// and the rounded restarts of the audit ladder. Build one with Bits, Digits or
// Places; the zero value rounds nothing.
//
// Binary rounding (BinaryBits) is exact: the result is the float64 nearest
// to x that has at most N significant bits, ties to the value whose last
// kept bit is zero, the same as math/big's big.Float with SetPrec(N) and
// ToNearestEven. The exponent range stays float64's, so Bits(24) equals
// float32(x) for every x in float32's normal range, but does not overflow
// above 3.4e38 nor lose bits to float32's subnormals: it emulates the
// significand of float32 storage, not its range.
//
// Decimal rounding (SignificantDigits, DecimalPlaces) returns what a printout
// shows when read back: strconv.ParseFloat of strconv.FormatFloat's output,
// which rounds the exact binary value to nearest, ties to even (a value that
// is exactly halfway in decimal is rare in binary). It models a restart from
// printed-and-retyped numbers.
//
// Special cases (every kind):
//
//	Round(±0)  = ±0
//	Round(±Inf) = ±Inf
//	Round(NaN) = NaN
//
// Binary rounding of a number near MaxFloat64 may carry to ±Inf, as IEEE 754
// rounding to a narrower significand with the same exponent range does.
type Rounding struct {
	// Kind selects the rule.
	Kind RoundingKind
	// N is the number of bits (1..53), significant digits (1..17) or
	// decimal places (0..40).
	N int
	// Stages, when true, also rounds the input and the output of every
	// evaluation of the vector field made by Rounded (every stage value and
	// derivative is then stored at the emulated precision). The arithmetic
	// that combines stages stays float64, so this emulates storage, not a
	// narrower arithmetic unit.
	Stages bool
}

// Bits returns the rounding to p significand bits (p = 24 emulates float32
// storage).
func Bits(p int) Rounding { return Rounding{Kind: BinaryBits, N: p} }

// Digits returns the rounding to k significant decimal digits.
func Digits(k int) Rounding { return Rounding{Kind: SignificantDigits, N: k} }

// Places returns the rounding to k decimal places.
func Places(k int) Rounding { return Rounding{Kind: DecimalPlaces, N: k} }

// Validate reports whether r is usable: a known Kind and N in its range.
// The error wraps ErrSettings.
func (r Rounding) Validate() error {
	lo, hi := 0, 0
	switch r.Kind {
	case NoRounding:
		return nil
	case BinaryBits:
		lo, hi = 1, maxBits
	case SignificantDigits:
		lo, hi = 1, maxDigits
	case DecimalPlaces:
		lo, hi = 0, maxPlaces
	default:
		return fmt.Errorf("integrate: Rounding.Kind = %d: unknown kind: %w", int(r.Kind), ErrSettings)
	}
	if r.N < lo || r.N > hi {
		return fmt.Errorf("integrate: Rounding.N = %d: %s needs %d..%d: %w", r.N, r.Kind, lo, hi, ErrSettings)
	}
	return nil
}

// String returns the rule in words, e.g. "24 bits", "3 places".
func (k RoundingKind) String() string {
	switch k {
	case NoRounding:
		return "none"
	case BinaryBits:
		return "bits"
	case SignificantDigits:
		return "digits"
	case DecimalPlaces:
		return "places"
	}
	return fmt.Sprintf("RoundingKind(%d)", int(k))
}

// String returns the rule in words, e.g. "24 bits", "3 places", "24 bits,
// stages".
func (r Rounding) String() string {
	if r.Kind == NoRounding {
		return "no rounding"
	}
	s := fmt.Sprintf("%d %s", r.N, r.Kind)
	if r.Stages {
		s += ", stages"
	}
	return s
}

// Round returns x rounded by r. An invalid r (see Validate) returns NaN.
// It does not allocate.
func (r Rounding) Round(x float64) float64 {
	switch r.Kind {
	case NoRounding:
		return x
	case BinaryBits:
		if r.N < 1 || r.N > maxBits {
			return math.NaN()
		}
		return roundBits(x, r.N)
	case SignificantDigits:
		if r.N < 1 || r.N > maxDigits {
			return math.NaN()
		}
		return roundDecimal(x, 'e', r.N-1)
	case DecimalPlaces:
		if r.N < 0 || r.N > maxPlaces {
			return math.NaN()
		}
		return roundDecimal(x, 'f', r.N)
	}
	return math.NaN()
}

// Vec writes y rounded by r into dst (grown if short; it may be y itself)
// and returns it.
func (r Rounding) Vec(dst, y []float64) []float64 {
	if cap(dst) < len(y) {
		dst = make([]float64, len(y))
	}
	dst = dst[:len(y)]
	for i, v := range y {
		dst[i] = r.Round(v)
	}
	return dst
}

// unit returns the relative size of one rounding (half a unit in the last
// kept place) at magnitude scale: 2^-p·scale for bits, 5·10^-k·scale for k
// digits, 5·10^-(k+1) for k places. Used for a-priori perturbation sizes.
func (r Rounding) unit(scale float64) float64 {
	switch r.Kind {
	case BinaryBits:
		return math.Ldexp(scale, -r.N)
	case SignificantDigits:
		return 5 * detmath.Pow(10, -float64(r.N)) * scale
	case DecimalPlaces:
		return 5 * detmath.Pow(10, -float64(r.N+1))
	}
	return 0
}

// roundBits rounds x to p significand bits, ties to even, in float64's
// exponent range (1 <= p <= 53).
//
// For a normal number the bit pattern is sign | exponent | 52-bit fraction;
// adding half of the dropped range (minus one, plus the last kept bit, which
// breaks ties to even) to the magnitude and clearing the dropped bits rounds
// to nearest; a carry out of the fraction increments the exponent, which is
// exactly the rounding-up to the next power of two (and to Inf past
// MaxFloat64). A subnormal is scaled by 2^64 first (exact), rounded, and
// scaled back (exact: rounding keeps no bit below the input's last one).
func roundBits(x float64, p int) float64 {
	if p >= maxBits || x == 0 || math.IsNaN(x) || math.IsInf(x, 0) {
		return x
	}
	if math.Abs(x) < 0x1p-1022 {
		return math.Ldexp(roundBits(math.Ldexp(x, 64), p), -64)
	}
	b := math.Float64bits(x)
	sign := b & (1 << 63)
	m := b &^ (1 << 63)
	drop := uint(maxBits - p)
	// The last kept bit breaks ties. With p = 1 it is the implicit leading
	// bit, which is always 1 (bit 52 would be the exponent's lowest bit).
	lsb := uint64(1)
	if p > 1 {
		lsb = (m >> drop) & 1
	}
	m += (uint64(1) << (drop - 1)) - 1 + lsb
	m &^= (uint64(1) << drop) - 1
	return math.Float64frombits(sign | m)
}

// roundDecimal prints x with strconv in format fmt ('e' or 'f') with prec
// digits and reads it back. It does not allocate: the text lives in a stack
// buffer and is read without a copy.
func roundDecimal(x float64, format byte, prec int) float64 {
	if x == 0 || math.IsNaN(x) || math.IsInf(x, 0) {
		return x
	}
	// 'f' of MaxFloat64 with 40 places needs 309+1+40+1 bytes.
	var buf [400]byte
	s := strconv.AppendFloat(buf[:0], x, format, prec, 64)
	// The bytes are not modified while the string view is used, and
	// ParseFloat keeps no reference to its input.
	// strconv's own output always parses; a value that prints as more than
	// MaxFloat64 reads back as ±Inf (with ErrRange), which is what a
	// printout re-read gives, so the error is not needed.
	v, _ := strconv.ParseFloat(unsafe.String(unsafe.SliceData(s), len(s)), 64)
	return v
}

// Rounded returns m with every accepted state rounded by r, emulating a run
// whose state is stored at a lower precision (Bits(24): float32 storage) or
// that is printed and re-read after every step (Digits, Places). With
// r.Stages it also rounds the input and the output of every evaluation of the
// vector field. The initial state is rounded too. A nil m means
// DormandPrince54. An invalid r makes Solve and NewStepper fail with
// ErrSettings.
//
// The wrapper needs no change to the stepper: after each attempt of m it
// rounds the candidate state and, for methods whose last stage is the next
// step's first (FSAL), evaluates the field once more at the rounded state, so
// that the next step starts from what was stored. The error estimate is the
// one m computed for the unrounded candidate; step control is unchanged.
// Dense output interpolates between the rounded step ends and is not itself
// rounded.
//
// Cost: one rounding per component per step (bits: a few integer operations;
// decimal: one strconv print and parse), one extra evaluation per accepted
// step for FSAL methods; with Stages, 2n roundings per evaluation.
func Rounded(m Method, r Rounding) Method {
	if m == nil {
		m = DormandPrince54
	}
	return rounded{m: m, r: r}
}

type rounded struct {
	m Method
	r Rounding
}

func (w rounded) Name() string           { return w.m.Name() + " (" + w.r.String() + ")" }
func (w rounded) Order() int             { return w.m.Order() }
func (w rounded) errOrder() int          { return w.m.errOrder() }
func (w rounded) fixedStep() float64     { return w.m.fixedStep() }
func (w rounded) controller() Controller { return w.m.controller() }

// newScheme wraps the method's scheme. p is the stepper's own copy of the
// problem: its F is replaced by the rounding field when r.Stages is set and
// its Y0 by a rounded copy (the caller's slice is never written).
func (w rounded) newScheme(p *Problem, n int) (scheme, error) {
	if err := w.r.Validate(); err != nil {
		return nil, err
	}
	rs := &roundedScheme{r: w.r, f: p.F, fixed: w.m.fixedStep() > 0}
	if w.r.Stages {
		rs.yin = make([]float64, n)
		rs.inner = p.F
		p.F = rs.stageF
		rs.f = p.F
	}
	p.Y0 = w.r.Vec(nil, p.Y0)
	in, err := w.m.newScheme(p, n)
	if err != nil {
		return nil, err
	}
	rs.sc = in
	if sq, ok := in.(sqAttempter); ok {
		// Keep the inner method's squared-norm path, so that 53-bit
		// rounding reproduces the unwrapped method bit for bit.
		return &roundedSqScheme{roundedScheme: rs, sq: sq}, nil
	}
	return rs, nil
}

// roundedSqScheme is a roundedScheme over a scheme that offers attemptSq.
type roundedSqScheme struct {
	*roundedScheme
	sq sqAttempter
}

func (s *roundedSqScheme) attemptSq(t, h float64, y, f0, y1, f1, rtol, atol []float64) (float64, int) {
	e2, ev := s.sq.attemptSq(t, h, y, f0, y1, f1, rtol, atol)
	return e2, ev + s.roundCandidate(t, h, y1, f1, e2 <= 1)
}

type roundedScheme struct {
	sc    scheme
	r     Rounding
	f     Func // the field the stepper and scheme use (rounding with Stages)
	inner Func // the caller's field, with Stages
	yin   []float64
	fixed bool
}

// stageF evaluates the caller's field at the rounded y and rounds the result.
func (s *roundedScheme) stageF(t float64, y, dydt []float64) {
	yin := s.yin[:len(y)]
	for i, v := range y {
		yin[i] = s.r.Round(v)
	}
	s.inner(t, yin, dydt)
	for i, v := range dydt {
		dydt[i] = s.r.Round(v)
	}
}

func (s *roundedScheme) attempt(t, h float64, y, f0, y1, f1, rtol, atol []float64) (float64, int) {
	err, ev := s.sc.attempt(t, h, y, f0, y1, f1, rtol, atol)
	return err, ev + s.roundCandidate(t, h, y1, f1, err <= 1)
}

// roundCandidate rounds the candidate state and, for a method that hands
// its last stage on, re-evaluates F at the rounded state. Only an accepted
// candidate's derivative is used; rejected ones (err > 1 or NaN) are
// discarded by the stepper. Fixed-step methods accept always. It returns
// the evaluations made.
func (s *roundedScheme) roundCandidate(t, h float64, y1, f1 []float64, accepted bool) int {
	for i, v := range y1 {
		y1[i] = s.r.Round(v)
	}
	if s.sc.fsal() && (s.fixed || accepted) {
		s.f(t+h, y1, f1)
		return 1
	}
	return 0
}

func (s *roundedScheme) fsal() bool { return s.sc.fsal() }

func (s *roundedScheme) stiffness(h float64, y1, f1 []float64) (float64, float64, bool) {
	return s.sc.stiffness(h, y1, f1)
}

func (s *roundedScheme) denseSize() int { return s.sc.denseSize() }

func (s *roundedScheme) dense(t, h float64, y, f0, y1, f1, coef []float64) int {
	return s.sc.dense(t, h, y, f0, y1, f1, coef)
}

func (s *roundedScheme) interp(coef []float64, theta float64, dst []float64) {
	s.sc.interp(coef, theta, dst)
}
