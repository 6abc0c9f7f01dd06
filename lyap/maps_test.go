package lyap

import "gonum.org/v1/gonum/mat"

// henon is the Hénon map x' = 1 + y − a x², y' = b x (M. Hénon, A
// two-dimensional mapping with a strange attractor, Commun. Math. Phys. 50
// (1976) 69–77).
type henon struct{ a, b float64 }

func (henon) Dim() int { return 2 }
func (m henon) Next(x, dst []float64) {
	x0, y0 := x[0], x[1]
	dst[0] = 1 + y0 - float64(m.a*float64(x0*x0))
	dst[1] = m.b * x0
}
func (m henon) Jacobian(x []float64, dst *mat.Dense) {
	dst.Set(0, 0, -2*m.a*x[0])
	dst.Set(0, 1, 1)
	dst.Set(1, 0, m.b)
	dst.Set(1, 1, 0)
}

// logistic is the logistic map x' = r x (1 − x) (R. M. May, Simple
// mathematical models with very complicated dynamics, Nature 261 (1976)
// 459–467).
type logistic struct{ r float64 }

func (logistic) Dim() int                               { return 1 }
func (m logistic) Next(x, dst []float64)                { dst[0] = m.r * x[0] * (1 - x[0]) }
func (m logistic) deriv(x float64) float64              { return m.r * (1 - 2*x) }
func (m logistic) Jacobian(x []float64, dst *mat.Dense) { dst.Set(0, 0, m.deriv(x[0])) }

// linearMap is x' = A x.
type linearMap struct{ a *mat.Dense }

func (m linearMap) Dim() int { r, _ := m.a.Dims(); return r }
func (m linearMap) Next(x, dst []float64) {
	n := m.Dim()
	for i := 0; i < n; i++ {
		var s float64
		for j := 0; j < n; j++ {
			s += float64(m.a.At(i, j) * x[j])
		}
		dst[i] = s
	}
}
func (m linearMap) Jacobian(_ []float64, dst *mat.Dense) { dst.Copy(m.a) }
