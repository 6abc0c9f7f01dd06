package detmath

import (
	"math"
	"math/big"
	"sync"
)

// π/2 = pio2a + pio2b + pio2c (+ 1e-37): pio2a and pio2b have 33
// significant bits, so q·pio2a and q·pio2b are exact for |q| < 2^20
// (Cody & Waite's three-part constant; computed from π by Machin's formula
// with exact rational arithmetic).
const (
	pio2a = 0x1.921fb54400000p+0
	pio2b = 0x1.0b4611a600000p-34
	pio2c = 0x1.3198a2e037073p-69
	// twoOverPi rounds 2/π; it only picks the quadrant q.
	twoOverPi = 0.6366197723675814
	// reduceMax bounds the arguments reduced with the three-part constant
	// (q below 2^19); larger ones are reduced in big.Float.
	reduceMax = 0x1p19 * 1.5707963267948966
)

// reduce returns r = rhi + rlo in about [-π/4, π/4] (a double-double: the
// reduction's rounding kept in rlo) and q mod 4 with x = q·π/2 + r.
func reduce(x float64) (rhi, rlo float64, q int) {
	if math.Abs(x) <= math.Pi/4 {
		return x, 0, 0
	}
	if math.Abs(x) < reduceMax {
		qf := math.Round(float64(x * twoOverPi))
		t := x - float64(qf*pio2a) // exact: q·pio2a is exact and near x
		w := float64(qf * pio2b)   // exact
		// r + e = t - w exactly (Knuth's TwoSum, no condition on the
		// magnitudes: x near a multiple of π/2 has t near w).
		r := t - w
		bv := r - t
		e := (t - (r - bv)) - (w + bv)
		w = float64(qf*pio2c) - e
		rhi = r - w
		rlo = (r - rhi) - w
		return rhi, rlo, int(int64(qf) & 3)
	}
	return reduceBig(x)
}

// bigPiOver2 is π/2 to bigPrec bits, made once by Machin's formula
// π/4 = 4·atan(1/5) - atan(1/239).
var (
	bigPiOnce  sync.Once
	bigPiOver2 *big.Float
)

// bigPrec covers the reduction of every float64 (up to 2^1024, so 1024
// bits of q) with 53 bits left for r and a margin for an x close to a
// multiple of π/2 (no float64 comes nearer than about 2^-62 relative,
// Kahan & McDonald's search; common practice).
const bigPrec = 1024 + 53 + 128

func piOver2() *big.Float {
	bigPiOnce.Do(func() {
		const prec = bigPrec + 64
		atanInv := func(n int64) *big.Float { // atan(1/n) = Σ (-1)^k / ((2k+1) n^(2k+1))
			sum := new(big.Float).SetPrec(prec)
			p := new(big.Float).SetPrec(prec).Quo(big.NewFloat(1).SetPrec(prec), new(big.Float).SetInt64(n))
			n2 := new(big.Float).SetPrec(prec).SetInt64(n * n)
			eps := new(big.Float).SetMantExp(big.NewFloat(1), -prec-8)
			for k := int64(0); ; k++ {
				t := new(big.Float).SetPrec(prec).Quo(p, new(big.Float).SetInt64(2*k+1))
				if k%2 == 0 {
					sum.Add(sum, t)
				} else {
					sum.Sub(sum, t)
				}
				if t.Cmp(eps) < 0 {
					return sum
				}
				p.Quo(p, n2)
			}
		}
		a := atanInv(5)
		a.Mul(a, big.NewFloat(4))
		a.Sub(a, atanInv(239))
		// π/2 = 2·(4·atan(1/5) - atan(1/239))
		bigPiOver2 = a.Mul(a, big.NewFloat(2)).SetPrec(bigPrec)
	})
	return bigPiOver2
}

// reduceBig reduces a large x in big.Float: q = round(x/(π/2)), r = x -
// q·π/2, both exact to bigPrec bits; r is returned as rhi + rlo.
func reduceBig(x float64) (rhi, rlo float64, q int) {
	p := piOver2()
	xb := new(big.Float).SetPrec(bigPrec).SetFloat64(x)
	qf := new(big.Float).SetPrec(bigPrec).Quo(xb, p)
	// round half away from zero
	half := big.NewFloat(0.5)
	if qf.Sign() < 0 {
		qf.Sub(qf, half)
	} else {
		qf.Add(qf, half)
	}
	qi, _ := qf.Int(nil) // truncates toward zero
	qb := new(big.Float).SetPrec(bigPrec).SetInt(qi)
	r := new(big.Float).SetPrec(bigPrec).Mul(qb, p)
	r.Sub(xb, r)
	rhi, _ = r.Float64()
	rlo, _ = r.Sub(r, new(big.Float).SetFloat64(rhi)).Float64()
	m := new(big.Int).And(qi, big.NewInt(3)) // two's-complement low bits, also for q < 0
	return rhi, rlo, int(m.Int64())
}

// sinPoly and cosPoly are sin r and cos r for r = r + rlo, |r| <= π/4, by
// their Taylor polynomials in r (to r^21 and r^20; the next terms are below
// 2^-70 of the sums) and the first-order terms in rlo (sin(r + rlo) =
// sin r + rlo·cos r, cos(r + rlo) = cos r - rlo·sin r; rlo is below an ulp
// of r, so the next order is far below the rounding).
func sinPoly(r, rlo float64) float64 {
	z := float64(r * r)
	p := -1.0 / 51090942171709440000 // -1/21!
	p = 1.0/121645100408832000 + float64(z*p)
	p = -1.0/355687428096000 + float64(z*p)
	p = 1.0/1307674368000 + float64(z*p)
	p = -1.0/6227020800 + float64(z*p)
	p = 1.0/39916800 + float64(z*p)
	p = -1.0/362880 + float64(z*p)
	p = 1.0/5040 + float64(z*p)
	p = -1.0/120 + float64(z*p)
	p = 1.0/6 + float64(z*p) // p = 1/3! - z/5! + z²/7! - ...
	return r + ((rlo - float64(float64(r*z)*p)) - float64(rlo*float64(0.5*z)))
}

func cosPoly(r, rlo float64) float64 {
	z := float64(r * r)
	p := 1.0 / 2432902008176640000 // 1/20!
	p = -1.0/6402373705728000 + float64(z*p)
	p = 1.0/20922789888000 + float64(z*p)
	p = -1.0/87178291200 + float64(z*p)
	p = 1.0/479001600 + float64(z*p)
	p = -1.0/3628800 + float64(z*p)
	p = 1.0/40320 + float64(z*p)
	p = -1.0/720 + float64(z*p)
	p = 1.0/24 + float64(z*p)
	// cos r = 1 - z/2 + z²·p; w = 1 - z/2 is rounded, and its rounding
	// error (1 - w) - z/2 is added back with the small terms.
	hz := float64(0.5 * z)
	w := 1 - hz
	return w + (((1 - w) - hz) + (float64(float64(z*z)*p) - float64(r*rlo)))
}

// Sincos returns Sin(x) and Cos(x) with one reduction.
func Sincos(x float64) (sin, cos float64) {
	switch {
	case x == 0:
		return x, 1 // keeps the sign of zero
	case math.IsNaN(x) || math.IsInf(x, 0):
		return math.NaN(), math.NaN()
	}
	r, rlo, q := reduce(x)
	s, c := sinPoly(r, rlo), cosPoly(r, rlo)
	switch q {
	case 0:
		return s, c
	case 1:
		return c, -s
	case 2:
		return -s, -c
	}
	return -c, s
}

// Sin returns the sine of x (radians), within 1 ulp (0.72 measured against
// math/big at 400 bits, see TestSinCos), with the special cases of
// math.Sin: Sin(±0) = ±0, Sin(±Inf) = NaN, Sin(NaN) = NaN.
//
// Method: x = q·π/2 + r, |r| <= π/4, by Cody & Waite's three-part π/2 for
// |x| < 2^19·π/2 and in big.Float with π/2 to 1,205 bits beyond (every
// float64, exactly enough); then the Taylor polynomial of sin or cos of r
// by the quadrant q, with the reduction's rounding carried to first order.
//
// References:
//
//	W. J. Cody, W. Waite, Software Manual for the Elementary Functions,
//	  Prentice-Hall 1980 (argument reduction).
//	W. Kahan, K. C. Ng (McDonald), the search for the float64 nearest a
//	  multiple of π/2, cited in J.-M. Muller, Elementary Functions:
//	  Algorithms and Implementation, 3rd ed., Birkhäuser 2016, Ch. 11.
func Sin(x float64) float64 {
	switch {
	case x == 0:
		return x
	case math.IsNaN(x) || math.IsInf(x, 0):
		return math.NaN()
	}
	r, rlo, q := reduce(x)
	switch q {
	case 0:
		return sinPoly(r, rlo)
	case 1:
		return cosPoly(r, rlo)
	case 2:
		return -sinPoly(r, rlo)
	}
	return -cosPoly(r, rlo)
}

// Cos returns the cosine of x (radians), within 1 ulp, as Sin; special
// cases as math.Cos: Cos(±Inf) = NaN, Cos(NaN) = NaN.
func Cos(x float64) float64 {
	switch {
	case x == 0:
		return 1
	case math.IsNaN(x) || math.IsInf(x, 0):
		return math.NaN()
	}
	r, rlo, q := reduce(x)
	switch q {
	case 0:
		return cosPoly(r, rlo)
	case 1:
		return -sinPoly(r, rlo)
	case 2:
		return -cosPoly(r, rlo)
	}
	return sinPoly(r, rlo)
}

// Tan returns the tangent of x (radians), Sin(x)/Cos(x) from one reduction
// (within 2.5 ulp, 1.87 measured); special cases as math.Tan: Tan(±0) = ±0,
// Tan(±Inf) = NaN, Tan(NaN) = NaN.
func Tan(x float64) float64 {
	if x == 0 {
		return x
	}
	s, c := Sincos(x)
	return s / c
}
