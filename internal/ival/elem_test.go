package ival_test

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"

	"github.com/plumbdyn/plumb/internal/expr"
	"github.com/plumbdyn/plumb/internal/ival"
)

// refPrec is the precision of the reference values: internal/expr's
// math/big elementary functions (bigmath.go), independent algorithms
// (Machin's π, exp by halving and squaring, sin/cos by reduction to |r| <=
// π/4, atan by four halvings) documented as within a few ulps of the
// precision asked.
const refPrec = 300

// refRel is the relative margin put around each reference value: 2^-280,
// about 2^20 of its ulps, far more than its documented few-ulps error and
// far less than a float64 ulp (2^-52), so the checks lose nothing.
var refRel = math.Ldexp(1, -280)

type fn1 struct {
	name string
	f    func(ival.Interval) ival.Interval
	ref  func(z, x *big.Float) *big.Float
	gen  func(rng *rand.Rand) float64 // arguments in (or around) the domain
	// lowest is the smallest end of an interval inside the domain (-Inf:
	// the whole line), or the smallest excluded end when open is true.
	lowest float64
	open   bool
}

// inDomain reports whether x lies inside f's domain.
func (f fn1) inDomain(x ival.Interval) bool {
	if f.open {
		return x.Lo > f.lowest
	}
	return x.Lo >= f.lowest
}

// wide draws from every binade of the given sign pattern.
func wide(rng *rand.Rand) float64 {
	for {
		x := math.Float64frombits(rng.Uint64())
		if !math.IsNaN(x) && !math.IsInf(x, 0) {
			return x
		}
	}
}

func uniform(a, b float64) func(*rand.Rand) float64 {
	return func(rng *rand.Rand) float64 { return a + (b-a)*rng.Float64() }
}

// mix draws half from gen and half from wide.
func mix(gen func(*rand.Rand) float64) func(*rand.Rand) float64 {
	return func(rng *rand.Rand) float64 {
		if rng.IntN(2) == 0 {
			return wide(rng)
		}
		return gen(rng)
	}
}

var fns1 = []fn1{
	{"Exp", ival.Exp, expr.BigExp, mix(uniform(-760, 760)), math.Inf(-1), false},
	{"Log", ival.Log, expr.BigLog, func(rng *rand.Rand) float64 { return math.Abs(wide(rng)) }, 0, true},
	{"Sin", ival.Sin, expr.BigSin, mix(uniform(-20, 20)), math.Inf(-1), false},
	{"Cos", ival.Cos, expr.BigCos, mix(uniform(-20, 20)), math.Inf(-1), false},
	{"Tan", ival.Tan, expr.BigTan, mix(uniform(-20, 20)), math.Inf(-1), false},
	{"Atan", ival.Atan, expr.BigAtan, wide, math.Inf(-1), false},
	{"Sinh", ival.Sinh, expr.BigSinh, mix(uniform(-800, 800)), math.Inf(-1), false},
	{"Cosh", ival.Cosh, expr.BigCosh, mix(uniform(-800, 800)), math.Inf(-1), false},
	{"Tanh", ival.Tanh, expr.BigTanh, mix(uniform(-50, 50)), math.Inf(-1), false},
	{"Sqrt", ival.Sqrt, func(z, x *big.Float) *big.Float {
		if x.Sign() < 0 {
			return nil
		}
		return z.Sqrt(x)
	}, func(rng *rand.Rand) float64 { return math.Abs(wide(rng)) }, 0, false},
}

// reference returns a bracket [lo, hi] of f(x) from the 300-bit reference,
// widened by refRel; ok is false where the reference has no real value.
func reference(ref func(z, x *big.Float) *big.Float, x float64) (lo, hi *big.Float, ok bool) {
	z := ref(new(big.Float).SetPrec(refPrec), new(big.Float).SetFloat64(x))
	if z == nil {
		return nil, nil, false
	}
	return widen(z)
}

func widen(z *big.Float) (lo, hi *big.Float, ok bool) {
	if z.IsInf() {
		return z, z, true
	}
	d := new(big.Float).SetPrec(refPrec).Abs(z)
	d.Mul(d, new(big.Float).SetFloat64(refRel))
	lo = new(big.Float).SetPrec(refPrec).Sub(z, d)
	hi = new(big.Float).SetPrec(refPrec).Add(z, d)
	return lo, hi, true
}

// bigIn reports whether x meets the reference bracket [lo, hi]: x misses
// the true value by at most the bracket's width (2^-279 relative), far
// below a float64 ulp, so a wrong end is caught unless it lies within
// 2^-279 of the true value, which only an exact float64 value does (and
// then the end is right). Testing overlap rather than inclusion keeps exact
// results (exp 0 = 1, sqrt 4 = 2) from failing on the bracket's margin.
func bigIn(x ival.Interval, lo, hi *big.Float) bool {
	if x.IsEmpty() {
		return false
	}
	return new(big.Float).SetFloat64(x.Lo).Cmp(hi) <= 0 && lo.Cmp(new(big.Float).SetFloat64(x.Hi)) <= 0
}

// maxUlps is the widest point enclosure the elementary functions return
// where the value is a normal float64: the fast float64 paths are accepted
// up to eight steps wide (fast.go), the 128-bit kernels give at most two.
const maxUlps = 8

// narrow reports whether x is at most maxUlps float64 steps wide (Tan,
// a quotient of two such enclosures, is allowed twice as many).
func narrow(x ival.Interval) bool { return narrowN(x, maxUlps) }

func narrowN(x ival.Interval, n int) bool {
	v := x.Lo
	for range n {
		v = math.Nextafter(v, math.Inf(1))
	}
	return x.Hi <= v
}

// TestElementaryPointsContainReference checks, at random points in all
// binades and in each function's main range, that the point enclosure
// contains the 300-bit reference value, and that it is at most maxUlps
// float64 steps wide wherever the value is a normal float64.
func TestElementaryPointsContainReference(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	n := 1000
	if testing.Short() {
		n = 300
	}
	for _, f := range fns1 {
		for range n {
			x := f.gen(rng)
			lo, hi, ok := reference(f.ref, x)
			if !ok {
				continue
			}
			got := f.f(ival.Point(x))
			if !bigIn(got, lo, hi) {
				t.Fatalf("%s(%v) = %v misses the reference %s", f.name, x, got, lo.Text('g', 30))
			}
			if v, _ := lo.Float64(); got.IsBounded() && math.Abs(v) > 0x1p-1020 && !narrow(got) && !(f.name == "Tan" && narrowN(got, 2*maxUlps)) {
				t.Errorf("%s(%v) = %v is wider than %d ulps", f.name, x, got, maxUlps)
			}
		}
	}
}

// hardPoints are arguments where naive evaluation loses accuracy: near
// zero, near multiples of π/2 (including the float64 nearest π and
// 2^1023-sized arguments), near the overflow and underflow thresholds of
// exp, and the ends of the float64 range.
var hardPoints = []float64{
	0, math.SmallestNonzeroFloat64, 1e-300, 1e-20, 0x1p-30, 1e-8, 0.5, 1,
	math.Pi, math.Pi / 2, math.Pi / 4, 2 * math.Pi, 3 * math.Pi / 2, 1e22,
	6381956970095103 * 0x1p797, // a float64 very close to a multiple of π/2 (from memory; checked by the reference, not assumed)
	5.319372648326541e+255, 1e300, math.MaxFloat64,
	709.782712893384, 709.79, 710, -745.1332191019411, -745.2, -708.4,
	20, 40, 39.99, 710.475860073944, 710.48, 0.7, 1.4, math.Sqrt2,
	math.Nextafter(1, 0), math.Nextafter(1, 2), 1e15, 1e16 * math.Pi,
}

// TestElementaryHardPoints checks containment of the reference at the hard
// points and their negatives.
func TestElementaryHardPoints(t *testing.T) {
	for _, f := range fns1 {
		for _, x0 := range hardPoints {
			for _, x := range []float64{x0, -x0, math.Nextafter(x0, 0), math.Nextafter(x0, math.Inf(1))} {
				if math.IsInf(x, 0) || !f.inDomain(ival.Point(x)) {
					continue // Point(±Inf) is empty by definition
				}
				lo, hi, ok := reference(f.ref, x)
				if !ok {
					continue
				}
				if got := f.f(ival.Point(x)); !bigIn(got, lo, hi) {
					t.Errorf("%s(%v) = %v misses the reference %s", f.name, x, got, lo.Text('g', 30))
				}
			}
		}
	}
}

// TestNearMultiplesOfHalfPi checks sin, cos and tan at the float64 values
// nearest k π/2 (π from internal/expr's 300-bit BigPi) and their
// neighbours, for k up to 2^12 and at k = 2^20 ± j and 2^40 + j, where the
// reduction cancels most bits: the enclosure must hold the reference and,
// for sin and cos, stay within maxUlps steps (relative accuracy near the
// zeros).
func TestNearMultiplesOfHalfPi(t *testing.T) {
	halfPi := expr.BigPi(refPrec)
	halfPi.SetMantExp(halfPi, -1)
	var ks []int64
	for k := int64(1); k <= 1<<12; k++ {
		ks = append(ks, k)
	}
	for j := int64(-3); j <= 3; j++ {
		ks = append(ks, 1<<20+j, 1<<40+j)
	}
	for _, k := range ks {
		v, _ := new(big.Float).SetPrec(refPrec).Mul(halfPi, new(big.Float).SetInt64(k)).Float64()
		for _, x := range []float64{v, math.Nextafter(v, 0), math.Nextafter(v, math.Inf(1)), -v} {
			for _, f := range fns1[2:5] { // Sin, Cos, Tan
				lo, hi, ok := reference(f.ref, x)
				if !ok {
					continue
				}
				got := f.f(ival.Point(x))
				if !bigIn(got, lo, hi) {
					t.Fatalf("%s(%v) (k = %d) = %v misses %s", f.name, x, k, got, lo.Text('g', 25))
				}
				if f.name != "Tan" && !narrow(got) {
					t.Errorf("%s(%v) (k = %d) = %v wider than %d steps", f.name, x, k, got, maxUlps)
				}
			}
		}
	}
}

// TestElementaryIntervalsContainSubpoints: for random intervals x and random
// points a in x (ends included), the reference f(a) lies in f(x). Intervals
// are drawn narrow (around turning points too) and wide.
func TestElementaryIntervalsContainSubpoints(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	n := 600
	if testing.Short() {
		n = 150
	}
	for _, f := range fns1 {
		for range n {
			a, b := f.gen(rng), f.gen(rng)
			switch rng.IntN(3) {
			case 0: // narrow, around a turning point of sin/cos or a pole of tan
				k := float64(rng.IntN(41) - 20)
				c := k * math.Pi / 2
				a, b = c-rng.Float64()*0.3, c+rng.Float64()*0.3
			case 1:
				b = a + rng.Float64()*math.Abs(a)*1e-3
			}
			if a > b {
				a, b = b, a
			}
			x := ival.New(a, b)
			got := f.f(x)
			if !f.inDomain(x) {
				if !got.IsEmpty() {
					t.Fatalf("%s(%v) = %v, want empty outside the domain", f.name, x, got)
				}
				continue
			}
			for range 6 {
				p := a + (b-a)*rng.Float64()
				switch rng.IntN(4) {
				case 0:
					p = a
				case 1:
					p = b
				}
				if !x.Contains(p) {
					continue
				}
				lo, hi, ok := reference(f.ref, p)
				if !ok {
					continue
				}
				if !bigIn(got, lo, hi) {
					t.Fatalf("%s(%v) = %v misses f(%v) = %s", f.name, x, got, p, lo.Text('g', 30))
				}
			}
		}
	}
}
