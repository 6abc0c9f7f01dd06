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
// of an (n+1)×(n+1) matrix, which the direct path turns down): an exact identity, the
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
