package integrate

import (
	"math"
	"sync"
	"sync/atomic"
)

// errSqFloor bounds err² from below (err = 1e-10): an exact step (err = 0)
// must still give a finite factor, clamped to MaxFactor.
const errSqFloor = 1e-20

// errPow returns err^(-Alpha) and Safety·max(err, 1e-4)^Beta (the sB of
// the next step, should this one be accepted) from x = err² (x >=
// errSqFloor). Past the table (x >= 2^65, a rejected step with err >
// 2^32.5) it uses log2Ctl and exp2Ctl, of err when given (x may have
// overflowed), else of x.
func (st *Stepper) errPow(x, err float64) (pA, sB float64) {
	if x >= 1e-8 && x < 0x1p65 {
		pA, pB := st.tA.pow2(st.tB, x)
		return pA, float64(st.cfg.safety * pB)
	}
	if x < 1e-8 {
		return st.tA.pow(x), st.sB0
	}
	if err > 0 {
		return exp2Ctl(-float64(st.cfg.alpha * log2Ctl(err))), st.sB0
	}
	return exp2Ctl(-float64(float64(0.5*st.cfg.alpha) * log2Ctl(x))), st.sB0
}

// powTable evaluates x^(-a) for x in [2^ptKMin, 2^(ptKMax+1)), the
// step-size controller's power of the squared error norm, with a table
// look-up on the exponent and on the leading mantissa bits and a quadratic
// for the rest. Writing x = 2^k·c_j·(1+r), with c_j = 1 + (j+1/2)/32 the
// centre of the mantissa interval j and |r| < 1/65,
//
//	x^(-a) = 2^(-a·k) · c_j^(-a) · (1+r)^(-a),
//	(1+r)^(-a) ≈ 1 - a·r + a(a+1)/2·r²,
//
// whose truncation error |a(a+1)(a+2)/6|·|r|³ is below 1.2e-7 for the
// default Alpha = 0.17 (a = 0.085) and below 3.7e-6 for |a| <= 1 (checked
// against math.Pow in TestPowTable). On a cheap vector field (Lorenz, about
// 80 ns per step) this power sits on the critical path from one step to the
// next: the library's math.Log and math.Exp took a third of a step; this
// takes a few multiplications. The tables are filled at set-up with
// log2Prec and exp2Prec (IEEE arithmetic only), so the factor has the same
// bits on every architecture.
//
// References:
//
//	J.-M. Muller, Elementary Functions: Algorithms and Implementation, 3rd
//	  ed., Birkhäuser 2016 (table-based range reduction).
type powTable struct {
	a, c2  float64                      // a and a(a+1)/2
	k      [ptKMax - ptKMin + 1]float64 // 2^(-a·k)
	inv, p [ptJ]float64                 // 1/c_j and c_j^(-a)
}

const (
	ptKMin = -67 // 2^-67 < 1e-20 = errSqFloor
	ptKMax = 64
	ptJ    = 32 // mantissa intervals (5 leading bits)
)

func newPowTable(a float64) *powTable {
	t := &powTable{a: a, c2: float64(0.5 * float64(a*(a+1)))}
	for i := range t.k {
		t.k[i] = exp2Prec(-float64(a * float64(i+ptKMin)))
	}
	for j := range t.inv {
		c := 1 + float64((float64(j)+0.5)/ptJ)
		t.inv[j] = 1 / c
		t.p[j] = exp2Prec(-float64(a * log2Prec(c)))
	}
	return t
}

// Filling a powTable takes about 200 evaluations of exp2Prec, some 25 µs:
// 2-3% of a whole Lorenz run to t = 100 with DormandPrince853 at tol
// 1e-12. The tables are read-only once filled, so Steppers share them:
// sharedPowTable keeps the first powTableKeep exponents asked for (the
// defaults of the methods and a few of the caller's own) and builds the
// rest afresh. A table depends only on a, so sharing changes no result.
var (
	powTables     sync.Map // math.Float64bits(a) -> *powTable
	powTablesKept atomic.Int32
)

const powTableKeep = 32

func sharedPowTable(a float64) *powTable {
	key := math.Float64bits(a)
	if t, ok := powTables.Load(key); ok {
		return t.(*powTable)
	}
	t := newPowTable(a)
	if powTablesKept.Add(1) > powTableKeep {
		powTablesKept.Add(-1) // full: this one is not kept
		return t
	}
	if old, loaded := powTables.LoadOrStore(key, t); loaded {
		powTablesKept.Add(-1) // built at the same time elsewhere
		return old.(*powTable)
	}
	return t
}

// pow returns x^(-a) for a normal x in [2^ptKMin, 2^(ptKMax+1)), by pow2
// (off the per-step path: set-up and steps with err < 1e-4).
func (t *powTable) pow(x float64) float64 {
	p, _ := t.pow2(t, x)
	return p
}

// pow2 returns x^(-t.a) and x^(-u.a) for the same x, sharing the range
// reduction (both tables have the same layout and mantissa centres), for a
// normal x in [2^ptKMin, 2^(ptKMax+1)). It is the one evaluation of the
// tables; the adaptive step calls it on every step with an error in range.
func (t *powTable) pow2(u *powTable, x float64) (float64, float64) {
	b := math.Float64bits(x)
	k := int(b>>52&0x7ff) - 1023 - ptKMin
	j := int(b>>(52-5)) & (ptJ - 1)
	m := math.Float64frombits(b&(1<<52-1) | 1023<<52) // in [1, 2)
	r := float64(m*t.inv[j]) - 1
	q := 1 + float64(r*(float64(t.c2*r)-t.a))
	qu := 1 + float64(r*(float64(u.c2*r)-u.a))
	return float64(float64(t.k[k]*t.p[j]) * q), float64(float64(u.k[k]*u.p[j]) * qu)
}

// log2Prec returns log2(m) for m in [1, 2] to about 1e-16, from
// ln m = 2·atanh(s), s = (m-1)/(m+1) <= 1/3, summed to s^31. For set-up only.
func log2Prec(m float64) float64 {
	s := (m - 1) / (m + 1)
	z := float64(s * s)
	var p float64
	for i := 31; i >= 1; i -= 2 {
		p = float64(p*z) + 1/float64(i)
	}
	return float64(float64(2*math.Log2E*s) * p)
}

// exp2Prec returns 2^x for |x| <= 1000 to about 1e-16: 2^k by the exponent
// field and e^u, |u| <= ln(2)/2, by its Taylor series to u^20. For set-up only.
func exp2Prec(x float64) float64 {
	const shift = 0x1.8p52
	kf := (x + shift) - shift
	u := float64((x - kf) * math.Ln2)
	p := 1.0
	for i := 20; i >= 1; i-- {
		p = 1 + float64(float64(p*u)/float64(i))
	}
	return p * math.Float64frombits(uint64(int(kf)+1023)<<52)
}

// log2Ctl and exp2Ctl evaluate the controller's power where powTable's
// range ends (a rejected step with err > 2^32.5). They reduce the argument
// with bit manipulation and evaluate short polynomials (Estrin's scheme);
// products are rounded explicitly (float64(x*y)), so the result is the same
// on every architecture. Their errors, absolute below 2e-6 for log2Ctl on
// [1e-20, 1e300] and relative below 3.5e-6 for exp2Ctl on [-200, 200]
// (checked against math.Log2 and math.Exp2 in TestControllerExponents), put
// the step-size factor within 4e-6 (relative) of Safety·err^(-Alpha): far
// below what a heuristic factor with Safety = 0.9 needs. (They were the
// controller's main path before powTable, and replaced math.Log and
// math.Exp, which took about a third of a Lorenz step.)
//
// References:
//
//	J.-M. Muller, Elementary Functions: Algorithms and Implementation, 3rd
//	  ed., Birkhäuser 2016 (range reduction x = 2^k·m; the series
//	  ln m = 2·atanh((m-1)/(m+1)); 2^f = e^(f·ln 2) on |f| <= 1/2;
//	  Estrin's scheme).

// log2Ctl returns log2(x) for a positive, normal, finite x.
func log2Ctl(x float64) float64 {
	b := math.Float64bits(x)
	k := int(b>>52&0x7ff) - 1023
	m := math.Float64frombits(b&(1<<52-1) | 1023<<52) // x = 2^k·m, m in [1, 2)
	if m > math.Sqrt2 {
		m = 0.5 * m
		k++
	}
	// m in [1/√2, √2]: s = (m-1)/(m+1) has |s| <= 0.1716, z = s² <= 0.0295,
	// and ln m = 2s(1 + z/3 + z²/5) leaves a relative error below
	// z³/(7(1-z)) < 3.7e-6, so log2 m is off by less than 1.9e-6.
	s := (m - 1) / (m + 1)
	z := float64(s * s)
	p := (1 + float64(z*(1.0/3))) + float64(float64(z*z)*(1.0/5))
	return float64(k) + float64(float64(2*math.Log2E*s)*p)
}

// exp2Ctl returns 2^x for x in [-1000, 1000]; below it returns 0.
func exp2Ctl(x float64) float64 {
	if x < -1000 {
		return 0
	}
	if x > 1000 {
		return math.Inf(1)
	}
	// Round to the nearest integer k (adding and subtracting 1.5·2^52 is
	// exact IEEE rounding for |x| < 2^51); f = x - k is in [-1/2, 1/2].
	const shift = 0x1.8p52
	kf := (x + shift) - shift
	f := x - kf
	// 2^f = e^u, u = f·ln 2 in [-0.3466, 0.3466]; the Taylor polynomial of
	// degree 5 leaves a relative error below e^|u|·u⁶/6! < 3.4e-6.
	u := float64(f * math.Ln2)
	u2 := float64(u * u)
	lo := (1 + u) + float64(u2*(0.5+float64(u*(1.0/6))))
	hi := (1.0 / 24) + float64(u*(1.0/120))
	p := lo + float64(float64(u2*u2)*hi)
	// 2^k is a normal number for |k| <= 1000.
	return p * math.Float64frombits(uint64(int(kf)+1023)<<52)
}
