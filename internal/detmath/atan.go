package detmath

import "math"

// atanBase[i][j] = {hi, lo}: hi + lo approximates a base angle to about
// 2^-107 relative, hi being the float64 nearest to it. Row 0 is for the
// ratios v < 1/4 (c = 0); row i >= 1 is for v in [1/8·i + 1/8, 1/8·i + 1/4]
// with c_i = (2i+3)/16. The columns are the base angle of each octant pair:
//
//	j = 0: atan(c)        (θ = atan(v), |y| <= |x|, x > 0)
//	j = 1: π/2 - atan(c)  (π/2 - θ,    |y| > |x|, x > 0)
//	j = 2: π - atan(c)    (π - θ,      |y| <= |x|, x < 0)
//	j = 3: π/2 + atan(c)  (π/2 + θ,    |y| > |x|, x < 0)
//
// The values were computed with math/big at 300 bits (π as 4·atan(1),
// atan by six angle halvings and the Taylor series); TestAtanBase checks
// every entry against an independent math/big evaluation.
var atanBase = [7][4][2]float64{
	{{0, 0}, {1.5707963267948966, 6.123233995736766e-17}, {3.141592653589793, 1.2246467991473532e-16}, {1.5707963267948966, 6.123233995736766e-17}},
	{{0.3028848683749714, -1.1010827903001369e-17}, {1.2679114584199251, 7.224316786036903e-17}, {2.838707785214822, -8.856909710729462e-17}, {1.873681195169868, 5.022151205436629e-17}},    // c = 5/16
	{{0.4124104415973873, -1.587652227770689e-17}, {1.1583858851975093, 2.1597711003816724e-17}, {2.729182211992406, -1.3921455396384692e-16}, {1.9832067683922838, 1.0086696891091859e-16}}, // c = 7/16
	{{0.5123894603107377, -2.5462781472855804e-17}, {1.0584068664841588, 8.669512143022346e-17}, {2.6292031932790554, 1.4792746138759113e-16}, {2.0831857871056343, 3.5769558484511857e-17}}, // c = 9/16
	{{0.6022873461349642, 2.950430737228402e-17}, {0.9685089806599324, 3.172803258508363e-17}, {2.539305307454829, 2.0398267500496694e-16}, {2.173083672929861, -2.0285655132863968e-17}},    // c = 11/16
	{{0.6823165548747481, 6.943223671560008e-18}, {0.8884797719201485, 5.428911628580765e-17}, {2.459276098715045, 1.155214562431753e-16}, {2.2531128816696446, 6.817556362892767e-17}},      // c = 13/16
	{{0.7531512809621944, -2.4256934659182068e-17}, {0.8176450458327023, -2.553302784596593e-17}, {2.388441372627599, 3.569931211140173e-17}, {2.323947607757091, 1.4799770776070126e-16}},   // c = 15/16
}

// atanSign[j] is the sign with which atan(t) enters the base angle of
// column j of atanBase.
var atanSign = [4]float64{1, -1, -1, 1}

// Atan returns the arctangent of x in radians, within 2 ulp (0.62 ulp
// measured against math/big at 200 bits, see TestAtan).
//
// Special cases are:
//
//	Atan(±0) = ±0
//	Atan(±Inf) = ±Pi/2
//	Atan(NaN) = NaN
//
// Method: for |x| <= 1, θ = atan(|x|); for |x| > 1, π/2 - atan(1/|x|),
// with the rounding of 1/|x| undone by its exact remainder (see
// atanRatio).
//
// References:
//
//	W. J. Cody, W. Waite, Software Manual for the Elementary Functions,
//	  Prentice-Hall 1980 (reduction of the arctangent by
//	  atan(v) = atan(c) + atan((v-c)/(1+vc))).
//	J.-M. Muller, Elementary Functions: Algorithms and Implementation, 3rd
//	  ed., Birkhäuser 2016 (table-based additive reduction).
func Atan(x float64) float64 {
	if math.IsNaN(x) {
		return x
	}
	ax := math.Abs(x)
	var r float64
	if ax <= 1 {
		r = atanUnit(ax, 0)
	} else {
		r = atanRatio(1, ax, 1)
	}
	return math.Copysign(r, x)
}

// Atan2 returns the arctangent of y/x in radians, in [-π, π], using the
// signs of both to choose the quadrant, within 2 ulp (0.60 ulp measured
// against math/big at 200 bits, see TestAtan2). The rounding of the
// smaller of |y|/|x| and |x|/|y| is undone by its exact remainder, or the
// reduced argument is formed from y and x directly (see atanRatio), and
// y and x are scaled by a power of two when their products could
// overflow or underflow.
//
// Special cases are (in order), as those of math.Atan2:
//
//	Atan2(y, NaN) = NaN
//	Atan2(NaN, x) = NaN
//	Atan2(+0, x>=0) = +0
//	Atan2(-0, x>=0) = -0
//	Atan2(+0, x<=-0) = +Pi
//	Atan2(-0, x<=-0) = -Pi
//	Atan2(y>0, 0) = +Pi/2
//	Atan2(y<0, 0) = -Pi/2
//	Atan2(+Inf, +Inf) = +Pi/4
//	Atan2(-Inf, +Inf) = -Pi/4
//	Atan2(+Inf, -Inf) = 3Pi/4
//	Atan2(-Inf, -Inf) = -3Pi/4
//	Atan2(y, +Inf) = 0 (with the sign of y)
//	Atan2(y>0, -Inf) = +Pi
//	Atan2(y<0, -Inf) = -Pi
//	Atan2(+Inf, x) = +Pi/2
//	Atan2(-Inf, x) = -Pi/2
//
// References: as for Atan, and
//
//	T. J. Dekker, A floating-point technique for extending the available
//	  precision, Numer. Math. 18 (1971) 224–242 (the exact product).
func Atan2(y, x float64) float64 {
	const pi, pio2 = 3.141592653589793, 1.5707963267948966 // nearest float64 to π, π/2
	switch {
	case math.IsNaN(x) || math.IsNaN(y):
		return math.NaN()
	case y == 0:
		if x > 0 || (x == 0 && !math.Signbit(x)) {
			return y // ±0 with the sign of y
		}
		return math.Copysign(pi, y)
	case x == 0:
		return math.Copysign(pio2, y)
	case math.IsInf(x, 0):
		if math.IsInf(y, 0) {
			if x > 0 {
				return math.Copysign(pio2/2, y) // π/4 is exact from π/2
			}
			return math.Copysign(2.356194490192345, y) // nearest float64 to 3π/4
		}
		if x > 0 {
			return math.Copysign(0, y)
		}
		return math.Copysign(pi, y)
	case math.IsInf(y, 0):
		return math.Copysign(pio2, y)
	}
	ay, ax := math.Abs(y), math.Abs(x)
	var r float64
	switch {
	case ay <= ax && x > 0:
		r = atanRatio(ay, ax, 0)
	case ay > ax && x > 0:
		r = atanRatio(ax, ay, 1)
	case ay <= ax:
		r = atanRatio(ay, ax, 2)
	default:
		r = atanRatio(ax, ay, 3)
	}
	return math.Copysign(r, y)
}

// atanRatio returns base_j ± atan(a/b) for 0 <= a <= b, b > 0 (b may be
// +Inf when a is finite), where base_j and the sign are those of column j
// of atanBase.
//
// With v = a/b: if v < 2^-27, atan(v) = v to within 2^-55 relative. If v <
// 1/4, the series of atanDirect, with the rounding error of v = a/b
// restored as its exact remainder (a - v·b)/b (Dekker's product).
// Otherwise atan(v) = atan(c) + atan(t) with c = (2i+5)/16 the centre of
// the eighth of [1/4, 1] holding v (row i+1 of atanBase) and t = (a -
// c·b)/(b + c·a): a - c·b is exact (Dekker's product, then Sterbenz's
// lemma) and b + c·a is a double-double, so t is correct to about 2^-100.
func atanRatio(a, b float64, j int) float64 {
	v := a / b
	if v < 0x1p-27 {
		if j == 0 {
			return v
		}
		return atanBase[0][j][0] + (float64(atanSign[j]*v) + atanBase[0][j][1])
	}
	// Keep b and a within [2^-530, 2^500] so that the products below
	// neither overflow nor lose bits to underflow; scaling by a power of
	// two is exact here (a >= 2^-27·b stays normal).
	if b > 0x1p500 || b < 0x1p-500 {
		fr, e := math.Frexp(b)
		b, a = fr, math.Ldexp(a, -e)
	}
	if v < 0.25 {
		p, e := twoProd(v, b)
		return atanDirect(v, ((a-p)-e)/b, j) // a/b = v + vl to about 2^-106
	}
	i := min(int(float64((v-0.25)*8)), 5)
	c := float64(float64(2*i+5) / 16) // exact; rounded explicitly, since the compiler turns /16 into ·(1/16)
	p, e := twoProdShort(c, b)
	q, qe := twoProdShort(c, a)
	dh, dl := fastTwoSum(b, q) // b >= c·a
	return atanReduced(i+1, (a-p)-e, dh, dl+qe, j)
}

// atanUnit returns base_j ± atan(v) for 0 <= v <= 1, as atanRatio(v, 1, j)
// without its divisions.
func atanUnit(v float64, j int) float64 {
	switch {
	case v < 0x1p-27:
		if j == 0 {
			return v
		}
		return atanBase[0][j][0] + (float64(atanSign[j]*v) + atanBase[0][j][1])
	case v < 0.25:
		return atanDirect(v, 0, j)
	}
	i := min(int(float64((v-0.25)*8)), 5)
	c := float64(float64(2*i+5) / 16) // exact; rounded explicitly, since the compiler turns /16 into ·(1/16)
	q, qe := twoProdShort(c, v)
	dh, dl := fastTwoSum(1, q)                 // 1 >= c·v
	return atanReduced(i+1, v-c, dh, dl+qe, j) // v - c exact (Sterbenz)
}

// atanDirect returns base_j ± atan(v + vl) for 2^-27 <= v < 1/4, |vl| <=
// 2^-52·v: atan(v) = v + v·z·P(z), z = v², P the Taylor series of
// (atan(v) - v)/v³ to the term z^12 (the next is below 2^-60 of v), split
// by parity into two Horner chains in u = z² (evaluated side by side, in a
// fixed order); atan(v + vl) = atan(v) + vl/(1+z) with vl/(1+z) = vl -
// vl·z to within 2^-8·|vl|.
func atanDirect(v, vl float64, j int) float64 {
	z := float64(v * v)
	u := float64(z * z)
	// Even powers of z: -1/3 - u/7 - u²/11 - ... - u^6/27.
	qe := -1.0 / 27
	qe = -1.0/23 + float64(u*qe)
	qe = -1.0/19 + float64(u*qe)
	qe = -1.0/15 + float64(u*qe)
	qe = -1.0/11 + float64(u*qe)
	qe = -1.0/7 + float64(u*qe)
	qe = -1.0/3 + float64(u*qe)
	// Odd powers of z over z: 1/5 + u/9 + ... + u^5/25.
	qo := 1.0 / 25
	qo = 1.0/21 + float64(u*qo)
	qo = 1.0/17 + float64(u*qo)
	qo = 1.0/13 + float64(u*qo)
	qo = 1.0/9 + float64(u*qo)
	qo = 1.0/5 + float64(u*qo)
	q := qe + float64(z*qo)
	tail := float64(float64(v*z)*q) + (vl - float64(vl*z))
	s := atanSign[j]
	return atanBase[0][j][0] + (float64(s*v) + (atanBase[0][j][1] + float64(s*tail)))
}

// atanReduced returns base ± atan(n/(dh+dl)) with base and sign from row
// r and column j of atanBase, for |n/dh| < 0.059: t = n/d as a
// double-double t + tl (one division; the remainder n - t·dh - t·dl by
// Dekker's product), atan(t) = t + t·z·P(z) with P the Taylor series of
// (atan(t) - t)/t³ to the term z^7 (the next is below 2^-69 of t), and
// atan(t + tl) = atan(t) + tl to within z·|tl|.
func atanReduced(r int, n, dh, dl float64, j int) float64 {
	inv := 1 / dh
	t := float64(n * inv)
	p, pe := twoProd(t, dh)
	tl := float64((((n - p) - pe) - float64(t*dl)) * inv)
	z := float64(t * t)
	// (atan(t) - t)/t³ = -1/3 + z/5 - ... + z^7/17 by Horner.
	q := 1.0 / 17
	q = -1.0/15 + float64(z*q)
	q = 1.0/13 + float64(z*q)
	q = -1.0/11 + float64(z*q)
	q = 1.0/9 + float64(z*q)
	q = -1.0/7 + float64(z*q)
	q = 1.0/5 + float64(z*q)
	q = -1.0/3 + float64(z*q)
	tail := float64(float64(t*z)*q) + tl
	s := atanSign[j]
	return atanBase[r][j][0] + (float64(s*t) + (atanBase[r][j][1] + float64(s*tail)))
}

// twoProdShort is twoProd for a c with at most 26 significant bits (the
// table centres (2i+5)/16 have at most 4): c·bh and c·bl are then exact,
// so c needs no split.
func twoProdShort(c, b float64) (p, e float64) {
	p = float64(c * b)
	bh, bl := split(b)
	e = (float64(c*bh) - p) + float64(c*bl)
	return p, e
}
