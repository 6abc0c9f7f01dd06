package plumb

import (
	"math"
	"os"
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

// TestSparseJacFill: a formula system's Jacobian gives the same bits into
// a contiguous 3×3 matrix (the entries scattered from the evaluator's
// registers) as into a view of a larger matrix (through the buffer and
// set): both paths run the same compiled program, so the check is an
// exact identity; the structural zero of the lab-loop equations,
// d(rate 0)/d(profile), must be +0.
func TestSparseJacFill(t *testing.T) {
	f, err := os.Open("examples/systems/lab-loop.json")
	require.NoError(t, err)
	defer f.Close()
	sys, err := LoadSystem(f)
	require.NoError(t, err)
	p := sys.Problem()
	y := []float64{1.5, -2.25, 30.125}
	full := mat.NewDense(3, 3, nil)
	big := mat.NewDense(5, 6, nil)
	for _, m := range []*mat.Dense{full, big} {
		r, c := m.Dims()
		for i := 0; i < r; i++ {
			for j := 0; j < c; j++ {
				m.Set(i, j, math.NaN())
			}
		}
	}
	view := big.Slice(1, 4, 2, 5).(*mat.Dense)
	p.Jac(0.5, y, full)
	p.Jac(0.5, y, view)
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			require.Equalf(t, math.Float64bits(full.At(i, j)), math.Float64bits(view.At(i, j)), "entry (%d, %d)", i, j)
		}
	}
	require.Equal(t, uint64(0), math.Float64bits(full.At(0, 2)), "d(prandtl*(across - speed))/d(profile) is a structural +0")
	// The exact entries of J = [[-σ, σ, 0], [ρ - z, -1, -x], [y, x, -β]]
	// (exact identity: each is one operation on exact inputs).
	require.Equal(t, 28-30.125, full.At(1, 0))
	require.Equal(t, -1.5, full.At(1, 2))
	require.Equal(t, -2.25, full.At(2, 0))
	p.Jac(0.5, y, nil) // a nil matrix: nothing written, no panic
}
