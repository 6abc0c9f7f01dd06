package detmath

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// bigLn2 is ln 2 at 200 bits by bigLog (math/big), made once.
var bigLn2 = bigLog(2)

// bigExpOf returns e^z at 200 bits for a math/big z with |z| < 1000: z =
// k·ln 2 + r, e^r by its Taylor series (a general-purpose reference
// library, math/big), as bigExp but for an argument that is not a float64.
func bigExpOf(z *big.Float) *big.Float {
	const prec = 200
	zf, _ := z.Float64()
	k := math.Round(zf / math.Ln2)
	r := new(big.Float).SetPrec(prec).Mul(bigLn2, new(big.Float).SetFloat64(k))
	r.Sub(z, r)
	sum := new(big.Float).SetPrec(prec).SetInt64(1)
	term := new(big.Float).SetPrec(prec).SetInt64(1)
	for n := int64(1); n < 80; n++ { // |r| <= 0.35: 0.35^80/80! < 2^-500
		term.Mul(term, r)
		term.Quo(term, new(big.Float).SetInt64(n))
		sum.Add(sum, term)
	}
	return sum.SetMantExp(sum, int(k))
}

// bigPow returns x^y by math/big: exactly (4000 bits hold any product of 64
// float64 values) when y is an integer with |y| <= 64, else
// e^(y·ln|x|) at 200 bits with ln by bigLog, negated for x < 0 and y odd.
func bigPow(x, y float64) *big.Float {
	if y == math.Trunc(y) && math.Abs(y) <= 64 {
		n := int(math.Abs(y))
		bx := new(big.Float).SetPrec(4000).SetFloat64(x)
		r := new(big.Float).SetPrec(4000).SetInt64(1)
		for range n {
			r.Mul(r, bx)
		}
		if y < 0 {
			r = new(big.Float).SetPrec(200).Quo(big.NewFloat(1), r)
		}
		return r
	}
	z := new(big.Float).SetPrec(200).Mul(new(big.Float).SetFloat64(y), bigLog(math.Abs(x)))
	r := bigExpOf(z)
	if x < 0 && isOddInt(y) {
		r.Neg(r)
	}
	return r
}

// ulpErr is |got - want| in units of the last place of want rounded to
// float64, as ulps but with the quotient taken in math/big, so that the
// difference is not rounded to a subnormal float64 (which ulps does for
// results just above 2^-1022, where a half-ulp error reads as 0 or 1).
func ulpErr(got float64, want *big.Float) float64 {
	w, _ := want.Float64()
	ulp := math.Nextafter(math.Abs(w), math.Inf(1)) - math.Abs(w)
	d := new(big.Float).SetPrec(200).Sub(new(big.Float).SetPrec(200).SetFloat64(got), want)
	d.Quo(d, new(big.Float).SetFloat64(ulp))
	u, _ := d.Float64()
	return math.Abs(u)
}

// powMaxULP: the stated bound. ln x is carried to 2^-62 relative
// (TestLogDD), so y·ln x is off by at most 709·2^-62 ≈ 2^-52.5 relative to
// the result (at most 1.4 ulp, and 0.35 ulp with the 2^-63.8 measured),
// e^(hi+lo) by about 2^-58 (TestExpDD), and the result rounds once (half
// an ulp): an error budget below 2 ulp (common practice); the integer
// powers round once after a double-double product (about half an ulp).
// Measured 0.83 (see the log).
const powMaxULP = 2

// TestPow: within powMaxULP of x^y by math/big over the whole range of
// normal results (|y·ln x| up to 708), for x from 1e-300 to 1e300, x near
// 1 with huge y, moderate arguments, integer exponents up to 64 in
// magnitude (repeated squaring) and odd integer exponents above 64 with
// negative x.
func TestPow(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 32))
	type pair struct{ x, y float64 }
	var ps []pair
	sign := func() float64 {
		if rng.IntN(2) == 0 {
			return -1
		}
		return 1
	}
	for range 700 {
		// Any x, y chosen so that y·ln x is uniform in [-708, 708].
		x := math.Exp(rng.Float64()*1400 - 700)
		ps = append(ps, pair{x, (rng.Float64()*1416 - 708) / math.Log(x)})
		// x near 1, y huge.
		x = 1 + (rng.Float64()-0.5)*math.Exp(-rng.Float64()*34)
		if x != 1 {
			ps = append(ps, pair{x, (rng.Float64()*1416 - 708) / math.Log(x)})
		}
		// Moderate.
		ps = append(ps, pair{rng.Float64() * 10, rng.Float64()*20 - 10})
		// Integer exponents |n| <= 64, with either sign of x.
		n := rng.IntN(129) - 64
		if n != 0 {
			u := (rng.Float64()*2 - 1) * 700 / math.Abs(float64(n))
			x = math.Exp(u)
			if rng.IntN(2) == 0 {
				x = -x
			}
			ps = append(ps, pair{x, float64(n)})
		}
		// Odd integer exponents above 64 with negative x (the sign of e^(y·ln|x|)).
		m := float64(65 + 2*rng.IntN(500))
		ps = append(ps, pair{-math.Exp((rng.Float64()*2 - 1) * 700 / m), m})
		// m near √2 and 1/√2 (the largest reduced s of logDD), |y·ln x| near 700.
		x = math.Sqrt2 * (1 + (rng.Float64()-0.5)*1e-3)
		if rng.IntN(2) == 0 {
			x = math.Ldexp(x, rng.IntN(2000)-1000)
		}
		ps = append(ps, pair{x, (690 + rng.Float64()*18) / math.Log(x) * sign()})
		// Subnormal and huge bases with results in range.
		x = math.Ldexp(rng.Float64()+1, -1074+rng.IntN(52))
		ps = append(ps, pair{x, -(rng.Float64() * 700) / math.Log(x)})
	}
	ps = append(ps, pair{0.7064143598916803, -2024.2345166954851}, // the worst seen in a longer run of 30000 near √2
		pair{2, 1023.5}, pair{0.5, 1074 - 52.5}, pair{10, 308.25}, pair{math.MaxFloat64, 0.999}, pair{1e-300, -1.02}, pair{3, 0.5}, pair{7, -0.5})
	worst, at := 0.0, pair{}
	worstInt := 0.0
	for _, p := range ps {
		got := Pow(p.x, p.y)
		want := bigPow(p.x, p.y)
		if w, _ := want.Float64(); math.IsInf(w, 0) || math.Abs(w) < 0x1p-1022 {
			continue // outside the normal range (rounding of y, near the edges)
		}
		u := ulpErr(got, want)
		if u > worst {
			worst, at = u, p
		}
		if p.y == math.Trunc(p.y) && math.Abs(p.y) <= 64 && u > worstInt {
			worstInt = u
		}
	}
	t.Logf("largest error %.3g ulp at (x, y) = (%v, %v) (%d pairs); integer exponents |y| <= 64: %.3g ulp", worst, at.x, at.y, len(ps), worstInt)
	if worst > powMaxULP {
		t.Errorf("Pow off by %.3g ulp at (x, y) = (%v, %v), want <= %g", worst, at.x, at.y, float64(powMaxULP))
	}

	// Exact results are exact (exact identity: k^n by big.Int, below 2^53).
	for _, c := range []struct{ k, n int64 }{{3, 33}, {7, 18}, {-5, 21}, {2, 52}, {-2, 51}, {10, 15}, {-3, 4}} {
		want := new(big.Int).Exp(big.NewInt(c.k), big.NewInt(c.n), nil)
		if got := Pow(float64(c.k), float64(c.n)); got != float64(want.Int64()) {
			t.Errorf("Pow(%d, %d) = %v, want %v exactly", c.k, c.n, got, want)
		}
	}
	if got := Pow(2, -64); got != 0x1p-64 {
		t.Errorf("Pow(2, -64) = %v, want 2^-64 exactly", got)
	}
	if got := Pow(-0.5, -63); got != -0x1p63 {
		t.Errorf("Pow(-0.5, -63) = %v, want -2^63 exactly", got)
	}
}

// TestPowSpecial: every line of math.Pow's documented special cases, and
// overflow and underflow, compared bit for bit (signs of zeros and
// infinities) with math.Pow (the reference library).
func TestPowSpecial(t *testing.T) {
	nz, inf, nan := math.Copysign(0, -1), math.Inf(1), math.NaN()
	cases := []struct {
		name string
		x, y float64
	}{
		{"x, +0", 3, 0}, {"x, -0", 3, nz}, {"NaN, 0", nan, 0}, {"Inf, -0", inf, nz},
		{"1, y", 1, 7.5}, {"1, NaN", 1, nan}, {"1, Inf", 1, inf}, {"1, -Inf", 1, -inf},
		{"x, 1", 2.5, 1}, {"-x, 1", -2.5, 1}, {"-0, 1", nz, 1}, {"-Inf, 1", -inf, 1},
		{"NaN, y", nan, 2}, {"x, NaN", 2, nan}, {"NaN, NaN", nan, nan},
		{"+0, odd<0", 0, -3}, {"-0, odd<0", nz, -3}, {"-0, -1", nz, -1},
		{"+0, -Inf", 0, -inf}, {"-0, -Inf", nz, -inf},
		{"+0, +Inf", 0, inf}, {"-0, +Inf", nz, inf},
		{"+0, y<0 even", 0, -2}, {"-0, y<0 even", nz, -2}, {"-0, y<0 frac", nz, -0.5}, {"+0, -1e300", 0, -1e300},
		{"+0, odd>0", 0, 3}, {"-0, odd>0", nz, 3}, {"-0, 2^53+1 (even)", nz, 0x1p53 + 2},
		{"+0, y>0 even", 0, 2}, {"-0, y>0 even", nz, 2}, {"-0, y>0 frac", nz, 0.5}, {"-0, 1e300", nz, 1e300},
		{"-1, +Inf", -1, inf}, {"-1, -Inf", -1, -inf},
		{"|x|>1, +Inf", 1.5, inf}, {"x<-1, +Inf", -1.5, inf}, {"|x|>1, -Inf", -2, -inf}, {"Inf, -Inf", inf, -inf},
		{"|x|<1, +Inf", 0.5, inf}, {"-|x|<1, +Inf", -0.5, inf}, {"|x|<1, -Inf", 0.5, -inf}, {"-|x|<1, -Inf", -0.25, -inf},
		{"+Inf, y>0", inf, 0.3}, {"+Inf, +Inf", inf, inf}, {"+Inf, y<0", inf, -0.3},
		{"-Inf, odd>0", -inf, 3}, {"-Inf, even>0", -inf, 2}, {"-Inf, frac>0", -inf, 2.5},
		{"-Inf, odd<0", -inf, -3}, {"-Inf, even<0", -inf, -2}, {"-Inf, frac<0", -inf, -2.5}, {"-Inf, +Inf", -inf, inf},
		{"x<0, frac", -2, 0.5}, {"x<0, frac", -2, 1.5}, {"x<0, frac", -0.3, -7.25},
		{"overflow", 10, 309}, {"overflow", 1e300, 1.5}, {"overflow odd", -10, 309}, {"overflow int", 1e10, 40}, {"overflow -int", -1e10, 41},
		{"underflow", 10, -400}, {"underflow", 1e-300, 1.5}, {"underflow odd", -10, -401}, {"underflow int", 1e-10, 64}, {"underflow -int", -1e10, -63},
		{"huge y", 1.0000001, 1e300}, {"huge -y", 1.0000001, -1e300}, {"huge y, x<1", 0.9999999, 1e300}, {"huge y, x<0", -1.0000001, 1e300},
		{"sqrt", 2, 0.5}, {"sqrt", 1e-310, 0.5},
	}
	for _, c := range cases {
		got, want := Pow(c.x, c.y), math.Pow(c.x, c.y)
		if math.IsNaN(want) {
			if !math.IsNaN(got) {
				t.Errorf("%s: Pow(%v, %v) = %v, want NaN", c.name, c.x, c.y, got)
			}
			continue
		}
		if math.Float64bits(got) != math.Float64bits(want) {
			t.Errorf("%s: Pow(%v, %v) = %v, want %v", c.name, c.x, c.y, got, want)
		}
	}
}

// TestLogDD: logDD carries ln x to within powLogTol relative of math/big
// (bigLog) over the whole range, near 1 above all (where y·ln x can still
// reach 700).
func TestLogDD(t *testing.T) {
	// powLogTol: 709·2^-62 is 1.4 ulp of Pow's result at most (see
	// powMaxULP); it leaves a margin of 3.5 over the 2^-63.8 measured
	// (logged).
	const powLogTol = 0x1p-62
	rng := rand.New(rand.NewPCG(33, 34))
	worst, at := 0.0, 0.0
	for range 1500 {
		for _, x := range []float64{math.Exp(rng.Float64()*1400 - 700), 1 + (rng.Float64()-0.5)*math.Exp(-rng.Float64()*36), 0.7 + rng.Float64()*0.72, math.Ldexp(1+rng.Float64(), -1074+rng.IntN(52))} {
			if x == 1 {
				continue
			}
			h, l := logDD(x)
			want := bigLog(x)
			d := new(big.Float).SetPrec(200).SetFloat64(h)
			d.Add(d, new(big.Float).SetFloat64(l))
			d.Sub(d, want)
			d.Quo(d, want)
			if r, _ := d.Float64(); math.Abs(r) > worst {
				worst, at = math.Abs(r), x
			}
		}
	}
	t.Logf("largest relative error of logDD %.3g (2^%.1f) at x = %v", worst, math.Log2(worst), at)
	if worst > powLogTol {
		t.Errorf("logDD relative error %.3g at x = %v, want <= %g", worst, at, powLogTol)
	}
}

func BenchmarkPow(b *testing.B) {
	xs := []float64{0.3, 1.7, 12.5, 1e-5, 3e8}
	for _, c := range []struct {
		name string
		ys   []float64
	}{{"real", []float64{0.37, -1.5, 2.75, -0.01, 1.25}}, {"int", []float64{2, -3, 7, 12, -1}}} {
		b.Run(c.name+"/detmath", func(b *testing.B) {
			b.ReportAllocs()
			s := 0.0
			for i := 0; b.Loop(); i++ {
				s += Pow(xs[i%len(xs)], c.ys[i%len(c.ys)])
			}
			_ = s
		})
		b.Run(c.name+"/math", func(b *testing.B) {
			b.ReportAllocs()
			s := 0.0
			for i := 0; b.Loop(); i++ {
				s += math.Pow(xs[i%len(xs)], c.ys[i%len(c.ys)])
			}
			_ = s
		})
	}
}

// bitsHash returns an FNV-1a hash of the bits of f over n seeded
// arguments from gen, for the golden determinism checks.
func bitsHash(n int, seed uint64, gen func(*rand.Rand) float64, f func(float64) float64) uint64 {
	rng := rand.New(rand.NewPCG(seed, seed^0x9e3779b97f4a7c15))
	h := uint64(14695981039346656037)
	for range n {
		b := math.Float64bits(f(gen(rng)))
		for i := range 8 {
			h ^= b >> (8 * i) & 0xff
			h *= 1099511628211
		}
	}
	return h
}

// TestBitsGolden: the functions give the same bits on every architecture.
// The hashes were recorded on linux/amd64 and the test passes unchanged
// on linux/arm64 (cross-compiled with GOARCH=arm64 and run under
// qemu-aarch64), where the Go compiler would fuse any unrounded product
// into an FMA; a change of any last bit changes the hash. The argument
// generators use no product followed by a sum, so that the arguments are
// the same bits on both too.
func TestBitsGolden(t *testing.T) {
	wide := func(r *rand.Rand) float64 { // both signs, 2^-1010 .. 2^1010 (exact operations only)
		x := math.Ldexp(1+r.Float64(), r.IntN(2021)-1010)
		if r.IntN(2) == 0 {
			return -x
		}
		return x
	}
	mid := func(r *rand.Rand) float64 { return (r.Float64() - 0.5) * 60 }
	unit := func(r *rand.Rand) float64 { return (r.Float64() - 0.5) * 4 }
	for _, c := range []struct {
		name string
		f    func(float64) float64
		gen  func(*rand.Rand) float64
		want uint64
	}{
		{"Atan", Atan, wide, 0xaa4376f9ec78c416},
		{"Atan2", func(x float64) float64 { return Atan2(x, 1/(x+0.3)) }, wide, 0x15c1924c6ee05cec},
		{"AtanUnit", Atan, unit, 0x51076a7da1676c11},
		{"Atan2Unit", func(x float64) float64 { return Atan2(x, -1.5) }, unit, 0x66a00486a7365f40},
		{"Sinh", Sinh, mid, 0x320fed878a9c81b4},
		{"Cosh", Cosh, mid, 0x6e75f2ba0fee9801},
		{"SinhUnit", Sinh, unit, 0xe60d1cad9e1aa807},
		{"TanhUnit", Tanh, unit, 0x531b11f440fb9b74},
		{"Tanh", Tanh, mid, 0x99042fb87d28d436},
		{"Pow", func(x float64) float64 { return Pow(math.Abs(x)+0.5, x) }, mid, 0x4a64180e03ae2992},
		{"PowInt", func(x float64) float64 { return Pow(x, math.Round(x)) }, mid, 0x2d0c4a3452e571d6},
	} {
		if got := bitsHash(20000, 41, c.gen, c.f); got != c.want {
			t.Errorf("%s: bits hash %#x, want %#x", c.name, got, c.want)
		}
	}
}
