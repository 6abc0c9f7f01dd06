package bigadd

import (
	"math/big"
	"math/rand/v2"
	"testing"

	"github.com/stretchr/testify/require"
)

// TestMatchesMathBig: Add and Sub give the bits of big.Float's own Add and
// Sub (the reference library, math/big) for every rounding mode, on
// operands near, far and at the edge of the stand-in's threshold, with
// exponents kept small enough that math/big's exact alignment stays cheap.
func TestMatchesMathBig(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	modes := []big.RoundingMode{big.ToNearestEven, big.ToNearestAway, big.ToZero, big.AwayFromZero, big.ToNegativeInf, big.ToPositiveInf}
	for i := 0; i < 20000; i++ {
		px, py, pz := uint(1+rng.IntN(200)), uint(1+rng.IntN(200)), uint(1+rng.IntN(200))
		x := randFloat(rng, px, 0)
		y := randFloat(rng, py, rng.IntN(900)-450)
		if rng.IntN(2) == 0 {
			x, y = y, x
		}
		mode := modes[rng.IntN(len(modes))]
		want := new(big.Float).SetPrec(pz).SetMode(mode).Add(x, y)
		got := Add(new(big.Float).SetPrec(pz).SetMode(mode), x, y)
		require.Equalf(t, want.Text('p', 0), got.Text('p', 0), "Add(%v, %v) at prec %d, mode %v (math/big)", x.Text('p', 0), y.Text('p', 0), pz, mode)
		want = new(big.Float).SetPrec(pz).SetMode(mode).Sub(x, y)
		got = Sub(new(big.Float).SetPrec(pz).SetMode(mode), x, y)
		require.Equalf(t, want.Text('p', 0), got.Text('p', 0), "Sub(%v, %v) at prec %d, mode %v (math/big)", x.Text('p', 0), y.Text('p', 0), pz, mode)
	}
}

// randFloat is a random value of precision p with its binary exponent
// shifted by e; half of them are 1 + 2^-k, which sit on a rounding tie of
// lower precisions.
func randFloat(rng *rand.Rand, p uint, e int) *big.Float {
	f := new(big.Float).SetPrec(p)
	f.SetFloat64(rng.Float64() + 0.5)
	if rng.IntN(2) == 0 {
		f.SetFloat64(1 + 1.0/float64(uint64(1)<<uint(1+rng.IntN(50))))
	}
	if rng.IntN(2) == 0 {
		f.Neg(f)
	}
	return f.SetMantExp(f, e)
}

// TestFarApartIsCheap: operands 2^30 binary places apart, which math/big
// aligns with a 128 MB shift, give the larger operand.
func TestFarApartIsCheap(t *testing.T) {
	one := new(big.Float).SetPrec(100).SetInt64(1)
	tiny := new(big.Float).SetPrec(100).SetMantExp(big.NewFloat(1), -1<<30)
	z := new(big.Float).SetPrec(100)
	require.Equal(t, 0, Add(z, one, tiny).Cmp(one), "1 + 2^-2^30 rounds to 1 at 100 bits (exact identity)")
	require.Equal(t, 0, Sub(z, tiny, one).Cmp(new(big.Float).Neg(one)), "2^-2^30 - 1 rounds to -1 at 100 bits (exact identity)")
	allocs := testing.AllocsPerRun(10, func() { Add(z, one, tiny) })
	require.LessOrEqual(t, allocs, 2.0, "no mantissa as long as the exponent gap")
}
