package lyap_test

import (
	"context"
	"fmt"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
	"gonum.org/v1/gonum/mat"
)

// A lab's convection loop, written by hand as the three-mode model
// x' = 10(y - x), y' = x(28 - z) - y, z' = xy - 8z/3, with its Jacobian.
// Its owner also writes the fused evaluation (the field and J·V in one call,
// the sums in the order of the contract, J[0][2] = 0 left out): the spectrum
// comes out bit for bit the same, at lower cost per evaluation.
func ExampleTangent3() {
	const s, r, b = 10.0, 28.0, 8.0 / 3
	p := integrate.Problem{
		F: func(_ float64, y, d []float64) {
			d[0] = s * (y[1] - y[0])
			d[1] = float64(y[0]*(r-y[2])) - y[1]
			d[2] = float64(y[0]*y[1]) - float64(b*y[2])
		},
		Jac: func(_ float64, y []float64, j *mat.Dense) {
			j.Set(0, 0, -s)
			j.Set(0, 1, s)
			j.Set(0, 2, 0)
			j.Set(1, 0, r-y[2])
			j.Set(1, 1, -1)
			j.Set(1, 2, -y[0])
			j.Set(2, 0, y[1])
			j.Set(2, 1, y[0])
			j.Set(2, 2, -b)
		},
		Y0: []float64{1, 1, 1},
	}
	fused := func(_ float64, x, dx *[3]float64, v, dv *[9]float64) float64 {
		dx[0] = s * (x[1] - x[0])
		dx[1] = float64(x[0]*(r-x[2])) - x[1]
		dx[2] = float64(x[0]*x[1]) - float64(b*x[2])
		for c := 0; c < 3; c++ { // column c of J·V
			var s0, s1, s2 float64
			s0 += float64(-s * v[c])
			s0 += float64(s * v[3+c])
			s1 += float64((r - x[2]) * v[c])
			s1 += float64(-1 * v[3+c])
			s1 += float64(-x[0] * v[6+c])
			s2 += float64(x[1] * v[c])
			s2 += float64(x[0] * v[3+c])
			s2 += float64(-b * v[6+c])
			dv[c], dv[3+c], dv[6+c] = s0, s1, s2
		}
		var tr float64 // ((0 + J00) + J11) + J22
		tr += -s
		tr += -1
		tr += -b
		return tr
	}
	set := lyap.Settings{Duration: 200, Transient: 20}
	plain, err := lyap.Exponents(context.Background(), p, 3, &set)
	if err != nil {
		fmt.Println(err)
		return
	}
	set.Tangent3 = fused
	quick, err := lyap.Exponents(context.Background(), p, 3, &set)
	if err != nil {
		fmt.Println(err)
		return
	}
	// The largest exponent of this model is about 0.906 (J. C. Sprott,
	// Chaos and Time-Series Analysis, 2003, Appendix A; from memory).
	fmt.Printf("largest exponent %.2f per time unit\n", quick.Exponents[0])
	same := plain.Stats == quick.Stats
	for i := range plain.Exponents {
		same = same && plain.Exponents[i] == quick.Exponents[i]
	}
	fmt.Println("the same spectrum:", same)
	// Output:
	// largest exponent 0.91 per time unit
	// the same spectrum: true
}
