package expr

import (
	"math"
	"math/big"
	"sync"

	"github.com/plumbdyn/plumb/internal/bigadd"
	"github.com/plumbdyn/plumb/internal/detmath"
)

// Elementary functions on math/big.Float at any precision, for the
// reference-precision evaluator. Where the result is not a real number they
// return nil (big.Float has no NaN). Each computes with guard bits and rounds
// the result to z's precision (or, when z has precision 0, to the largest
// operand precision); the error is within a few ulps of that precision.
//
// Methods (all classical; see Brent & Zimmermann, Modern Computer
// Arithmetic, Cambridge 2010, ch. 4):
//
//	π         Machin's formula π = 16·atan(1/5) - 4·atan(1/239)
//	ln 2      2·atanh(1/3)
//	exp       x = k·ln2 + r, r·2^-s, Taylor series of e^r - 1, s squarings
//	log       x = m·2^e with m in [√½, √2), log m = 2·atanh((m-1)/(m+1))
//	sin, cos  reduction by π/2, Taylor series on |r| <= π/4
//	atan      reduction to |x| <= 1, four halvings x/(1+√(1+x²)), Taylor series
//
// References:
//
//	R. P. Brent, P. Zimmermann, Modern Computer Arithmetic, Cambridge
//	  University Press, 2010, chapter 4.
//	J. Machin (1706), in W. Jones, Synopsis Palmariorum Matheseos.

const guardBits = 64

// maxReduceExp bounds the binary exponent of arguments reduced by π/2:
// the reduction is exact and needs π to as many bits as the exponent, so
// beyond 2^4096 (four times float64's range, which no state compared with
// a float64 run can reach) sin, cos and tan return nil rather than spend
// seconds: tan(2^51650) would compute π to 52000 bits.
const maxReduceExp = 1 << 12

var constCache struct {
	sync.Mutex
	pi, ln2 *big.Float
}

func newF(prec uint) *big.Float { return new(big.Float).SetPrec(prec) }

// atanInv returns atan(1/n) at precision prec by its Taylor series.
func atanInv(n int64, prec uint) *big.Float {
	x := newF(prec).Quo(newF(prec).SetInt64(1), newF(prec).SetInt64(n))
	x2 := newF(prec).Mul(x, x)
	sum := newF(prec).Set(x)
	t := newF(prec).Set(x)
	eps := newF(prec).SetMantExp(big.NewFloat(1), -int(prec))
	for k := int64(3); ; k += 2 {
		t.Mul(t, x2)
		t.Neg(t)
		q := newF(prec).Quo(t, newF(prec).SetInt64(k))
		bigadd.Add(sum, sum, q)
		if q.Sign() == 0 || new(big.Float).Abs(q).Cmp(eps) < 0 {
			return sum
		}
	}
}

// BigPi returns π rounded to prec bits.
func BigPi(prec uint) *big.Float {
	constCache.Lock()
	defer constCache.Unlock()
	if constCache.pi == nil || constCache.pi.Prec() < prec+guardBits {
		w := prec + guardBits
		a := atanInv(5, w)
		b := atanInv(239, w)
		p := newF(w).Mul(a, newF(w).SetInt64(16))
		bigadd.Sub(p, p, newF(w).Mul(b, newF(w).SetInt64(4)))
		constCache.pi = p
	}
	return newF(prec).Set(constCache.pi)
}

// BigLn2 returns ln 2 rounded to prec bits.
func BigLn2(prec uint) *big.Float {
	constCache.Lock()
	defer constCache.Unlock()
	if constCache.ln2 == nil || constCache.ln2.Prec() < prec+guardBits {
		w := prec + guardBits
		z := newF(w).Quo(newF(w).SetInt64(1), newF(w).SetInt64(3))
		constCache.ln2 = atanhSeries(z, w)
		constCache.ln2.Mul(constCache.ln2, newF(w).SetInt64(2))
	}
	return newF(prec).Set(constCache.ln2)
}

// atanhSeries returns atanh z = z + z³/3 + z⁵/5 + ... for small |z|.
func atanhSeries(z *big.Float, prec uint) *big.Float {
	z2 := newF(prec).Mul(z, z)
	sum := newF(prec).Set(z)
	t := newF(prec).Set(z)
	for k := int64(3); ; k += 2 {
		t.Mul(t, z2)
		q := newF(prec).Quo(t, newF(prec).SetInt64(k))
		if q.Sign() == 0 || q.MantExp(nil)-sum.MantExp(nil) < -int(prec) {
			return sum
		}
		bigadd.Add(sum, sum, q)
	}
}

// resultPrec is z's precision, or the largest of xs when z has none.
func resultPrec(z *big.Float, xs ...*big.Float) uint {
	if p := z.Prec(); p != 0 {
		return p
	}
	var p uint
	for _, x := range xs {
		p = max(p, x.Prec())
	}
	if p == 0 {
		p = 53
	}
	return p
}

// nan is the result of a function at a point where it is not a real number:
// big.Float has no NaN, so the functions return nil and leave z unchanged.
func nan(*big.Float) *big.Float { return nil }

// BigExp sets z = e^x and returns z.
func BigExp(z, x *big.Float) *big.Float {
	prec := resultPrec(z, x)
	if x.IsInf() {
		if x.Sign() > 0 {
			return z.SetPrec(prec).SetInf(false)
		}
		return z.SetPrec(prec).SetInt64(0)
	}
	if x.Sign() == 0 {
		return z.SetPrec(prec).SetInt64(1)
	}
	xf, _ := x.Float64()
	// Very large arguments: the exponent would overflow big.Float's range.
	if math.Abs(xf) > 1e15 {
		if xf > 0 {
			return z.SetPrec(prec).SetInf(false)
		}
		return z.SetPrec(prec).SetInt64(0)
	}
	ex := x.MantExp(nil)
	w := prec + guardBits + uint(max(ex, 0))
	k := math.Round(xf / math.Ln2)
	r := bigadd.Sub(newF(w), x, newF(w).Mul(BigLn2(w), newF(w).SetFloat64(k)))
	s := uint(math.Sqrt(float64(prec))) + 1
	w += s
	r.SetPrec(w)
	r.SetMantExp(r, -int(s))
	// e^r - 1 by Taylor series.
	sum := newF(w).Set(r)
	t := newF(w).Set(r)
	for n := int64(2); ; n++ {
		t.Mul(t, r)
		t.Quo(t, newF(w).SetInt64(n))
		if t.Sign() == 0 || t.MantExp(nil)-sum.MantExp(nil) < -int(w) {
			break
		}
		bigadd.Add(sum, sum, t)
	}
	two := newF(w).SetInt64(2)
	for range s {
		// e^(2r) - 1 = s(s+2)
		sum.Mul(sum, bigadd.Add(newF(w), sum, two))
	}
	bigadd.Add(sum, sum, newF(w).SetInt64(1))
	sum.SetMantExp(sum, int(k))
	return z.SetPrec(prec).Set(sum)
}

// BigLog sets z = log x (natural) and returns z. It returns nil (big.Float has no NaN)
// for x < 0 and returns -Inf for x = 0.
func BigLog(z, x *big.Float) *big.Float {
	prec := resultPrec(z, x)
	switch {
	case x.Sign() < 0:
		return nan(z)
	case x.Sign() == 0:
		return z.SetPrec(prec).SetInf(true)
	case x.IsInf():
		return z.SetPrec(prec).SetInf(false)
	}
	w := prec + guardBits
	m := newF(w)
	e := x.MantExp(m) // x = m·2^e, m in [0.5, 1)
	if m.Cmp(newF(w).SetFloat64(math.Sqrt2/2)) < 0 {
		m.SetMantExp(m, 1)
		e--
	}
	one := newF(w).SetInt64(1)
	num := bigadd.Sub(newF(w), m, one)
	den := bigadd.Add(newF(w), m, one)
	zz := newF(w).Quo(num, den)
	var l *big.Float
	if zz.Sign() == 0 {
		l = newF(w)
	} else {
		l = atanhSeries(zz, w)
		l.SetMantExp(l, 1)
	}
	if e != 0 {
		ext := w + 64
		l.SetPrec(ext)
		bigadd.Add(l, l, newF(ext).Mul(BigLn2(ext), newF(ext).SetInt64(int64(e))))
	}
	return z.SetPrec(prec).Set(l)
}

// bigSinCos returns sin x and cos x at precision prec.
func bigSinCos(x *big.Float, prec uint) (sin, cos *big.Float) {
	ex := x.MantExp(nil)
	if ex > maxReduceExp {
		return nil, nil
	}
	w := prec + guardBits + uint(max(ex, 0))
	if x.Sign() == 0 {
		return newF(prec), newF(prec).SetInt64(1)
	}
	halfPi := BigPi(w)
	halfPi.SetMantExp(halfPi, -1)
	q := newF(w).Quo(x, halfPi)
	// k = round(q), exactly: w has room for all of q's integer bits.
	half := big.NewFloat(0.5)
	if q.Sign() < 0 {
		half.Neg(half)
	}
	kInt, _ := bigadd.Add(newF(w), q, half).Int(nil)
	r := bigadd.Sub(newF(w), x, newF(w).Mul(halfPi, newF(w).SetInt(kInt)))
	quad := new(big.Int).Mod(kInt, big.NewInt(4)).Int64()
	// Extra precision for small r (relative accuracy of sin near 0).
	if r.Sign() != 0 {
		if re := r.MantExp(nil); re < 0 {
			w += uint(-re)
			r.SetPrec(w)
		}
	}
	r2 := newF(w).Mul(r, r)
	s, c := newF(w).Set(r), newF(w).SetInt64(1)
	ts, tc := newF(w).Set(r), newF(w).SetInt64(1)
	for n := int64(1); ; n += 2 {
		tc.Mul(tc, r2)
		tc.Quo(tc, newF(w).SetInt64(n*(n+1)))
		tc.Neg(tc)
		ts.Mul(ts, r2)
		ts.Quo(ts, newF(w).SetInt64((n+1)*(n+2)))
		ts.Neg(ts)
		bigadd.Add(c, c, tc)
		bigadd.Add(s, s, ts)
		if tc.Sign() == 0 || tc.MantExp(nil) < -int(w)-4 {
			if ts.Sign() == 0 || ts.MantExp(nil)-s.MantExp(nil) < -int(w) {
				break
			}
		}
	}
	switch quad {
	case 1:
		s, c = c, s.Neg(s)
	case 2:
		s, c = s.Neg(s), c.Neg(c)
	case 3:
		s, c = c.Neg(c), s
	}
	return newF(prec).Set(s), newF(prec).Set(c)
}

// BigSin sets z = sin x and returns z. It returns nil (big.Float has no NaN) for
// infinite x.
func BigSin(z, x *big.Float) *big.Float {
	prec := resultPrec(z, x)
	if x.IsInf() {
		return nan(z)
	}
	s, _ := bigSinCos(x, prec)
	if s == nil {
		return nan(z)
	}
	return z.SetPrec(prec).Set(s)
}

// BigCos sets z = cos x and returns z. It returns nil (big.Float has no NaN) for
// infinite x.
func BigCos(z, x *big.Float) *big.Float {
	prec := resultPrec(z, x)
	if x.IsInf() {
		return nan(z)
	}
	_, c := bigSinCos(x, prec)
	if c == nil {
		return nan(z)
	}
	return z.SetPrec(prec).Set(c)
}

// BigTan sets z = tan x and returns z.
func BigTan(z, x *big.Float) *big.Float {
	prec := resultPrec(z, x)
	if x.IsInf() {
		return nan(z)
	}
	s, c := bigSinCos(x, prec+guardBits)
	if s == nil || c.Sign() == 0 {
		return nan(z)
	}
	return z.SetPrec(prec).Quo(s, c)
}

// BigAtan sets z = atan x and returns z.
func BigAtan(z, x *big.Float) *big.Float {
	prec := resultPrec(z, x)
	w := prec + guardBits
	if x.IsInf() {
		p := BigPi(w)
		p.SetMantExp(p, -1)
		if x.Sign() < 0 {
			p.Neg(p)
		}
		return z.SetPrec(prec).Set(p)
	}
	if x.Sign() == 0 {
		return z.SetPrec(prec).SetInt64(0)
	}
	neg := x.Sign() < 0
	a := newF(w).Abs(x)
	one := newF(w).SetInt64(1)
	inv := a.Cmp(one) > 0
	if inv {
		a.Quo(one, a)
	}
	// Four halvings: atan a = 2·atan(a/(1+sqrt(1+a²))).
	const halvings = 4
	for range halvings {
		d := newF(w).Mul(a, a)
		bigadd.Add(d, d, one)
		d.Sqrt(d)
		bigadd.Add(d, d, one)
		a.Quo(a, d)
	}
	if re := a.MantExp(nil); re < 0 {
		w += uint(-re)
	}
	sum := atanSeries(a, w)
	sum.SetMantExp(sum, halvings)
	if inv {
		p := BigPi(w)
		p.SetMantExp(p, -1)
		bigadd.Sub(sum, p, sum)
	}
	if neg {
		sum.Neg(sum)
	}
	return z.SetPrec(prec).Set(sum)
}

// atanSeries returns a - a³/3 + a⁵/5 - ... for small |a|.
func atanSeries(a *big.Float, prec uint) *big.Float {
	a2 := newF(prec).Mul(a, a)
	sum := newF(prec).Set(a)
	t := newF(prec).Set(a)
	for k := int64(3); ; k += 2 {
		t.Mul(t, a2)
		t.Neg(t)
		q := newF(prec).Quo(t, newF(prec).SetInt64(k))
		if q.Sign() == 0 || q.MantExp(nil)-sum.MantExp(nil) < -int(prec) {
			return sum
		}
		bigadd.Add(sum, sum, q)
	}
}

// BigAtan2 sets z to the angle of the point (x, y) in (-π, π] and returns z.
// BigAtan2(0, 0) is 0.
func BigAtan2(z, y, x *big.Float) *big.Float {
	prec := resultPrec(z, y, x)
	w := prec + guardBits
	switch {
	case x.Sign() == 0 && y.Sign() == 0:
		if x.Signbit() {
			p := BigPi(prec)
			if y.Signbit() {
				p.Neg(p)
			}
			return z.SetPrec(prec).Set(p)
		}
		return z.SetPrec(prec).Set(y)
	case x.Sign() == 0:
		p := BigPi(prec)
		p.SetMantExp(p, -1)
		if y.Sign() < 0 {
			p.Neg(p)
		}
		return z.SetPrec(prec).Set(p)
	}
	if x.IsInf() || y.IsInf() {
		xf, _ := x.Float64()
		yf, _ := y.Float64()
		return z.SetPrec(prec).SetFloat64(detmath.Atan2(yf, xf))
	}
	q := newF(w).Quo(y, x)
	a := BigAtan(newF(w), q)
	if x.Sign() < 0 {
		p := BigPi(w)
		if y.Sign() < 0 || (y.Sign() == 0 && y.Signbit()) {
			bigadd.Sub(a, a, p)
		} else {
			bigadd.Add(a, a, p)
		}
	}
	return z.SetPrec(prec).Set(a)
}

// BigSinh sets z = sinh x = (e^x - e^-x)/2 and returns z, with guard bits
// against cancellation for small |x|.
func BigSinh(z, x *big.Float) *big.Float {
	prec := resultPrec(z, x)
	if x.IsInf() || x.Sign() == 0 {
		return z.SetPrec(prec).Set(x)
	}
	w := prec + guardBits
	if e := x.MantExp(nil); e < 0 {
		w += uint(-e)
	}
	e := BigExp(newF(w), x)
	if e.IsInf() {
		return z.SetPrec(prec).Set(e)
	}
	if e.Sign() == 0 {
		return z.SetPrec(prec).SetInf(true)
	}
	inv := newF(w).Quo(newF(w).SetInt64(1), e)
	bigadd.Sub(e, e, inv)
	e.SetMantExp(e, -1)
	return z.SetPrec(prec).Set(e)
}

// BigCosh sets z = cosh x = (e^x + e^-x)/2 and returns z.
func BigCosh(z, x *big.Float) *big.Float {
	prec := resultPrec(z, x)
	if x.IsInf() {
		return z.SetPrec(prec).SetInf(false)
	}
	w := prec + guardBits
	e := BigExp(newF(w), x)
	if e.IsInf() || e.Sign() == 0 {
		return z.SetPrec(prec).SetInf(false)
	}
	inv := newF(w).Quo(newF(w).SetInt64(1), e)
	bigadd.Add(e, e, inv)
	e.SetMantExp(e, -1)
	return z.SetPrec(prec).Set(e)
}

// BigTanh sets z = tanh x = sinh x / cosh x and returns z (±1 when the
// exponentials overflow).
func BigTanh(z, x *big.Float) *big.Float {
	prec := resultPrec(z, x)
	xf, _ := x.Float64()
	if x.IsInf() || math.Abs(xf) > float64(prec) {
		return z.SetPrec(prec).SetInt64(int64(x.Sign()))
	}
	w := prec + guardBits
	s := BigSinh(newF(w), x)
	c := BigCosh(newF(w), x)
	return z.SetPrec(prec).Quo(s, c)
}

// BigPow sets z = x^y and returns z: repeated squaring for an integer y of
// magnitude up to 2^30, e^(y·log x) for x > 0 otherwise. It returns
// nil (big.Float has no NaN) for x < 0 and non-integer y.
func BigPow(z, x, y *big.Float) *big.Float {
	prec := resultPrec(z, x, y)
	if y.IsInt() && !y.IsInf() {
		if n, acc := y.Int64(); acc == big.Exact && n >= -(1<<30) && n <= 1<<30 {
			return bigPowi(z.SetPrec(prec), x, n)
		}
	}
	switch {
	case x.Sign() < 0:
		return nan(z)
	case x.Sign() == 0:
		if y.Sign() > 0 {
			return z.SetPrec(prec).SetInt64(0)
		}
		return z.SetPrec(prec).SetInf(false)
	}
	w := prec + guardBits
	l := BigLog(newF(w), x)
	l.Mul(l, y)
	return BigExp(z.SetPrec(prec), l)
}

// bigPowi sets z = x^n by binary powering with guard bits.
func bigPowi(z, x *big.Float, n int64) *big.Float {
	prec := z.Prec()
	w := prec + guardBits
	neg := n < 0
	if neg {
		n = -n
	}
	r := newF(w).SetInt64(1)
	b := newF(w).Set(x)
	for ; n > 0; n >>= 1 {
		if n&1 == 1 {
			r.Mul(r, b)
		}
		if n > 1 {
			b.Mul(b, b)
		}
	}
	if neg {
		if r.Sign() == 0 {
			return z.SetInf(false)
		}
		r.Quo(newF(w).SetInt64(1), r)
	}
	return z.Set(r)
}
