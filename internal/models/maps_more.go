package models

import (
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// More one-dimensional and piecewise-linear maps: the families whose
// orbit diagrams, cycles and windows the maps package studies.

func init() {
	register(&Flow{
		Name:  "ricker",
		Title: "Ricker map",
		Doc:   "a fish stock's recruitment from its spawners, once a year: x -> x·exp(r(1 - x)); chaotic at r=3",
		Source: "W. E. Ricker, Stock and recruitment, J. Fish. Res. Board Can. 11 (1954) 559–623; " +
			"its cycles and chaos as a map: R. M. May, Nature 261 (1976) 459–467; r=3 lies in the chaotic range " +
			"(exponent about 0.38 per iterate, computed with plumb scan)",
		Map:    true,
		States: []string{"x"},
		Params: []Param{{"r", 3, "growth rate at low stock"}},
		Y0:     []float64{0.5},
		Field: func(p []float64) func(float64, []float64, []float64) {
			r := p[0]
			return func(_ float64, x, d []float64) {
				d[0] = x[0] * detmath.Exp(float64(r*(1-x[0])))
			}
		},
		Jac: func(p []float64) func(float64, []float64, *mat.Dense) {
			r := p[0]
			return func(_ float64, x []float64, j *mat.Dense) {
				j.Set(0, 0, detmath.Exp(float64(r*(1-x[0])))*(1-float64(r*x[0])))
			}
		},
	})
	register(&Flow{
		Name:  "tent",
		Title: "Tent map",
		Doc:   "piecewise-linear stretch and fold: x -> mu·min(x, 1 - x); at mu=2 lambda = ln 2, and float64 orbits fall to 0 within about 55 iterates",
		Source: "P. Collet, J.-P. Eckmann, Iterated Maps on the Interval as Dynamical Systems, Birkhäuser (1980) " +
			"(mu=2: lambda = ln 2, exact)",
		Map:    true,
		States: []string{"x"},
		Params: []Param{{"mu", 2, "slope"}},
		Y0:     []float64{0.3},
		Field: func(p []float64) func(float64, []float64, []float64) {
			mu := p[0]
			return func(_ float64, x, d []float64) {
				d[0] = mu * math.Min(x[0], 1-x[0])
			}
		},
		Jac: func(p []float64) func(float64, []float64, *mat.Dense) {
			mu := p[0]
			return func(_ float64, x []float64, j *mat.Dense) {
				if x[0] < 1-x[0] {
					j.Set(0, 0, mu)
				} else {
					j.Set(0, 0, -mu)
				}
			}
		},
	})
	register(&Flow{
		Name:   "sine",
		Title:  "Sine map",
		Doc:    "a one-hump map with a quadratic top, x -> r·sin(πx): the same period-doubling ratios as the logistic map",
		Source: "M. J. Feigenbaum, Quantitative universality for a class of nonlinear transformations, J. Stat. Phys. 19 (1978) 25–52 (r=1)",
		Map:    true,
		States: []string{"x"},
		Params: []Param{{"r", 1, "height of the hump"}},
		Y0:     []float64{0.3},
		Field: func(p []float64) func(float64, []float64, []float64) {
			r := p[0]
			return func(_ float64, x, d []float64) {
				d[0] = r * detmath.Sin(math.Pi*x[0])
			}
		},
		Jac: func(p []float64) func(float64, []float64, *mat.Dense) {
			r := p[0]
			return func(_ float64, x []float64, j *mat.Dense) {
				j.Set(0, 0, float64(r*math.Pi)*detmath.Cos(math.Pi*x[0]))
			}
		},
	})
	register(&Flow{
		Name:  "circle",
		Title: "Circle map",
		Doc:   "a driven rotor seen once per drive period, on the circle of circumference 1: theta -> theta + omega - (k/2π)·sin(2π·theta); mode locking for k <= 1",
		Source: "V. I. Arnold, Small denominators I, Izv. Akad. Nauk SSSR Ser. Mat. 25 (1961) 21–86; " +
			"M. H. Jensen, P. Bak, T. Bohr, Complete devil's staircase, fractal dimension and universality of mode-locking structure " +
			"in the circle map, Phys. Rev. Lett. 50 (1983) 1637–1639 (k=1, the critical line; omega=0.6066610634 gives the golden-mean " +
			"winding number there, from memory)",
		Map:    true,
		States: []string{"theta"},
		Params: []Param{{"omega", 0.6066610634, "bare rotation per step"}, {"k", 1, "coupling strength"}},
		Y0:     []float64{0.1},
		Period: []float64{1},
		Field: func(p []float64) func(float64, []float64, []float64) {
			omega, k := p[0], p[1]
			c := k / (2 * math.Pi)
			return func(_ float64, x, d []float64) {
				d[0] = x[0] + omega - float64(c*detmath.Sin(2*math.Pi*x[0]))
			}
		},
		Jac: func(p []float64) func(float64, []float64, *mat.Dense) {
			k := p[1]
			return func(_ float64, x []float64, j *mat.Dense) {
				j.Set(0, 0, 1-float64(k*detmath.Cos(2*math.Pi*x[0])))
			}
		},
	})
	register(&Flow{
		Name:   "gauss",
		Title:  "Gauss map (iterated exponential)",
		Doc:    "x -> exp(-alpha·x²) + beta: a one-hump map whose orbit diagram in beta doubles, turns chaotic and doubles back",
		Source: "R. C. Hilborn, Chaos and Nonlinear Dynamics, Oxford University Press (1994), the Gaussian map (alpha=4.9, beta=-0.58; from memory)",
		Map:    true,
		States: []string{"x"},
		Params: []Param{{"alpha", 4.9, "sharpness of the hump"}, {"beta", -0.58, "offset"}},
		Y0:     []float64{0.1},
		Field: func(p []float64) func(float64, []float64, []float64) {
			alpha, beta := p[0], p[1]
			return func(_ float64, x, d []float64) {
				d[0] = detmath.Exp(-float64(alpha*float64(x[0]*x[0]))) + beta
			}
		},
		Jac: func(p []float64) func(float64, []float64, *mat.Dense) {
			alpha := p[0]
			return func(_ float64, x []float64, j *mat.Dense) {
				j.Set(0, 0, -float64(2*alpha*x[0])*detmath.Exp(-float64(alpha*float64(x[0]*x[0]))))
			}
		},
	})
	register(&Flow{
		Name:   "lozi",
		Title:  "Lozi map",
		Doc:    "the Hénon map with |x| for x²: a piecewise-linear map with a strange attractor; det J = -b",
		Source: "R. Lozi, Un attracteur étrange (?) du type attracteur de Hénon, J. Physique Colloq. 39 (1978) C5-9–C5-10 (a=1.7, b=0.5)",
		Map:    true,
		States: []string{"x", "y"},
		Params: []Param{{"a", 1.7, "stretch"}, {"b", 0.5, "contraction (|det J|)"}},
		Y0:     []float64{0, 0},
		Field: func(p []float64) func(float64, []float64, []float64) {
			a, b := p[0], p[1]
			return func(_ float64, x, d []float64) {
				x0, y0 := x[0], x[1]
				d[0] = 1 + y0 - float64(a*math.Abs(x0))
				d[1] = b * x0
			}
		},
		Jac: func(p []float64) func(float64, []float64, *mat.Dense) {
			a, b := p[0], p[1]
			return func(_ float64, x []float64, j *mat.Dense) {
				s := a
				if x[0] < 0 {
					s = -a
				}
				j.Set(0, 0, -s)
				j.Set(0, 1, 1)
				j.Set(1, 0, b)
				j.Set(1, 1, 0)
			}
		},
	})
}
