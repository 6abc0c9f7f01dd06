package lyap

import (
	"math"
	"math/rand/v2"
	"testing"
)

// denseTangent is J·V by the full triple loop, every term kept: the product
// mulTangent must reproduce bit for bit.
func denseTangent(dst, jd, v []float64, n, k int) {
	for i := 0; i < n; i++ {
		for j := 0; j < k; j++ {
			var s float64
			for l := 0; l < n; l++ {
				s += float64(jd[i*n+l] * v[l*k+j])
			}
			dst[i*k+j] = s
		}
	}
}

// TestMulTangentBits checks mulTangent against the full product on random
// matrices with most entries zero (both +0 and -0) and with sums that
// cancel to zero, for the unrolled n = 3 kernel and the general one. The
// expected values are an exact identity: skipping a zero term changes no
// bit of a sum of finite terms, so the bits must agree.
func TestMulTangentBits(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, n := range []int{1, 2, 3, 4, 7, 40} {
		for _, k := range []int{1, (n + 1) / 2, n} {
			jd := make([]float64, n*n)
			v := make([]float64, n*k)
			got := make([]float64, n*k)
			want := make([]float64, n*k)
			for trial := 0; trial < 50; trial++ {
				for i := range jd {
					switch r := rng.IntN(10); {
					case r < 5:
						jd[i] = 0
					case r < 7:
						jd[i] = math.Copysign(0, -1)
					case r < 8:
						jd[i] = 1 // with v = ±1 below, sums that cancel exactly
					default:
						jd[i] = rng.NormFloat64()
					}
				}
				for i := range v {
					switch rng.IntN(4) {
					case 0:
						v[i] = 1
					case 1:
						v[i] = -1
					case 2:
						v[i] = math.Copysign(0, -1)
					default:
						v[i] = rng.NormFloat64()
					}
				}
				mulTangent(got, jd, v, n, k)
				denseTangent(want, jd, v, n, k)
				for i := range got {
					if math.Float64bits(got[i]) != math.Float64bits(want[i]) {
						t.Fatalf("n=%d k=%d trial %d: entry %d = %v (bits %x), full product %v (bits %x)",
							n, k, trial, i, got[i], math.Float64bits(got[i]), want[i], math.Float64bits(want[i]))
					}
				}
			}
		}
	}
}

// TestMulTangentNoAlloc: the tangent product runs at every evaluation of
// the augmented field and must not allocate.
func TestMulTangentNoAlloc(t *testing.T) {
	for _, n := range []int{3, 40} {
		jd, v, dst := make([]float64, n*n), make([]float64, n*n), make([]float64, n*n)
		if a := testing.AllocsPerRun(100, func() { mulTangent(dst, jd, v, n, n) }); a != 0 {
			t.Errorf("n=%d: %v allocations per product", n, a)
		}
	}
}
