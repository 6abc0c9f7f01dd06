package plumb

import (
	"context"
	"errors"
	"math"
	"math/big"
	"strconv"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
)

// TestReferenceManyDigits runs Reference past the float64 range of
// 10^-Digits (it underflows beyond about 323 digits): at 400 and 1000
// digits, over a short span so that the test is quick. The runs at 400 and
// 1000 digits approximate the same solution, so their difference bounds the
// error of the 400-digit run (exact identity: the solution is unique); a
// run at D digits makes local errors about 10^-D·|y| per step (|y| <= 50 on
// the attractor, see TestReferenceLorenzStored), summed over a few steps
// of a span of 0.02 with no noticeable growth (e^(λ_1·0.02) ≈ 1.02), so
// the difference must be below 10^-396 (manyDigitsSlack decades of slack).
func TestReferenceManyDigits(t *testing.T) {
	sys, _ := Model("lorenz")
	const t1 = 0.02
	// manyDigitsSlack allows 50·(a few steps)·e^(λ_1 t1) ≈ 10^3.5 above
	// 10^-400 (common practice: the bound of TestReferenceLorenzStored).
	const manyDigitsSlack = 4
	runs := map[int]*referenceResult{}
	for _, d := range []int{400, 1000} {
		r, err := referenceRun(context.Background(), sys, t1, []float64{0.01}, &referenceSettings{Digits: d, NoCheck: true})
		if err != nil {
			t.Fatalf("Digits %d: %v", d, err)
		}
		if r.Digits != d || r.Arithmetic != "big.Float" || r.Order < 1 || r.Order > integrate.MaxTaylorOrder {
			t.Errorf("Digits %d: got digits %d, %s, order %d (want big.Float, order in [1, %d])", d, r.Digits, r.Arithmetic, r.Order, integrate.MaxTaylorOrder)
		}
		runs[d] = r
	}
	// The Jorba–Zou order ceil(D·ln 10/2) + 1 (Jorba & Zou 2005, Sect.
	// 3.2): 462 at 400 digits; at 1000 digits it would be 1153, capped.
	if got := runs[400].Order; got != 462 {
		t.Errorf("order at 400 digits = %d, want ceil(400·ln 10/2) + 1 = 462", got)
	}
	if got := runs[1000].Order; got != integrate.MaxTaylorOrder {
		t.Errorf("order at 1000 digits = %d, want the cap %d", got, integrate.MaxTaylorOrder)
	}
	bound, _ := new(big.Float).SetPrec(4000).SetString("1e-" + strconv.Itoa(400-manyDigitsSlack))
	for k := range runs[400].States {
		d := new(big.Float).SetPrec(4000)
		for i := range runs[400].States[k] {
			d.Sub(runs[400].States[k][i], runs[1000].States[k][i])
			if d.Abs(d).Cmp(bound) > 0 {
				t.Errorf("t = %g, component %d: 400- and 1000-digit runs differ by %.3g, want below 1e-%d", runs[400].Times[k], i, d, 400-manyDigitsSlack)
			}
		}
	}
}

// TestReferenceDigitsRefuses checks that referenceDigits refuses input that
// gives no precision instead of returning a silent default.
func TestReferenceDigitsRefuses(t *testing.T) {
	inf, nan := math.Inf(1), math.NaN()
	cases := []struct {
		name                  string
		lambda, T, tol, scale float64
	}{
		{"span Inf", 1, inf, 1, 1},
		{"span NaN", 1, nan, 1, 1},
		{"span negative", 1, -1, 1, 1},
		{"lambda Inf", inf, 1, 1, 1},
		{"lambda NaN", nan, 1, 1, 1},
		{"tol zero", 1, 1, 0, 1},
		{"tol Inf", 1, 1, inf, 1},
		{"scale NaN", 1, 1, 1, nan},
		// 0.9·1e5/ln 10 ≈ 39000 digits, beyond maxReferenceDigits.
		{"too many digits", 0.9, 1e5, 1, 1},
	}
	for _, c := range cases {
		d, err := referenceDigits(c.lambda, c.T, c.tol, c.scale)
		if !errors.Is(err, integrate.ErrSettings) {
			t.Errorf("%s: referenceDigits = %d, %v; want an error wrapping ErrSettings", c.name, d, err)
		}
	}
	// The rule itself, past the float64 range of 10^-D: λ = 0.9 over
	// T = 1e4 at tol 1e-3, scale 1: ceil(0.9·1e4/ln 10 + 3) + 4 digits
	// (arithmetic of the documented formula).
	want := int(math.Ceil(0.9*1e4/math.Ln10+3)) + guardDigits
	if d, err := referenceDigits(0.9, 1e4, 1e-3, 1); err != nil || d != want {
		t.Errorf("referenceDigits(0.9, 1e4, 1e-3, 1) = %d, %v; want %d", d, err, want)
	}
}
