package ival

import (
	"math"
	"math/big"
)

// benc is an enclosure [lo, hi] of a real number (or of a set of reals) in
// math/big floating point, the working representation of the elementary
// functions. Every operation rounds lo toward -Inf and hi toward +Inf
// (big.Float's Add, Sub, Mul and Quo round correctly in the mode of the
// result), so benc arithmetic is interval arithmetic at any precision, with
// the inclusion property by the same argument as for float64 intervals
// (Moore 1966). Only finite values are used.
type benc struct{ lo, hi *big.Float }

func bLo(p uint) *big.Float { return new(big.Float).SetPrec(p).SetMode(big.ToNegativeInf) }
func bHi(p uint) *big.Float { return new(big.Float).SetPrec(p).SetMode(big.ToPositiveInf) }

// bexact returns the point enclosure of v, rounded outward to p bits if v
// has more.
func bexact(v *big.Float, p uint) benc { return benc{bLo(p).Set(v), bHi(p).Set(v)} }

// bf64 returns the point enclosure of the float64 x (exact for p >= 53).
func bf64(x float64, p uint) benc {
	v := new(big.Float).SetFloat64(x)
	return bexact(v, p)
}

// bint returns the enclosure of the integer n.
func bint(n int64, p uint) benc { return bexact(new(big.Float).SetInt64(n), p) }

func (a benc) add(b benc, p uint) benc {
	return benc{bLo(p).Add(a.lo, b.lo), bHi(p).Add(a.hi, b.hi)}
}

func (a benc) sub(b benc, p uint) benc {
	return benc{bLo(p).Sub(a.lo, b.hi), bHi(p).Sub(a.hi, b.lo)}
}

func (a benc) neg() benc {
	return benc{new(big.Float).Neg(a.hi).SetMode(big.ToNegativeInf), new(big.Float).Neg(a.lo).SetMode(big.ToPositiveInf)}
}

// mul is the product, by the signs of the ends (Moore's case table): two
// products unless both operands hold 0.
func (a benc) mul(b benc, p uint) benc {
	l := func(x, y *big.Float) *big.Float { return bLo(p).Mul(x, y) }
	h := func(x, y *big.Float) *big.Float { return bHi(p).Mul(x, y) }
	switch {
	case a.lo.Sign() >= 0:
		switch {
		case b.lo.Sign() >= 0:
			return benc{l(a.lo, b.lo), h(a.hi, b.hi)}
		case b.hi.Sign() <= 0:
			return benc{l(a.hi, b.lo), h(a.lo, b.hi)}
		}
		return benc{l(a.hi, b.lo), h(a.hi, b.hi)}
	case a.hi.Sign() <= 0:
		switch {
		case b.lo.Sign() >= 0:
			return benc{l(a.lo, b.hi), h(a.hi, b.lo)}
		case b.hi.Sign() <= 0:
			return benc{l(a.hi, b.hi), h(a.lo, b.lo)}
		}
		return benc{l(a.lo, b.hi), h(a.lo, b.lo)}
	}
	switch {
	case b.lo.Sign() >= 0:
		return benc{l(a.lo, b.hi), h(a.hi, b.hi)}
	case b.hi.Sign() <= 0:
		return benc{l(a.hi, b.lo), h(a.lo, b.lo)}
	}
	lo, lo2 := l(a.lo, b.hi), l(a.hi, b.lo)
	if lo2.Cmp(lo) < 0 {
		lo = lo2
	}
	hi, hi2 := h(a.lo, b.lo), h(a.hi, b.hi)
	if hi2.Cmp(hi) > 0 {
		hi = hi2
	}
	return benc{lo, hi}
}

// divInt divides by the positive integer n (increasing in a).
func (a benc) divInt(n int64, p uint) benc {
	d := new(big.Float).SetInt64(n)
	return benc{bLo(p).Quo(a.lo, d), bHi(p).Quo(a.hi, d)}
}

// sqr is {v*v}: never negative, tighter than mul(a, a) when a holds 0.
func (a benc) sqr(p uint) benc {
	switch {
	case a.lo.Sign() >= 0:
		return benc{bLo(p).Mul(a.lo, a.lo), bHi(p).Mul(a.hi, a.hi)}
	case a.hi.Sign() <= 0:
		return benc{bLo(p).Mul(a.hi, a.hi), bHi(p).Mul(a.lo, a.lo)}
	}
	h1, h2 := bHi(p).Mul(a.lo, a.lo), bHi(p).Mul(a.hi, a.hi)
	if h2.Cmp(h1) > 0 {
		h1 = h2
	}
	return benc{bLo(p), h1}
}

// quo is the quotient; b must not contain 0 (the caller ensures it). It is
// a times the reciprocal's ends, by the signs of the ends.
func (a benc) quo(b benc, p uint) benc {
	l := func(x, y *big.Float) *big.Float { return bLo(p).Quo(x, y) }
	h := func(x, y *big.Float) *big.Float { return bHi(p).Quo(x, y) }
	if b.lo.Sign() > 0 {
		switch {
		case a.lo.Sign() >= 0:
			return benc{l(a.lo, b.hi), h(a.hi, b.lo)}
		case a.hi.Sign() <= 0:
			return benc{l(a.lo, b.lo), h(a.hi, b.hi)}
		}
		return benc{l(a.lo, b.lo), h(a.hi, b.lo)}
	}
	// b < 0
	switch {
	case a.lo.Sign() >= 0:
		return benc{l(a.hi, b.hi), h(a.lo, b.lo)}
	case a.hi.Sign() <= 0:
		return benc{l(a.hi, b.lo), h(a.lo, b.hi)}
	}
	return benc{l(a.hi, b.hi), h(a.lo, b.hi)}
}

// ldexp multiplies by 2^k (exact).
func (a benc) ldexp(k int) benc {
	lo, hi := new(big.Float).Copy(a.lo), new(big.Float).Copy(a.hi)
	return benc{lo.SetMantExp(lo, k), hi.SetMantExp(hi, k)}
}

// pad widens a by [-r, r] for r >= 0 (a truncation error bound).
func (a benc) pad(r *big.Float, p uint) benc {
	return benc{bLo(p).Sub(a.lo, r), bHi(p).Add(a.hi, r)}
}

// mag returns an upper bound of max |v| over a.
func (a benc) mag(p uint) *big.Float {
	l, h := bHi(p).Abs(a.lo), bHi(p).Abs(a.hi)
	if l.Cmp(h) > 0 {
		return l
	}
	return h
}

// containsZero reports whether 0 is in a.
func (a benc) containsZero() bool { return a.lo.Sign() <= 0 && a.hi.Sign() >= 0 }

// hull returns the smallest enclosure holding a and b.
func (a benc) hull(b benc) benc {
	lo, hi := a.lo, a.hi
	if b.lo.Cmp(lo) < 0 {
		lo = b.lo
	}
	if b.hi.Cmp(hi) > 0 {
		hi = b.hi
	}
	return benc{lo, hi}
}

// ulpOf returns 2^(exp(v) - p), one unit in the last place of a p-bit v != 0.
func ulpOf(v *big.Float, p uint) *big.Float {
	return new(big.Float).SetMantExp(big.NewFloat(1), v.MantExp(nil)-int(p))
}

// sqrtDownBig returns a p-bit value <= sqrt(v) for v >= 0. big.Float's Sqrt
// does not promise a rounding direction, so the candidate is checked with
// an exact square (2p bits hold the product of two p-bit values) and moved
// down one ulp until it passes.
func sqrtDownBig(v *big.Float, p uint) *big.Float {
	if v.Sign() == 0 {
		return bLo(p)
	}
	s := bLo(p).Sqrt(v)
	for bHi(2*p+2).Mul(s, s).Cmp(v) > 0 {
		s = bLo(p).Sub(s, ulpOf(s, p))
	}
	return s
}

// sqrtUpBig returns a p-bit value >= sqrt(v) for v >= 0 (as sqrtDownBig).
func sqrtUpBig(v *big.Float, p uint) *big.Float {
	if v.Sign() == 0 {
		return bHi(p)
	}
	s := bHi(p).Sqrt(v)
	for bLo(2*p+2).Mul(s, s).Cmp(v) < 0 {
		s = bHi(p).Add(s, ulpOf(s, p))
	}
	return s
}

// sqrt is the square root of a with a.lo >= 0.
func (a benc) sqrt(p uint) benc { return benc{sqrtDownBig(a.lo, p), sqrtUpBig(a.hi, p)} }

// down64 returns the largest float64 <= v (v finite; below -MaxFloat64 it
// is -Inf). big.Float's Float64 rounds to nearest and reports the side.
func down64(v *big.Float) float64 {
	f, acc := v.Float64()
	if acc == big.Above {
		f = math.Nextafter(f, math.Inf(-1))
	}
	return f
}

// up64 returns the smallest float64 >= v.
func up64(v *big.Float) float64 {
	f, acc := v.Float64()
	if acc == big.Below {
		f = math.Nextafter(f, math.Inf(1))
	}
	return f
}

// toInterval rounds the enclosure a outward to float64.
func (a benc) toInterval() Interval { return Interval{down64(a.lo), up64(a.hi)} }
