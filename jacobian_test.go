package plumb

import (
	"math"
	"testing"

	"github.com/stretchr/testify/require"
	"gonum.org/v1/gonum/mat"
)

// TestSparseJacSet writes a pattern into matrices full of NaN: every entry
// given must land at its place and every other one must be zero (exact
// identity: set stores the values and zeros, nothing is computed), for a
// small system (zeros stored one by one), a large one (cleared first) and
// a view into a larger matrix (another stride, its own path).
func TestSparseJacSet(t *testing.T) {
	for _, n := range []int{1, 3, 8, 9} {
		var at []int
		for ij := 0; ij < n*n; ij++ {
			if ij%3 != 1 { // every third entry structurally zero
				at = append(at, ij)
			}
		}
		vals := make([]float64, len(at))
		for k := range vals {
			vals[k] = float64(k + 1)
		}
		want := mat.NewDense(n, n, nil)
		for k, ij := range at {
			want.Set(ij/n, ij%n, vals[k])
		}
		sp := newSparseJac(n, at)
		require.Equalf(t, n*n <= sparseZeroMax, sp.zero != nil, "n = %d: zero offsets kept exactly for small systems", n)

		full := mat.NewDense(n, n, nil)
		big := mat.NewDense(n+2, n+3, nil)
		for _, m := range []*mat.Dense{full, big} {
			r, c := m.Dims()
			for i := 0; i < r; i++ {
				for j := 0; j < c; j++ {
					m.Set(i, j, math.NaN())
				}
			}
		}
		view := big.Slice(1, 1+n, 2, 2+n).(*mat.Dense)
		for _, dst := range []*mat.Dense{full, view} {
			sp.set(dst, vals)
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					require.Equalf(t, math.Float64bits(want.At(i, j)), math.Float64bits(dst.At(i, j)),
						"n = %d: entry (%d, %d) = %v, want %v", n, i, j, dst.At(i, j), want.At(i, j))
				}
			}
		}
		// Outside the view, nothing was written.
		require.Truef(t, math.IsNaN(big.At(0, 0)) && math.IsNaN(big.At(n+1, n+2)), "n = %d: set wrote outside the view", n)
	}
	newSparseJac(3, []int{0}).set(nil, []float64{1}) // a nil dst: nothing, no panic
}
