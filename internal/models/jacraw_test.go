package models

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestJacobianStorage checks that every flow's Jacobian writes the same bits
// into a compact matrix (where the 3-D flows write their entries directly)
// as into a view of a larger matrix (where they go through Set): an exact
// identity, the same expressions either way.
func TestJacobianStorage(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, name := range Names() {
		m, _ := Lookup(name)
		if m.Jac == nil {
			continue
		}
		n := len(m.Y0)
		jf := m.Jac(m.Defaults())
		for trial := 0; trial < 5; trial++ {
			x := make([]float64, n)
			for i := range x {
				x[i] = m.Y0[i] + rng.NormFloat64()
			}
			compact := mat.NewDense(n, n, nil)
			big := mat.NewDense(n+1, n+1, nil)
			view := big.Slice(0, n, 0, n).(*mat.Dense)
			jf(0, x, compact)
			jf(0, x, view)
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					a, b := compact.At(i, j), view.At(i, j)
					if math.Float64bits(a) != math.Float64bits(b) {
						t.Errorf("%s: J[%d][%d] = %v compact, %v through Set", name, i, j, a, b)
					}
				}
			}
		}
	}
}

// TestEntries3 checks which matrices entries3 writes directly.
func TestEntries3(t *testing.T) {
	if entries3(mat.NewDense(3, 3, nil)) == nil {
		t.Error("a compact 3×3 matrix: want its entries")
	}
	if entries3(mat.NewDense(4, 4, nil).Slice(0, 3, 0, 3).(*mat.Dense)) != nil {
		t.Error("a 3×3 view with stride 4: want nil")
	}
	if entries3(mat.NewDense(2, 2, nil)) != nil {
		t.Error("a 2×2 matrix: want nil")
	}
}
