package models

import (
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// The built-in maps. For an entry with Map set, Field writes the next state
// x_{n+1} = f(x_n) into its last argument (the time argument is unused) and
// Jac writes df/dx. Periodic components are reduced to [0, period) by the
// root package after every iterate, not here, so that the Go field and the
// formulas stay the same smooth functions.

func init() {
	register(&Flow{
		Name:   "henon",
		Title:  "Hénon map",
		Doc:    "a two-dimensional quadratic map with a strange attractor; det J = -b",
		Source: "M. Hénon, A two-dimensional mapping with a strange attractor, Commun. Math. Phys. 50 (1976) 69–77 (a=1.4, b=0.3)",
		Map:    true,
		States: []string{"x", "y"},
		Params: []Param{{"a", 1.4, "quadratic stretch"}, {"b", 0.3, "contraction (|det J|)"}},
		Y0:     []float64{0, 0},
		Field: func(p []float64) func(float64, []float64, []float64) {
			a, b := p[0], p[1]
			return func(_ float64, x, d []float64) {
				x0, y0 := x[0], x[1]
				d[0] = 1 + y0 - float64(float64(a*x0)*x0)
				d[1] = b * x0
			}
		},
		Jac: func(p []float64) func(float64, []float64, *mat.Dense) {
			a, b := p[0], p[1]
			return func(_ float64, x []float64, j *mat.Dense) {
				j.Set(0, 0, -2*a*x[0])
				j.Set(0, 1, 1)
				j.Set(1, 0, b)
				j.Set(1, 1, 0)
			}
		},
	})
	register(&Flow{
		Name:   "logistic",
		Title:  "Logistic map",
		Doc:    "a population counted once a generation with overcompensating growth; chaotic at r=4, a stable 2-cycle at r=3.2",
		Source: "R. M. May, Simple mathematical models with very complicated dynamics, Nature 261 (1976) 459–467 (r=4: lambda = ln 2)",
		Map:    true,
		States: []string{"x"},
		Params: []Param{{"r", 4, "growth rate"}},
		Y0:     []float64{0.3},
		Field: func(p []float64) func(float64, []float64, []float64) {
			r := p[0]
			return func(_ float64, x, d []float64) {
				d[0] = float64(r*x[0]) * (1 - x[0])
			}
		},
		Jac: func(p []float64) func(float64, []float64, *mat.Dense) {
			r := p[0]
			return func(_ float64, x []float64, j *mat.Dense) {
				j.Set(0, 0, r*(1-2*x[0]))
			}
		},
	})
	register(&Flow{
		Name:  "standard",
		Title: "Chirikov standard map",
		Doc:   "a kicked rotor seen once per kick, on the torus (both components 2π-periodic); area preserving",
		Source: "B. V. Chirikov, A universal instability of many-dimensional oscillator systems, Phys. Rep. 52 (1979) 263–379; " +
			"k=0.971635 near the break-up of the golden invariant circle, J. M. Greene, J. Math. Phys. 20 (1979) 1183–1201",
		Map:    true,
		States: []string{"theta", "p"},
		Params: []Param{{"k", 0.971635, "kick strength"}},
		// Next to the hyperbolic fixed point (0, 0), in its chaotic layer.
		Y0:     []float64{0.001, 0},
		Period: []float64{2 * math.Pi, 2 * math.Pi},
		Field: func(p []float64) func(float64, []float64, []float64) {
			k := p[0]
			return func(_ float64, x, d []float64) {
				pn := x[1] + float64(k*detmath.Sin(x[0]))
				d[0] = x[0] + pn
				d[1] = pn
			}
		},
		Jac: func(p []float64) func(float64, []float64, *mat.Dense) {
			k := p[0]
			return func(_ float64, x []float64, j *mat.Dense) {
				c := float64(k * detmath.Cos(x[0]))
				j.Set(0, 0, 1+c)
				j.Set(0, 1, 1)
				j.Set(1, 0, c)
				j.Set(1, 1, 1)
			}
		},
	})
	register(&Flow{
		Name:  "ikeda",
		Title: "Ikeda map",
		Doc:   "light in a ring cavity with a nonlinear medium, sampled once per round trip; det J = u²",
		Source: "K. Ikeda, Multiple-valued stationary state and its instability of the transmitted light by a ring cavity system, " +
			"Opt. Commun. 30 (1979) 257–261; the real form with phase 0.4 - 6/(1+x²+y²) as in S. M. Hammel, C. K. R. T. Jones, " +
			"J. V. Moloney, J. Opt. Soc. Am. B 2 (1985) 552–564 (u=0.9)",
		Map:    true,
		States: []string{"x", "y"},
		Params: []Param{{"u", 0.9, "round-trip amplitude factor"}},
		Y0:     []float64{0, 0},
		Field: func(p []float64) func(float64, []float64, []float64) {
			u := p[0]
			return func(_ float64, x, d []float64) {
				s, c := detmath.Sincos(ikedaPhase(x[0], x[1]))
				d[0] = 1 + float64(u*(float64(x[0]*c)-float64(x[1]*s)))
				d[1] = u * (float64(x[0]*s) + float64(x[1]*c))
			}
		},
		Jac: func(p []float64) func(float64, []float64, *mat.Dense) {
			u := p[0]
			return func(_ float64, x []float64, j *mat.Dense) {
				xx, yy := x[0], x[1]
				r2 := 1 + float64(xx*xx) + float64(yy*yy)
				// d(phase)/dx = 12x/r2², d(phase)/dy = 12y/r2².
				px, py := 12*xx/float64(r2*r2), 12*yy/float64(r2*r2)
				s, c := detmath.Sincos(ikedaPhase(xx, yy))
				a := -float64(xx*s) - float64(yy*c) // d(x c - y s)/d(phase)
				b := float64(xx*c) - float64(yy*s)  // d(x s + y c)/d(phase)
				j.Set(0, 0, u*(c+float64(a*px)))
				j.Set(0, 1, u*(-s+float64(a*py)))
				j.Set(1, 0, u*(s+float64(b*px)))
				j.Set(1, 1, u*(c+float64(b*py)))
			}
		},
	})
}

// ikedaPhase is the Ikeda map's phase 0.4 - 6/(1 + x² + y²).
func ikedaPhase(x, y float64) float64 {
	return 0.4 - 6/(1+float64(x*x)+float64(y*y))
}
