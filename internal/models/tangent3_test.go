package models

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestTangent3Bits checks every flow's fused evaluation against its Field and
// Jac at random states and tangent vectors, bit for bit (an exact identity:
// the same expressions, and the sums of lyap's product,
// ((0 + J[i][0]·v[c]) + J[i][1]·v[3+c]) + J[i][2]·v[6+c] with unfused
// products and the trace ((0 + J00) + J11) + J22, where leaving out a term of
// a zero entry changes no bit). Parameters are the defaults and a random
// perturbation of them; tangent vectors include exact zeros, so that a -0
// product meets the +0 start of a sum.
func TestTangent3Bits(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	found := 0
	for _, name := range Names() {
		m, _ := Lookup(name)
		if m.Tangent3 == nil {
			continue
		}
		found++
		if len(m.Y0) != 3 || m.Jac == nil || m.Map {
			t.Fatalf("%s: Tangent3 on a system that is not a 3-D flow with a Jacobian", name)
		}
		for pt := 0; pt < 3; pt++ {
			p := m.Defaults()
			if pt > 0 {
				for i := range p {
					p[i] *= 1 + 0.3*rng.NormFloat64()
				}
			}
			field, jac, tf := m.Field(p), m.Jac(p), m.Tangent3(p)
			J := mat.NewDense(3, 3, nil)
			for trial := 0; trial < 200; trial++ {
				var x, f, fx [3]float64
				var v, dv [9]float64
				for i := range x {
					x[i] = m.Y0[i] + 10*rng.NormFloat64()
				}
				for i := range v {
					switch rng.IntN(6) {
					case 0:
						v[i] = 0
					case 1:
						v[i] = math.Copysign(0, -1)
					default:
						v[i] = rng.NormFloat64()
					}
				}
				field(0, x[:], f[:])
				jac(0, x[:], J)
				xc := x
				tr := tf(0, &xc, &fx, &v, &dv)
				for i := 0; i < 3; i++ {
					if math.Float64bits(fx[i]) != math.Float64bits(f[i]) {
						t.Fatalf("%s p=%v x=%v: dx[%d] = %v, Field gives %v", name, p, x, i, fx[i], f[i])
					}
					for c := 0; c < 3; c++ {
						var s float64
						for l := 0; l < 3; l++ {
							s += float64(J.At(i, l) * v[3*l+c])
						}
						if math.Float64bits(dv[3*i+c]) != math.Float64bits(s) {
							t.Fatalf("%s p=%v x=%v v=%v: dv[%d] = %v, J·v gives %v", name, p, x, v, 3*i+c, dv[3*i+c], s)
						}
					}
				}
				var want float64
				want += J.At(0, 0)
				want += J.At(1, 1)
				want += J.At(2, 2)
				if math.Float64bits(tr) != math.Float64bits(want) {
					t.Fatalf("%s p=%v x=%v: trace %v, want %v", name, p, x, tr, want)
				}
				if xc != x {
					t.Fatalf("%s: Tangent3 wrote its state argument", name)
				}
			}
		}
	}
	if found < 2 {
		t.Errorf("%d flows with Tangent3, want lorenz and rossler at least", found)
	}
}
