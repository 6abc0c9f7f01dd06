package detmath

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// bigSinh returns sinh x at 200 bits by math/big (a general-purpose
// reference library): the Taylor series x + x³/3! + ... for |x| < 1 (where
// e^x - e^-x would cancel), else (bigExp(x) - bigExp(-x))/2.
func bigSinh(x float64) *big.Float {
	const prec = 200
	if math.Abs(x) >= 1 {
		e := bigExp(x)
		s := new(big.Float).SetPrec(prec).Quo(big.NewFloat(-1), e)
		s.Add(s, e)
		return s.Quo(s, big.NewFloat(2))
	}
	bx := new(big.Float).SetPrec(prec).SetFloat64(x)
	z := new(big.Float).SetPrec(prec).Mul(bx, bx)
	term := new(big.Float).SetPrec(prec).Set(bx)
	sum := new(big.Float).SetPrec(prec).Set(bx)
	for n := int64(2); n < 80; n += 2 { // 1/79! < 2^-380
		term.Mul(term, z)
		term.Quo(term, new(big.Float).SetInt64(n*(n+1)))
		sum.Add(sum, term)
	}
	return sum
}

// bigCosh returns cosh x = (e^x + 1/e^x)/2 at 200 bits with e^x by bigExp
// (no cancellation: both terms are positive).
func bigCosh(x float64) *big.Float {
	e := bigExp(x)
	s := new(big.Float).SetPrec(200).Quo(big.NewFloat(1), e)
	s.Add(s, e)
	return s.Quo(s, big.NewFloat(2))
}

// hyperArgs returns seeded arguments over the ranges that matter for the
// hyperbolic functions: tiny, the series range, around the switch points
// 1/4 and 22, moderate, and up to overflow, with both signs.
func hyperArgs(seed uint64, top float64) []float64 {
	rng := rand.New(rand.NewPCG(seed, seed+1))
	var xs []float64
	sign := func() float64 {
		if rng.IntN(2) == 0 {
			return -1
		}
		return 1
	}
	for range 700 {
		xs = append(xs,
			sign()*math.Exp(rng.Float64()*60-62), // e^-62 .. e^-2
			sign()*rng.Float64()*0.25,            // the series
			sign()*(0.25+rng.Float64()*0.75),     // just above the series
			sign()*(1+rng.Float64()*21),          // (1, 22]
			sign()*rng.Float64()*top,             // the whole range
			sign()*(top-rng.Float64()*10),        // near overflow or saturation
		)
	}
	for _, b := range []float64{0.25, 1, 22, top} {
		xs = append(xs, b, math.Nextafter(b, 0), math.Nextafter(b, 100), -b)
	}
	return append(xs, 1e-300, 5e-324, 0x1p-27, 0x1p-1022)
}

// hyperMaxULP: the stated bound for Sinh, Cosh and Tanh. The series
// ranges lose half an ulp in the final rounding and a small fraction in
// the tail (at most 1/48 of the result); the exponential ranges carry
// e^|x| and its reciprocal to about 2^-60 and round once (common
// practice); measured 0.53 at most (see the logs).
const hyperMaxULP = 2

// sinhTop is the largest argument with a finite sinh and cosh:
// ln(2·MaxFloat64) = 710.4758600739439 (from math/big: bigExp of it
// halved is below MaxFloat64, checked in TestSinh).
const sinhTop = 710.4758600739439

func TestSinh(t *testing.T) {
	worst, at := 0.0, 0.0
	xs := hyperArgs(21, sinhTop)
	for _, x := range xs {
		if u := ulps(Sinh(x), bigSinh(x)); u > worst {
			worst, at = u, x
		}
	}
	t.Logf("largest error %.3g ulp at x = %v (%d arguments)", worst, at, len(xs))
	if worst > hyperMaxULP {
		t.Errorf("Sinh off by %.3g ulp at x = %v, want <= %g", worst, at, float64(hyperMaxULP))
	}
	if w, _ := bigSinh(sinhTop).Float64(); math.IsInf(w, 0) {
		t.Errorf("sinh(%v) overflows by math/big; sinhTop is wrong", sinhTop)
	}
	if w, _ := bigSinh(math.Nextafter(sinhTop, 800)).Float64(); !math.IsInf(w, 0) {
		t.Errorf("sinh just above %v is finite by math/big; sinhTop is wrong", sinhTop)
	}
	// Special cases and overflow: math.Sinh's documentation, values from
	// math.Sinh, bit for bit (signed zeros and infinities).
	nz, inf := math.Copysign(0, -1), math.Inf(1)
	for _, x := range []float64{0, nz, inf, -inf, math.Nextafter(sinhTop, 800), -711, 1000, -1e300} {
		if got, want := Sinh(x), math.Sinh(x); math.Float64bits(got) != math.Float64bits(want) {
			t.Errorf("Sinh(%v) = %v, want %v", x, got, want)
		}
	}
	if !math.IsNaN(Sinh(math.NaN())) {
		t.Error("Sinh(NaN) is not NaN")
	}
}

func TestCosh(t *testing.T) {
	worst, at := 0.0, 0.0
	xs := hyperArgs(23, sinhTop)
	for _, x := range xs {
		if u := ulps(Cosh(x), bigCosh(x)); u > worst {
			worst, at = u, x
		}
	}
	t.Logf("largest error %.3g ulp at x = %v (%d arguments)", worst, at, len(xs))
	if worst > hyperMaxULP {
		t.Errorf("Cosh off by %.3g ulp at x = %v, want <= %g", worst, at, float64(hyperMaxULP))
	}
	// Special cases and overflow as math.Cosh (its documentation).
	nz, inf := math.Copysign(0, -1), math.Inf(1)
	for _, x := range []float64{0, nz, inf, -inf, math.Nextafter(sinhTop, 800), -711, 1000, 1e-300} {
		if got, want := Cosh(x), math.Cosh(x); math.Float64bits(got) != math.Float64bits(want) {
			t.Errorf("Cosh(%v) = %v, want %v", x, got, want)
		}
	}
	if !math.IsNaN(Cosh(math.NaN())) {
		t.Error("Cosh(NaN) is not NaN")
	}
}

func TestTanh(t *testing.T) {
	worst, at := 0.0, 0.0
	xs := hyperArgs(25, 25)
	for _, x := range xs {
		want := bigSinh(x)
		want.Quo(want, bigCosh(x))
		if u := ulps(Tanh(x), want); u > worst {
			worst, at = u, x
		}
	}
	t.Logf("largest error %.3g ulp at x = %v (%d arguments)", worst, at, len(xs))
	if worst > hyperMaxULP {
		t.Errorf("Tanh off by %.3g ulp at x = %v, want <= %g", worst, at, float64(hyperMaxULP))
	}
	// Special cases and saturation as math.Tanh (its documentation).
	nz, inf := math.Copysign(0, -1), math.Inf(1)
	for _, x := range []float64{0, nz, inf, -inf, 22.5, -30, 1e300, -5e-324} {
		if got, want := Tanh(x), math.Tanh(x); math.Float64bits(got) != math.Float64bits(want) {
			t.Errorf("Tanh(%v) = %v, want %v", x, got, want)
		}
	}
	if !math.IsNaN(Tanh(math.NaN())) {
		t.Error("Tanh(NaN) is not NaN")
	}
}

func benchHyper(b *testing.B, mine, ref func(float64) float64) {
	xs := []float64{0.1, -0.6, 2.5, 9, -40}
	b.Run("detmath", func(b *testing.B) {
		b.ReportAllocs()
		s := 0.0
		for i := 0; b.Loop(); i++ {
			s += mine(xs[i%len(xs)])
		}
		_ = s
	})
	b.Run("math", func(b *testing.B) {
		b.ReportAllocs()
		s := 0.0
		for i := 0; b.Loop(); i++ {
			s += ref(xs[i%len(xs)])
		}
		_ = s
	})
}

func BenchmarkSinh(b *testing.B) { benchHyper(b, Sinh, math.Sinh) }
func BenchmarkCosh(b *testing.B) { benchHyper(b, Cosh, math.Cosh) }
func BenchmarkTanh(b *testing.B) { benchHyper(b, Tanh, math.Tanh) }

// TestExpDD: expDD's double-double e^(xh+xl) against math/big (bigExpOf at
// 200 bits) over the whole range, with and without a low part xl of the
// size a double-double carries.
func TestExpDD(t *testing.T) {
	// expDDTol: the error budget of expDD (the polynomial beyond r²/2,
	// at most 2^-4 of e^r, rounded in float64, about 2^-59) with a margin
	// of 2; measured 2^-58.5 at most.
	const expDDTol = 0x1p-57
	rng := rand.New(rand.NewPCG(27, 28))
	worst, at := 0.0, 0.0
	for range 2000 {
		xh := rng.Float64()*1440 - 720
		for _, xl := range []float64{0, (rng.Float64() - 0.5) * 0x1p-52 * math.Abs(xh)} {
			h, l, k := expDD(xh, xl)
			z := new(big.Float).SetPrec(200).SetFloat64(xh)
			z.Add(z, new(big.Float).SetFloat64(xl))
			want := bigExpOf(z)
			got := new(big.Float).SetPrec(200).SetFloat64(h)
			got.Add(got, new(big.Float).SetFloat64(l))
			got.SetMantExp(got, k)
			got.Sub(got, want)
			got.Quo(got, want)
			if r, _ := got.Float64(); math.Abs(r) > worst {
				worst, at = math.Abs(r), xh
			}
		}
	}
	t.Logf("largest relative error of expDD %.3g (2^%.1f) at x = %v", worst, math.Log2(worst), at)
	if worst > expDDTol {
		t.Errorf("expDD relative error %.3g at x = %v, want <= %g", worst, at, expDDTol)
	}
}
