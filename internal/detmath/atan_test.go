package detmath

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// bigAtan returns atan(v) at 200 bits by math/big (a general-purpose
// reference library): six halvings v <- v/(1 + √(1+v²)) (the exact identity
// atan v = 2·atan(v/(1+√(1+v²)))) bring |v| below tan(π/128) ≈ 0.025 even
// for |v| = 1, then the Taylor series v - v³/3 + ... to 200 bits; for
// |v| > 1, atan v = ±π/2 - atan(1/v).
func bigAtan(v *big.Float) *big.Float {
	const prec = 200
	nf := func() *big.Float { return new(big.Float).SetPrec(prec) }
	one := nf().SetInt64(1)
	if new(big.Float).Abs(v).Cmp(one) > 0 {
		r := bigAtan(nf().Quo(one, v))
		h := nf().Quo(bigPi(), nf().SetInt64(2))
		if v.Sign() < 0 {
			h.Neg(h)
		}
		return h.Sub(h, r)
	}
	w := nf().Set(v)
	for range 6 {
		s := nf().Mul(w, w)
		s.Add(s, one)
		s.Sqrt(s)
		s.Add(s, one)
		w.Quo(w, s)
	}
	z := nf().Mul(w, w)
	term := nf().Set(w)
	sum := nf()
	for n := int64(1); n < 120; n += 2 { // |w|^120 < 2^-640
		t := nf().Quo(term, nf().SetInt64(n))
		if n%4 == 1 {
			sum.Add(sum, t)
		} else {
			sum.Sub(sum, t)
		}
		term.Mul(term, z)
	}
	return sum.Mul(sum, nf().SetInt64(64))
}

// bigPi returns π at 200 bits by Machin's formula π = 16·atan(1/5) -
// 4·atan(1/239) (an exact identity), with atan by its Taylor series.
func bigPi() *big.Float {
	const prec = 200
	series := func(n int64) *big.Float { // atan(1/n)
		x := new(big.Float).SetPrec(prec).Quo(big.NewFloat(1), new(big.Float).SetInt64(n))
		z := new(big.Float).SetPrec(prec).Mul(x, x)
		term := new(big.Float).SetPrec(prec).Set(x)
		sum := new(big.Float).SetPrec(prec)
		for k := int64(1); k < 200; k += 2 {
			t := new(big.Float).SetPrec(prec).Quo(term, new(big.Float).SetInt64(k))
			if k%4 == 1 {
				sum.Add(sum, t)
			} else {
				sum.Sub(sum, t)
			}
			term.Mul(term, z)
		}
		return sum
	}
	a := series(5)
	a.Mul(a, big.NewFloat(16))
	b := series(239)
	b.Mul(b, big.NewFloat(4))
	return a.Sub(a, b)
}

// bigAtan2 is atan(y/x) placed in the quadrant of (x, y), for finite
// nonzero x and y, with y/x at 200 bits.
func bigAtan2(y, x float64) *big.Float {
	q := new(big.Float).SetPrec(200).Quo(new(big.Float).SetFloat64(y), new(big.Float).SetFloat64(x))
	r := bigAtan(q)
	if x < 0 {
		if y > 0 {
			r.Add(r, bigPi())
		} else {
			r.Sub(r, bigPi())
		}
	}
	return r
}

// TestAtanBase: every base angle of the reduction table is hi + lo with hi
// the nearest float64 and |hi + lo - angle| below 2^-104·angle, the angles
// recomputed here by math/big (Machin's π and the halving series above).
func TestAtanBase(t *testing.T) {
	// loTol: a float64 lo holds the remainder to half an ulp of lo, i.e.
	// 2^-54·2^-52 of the angle (exact identity of rounding); 2^-104 leaves
	// a margin of 4.
	const loTol = 0x1p-104
	pi := bigPi()
	if p, _ := pi.Float64(); p != math.Pi {
		t.Fatalf("bigPi rounds to %v, want math.Pi %v", p, math.Pi)
	}
	half := new(big.Float).SetPrec(200).Quo(pi, big.NewFloat(2))
	for i := range atanBase {
		a := new(big.Float).SetPrec(200)
		if i > 0 {
			a = bigAtan(new(big.Float).SetPrec(200).SetFloat64(float64(2*i+3) / 16))
		}
		want := [4]*big.Float{
			new(big.Float).SetPrec(200).Set(a),
			new(big.Float).SetPrec(200).Sub(half, a),
			new(big.Float).SetPrec(200).Sub(pi, a),
			new(big.Float).SetPrec(200).Add(half, a),
		}
		for j, w := range want {
			hi, lo := atanBase[i][j][0], atanBase[i][j][1]
			if wf, _ := w.Float64(); hi != wf {
				t.Errorf("atanBase[%d][%d] hi = %v, want nearest %v", i, j, hi, wf)
			}
			d := new(big.Float).SetPrec(200).SetFloat64(hi)
			d.Add(d, new(big.Float).SetFloat64(lo))
			d.Sub(d, w)
			df, _ := d.Float64()
			wf, _ := w.Float64()
			if math.Abs(df) > loTol*math.Abs(wf) {
				t.Errorf("atanBase[%d][%d] off by %g, want below %g", i, j, df, loTol*math.Abs(wf))
			}
		}
	}
}

// atanMaxULP: the stated bound. The reduced argument t is a double-double
// (to about 2^-100), so the error is the final rounding (half an ulp), the
// rounding of the polynomial's tail (at most 1/1000 of the result in the
// table range, 1/48 in the direct series) and of the sum of the parts
// (common practice for an additive reduction); measured 0.62 in TestAtan
// and 0.60 in TestAtan2.
const atanMaxULP = 2

// TestAtan: within atanMaxULP of atan x by math/big at 200 bits, over tiny,
// moderate, near-table-boundary and huge arguments of both signs; special
// cases as math.Atan (its documentation).
func TestAtan(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	var xs []float64
	for range 1000 {
		xs = append(xs,
			rng.Float64(),                                     // [0, 1): the table range
			rng.Float64()*0.25,                                // the direct series
			1+rng.Float64()*9,                                 // (1, 10]: the inverted table
			math.Exp(rng.Float64()*60-40),                     // e^-40 .. e^20
			-math.Exp(rng.Float64()*1400-700),                 // the whole range, negative
			math.Ldexp(rng.Float64()+1, -1074+rng.IntN(2100)), // every binade
		)
	}
	for i := 2; i <= 8; i++ { // the boundaries of the table's intervals
		b := float64(i) / 8
		xs = append(xs, b, math.Nextafter(b, 0), math.Nextafter(b, 2), 1/b, math.Nextafter(1/b, 0), math.Nextafter(1/b, 9))
	}
	xs = append(xs, 0.2500678304779125, // just above 1/4, where |t| is largest against the result
		0x1p-27, math.Nextafter(0x1p-27, 0), 1e-300, math.SmallestNonzeroFloat64, math.MaxFloat64, 1e300, 0x1p500, 0x1p-500)
	worst, at := 0.0, 0.0
	for _, x := range xs {
		if math.IsInf(x, 0) || math.IsNaN(x) {
			continue
		}
		if u := ulps(Atan(x), bigAtan(new(big.Float).SetPrec(200).SetFloat64(x))); u > worst {
			worst, at = u, x
		}
	}
	t.Logf("largest error %.3g ulp at x = %v (%d arguments)", worst, at, len(xs))
	if worst > atanMaxULP {
		t.Errorf("Atan off by %.3g ulp at x = %v, want <= %g", worst, at, float64(atanMaxULP))
	}
	// Special cases (math.Atan's documentation); exact bits, signs included.
	for _, x := range []float64{0, math.Copysign(0, -1), math.Inf(1), math.Inf(-1), 1, -1} {
		if got, want := Atan(x), math.Atan(x); math.Float64bits(got) != math.Float64bits(want) {
			t.Errorf("Atan(%v) = %v, want %v", x, got, want)
		}
	}
	if !math.IsNaN(Atan(math.NaN())) {
		t.Error("Atan(NaN) is not NaN")
	}
}

// TestAtan2: within atanMaxULP of the quadrant-placed atan(y/x) by
// math/big, over random pairs with every sign combination, with ratios
// near 1, near the table boundaries and far from 1 (including ratios that
// overflow or underflow in float64); every special case of math.Atan2's
// documentation compared bit for bit (sign of zero included) with
// math.Atan2.
func TestAtan2(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	type pair struct{ y, x float64 }
	var ps []pair
	sign := func() float64 {
		if rng.IntN(2) == 0 {
			return -1
		}
		return 1
	}
	for range 1000 {
		x := sign() * math.Exp(rng.Float64()*40-20)
		ps = append(ps,
			pair{sign() * rng.Float64() * math.Abs(x), x},                                                                            // |y| <= |x|
			pair{sign() * math.Abs(x) / (rng.Float64() + 1e-3), x},                                                                   // |y| > |x|
			pair{x * (1 + (rng.Float64()-0.5)*1e-6) * sign(), x},                                                                     // near the diagonals
			pair{sign() * math.Exp(rng.Float64()*1400-700), sign() * math.Exp(rng.Float64()*1400-700)},                               // any magnitudes
			pair{sign() * math.Ldexp(rng.Float64()+1, 1000+rng.IntN(23)), sign() * math.Ldexp(rng.Float64()+1, 1000+rng.IntN(23))},   // near overflow
			pair{sign() * math.Ldexp(rng.Float64()+1, -1074+rng.IntN(60)), sign() * math.Ldexp(rng.Float64()+1, -1074+rng.IntN(60))}, // subnormal
		)
	}
	worst, at := 0.0, pair{}
	for _, p := range ps {
		if p.x == 0 || p.y == 0 {
			continue
		}
		if u := ulps(Atan2(p.y, p.x), bigAtan2(p.y, p.x)); u > worst {
			worst, at = u, p
		}
	}
	t.Logf("largest error %.3g ulp at (y, x) = (%v, %v) (%d pairs)", worst, at.y, at.x, len(ps))
	if worst > atanMaxULP {
		t.Errorf("Atan2 off by %.3g ulp at (y, x) = (%v, %v), want <= %g", worst, at.y, at.x, float64(atanMaxULP))
	}

	// Special cases: each line of math.Atan2's documentation, with the
	// expected value taken from math.Atan2 itself (the reference library).
	nz, inf, nan := math.Copysign(0, -1), math.Inf(1), math.NaN()
	cases := []struct {
		name string
		y, x float64
	}{
		{"y, NaN", 1, nan}, {"NaN, x", nan, 1}, {"NaN, NaN", nan, nan}, {"Inf, NaN", inf, nan},
		{"+0, +0", 0, 0}, {"+0, x>0", 0, 3}, {"+0, +Inf", 0, inf},
		{"-0, +0", nz, 0}, {"-0, x>0", nz, 3}, {"-0, +Inf", nz, inf},
		{"+0, -0", 0, nz}, {"+0, x<0", 0, -3}, {"+0, -Inf", 0, -inf},
		{"-0, -0", nz, nz}, {"-0, x<0", nz, -3}, {"-0, -Inf", nz, -inf},
		{"y>0, +0", 2, 0}, {"y>0, -0", 2, nz}, {"y<0, +0", -2, 0}, {"y<0, -0", -2, nz},
		{"+Inf, +0", inf, 0}, {"-Inf, -0", -inf, nz},
		{"+Inf, +Inf", inf, inf}, {"-Inf, +Inf", -inf, inf}, {"+Inf, -Inf", inf, -inf}, {"-Inf, -Inf", -inf, -inf},
		{"y>0, +Inf", 5, inf}, {"y<0, +Inf", -5, inf}, {"y tiny, +Inf", -5e-324, inf},
		{"y>0, -Inf", 5, -inf}, {"y<0, -Inf", -5, -inf},
		{"+Inf, x>0", inf, 7}, {"+Inf, x<0", inf, -7}, {"-Inf, x>0", -inf, 7}, {"-Inf, x<0", -inf, -7},
		{"1, 1", 1, 1}, {"-1, -1", -1, -1}, {"1, -1", 1, -1},
	}
	for _, c := range cases {
		got, want := Atan2(c.y, c.x), math.Atan2(c.y, c.x)
		if math.IsNaN(want) {
			if !math.IsNaN(got) {
				t.Errorf("%s: Atan2(%v, %v) = %v, want NaN", c.name, c.y, c.x, got)
			}
			continue
		}
		if math.Float64bits(got) != math.Float64bits(want) {
			t.Errorf("%s: Atan2(%v, %v) = %v, want %v", c.name, c.y, c.x, got, want)
		}
	}
}

func BenchmarkAtan(b *testing.B) {
	xs := []float64{0.1, 0.45, 0.8, 3.5, 1e5}
	b.Run("detmath", func(b *testing.B) {
		b.ReportAllocs()
		s := 0.0
		for i := 0; b.Loop(); i++ {
			s += Atan(xs[i%len(xs)])
		}
		_ = s
	})
	b.Run("math", func(b *testing.B) {
		b.ReportAllocs()
		s := 0.0
		for i := 0; b.Loop(); i++ {
			s += math.Atan(xs[i%len(xs)])
		}
		_ = s
	})
}

func BenchmarkAtan2(b *testing.B) {
	ys := []float64{0.1, -4.5, 0.8, 3.5, -1e5}
	xs := []float64{1.3, 2.2, -0.7, -9, 2e-3}
	b.Run("detmath", func(b *testing.B) {
		b.ReportAllocs()
		s := 0.0
		for i := 0; b.Loop(); i++ {
			s += Atan2(ys[i%len(ys)], xs[i%len(xs)])
		}
		_ = s
	})
	b.Run("math", func(b *testing.B) {
		b.ReportAllocs()
		s := 0.0
		for i := 0; b.Loop(); i++ {
			s += math.Atan2(ys[i%len(ys)], xs[i%len(xs)])
		}
		_ = s
	})
}
