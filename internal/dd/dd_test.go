package dd_test

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"

	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/internal/expr"
)

// refPrec is the precision of the math/big reference: far beyond the 106
// bits of a double-double, so the reference's own rounding is negligible.
const refPrec = 200

func big200() *big.Float { return new(big.Float).SetPrec(refPrec) }

// relErr returns |got - want|/|want| (absolute error when want is 0).
func relErr(got dd.Float, want *big.Float) float64 {
	d := big200().Sub(got.Big(), want)
	d.Abs(d)
	if want.Sign() != 0 {
		d.Quo(d, big200().Abs(want))
	}
	f, _ := d.Float64()
	return f
}

// absErr returns |got - want|.
func absErr(got dd.Float, want *big.Float) float64 {
	d := big200().Sub(got.Big(), want)
	f, _ := d.Float64()
	return math.Abs(f)
}

// random returns a double-double with random sign, exponent in [-20, 20]
// and a random low part below half an ulp of the high part.
func random(rng *rand.Rand) dd.Float {
	hi := math.Ldexp(1+rng.Float64(), rng.IntN(41)-20)
	if rng.IntN(2) == 0 {
		hi = -hi
	}
	lo := (rng.Float64() - 0.5) * math.Ldexp(1, math.Ilogb(hi)-52)
	s := hi + lo
	return dd.Float{Hi: s, Lo: lo - (s - hi)}
}

// TestArithmetic checks + - * / sqrt against math/big at 200 bits with
// random seeded inputs.
func TestArithmetic(t *testing.T) {
	// Joldes, Muller & Popescu (2017) prove bounds of 3u²+13u³ (add), 5u²
	// (mul) and 15u²+56u³ (div), all below 2e-31 with u = 2^-53; the
	// target 1e-30 is the published double-double accuracy with margin.
	const tol = 1e-30
	rng := rand.New(rand.NewPCG(7, 8))
	worst := map[string]float64{}
	names := []string{"add", "sub", "mul", "div", "sqrt"}
	for range 20000 {
		x, y := random(rng), random(rng)
		bx, by := x.Big(), y.Big()
		cases := []struct {
			name string
			got  dd.Float
			want *big.Float
		}{
			{"add", dd.Add(x, y), big200().Add(bx, by)},
			{"sub", dd.Sub(x, y), big200().Sub(bx, by)},
			{"mul", dd.Mul(x, y), big200().Mul(bx, by)},
			{"div", dd.Div(x, y), big200().Quo(bx, by)},
			{"sqrt", dd.Sqrt(dd.Abs(x)), big200().Sqrt(big200().Abs(bx))},
		}
		for _, c := range cases {
			e := relErr(c.got, c.want)
			worst[c.name] = max(worst[c.name], e)
			if e > tol {
				t.Fatalf("%s(%v, %v) = %v, relative error %g (want < %g)", c.name, x, y, c.got, e, tol)
			}
		}
	}
	for _, n := range names {
		t.Logf("%s: worst relative error %.3g (u² = %.3g)", n, worst[n], math.Ldexp(1, -106))
	}
}

// TestCancellation checks Add where the high parts cancel: x + (-x·(1+ε)).
func TestCancellation(t *testing.T) {
	const tol = 1e-30 // as TestArithmetic
	rng := rand.New(rand.NewPCG(9, 10))
	for range 2000 {
		x := random(rng)
		y := dd.Neg(dd.Mul(x, dd.Float{Hi: 1, Lo: math.Ldexp(rng.Float64(), -60)}))
		want := big200().Add(x.Big(), y.Big())
		if e := relErr(dd.Add(x, y), want); e > tol {
			t.Fatalf("Add(%v, %v): relative error %g", x, y, e)
		}
	}
}

// TestFunctions checks the elementary functions against the big.Float ones
// of internal/expr at 200 bits (themselves checked against math and exact
// identities there).
func TestFunctions(t *testing.T) {
	// The documented accuracies: about 1e-31 relative (exp, sinh, cosh,
	// tanh) or absolute (log, sin, cos, atan) in the tested ranges; 1e-30
	// gives a factor-10 margin for the error growth in argument reduction.
	const tol = 1e-30
	rng := rand.New(rand.NewPCG(11, 12))
	cases := []struct {
		name     string
		f        func(dd.Float) dd.Float
		ref      func(z, x *big.Float) *big.Float
		lo, hi   float64
		absolute bool
	}{
		{"exp", dd.Exp, expr.BigExp, -30, 30, false},
		{"log", dd.Log, expr.BigLog, 1e-3, 1e3, true},
		{"sin", dd.Sin, expr.BigSin, -10, 10, true},
		{"cos", dd.Cos, expr.BigCos, -10, 10, true},
		{"tan", dd.Tan, expr.BigTan, -1.2, 1.2, false},
		{"atan", dd.Atan, expr.BigAtan, -20, 20, true},
		{"sinh", dd.Sinh, expr.BigSinh, -3, 3, false},
		{"cosh", dd.Cosh, expr.BigCosh, -3, 3, false},
		{"tanh", dd.Tanh, expr.BigTanh, -3, 3, false},
		{"sqrt", dd.Sqrt, func(z, x *big.Float) *big.Float { return z.Sqrt(x) }, 1e-6, 1e6, false},
	}
	for _, c := range cases {
		worst := 0.0
		for range 300 {
			x := dd.Add(dd.From(c.lo+(c.hi-c.lo)*rng.Float64()), dd.From(rng.Float64()*1e-17))
			want := c.ref(big200(), x.Big())
			got := c.f(x)
			e := relErr(got, want)
			if c.absolute {
				e = absErr(got, want)
			}
			worst = max(worst, e)
			if e > tol {
				t.Errorf("%s(%v) = %v: error %g", c.name, x, got, e)
			}
		}
		t.Logf("%s: worst error %.3g", c.name, worst)
	}
	for range 300 {
		y, x := random(rng), random(rng)
		want := expr.BigAtan2(big200(), y.Big(), x.Big())
		if e := absErr(dd.Atan2(y, x), want); e > tol {
			t.Errorf("atan2(%v, %v): error %g", y, x, e)
		}
		p := dd.From(rng.Float64() * 3)
		b := dd.Abs(random(rng))
		if b.Hi > 1e3 || b.Hi < 1e-3 {
			continue
		}
		want = expr.BigPow(big200(), b.Big(), p.Big())
		if e := relErr(dd.Pow(b, p), want); e > 10*tol {
			// pow = exp(p·log b): the log's absolute error is multiplied by p.
			t.Errorf("pow(%v, %v): error %g", b, p, e)
		}
	}
}

// TestSpecial checks special values (exact identities and IEEE conventions).
func TestSpecial(t *testing.T) {
	inf := dd.From(math.Inf(1))
	if got := dd.Exp(dd.From(-1000)); got.Hi != 0 {
		t.Errorf("Exp(-1000) = %v, want 0", got)
	}
	if got := dd.Exp(dd.From(1000)); !math.IsInf(got.Hi, 1) {
		t.Errorf("Exp(1000) = %v, want +Inf", got)
	}
	if got := dd.Div(dd.From(1), dd.From(0)); !math.IsInf(got.Hi, 1) {
		t.Errorf("1/0 = %v, want +Inf", got)
	}
	if got := dd.Sqrt(dd.From(-1)); !math.IsNaN(got.Hi) {
		t.Errorf("Sqrt(-1) = %v, want NaN", got)
	}
	if got := dd.Add(inf, dd.From(1)); !math.IsInf(got.Hi, 1) {
		t.Errorf("Inf+1 = %v", got)
	}
	if got := dd.Mul(dd.From(1e300), dd.From(1e300)); !math.IsInf(got.Hi, 1) {
		t.Errorf("1e300² = %v, want +Inf", got)
	}
	if got := dd.Exp(dd.From(0)); got != dd.From(1) {
		t.Errorf("Exp(0) = %v, want 1 exactly", got)
	}
	if got := dd.Powi(dd.From(3), 4); got != dd.From(81) {
		t.Errorf("3^4 = %v, want 81 exactly", got)
	}
}
