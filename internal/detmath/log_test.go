package detmath

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// bigLog returns ln x to about 60 digits by math/big: x = 2^k·m, ln m by
// the series 2·atanh((m-1)/(m+1)) at 200 bits, k·ln 2 with ln 2 by the same
// series (a general-purpose reference library, math/big).
func bigLog(x float64) *big.Float {
	const prec = 200
	atanh2 := func(s *big.Float) *big.Float { // 2·atanh(s) = 2(s + s³/3 + ...)
		z := new(big.Float).SetPrec(prec).Mul(s, s)
		term := new(big.Float).SetPrec(prec).Set(s)
		sum := new(big.Float).SetPrec(prec)
		for n := int64(1); n < 400; n += 2 {
			t := new(big.Float).SetPrec(prec).Quo(term, new(big.Float).SetInt64(n))
			sum.Add(sum, t)
			term.Mul(term, z)
		}
		return sum.Mul(sum, big.NewFloat(2))
	}
	frac, exp := math.Frexp(x) // x = frac·2^exp, frac in [1/2, 1)
	m := new(big.Float).SetPrec(prec).SetFloat64(frac)
	one := new(big.Float).SetPrec(prec).SetInt64(1)
	s := new(big.Float).SetPrec(prec).Quo(new(big.Float).SetPrec(prec).Sub(m, one), new(big.Float).SetPrec(prec).Add(m, one))
	lnm := atanh2(s)
	third := new(big.Float).SetPrec(prec).Quo(one, new(big.Float).SetPrec(prec).SetInt64(3)) // ln 2 = 2·atanh(1/3)
	ln2 := atanh2(third)
	return lnm.Add(lnm, new(big.Float).SetPrec(prec).Mul(ln2, new(big.Float).SetInt64(int64(exp))))
}

// ulps is |got - want| in units of the last place of want (rounded to
// float64).
func ulps(got float64, want *big.Float) float64 {
	w, _ := want.Float64()
	if w == 0 {
		return math.Abs(got) / math.SmallestNonzeroFloat64
	}
	d := new(big.Float).SetPrec(200).Sub(new(big.Float).SetPrec(200).SetFloat64(got), want)
	df, _ := d.Float64()
	ulp := math.Nextafter(math.Abs(w), math.Inf(1)) - math.Abs(w)
	return math.Abs(df) / ulp
}

// TestLog: within 1.5 ulp of ln x computed with math/big at 200 bits, over
// arguments near 1 (where ln x is small), across the binade, and from
// subnormals to the largest float64; the special cases are those of
// math.Log (its documentation).
func TestLog(t *testing.T) {
	// maxULP: half an ulp for the final rounding, about half for ln m
	// (rounded before k·ln 2 is added), and a margin (common practice for
	// this reduction; measured 1.08 on these arguments).
	const maxULP = 1.5
	rng := rand.New(rand.NewPCG(1, 2))
	var xs []float64
	for range 4000 {
		xs = append(xs, 1+(rng.Float64()-0.5)*1e-3, 0.5+rng.Float64()*1.5, math.Exp((rng.Float64()-0.5)*1400))
	}
	xs = append(xs, 1, 2, 0.5, math.Sqrt2, math.Nextafter(math.Sqrt2, 2), math.Nextafter(1, 2), math.Nextafter(1, 0),
		math.SmallestNonzeroFloat64, 0x1p-1022, math.MaxFloat64, 1e-300, 1e300)
	worst, at := 0.0, 0.0
	for _, x := range xs {
		if u := ulps(Log(x), bigLog(x)); u > worst {
			worst, at = u, x
		}
	}
	t.Logf("largest error %.3g ulp at x = %v", worst, at)
	if worst > maxULP {
		t.Errorf("Log off by %.3g ulp at x = %v, want <= %g", worst, at, maxULP)
	}
	for _, c := range []struct{ x, want float64 }{{0, math.Inf(-1)}, {math.Inf(1), math.Inf(1)}} {
		if got := Log(c.x); got != c.want {
			t.Errorf("Log(%v) = %v, want %v", c.x, got, c.want)
		}
	}
	for _, x := range []float64{-1, math.Inf(-1), math.NaN()} {
		if got := Log(x); !math.IsNaN(got) {
			t.Errorf("Log(%v) = %v, want NaN", x, got)
		}
	}
	if Log(1) != 0 {
		t.Errorf("Log(1) = %v, want 0 exactly", Log(1))
	}
}

func BenchmarkLog(b *testing.B) {
	xs := []float64{0.3, 1.7, 12.5, 1e-5, 3e8}
	b.Run("detmath", func(b *testing.B) {
		s := 0.0
		for i := 0; b.Loop(); i++ {
			s += Log(xs[i%len(xs)])
		}
		_ = s
	})
	b.Run("math", func(b *testing.B) {
		s := 0.0
		for i := 0; b.Loop(); i++ {
			s += math.Log(xs[i%len(xs)])
		}
		_ = s
	})
}

// bigExp returns e^x to about 60 digits by math/big: x = k·ln 2 + r with
// ln 2 from bigLog, e^r by its Taylor series at 200 bits (a general-purpose
// reference library, math/big).
func bigExp(x float64) *big.Float {
	const prec = 200
	ln2 := bigLog(2)
	k := math.Round(x / math.Ln2)
	r := new(big.Float).SetPrec(prec).Sub(new(big.Float).SetPrec(prec).SetFloat64(x), new(big.Float).SetPrec(prec).Mul(ln2, new(big.Float).SetFloat64(k)))
	sum := new(big.Float).SetPrec(prec).SetInt64(1)
	term := new(big.Float).SetPrec(prec).SetInt64(1)
	for n := int64(1); n < 80; n++ {
		term.Mul(term, r)
		term.Quo(term, new(big.Float).SetInt64(n))
		sum.Add(sum, term)
	}
	return sum.SetMantExp(sum, int(k))
}

// TestExp: within 1.5 ulp of e^x by math/big at 200 bits over the whole
// normal range and near 0; special cases and limits as math.Exp (its
// documentation).
func TestExp(t *testing.T) {
	// maxULP as for Log: half an ulp of final rounding, the reduction and
	// the polynomial (common practice; measured below).
	const maxULP = 1.5
	rng := rand.New(rand.NewPCG(5, 6))
	var xs []float64
	for range 4000 {
		xs = append(xs, (rng.Float64()-0.5)*1400, (rng.Float64()-0.5)*2, (rng.Float64()-0.5)*1e-6)
	}
	xs = append(xs, 0, 1, -1, 0.5*math.Ln2, -0.5*math.Ln2, 700, -700, 709.7, -708)
	worst, at := 0.0, 0.0
	for _, x := range xs {
		if u := ulps(Exp(x), bigExp(x)); u > worst {
			worst, at = u, x
		}
	}
	t.Logf("largest error %.3g ulp at x = %v", worst, at)
	if worst > maxULP {
		t.Errorf("Exp off by %.3g ulp at x = %v, want <= %g", worst, at, maxULP)
	}
	if Exp(0) != 1 {
		t.Errorf("Exp(0) = %v, want 1", Exp(0))
	}
	for _, c := range []struct{ x, want float64 }{{math.Inf(1), math.Inf(1)}, {math.Inf(-1), 0}, {710, math.Inf(1)}, {-746, 0}} {
		if got := Exp(c.x); got != c.want {
			t.Errorf("Exp(%v) = %v, want %v", c.x, got, c.want)
		}
	}
	if !math.IsNaN(Exp(math.NaN())) {
		t.Error("Exp(NaN) is not NaN")
	}
	// Subnormal results: relative error grows as the precision shrinks;
	// checked against math.Exp's value to 1e-10 relative (its
	// documentation promises the correctly rounded neighbourhood).
	for _, x := range []float64{-710, -720, -740} {
		if d := math.Abs(Exp(x)-math.Exp(x)) / math.Exp(x); d > 1e-10 {
			t.Errorf("Exp(%v) = %v, math.Exp %v", x, Exp(x), math.Exp(x))
		}
	}
}
