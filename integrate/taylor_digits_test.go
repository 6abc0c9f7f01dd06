package integrate

import (
	"context"
	"math/big"
	"strconv"
	"testing"
)

// TestSolveTaylorManyDigits integrates y' = -y², y(0) = 1 to t = 1 at 400
// and 1000 digits, where 10^-Digits underflows float64, against the exact
// solution 1/(1+t) (exact identity) computed in math/big. The flow
// contracts, so the error is a few local errors of 10^-Digits each: the
// bound is 10^(2-Digits) (the tolerance of TestSolveTaylorExact).
func TestSolveTaylorManyDigits(t *testing.T) {
	times := []float64{0.5, 1}
	for _, d := range []int{400, 1000} {
		r, err := SolveTaylor(context.Background(), riccati{}, 0, []float64{1}, times, &TaylorSettings{Digits: d})
		if err != nil {
			t.Fatalf("Digits %d: %v", d, err)
		}
		// Jorba & Zou (2005, Sect. 3.2): order ceil(D·ln 10/2) + 1,
		// capped at MaxTaylorOrder.
		if want := min(TaylorOrderDigits(d), MaxTaylorOrder); r.Order != want || r.Order < 2 {
			t.Errorf("Digits %d: order %d, want %d", d, r.Order, want)
		}
		prec := r.Prec + 64
		bound, _ := new(big.Float).SetPrec(prec).SetString("1e-" + strconv.Itoa(d-2))
		for k, tk := range times {
			want := new(big.Float).SetPrec(prec).Quo(big.NewFloat(1), big.NewFloat(1+tk))
			e := new(big.Float).SetPrec(prec).Sub(r.States[k][0], want)
			if e.Abs(e).Cmp(bound) > 0 {
				t.Errorf("Digits %d: y(%g) off by %.3g, want below %.3g", d, tk, e, bound)
			}
		}
	}
}

// TestTaylorOrderDigits checks the order rule from the digits against the
// one from eps where eps is representable, and that an underflowed eps
// gives no order instead of an overflowed one.
func TestTaylorOrderDigits(t *testing.T) {
	for _, d := range []int{8, 20, 31, 100, 300} {
		// 10^-d is a float64 here: the two forms of ceil(d·ln 10/2) + 1
		// must agree (same formula).
		if a, b := TaylorOrderDigits(d), TaylorOrder(pow10neg(d)); a != b {
			t.Errorf("digits %d: TaylorOrderDigits %d, TaylorOrder(1e-%d) %d", d, a, d, b)
		}
	}
	if got := TaylorOrder(0); got != 0 {
		t.Errorf("TaylorOrder(0) = %d, want 0 (no order for an underflowed eps)", got)
	}
	if got := TaylorOrderDigits(1000); got != 1153 {
		t.Errorf("TaylorOrderDigits(1000) = %d, want ceil(1000·ln 10/2) + 1 = 1153", got)
	}
}

func pow10neg(d int) float64 {
	f, _ := strconv.ParseFloat("1e-"+strconv.Itoa(d), 64)
	return f
}
