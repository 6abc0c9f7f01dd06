package ival

import (
	"math/big"
	"testing"
)

// machinPi returns π to about prec bits by Machin's formula
// π = 16 atan(1/5) - 4 atan(1/239) in plain round-to-nearest math/big, a
// formula independent of the one piEnc uses (Euler's atan(1/2) + atan(1/3)).
func machinPi(prec uint) *big.Float {
	atanInv := func(n int64) *big.Float {
		x := new(big.Float).SetPrec(prec).Quo(big.NewFloat(1), new(big.Float).SetInt64(n))
		x2 := new(big.Float).SetPrec(prec).Mul(x, x)
		sum := new(big.Float).SetPrec(prec).Set(x)
		t := new(big.Float).SetPrec(prec).Set(x)
		for k := int64(3); k < int64(prec); k += 2 {
			t.Mul(t, x2)
			q := new(big.Float).SetPrec(prec).Quo(t, new(big.Float).SetInt64(k))
			if k%4 == 3 {
				sum.Sub(sum, q)
			} else {
				sum.Add(sum, q)
			}
		}
		return sum
	}
	p := new(big.Float).SetPrec(prec).Mul(atanInv(5), big.NewFloat(16))
	return p.Sub(p, new(big.Float).SetPrec(prec).Mul(atanInv(239), big.NewFloat(4)))
}

// atanhLn2 returns ln 2 = 2 atanh(1/3) by its series in round-to-nearest
// math/big (independent of ln2Enc's Σ 1/(k 2^k)).
func atanhLn2(prec uint) *big.Float {
	z := new(big.Float).SetPrec(prec).Quo(big.NewFloat(1), big.NewFloat(3))
	z2 := new(big.Float).SetPrec(prec).Mul(z, z)
	sum := new(big.Float).SetPrec(prec).Set(z)
	t := new(big.Float).SetPrec(prec).Set(z)
	for k := int64(3); k < int64(prec); k += 2 {
		t.Mul(t, z2)
		sum.Add(sum, new(big.Float).SetPrec(prec).Quo(t, new(big.Float).SetInt64(k)))
	}
	return sum.Mul(sum, big.NewFloat(2))
}

// TestConstants checks the π and ln 2 enclosures at the kernel precision
// and at the 1300 bits that the reduction of arguments near MaxFloat64
// uses, against independent series at 64 more bits: the reference must be
// inside the enclosure up to 2^-(p+40) relative (the reference's own
// rounding error over a few hundred terms), and the enclosure narrower
// than 2^-(p-4) relative.
func TestConstants(t *testing.T) {
	for _, p := range []uint{64, kprec, 1300} {
		for _, c := range []struct {
			name string
			enc  benc
			ref  *big.Float
		}{
			{"pi", piEnc(p), machinPi(p + 64)},
			{"ln2", ln2Const(p), atanhLn2(p + 64)},
		} {
			slack := new(big.Float).SetMantExp(c.ref, -int(p)-40)
			lo := new(big.Float).SetPrec(p+64).Add(c.enc.lo, new(big.Float).Neg(slack))
			hi := new(big.Float).SetPrec(p+64).Add(c.enc.hi, slack)
			if lo.Cmp(c.ref) > 0 || hi.Cmp(c.ref) < 0 {
				t.Errorf("%s at %d bits: [%s, %s] misses %s", c.name, p, c.enc.lo.Text('g', 40), c.enc.hi.Text('g', 40), c.ref.Text('g', 40))
			}
			w := new(big.Float).Sub(c.enc.hi, c.enc.lo)
			if w.Cmp(new(big.Float).SetMantExp(c.ref, -int(p)+4)) > 0 {
				t.Errorf("%s at %d bits: width %s too large", c.name, p, w.Text('g', 5))
			}
		}
	}
}

// TestBigSqrtDirected checks the verified big square roots against exact
// squares (an exact identity: lo² <= v <= hi²).
func TestBigSqrtDirected(t *testing.T) {
	for _, v := range []float64{2, 3, 0.5, 1e-300, 1e300, 4, 0x1p-1074} {
		b := new(big.Float).SetFloat64(v)
		lo, hi := sqrtDownBig(b, 100), sqrtUpBig(b, 100)
		if new(big.Float).SetPrec(400).Mul(lo, lo).Cmp(b) > 0 || new(big.Float).SetPrec(400).Mul(hi, hi).Cmp(b) < 0 {
			t.Errorf("sqrt(%g): [%s, %s] does not bracket", v, lo.Text('g', 30), hi.Text('g', 30))
		}
		if d := new(big.Float).Sub(hi, lo); d.Cmp(new(big.Float).Mul(ulpOf(hi, 100), big.NewFloat(2))) > 0 {
			t.Errorf("sqrt(%g): bracket wider than two ulps at 100 bits", v)
		}
	}
}
