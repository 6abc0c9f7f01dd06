package integrate

import (
	"context"
	"errors"
	"math"
	"math/big"
	"math/rand/v2"
	"strconv"
	"testing"
)

// bigRound is the reference for binary rounding: math/big's big.Float with
// SetPrec(p) and ToNearestEven (a general-purpose reference library), read
// back as the nearest float64 (exact, since it has at most p <= 53 bits;
// only an exponent above float64's range gives ±Inf).
func bigRound(x float64, p int) float64 {
	f := new(big.Float).SetPrec(uint(p)).SetMode(big.ToNearestEven).SetFloat64(x)
	v, _ := f.Float64()
	return v
}

// bigDecimal is the reference for decimal rounding: the exact binary value
// of x as a math/big big.Float printed by big.Float.Text (its own decimal
// conversion, rounding half to even) and parsed back.
func bigDecimal(x float64, format byte, prec int) float64 {
	f := new(big.Float).SetPrec(53).SetFloat64(x)
	v, err := strconv.ParseFloat(f.Text(format, prec), 64)
	if err != nil && !errors.Is(err, strconv.ErrRange) {
		panic(err)
	}
	return v
}

// testValues returns seeded random float64 values over the whole exponent
// range, subnormals included, plus boundary values.
func testValues() []float64 {
	rng := rand.New(rand.NewPCG(7, 11))
	v := []float64{
		1, -1, 0.1, 1.0 / 3, 2.0 / 3, math.Pi, 123.4565, 0.0005, 0.0015, 0.0025, -0.0025,
		math.MaxFloat64, -math.MaxFloat64, math.SmallestNonzeroFloat64, 0x1p-1022,
		0x1p-1022 - math.SmallestNonzeroFloat64, 3 * math.SmallestNonzeroFloat64,
		math.MaxFloat32, 0x1p-126, 1 + 0x1p-24, 1 + 0x1p-23 + 0x1p-24, 16777217, 16777219,
	}
	for range 4000 {
		b := rng.Uint64()
		x := math.Float64frombits(b)
		if math.IsNaN(x) || math.IsInf(x, 0) {
			continue
		}
		v = append(v, x)
	}
	for range 300 {
		// Subnormals: exponent field zero, random fraction, either sign.
		v = append(v, math.Float64frombits(rng.Uint64()&(1<<52-1)|rng.Uint64()&(1<<63)))
	}
	for range 2000 {
		// Values of everyday size, where most states live.
		v = append(v, (rng.Float64()-0.5)*math.Pow(10, float64(rng.IntN(12)-6)))
	}
	return v
}

// TestRoundBitsMatchesBig checks the bit rounding, exact to the last bit,
// against math/big (reference library) for every precision 1..53.
func TestRoundBitsMatchesBig(t *testing.T) {
	vals := testValues()
	for p := 1; p <= 53; p++ {
		r := Bits(p)
		for _, x := range vals {
			got, want := r.Round(x), bigRound(x, p)
			if math.Float64bits(got) != math.Float64bits(want) {
				t.Fatalf("Bits(%d).Round(%v) = %v (%#x), want %v (%#x) (math/big ToNearestEven)",
					p, x, got, math.Float64bits(got), want, math.Float64bits(want))
			}
		}
	}
}

// TestBits24IsFloat32 checks that Bits(24) equals Go's float32 conversion,
// which rounds to nearest even by the language spec (IEEE 754), for values in
// float32's normal range, and keeps float64's range outside it.
func TestBits24IsFloat32(t *testing.T) {
	r := Bits(24)
	for _, x := range testValues() {
		a := math.Abs(x)
		if a < 0x1p-126 || a > math.MaxFloat32 {
			continue
		}
		if got, want := r.Round(x), float64(float32(x)); got != want {
			t.Fatalf("Bits(24).Round(%v) = %v, want float32 %v (Go spec, IEEE 754)", x, got, want)
		}
	}
	// Outside float32's range the exponent is float64's: no overflow.
	if got := r.Round(1e300); math.IsInf(got, 0) || math.Abs(got-1e300) > 1e300*0x1p-24 {
		t.Errorf("Bits(24).Round(1e300) = %v, want within 2^-24 relative of 1e300", got)
	}
}

// TestRoundBitsTies checks round half to even at the significand, by exact
// binary identities.
func TestRoundBitsTies(t *testing.T) {
	sub := math.SmallestNonzeroFloat64
	for _, c := range []struct {
		name string
		x    float64
		p    int
		want float64
	}{
		{"halfway down to even", 1 + 0x1p-24, 24, 1},           // 1.000…0|1 → 1 (last kept bit 0)
		{"halfway up to even", 1 + 3*0x1p-24, 24, 1 + 0x1p-22}, // …01|1 → …10
		{"just above halfway", 1 + 0x1p-24 + 0x1p-52, 24, 1 + 0x1p-23},
		{"just below halfway", 1 + 0x1p-24 - 0x1p-52, 24, 1},
		{"negative halfway", -(1 + 0x1p-24), 24, -1},
		{"carry to next binade", 2 - 0x1p-25, 24, 2}, // 1.11…1|1 → 10.0
		{"float32 integer tie 2^24+1", 16777217, 24, 16777216},
		{"float32 integer tie 2^24+3", 16777219, 24, 16777220},
		{"one bit, tie rounds up", 3, 1, 4}, // significand 1|1: the kept bit is 1 (odd)
		{"one bit, below tie", 2.9, 1, 2},
		{"subnormal tie up", 3 * sub, 1, 4 * sub},
		{"subnormal tie even", 5 * sub, 2, 4 * sub}, // 101 → 10|1 → 100
		{"subnormal tie even up", 7 * sub, 2, 8 * sub},
		{"largest carries to Inf", math.MaxFloat64, 52, math.Inf(1)},
		{"53 bits is identity", 1 + 0x1p-52, 53, 1 + 0x1p-52},
	} {
		if got := Bits(c.p).Round(c.x); got != c.want {
			t.Errorf("%s: Bits(%d).Round(%v) = %v, want %v (exact identity)", c.name, c.p, c.x, got, c.want)
		}
	}
}

// TestRoundingSpecialCases checks ±0 (sign kept), ±Inf and NaN for every
// kind (the documented special cases).
func TestRoundingSpecialCases(t *testing.T) {
	for _, r := range []Rounding{{}, Bits(1), Bits(24), Digits(1), Digits(6), Places(0), Places(3)} {
		if got := r.Round(math.Copysign(0, -1)); got != 0 || !math.Signbit(got) {
			t.Errorf("%v: Round(-0) = %v, want -0", r, got)
		}
		if got := r.Round(0); got != 0 || math.Signbit(got) {
			t.Errorf("%v: Round(+0) = %v, want +0", r, got)
		}
		for _, inf := range []float64{math.Inf(1), math.Inf(-1)} {
			if got := r.Round(inf); got != inf {
				t.Errorf("%v: Round(%v) = %v", r, inf, got)
			}
		}
		if got := r.Round(math.NaN()); !math.IsNaN(got) {
			t.Errorf("%v: Round(NaN) = %v, want NaN", r, got)
		}
	}
}

// TestRoundDecimal checks digits and places against strconv.FormatFloat (what
// a printout shows) and, independently, against math/big's decimal printing.
func TestRoundDecimal(t *testing.T) {
	vals := testValues()
	for k := 1; k <= 17; k++ {
		r := Digits(k)
		for _, x := range vals {
			got := r.Round(x)
			want, err := strconv.ParseFloat(strconv.FormatFloat(x, 'e', k-1, 64), 64)
			if err != nil && !errors.Is(err, strconv.ErrRange) {
				t.Fatal(err)
			}
			if got != want {
				t.Fatalf("Digits(%d).Round(%v) = %v, want %v (strconv)", k, x, got, want)
			}
			if b := bigDecimal(x, 'e', k-1); got != b {
				t.Fatalf("Digits(%d).Round(%v) = %v, want %v (math/big Text)", k, x, got, b)
			}
		}
	}
	for k := 0; k <= 12; k++ {
		r := Places(k)
		for _, x := range vals {
			got := r.Round(x)
			want, _ := strconv.ParseFloat(strconv.FormatFloat(x, 'f', k, 64), 64)
			if got != want {
				t.Fatalf("Places(%d).Round(%v) = %v, want %v (strconv)", k, x, got, want)
			}
			if b := bigDecimal(x, 'f', k); got != b {
				t.Fatalf("Places(%d).Round(%v) = %v, want %v (math/big Text)", k, x, got, b)
			}
		}
	}
	// Printed values, by hand (exact decimal expansions of the binary
	// values): 0.0025 is stored as 0.00250000000000000005…, so it rounds up;
	// 0.125 is exact and a tie, so it rounds to even.
	for _, c := range []struct {
		r    Rounding
		x    float64
		want float64
	}{
		{Places(3), 0.0025, 0.003},
		{Places(2), 0.125, 0.12},
		{Places(2), 0.375, 0.38},
		{Places(3), -12.34567, -12.346},
		{Digits(3), 123456, 123000},
		{Digits(2), 0.125, 0.12},
		{Places(3), 1e-10, 0},
		{Places(0), 2.5, 2},
	} {
		if got := c.r.Round(c.x); got != c.want {
			t.Errorf("%v.Round(%v) = %v, want %v (exact decimal expansion)", c.r, c.x, got, c.want)
		}
	}
}

// TestRoundingValidate checks the ranges and the sentinel.
func TestRoundingValidate(t *testing.T) {
	for _, r := range []Rounding{Bits(0), Bits(54), Digits(0), Digits(18), Places(-1), Places(41), {Kind: 9, N: 3}} {
		err := r.Validate()
		if !errors.Is(err, ErrSettings) {
			t.Errorf("%+v: Validate() = %v, want ErrSettings", r, err)
		}
		if got := r.Round(1.5); !math.IsNaN(got) {
			t.Errorf("%+v: Round(1.5) = %v, want NaN for an invalid rounding", r, got)
		}
	}
	for _, r := range []Rounding{{}, Bits(1), Bits(53), Digits(1), Digits(17), Places(0), Places(40)} {
		if err := r.Validate(); err != nil {
			t.Errorf("%+v: Validate() = %v, want nil", r, err)
		}
	}
	p := Problem{F: func(_ float64, y, d []float64) { d[0] = -y[0] }, Y0: []float64{1}}
	if _, err := Solve(context.Background(), p, 1, Rounded(nil, Bits(60)), nil); !errors.Is(err, ErrSettings) {
		t.Errorf("Solve with Rounded(Bits(60)): err = %v, want ErrSettings", err)
	}
}

// lorenzProblem is the Lorenz system at sigma=10, rho=28, beta=8/3 (Lorenz
// 1963) from a start that is not representable in float32.
func lorenzProblem() Problem {
	return Problem{F: func(_ float64, y, d []float64) {
		d[0] = 10 * (y[1] - y[0])
		d[1] = float64(y[0]*(28-y[2])) - y[1]
		d[2] = float64(y[0]*y[1]) - float64(8.0/3*y[2])
	}, Y0: []float64{1.1, 1.2, 1.3}}
}

// TestRoundedStoresRoundedStates checks that every stored state (the start
// included) of a Rounded run is a fixed point of the rounding, and with
// Stages that the field only ever sees rounded inputs.
func TestRoundedStoresRoundedStates(t *testing.T) {
	for _, r := range []Rounding{Bits(24), Bits(11), Places(3), Digits(5), {Kind: BinaryBits, N: 24, Stages: true}} {
		p := lorenzProblem()
		inner := p.F
		seen := 0
		if r.Stages {
			p.F = func(tt float64, y, d []float64) {
				for i, v := range y {
					if r.Round(v) != v {
						t.Fatalf("%v: field called with unrounded y[%d] = %v", r, i, v)
					}
				}
				seen++
				inner(tt, y, d)
			}
		}
		sol, err := Solve(context.Background(), p, 2, Rounded(DormandPrince54, r), &Settings{RelTol: 1e-8, AbsTol: 1e-8})
		if err != nil {
			t.Fatal(err)
		}
		st, err := NewStepper(p, 2, Rounded(DormandPrince54, r), nil)
		if err != nil {
			t.Fatal(err)
		}
		for i, v := range st.Y() {
			if r.Round(v) != v || v == p.Y0[i] && r.Round(p.Y0[i]) != p.Y0[i] {
				t.Errorf("%v: start component %d = %v is not rounded", r, i, v)
			}
		}
		for k := 1; k < len(sol.T); k++ {
			for i, v := range sol.Y[k*3 : k*3+3] {
				if r.Round(v) != v {
					t.Fatalf("%v: state %d component %d = %v is not rounded", r, k, i, v)
				}
			}
		}
		if r.Stages && seen == 0 {
			t.Errorf("%v: field never called", r)
		}
		if p.Y0[0] != 1.1 {
			t.Errorf("caller's Y0 was written: %v", p.Y0)
		}
	}
}

// TestRounded53IsIdentity checks that rounding to 53 bits changes nothing:
// the trajectory is bit-identical to the plain method's (exact identity; the
// extra evaluation at the rounded state repeats the FSAL one exactly).
func TestRounded53IsIdentity(t *testing.T) {
	p := lorenzProblem()
	s := &Settings{RelTol: 1e-9, AbsTol: 1e-9}
	a, err := Solve(context.Background(), p, 5, DormandPrince54, s)
	if err != nil {
		t.Fatal(err)
	}
	b, err := Solve(context.Background(), p, 5, Rounded(DormandPrince54, Bits(53)), s)
	if err != nil {
		t.Fatal(err)
	}
	if len(a.T) != len(b.T) {
		t.Fatalf("steps %d vs %d", len(b.T), len(a.T))
	}
	for i := range a.Y {
		if math.Float64bits(a.Y[i]) != math.Float64bits(b.Y[i]) {
			t.Fatalf("Y[%d] = %v, want %v bit for bit", i, b.Y[i], a.Y[i])
		}
	}
	if b.Stats.Evaluations != a.Stats.Evaluations+b.Stats.Accepted {
		t.Errorf("evaluations %d, want %d + one per accepted step (%d)", b.Stats.Evaluations, a.Stats.Evaluations, b.Stats.Accepted)
	}
	if got, want := b.Method, "Dormand–Prince 5(4) (53 bits)"; got != want {
		t.Errorf("Method = %q, want %q", got, want)
	}
}

// TestRoundedNoAllocs checks that stepping with a rounded method does not
// allocate (binary and decimal rules, with and without stages).
func TestRoundedNoAllocs(t *testing.T) {
	for _, r := range []Rounding{Bits(24), Places(3), Digits(6), {Kind: BinaryBits, N: 24, Stages: true}} {
		st, err := NewStepper(lorenzProblem(), 1e6, Rounded(nil, r), &Settings{RelTol: 1e-8, AbsTol: 1e-8})
		if err != nil {
			t.Fatal(err)
		}
		ctx := context.Background()
		if a := testing.AllocsPerRun(100, func() { st.Next(ctx) }); a != 0 {
			t.Errorf("%v: %v allocations per step, want 0", r, a)
		}
	}
}

// FuzzRoundBits compares the bit rounding with math/big on arbitrary bit
// patterns and precisions.
func FuzzRoundBits(f *testing.F) {
	f.Add(uint64(0x3ff0000001000000), 24)
	f.Add(uint64(3), 1)
	f.Fuzz(func(t *testing.T, b uint64, p int) {
		x := math.Float64frombits(b)
		if math.IsNaN(x) || p < 1 || p > 53 {
			return
		}
		if got, want := Bits(p).Round(x), bigRound(x, p); math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("Bits(%d).Round(%v) = %v, want %v (math/big)", p, x, got, want)
		}
	})
}
