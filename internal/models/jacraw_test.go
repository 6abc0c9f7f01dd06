package models

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestJacobianStorage checks that every flow's Jacobian writes the same bits
// into a compact matrix and into a view of a larger matrix (the 3-D flows
// write the rows of either directly) as through Set (into the leading block
// of an (n+1)×(n+1) matrix, which rows3 turns down): an exact identity, the
// same expressions every way.
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
			view := mat.NewDense(n+1, n+1, nil).Slice(1, n+1, 1, n+1).(*mat.Dense)
			wide := mat.NewDense(n+1, n+1, nil) // not n×n: written through Set
			jf(0, x, compact)
			jf(0, x, view)
			jf(0, x, wide)
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					a, b, c := compact.At(i, j), view.At(i, j), wide.At(i, j)
					if math.Float64bits(a) != math.Float64bits(c) || math.Float64bits(b) != math.Float64bits(c) {
						t.Errorf("%s: J[%d][%d] = %v compact, %v in a view, %v through Set", name, i, j, a, b, c)
					}
				}
			}
		}
	}
}

// TestRows3 checks which matrices rows3 writes directly, and that it
// hands out the rows of a view (a wider stride), not its backing array.
func TestRows3(t *testing.T) {
	big := mat.NewDense(4, 4, nil)
	r0, r1, r2, ok := rows3(big.Slice(1, 4, 1, 4).(*mat.Dense))
	if !ok {
		t.Fatal("a 3×3 view with stride 4: want its rows")
	}
	r0[0], r1[1], r2[2] = 1, 2, 3
	if big.At(1, 1) != 1 || big.At(2, 2) != 2 || big.At(3, 3) != 3 || big.At(1, 0) != 0 || big.At(0, 1) != 0 {
		t.Errorf("wrote the wrong entries:\n%v", mat.Formatted(big))
	}
	if _, _, _, ok := rows3(mat.NewDense(2, 2, nil)); ok {
		t.Error("a 2×2 matrix: want ok = false")
	}
	if _, _, _, ok := rows3(mat.NewDense(3, 4, nil)); ok {
		t.Error("a 3×4 matrix: want ok = false")
	}
}
