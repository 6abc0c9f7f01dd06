package detmath

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// bigSinCos returns sin x and cos x to about 60 digits by math/big: x is
// reduced by π/2 taken from piOver2 (Machin's formula at 1,269 bits, which
// TestPiOver2 checks against stored digits of π), then the Taylor series at
// 400 bits (a general-purpose reference library, math/big).
func bigSinCos(x float64) (*big.Float, *big.Float) {
	const prec = 400
	p := new(big.Float).SetPrec(bigPrec).Set(piOver2())
	xb := new(big.Float).SetPrec(bigPrec).SetFloat64(x)
	qf := new(big.Float).SetPrec(bigPrec).Quo(xb, p)
	qi, _ := qf.Int(nil)
	r := new(big.Float).SetPrec(bigPrec).Mul(new(big.Float).SetPrec(bigPrec).SetInt(qi), p)
	r.Sub(xb, r).SetPrec(prec)
	z := new(big.Float).SetPrec(prec).Mul(r, r)
	s, c := new(big.Float).SetPrec(prec), new(big.Float).SetPrec(prec)
	ts, tc := new(big.Float).SetPrec(prec).Set(r), new(big.Float).SetPrec(prec).SetInt64(1)
	for n := int64(0); n < 60; n++ {
		if n%2 == 0 {
			s.Add(s, ts)
			c.Add(c, tc)
		} else {
			s.Sub(s, ts)
			c.Sub(c, tc)
		}
		ts.Mul(ts, z).Quo(ts, new(big.Float).SetInt64((2*n+2)*(2*n+3)))
		tc.Mul(tc, z).Quo(tc, new(big.Float).SetInt64((2*n+1)*(2*n+2)))
	}
	switch new(big.Int).And(qi, big.NewInt(3)).Int64() {
	case 1:
		s, c = c, s.Neg(s)
	case 2:
		s, c = s.Neg(s), c.Neg(c)
	case 3:
		s, c = c.Neg(c), s
	}
	return s, c
}

// TestPiOver2: the π/2 of the big reduction against the first 80 digits
// of π (a handbook value: Abramowitz & Stegun 1964, Table 1.1, and any
// table of π), and the three-part constant against it.
func TestPiOver2(t *testing.T) {
	const pi80 = "3.1415926535897932384626433832795028841971693993751058209749445923078164062862089"
	want, _ := new(big.Float).SetPrec(300).SetString(pi80)
	got := new(big.Float).SetPrec(300).Mul(piOver2(), big.NewFloat(2))
	d := new(big.Float).Sub(got, want)
	if df, _ := d.Float64(); math.Abs(df) > 1e-78 {
		t.Errorf("2·piOver2 - π = %g", df)
	}
	parts := new(big.Float).SetPrec(300).Add(new(big.Float).SetPrec(300).SetFloat64(pio2a), new(big.Float).SetFloat64(pio2b))
	parts.Add(parts, new(big.Float).SetFloat64(pio2c))
	d.Sub(parts, new(big.Float).SetPrec(300).Set(piOver2()))
	// The three parts hold π/2 to 2^-126 of it (53 + 2·33 bits less the
	// overlap); the remainder is about 1e-37.
	if df, _ := d.Float64(); math.Abs(df) > 2e-37 {
		t.Errorf("pio2a + pio2b + pio2c - π/2 = %g", df)
	}
}

// TestSinCos: Sin, Cos within 1 ulp and Tan within 2.5 ulp of math/big
// over small, moderate and huge arguments, those near multiples of π/2
// included; special cases as in the math package's documentation.
func TestSinCos(t *testing.T) {
	// maxULP: half an ulp of final rounding, the reduction and the
	// polynomial (common practice for this scheme; measured below). Tan
	// adds the rounding of the division.
	const maxULP, maxULPTan = 1.0, 2.5
	rng := rand.New(rand.NewPCG(7, 8))
	var xs []float64
	for range 3000 {
		xs = append(xs, (rng.Float64()-0.5)*8, (rng.Float64()-0.5)*2e5, (rng.Float64()-0.5)*1e-4,
			math.Ldexp(rng.Float64()+0.5, rng.IntN(1000)), (rng.Float64()-0.5)*3e6)
	}
	for k := 1; k < 200; k++ {
		xs = append(xs, float64(k)*math.Pi/2, math.Nextafter(float64(k)*math.Pi/2, 0))
	}
	xs = append(xs, math.Pi/4, -math.Pi/4, reduceMax, math.Nextafter(reduceMax, 0), math.MaxFloat64, -math.MaxFloat64, 6381956970095103*0x1p797)
	var ws, wc, wt float64
	var as, ac, at float64
	for _, x := range xs {
		bs, bc := bigSinCos(x)
		if u := ulps(Sin(x), bs); u > ws {
			ws, as = u, x
		}
		if u := ulps(Cos(x), bc); u > wc {
			wc, ac = u, x
		}
		bt := new(big.Float).SetPrec(400).Quo(bs, bc)
		if u := ulps(Tan(x), bt); u > wt {
			wt, at = u, x
		}
	}
	t.Logf("largest errors: Sin %.3g ulp at %v, Cos %.3g ulp at %v, Tan %.3g ulp at %v", ws, as, wc, ac, wt, at)
	if ws > maxULP || wc > maxULP || wt > maxULPTan {
		t.Errorf("Sin %.3g ulp at %v, Cos %.3g at %v, Tan %.3g at %v; want <= %g, %g, %g", ws, as, wc, ac, wt, at, maxULP, maxULP, maxULPTan)
	}
	negZero := math.Copysign(0, -1)
	for _, f := range []struct {
		name string
		fn   func(float64) float64
	}{{"Sin", Sin}, {"Tan", Tan}} {
		if got := f.fn(negZero); got != 0 || !math.Signbit(got) {
			t.Errorf("%s(-0) = %v, want -0", f.name, got)
		}
		if got := f.fn(0); got != 0 || math.Signbit(got) {
			t.Errorf("%s(+0) = %v, want +0", f.name, got)
		}
	}
	if Cos(0) != 1 || Cos(negZero) != 1 {
		t.Error("Cos(±0) is not 1")
	}
	for _, x := range []float64{math.Inf(1), math.Inf(-1), math.NaN()} {
		if !math.IsNaN(Sin(x)) || !math.IsNaN(Cos(x)) || !math.IsNaN(Tan(x)) {
			t.Errorf("Sin, Cos, Tan of %v are %v, %v, %v; want NaN", x, Sin(x), Cos(x), Tan(x))
		}
	}
}

func BenchmarkSin(b *testing.B) {
	xs := []float64{0.3, 1.7, -12.5, 1e-5, 300}
	b.Run("detmath", func(b *testing.B) {
		s := 0.0
		for i := 0; b.Loop(); i++ {
			s += Sin(xs[i%len(xs)])
		}
		_ = s
	})
	b.Run("math", func(b *testing.B) {
		s := 0.0
		for i := 0; b.Loop(); i++ {
			s += math.Sin(xs[i%len(xs)])
		}
		_ = s
	})
}

// TestSincosSame: Sincos gives the bits of Sin and Cos (the same reduction
// and polynomials; exact identity).
func TestSincosSame(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	for range 2000 {
		x := (rng.Float64() - 0.5) * 1e4
		s, c := Sincos(x)
		if math.Float64bits(s) != math.Float64bits(Sin(x)) || math.Float64bits(c) != math.Float64bits(Cos(x)) {
			t.Fatalf("Sincos(%v) = %v, %v; Sin, Cos = %v, %v", x, s, c, Sin(x), Cos(x))
		}
	}
}
