package maps

import (
	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/internal/dd"
)

// logistic is the logistic map x -> r·x·(1-x) (May 1976) in float64 and
// double-double, with its derivative.
func logistic(r float64) *Map {
	m, err := New(1, Funcs{
		Next:     func(x, dst []float64) { dst[0] = float64(r*x[0]) * (1 - x[0]) },
		Jacobian: func(x []float64, dst *mat.Dense) { dst.Set(0, 0, r-float64(2*r*x[0])) },
		NextDD: func(x, dst []DoubleDouble) error {
			dst[0] = dd.Mul(dd.MulFloat(x[0], r), dd.Sub(dd.From(1), x[0]))
			return nil
		},
	}, nil)
	if err != nil {
		panic(err)
	}
	return m
}

// henon is the Hénon map (x, y) -> (1 - a·x² + y, b·x) (Hénon 1976) at
// a = 1.4, b = 0.3, in float64 and double-double, with its Jacobian.
func henon() *Map {
	const a, b = 1.4, 0.3
	m, err := New(2, Funcs{
		Next: func(x, dst []float64) {
			x0, y0 := x[0], x[1]
			dst[0], dst[1] = 1-float64(a*float64(x0*x0))+y0, b*x0
		},
		Jacobian: func(x []float64, dst *mat.Dense) {
			dst.Set(0, 0, -2*a*x[0])
			dst.Set(0, 1, 1)
			dst.Set(1, 0, b)
			dst.Set(1, 1, 0)
		},
		NextDD: func(x, dst []DoubleDouble) error {
			x0, y0 := x[0], x[1]
			dst[0] = dd.Add(dd.Sub(dd.From(1), dd.MulFloat(dd.Mul(x0, x0), a)), y0)
			dst[1] = dd.MulFloat(x0, b)
			return nil
		},
	}, nil)
	if err != nil {
		panic(err)
	}
	return m
}
