package models

import (
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// Products are wrapped in float64() where a fused multiply-add could form, so
// that every architecture computes the same bits (see DESIGN.md).

func init() {
	register(&Flow{
		Name:   "lorenz",
		Title:  "Lorenz convection",
		Doc:    "three-mode truncation of Rayleigh–Bénard convection; the built-in convection-loop demo",
		Source: "E. N. Lorenz, Deterministic nonperiodic flow, J. Atmos. Sci. 20 (1963) 130–141 (sigma=10, rho=28, beta=8/3)",
		States: []string{"x", "y", "z"},
		Params: []Param{{"sigma", 10, "Prandtl number"}, {"rho", 28, "reduced Rayleigh number"}, {"beta", 8.0 / 3, "aspect factor"}},
		Y0:     []float64{1, 1, 1},
		Field: func(p []float64) func(float64, []float64, []float64) {
			s, r, b := p[0], p[1], p[2]
			return func(_ float64, y, d []float64) {
				_, _ = y[2], d[2] // one bounds check each, not three
				x, yy, z := y[0], y[1], y[2]
				d[0] = s * (yy - x)
				d[1] = float64(x*(r-z)) - yy
				d[2] = float64(x*yy) - float64(b*z)
			}
		},
		Jac: func(p []float64) func(float64, []float64, *mat.Dense) {
			s, r, b := p[0], p[1], p[2]
			return func(_ float64, y []float64, j *mat.Dense) {
				// The rows written directly (any stride): nine calls of
				// Set, each checking its indices, cost twice as much, at
				// every evaluation of a tangent-space run. Set serves
				// any other shape, as before.
				if nr, nc := j.Dims(); nr == 3 && nc == 3 {
					e0, e1, e2 := (*[3]float64)(j.RawRowView(0)), (*[3]float64)(j.RawRowView(1)), (*[3]float64)(j.RawRowView(2))
					x0, y1, z2 := y[0], y[1], y[2]
					e0[0], e0[1], e0[2] = -s, s, 0
					e1[0], e1[1], e1[2] = r-z2, -1, -x0
					e2[0], e2[1], e2[2] = y1, x0, -b
					return
				}
				j.Set(0, 0, -s)
				j.Set(0, 1, s)
				j.Set(0, 2, 0)
				j.Set(1, 0, r-y[2])
				j.Set(1, 1, -1)
				j.Set(1, 2, -y[0])
				j.Set(2, 0, y[1])
				j.Set(2, 1, y[0])
				j.Set(2, 2, -b)
			}
		},
		// J = [[-s, s, 0], [r-z, -1, -x], [y, x, -b]], kept in registers; the
		// term of J[0][2] = 0 left out (see Flow.Tangent3). The columns are
		// written out through an inlined col (a loop over them cost 25
		// instructions more per call).
		Tangent3: func(p []float64) func(float64, *[3]float64, *[3]float64, *[9]float64, *[9]float64) float64 {
			s, r, b := p[0], p[1], p[2]
			ns, nb := -s, -b
			var tr float64 // ((0 + J00) + J11) + J22, the same at every state
			tr += ns
			tr += -1
			tr += nb
			return func(_ float64, x, dx *[3]float64, v, dv *[9]float64) float64 {
				x0, y1, z2 := x[0], x[1], x[2]
				dx[0] = s * (y1 - x0)
				dx[1] = float64(x0*(r-z2)) - y1
				dx[2] = float64(x0*y1) - float64(b*z2)
				j10, j12 := r-z2, -x0
				col := func(v0, v1, v2 float64) (s0, s1, s2 float64) {
					s0 += float64(ns * v0)
					s0 += float64(s * v1)
					s1 += float64(j10 * v0)
					s1 -= v1 // + (-1)·v1: x - y is x + (-y), exactly (IEEE 754)
					s1 += float64(j12 * v2)
					s2 += float64(y1 * v0)
					s2 += float64(x0 * v1)
					s2 += float64(nb * v2)
					return
				}
				dv[0], dv[3], dv[6] = col(v[0], v[3], v[6])
				dv[1], dv[4], dv[7] = col(v[1], v[4], v[7])
				dv[2], dv[5], dv[8] = col(v[2], v[5], v[8])
				return tr
			}
		},
	})
	register(&Flow{
		Name:   "rossler",
		Title:  "Rössler attractor",
		Doc:    "a single-lobe chaotic flow with one nonlinear term",
		Source: "O. E. Rössler, An equation for continuous chaos, Phys. Lett. A 57 (1976) 397–398 (a=0.2, b=0.2, c=5.7 as in the common tabulations)",
		States: []string{"x", "y", "z"},
		Params: []Param{{"a", 0.2, ""}, {"b", 0.2, ""}, {"c", 5.7, ""}},
		Y0:     []float64{1, 1, 0},
		Field: func(p []float64) func(float64, []float64, []float64) {
			a, b, c := p[0], p[1], p[2]
			return func(_ float64, y, d []float64) {
				_, _ = y[2], d[2] // one bounds check each, not three
				d[0] = -y[1] - y[2]
				d[1] = y[0] + float64(a*y[1])
				d[2] = b + float64(y[2]*(y[0]-c))
			}
		},
		Jac: func(p []float64) func(float64, []float64, *mat.Dense) {
			a, c := p[0], p[2]
			return func(_ float64, y []float64, j *mat.Dense) {
				if nr, nc := j.Dims(); nr == 3 && nc == 3 {
					e0, e1, e2 := (*[3]float64)(j.RawRowView(0)), (*[3]float64)(j.RawRowView(1)), (*[3]float64)(j.RawRowView(2))
					x0, z2 := y[0], y[2]
					e0[0], e0[1], e0[2] = 0, -1, -1
					e1[0], e1[1], e1[2] = 1, a, 0
					e2[0], e2[1], e2[2] = z2, 0, x0-c
					return
				}
				j.Set(0, 0, 0)
				j.Set(0, 1, -1)
				j.Set(0, 2, -1)
				j.Set(1, 0, 1)
				j.Set(1, 1, a)
				j.Set(1, 2, 0)
				j.Set(2, 0, y[2])
				j.Set(2, 1, 0)
				j.Set(2, 2, y[0]-c)
			}
		},
		// J = [[0, -1, -1], [1, a, 0], [z, 0, x-c]], kept in registers; the
		// terms of its zero entries left out (see Flow.Tangent3); the columns
		// written out as for lorenz.
		Tangent3: func(p []float64) func(float64, *[3]float64, *[3]float64, *[9]float64, *[9]float64) float64 {
			a, b, c := p[0], p[1], p[2]
			return func(_ float64, x, dx *[3]float64, v, dv *[9]float64) float64 {
				x0, y1, z2 := x[0], x[1], x[2]
				dx[0] = -y1 - z2
				dx[1] = x0 + float64(a*y1)
				dx[2] = b + float64(z2*(x0-c))
				j22 := x0 - c
				col := func(v0, v1, v2 float64) (s0, s1, s2 float64) {
					s0 -= v1 // + (-1)·v1: x - y is x + (-y), exactly (IEEE 754)
					s0 -= v2
					s1 += v0 // 1·v0, exactly
					s1 += float64(a * v1)
					s2 += float64(z2 * v0)
					s2 += float64(j22 * v2)
					return
				}
				dv[0], dv[3], dv[6] = col(v[0], v[3], v[6])
				dv[1], dv[4], dv[7] = col(v[1], v[4], v[7])
				dv[2], dv[5], dv[8] = col(v[2], v[5], v[8])
				var tr float64 // ((0 + J00) + J11) + J22
				tr += a
				tr += j22
				return tr
			}
		},
	})
	register(&Flow{
		Name:  "double-pendulum",
		Title: "Planar double pendulum",
		Doc:   "two point masses on rigid massless rods, angles from the downward vertical",
		Source: "equations of motion from the Lagrangian of two point masses on massless rods; " +
			"e.g. T. Shinbrot, C. Grebogi, J. Wisdom, J. A. Yorke, Chaos in a double pendulum, Am. J. Phys. 60 (1992) 491–499",
		States: []string{"theta1", "theta2", "omega1", "omega2"},
		Params: []Param{{"m1", 1, "upper mass"}, {"m2", 1, "lower mass"}, {"l1", 1, "upper rod length"}, {"l2", 1, "lower rod length"}, {"g", 9.81, "gravity"}},
		Y0:     []float64{2, 2.5, 0, 0},
		Period: []float64{2 * math.Pi, 2 * math.Pi, 0, 0},
		Field: func(p []float64) func(float64, []float64, []float64) {
			m1, m2, l1, l2, g := p[0], p[1], p[2], p[3], p[4]
			return func(_ float64, y, d []float64) {
				t1, t2, w1, w2 := y[0], y[1], y[2], y[3]
				dl := t1 - t2
				sd, cd := detmath.Sincos(dl)
				den := 2*m1 + m2 - float64(m2*detmath.Cos(2*dl))
				d[0] = w1
				d[1] = w2
				num1 := -float64(g*(2*m1+m2)*detmath.Sin(t1)) - float64(m2*g*detmath.Sin(t1-2*t2)) -
					float64(2*sd*m2*(float64(w2*w2*l2)+float64(w1*w1*l1*cd)))
				d[2] = num1 / float64(l1*den)
				num2 := 2 * sd * (float64(w1*w1*l1*(m1+m2)) + float64(g*(m1+m2)*detmath.Cos(t1)) + float64(w2*w2*l2*m2*cd))
				d[3] = num2 / float64(l2*den)
			}
		},
	})
	const mu = 0.012277471
	register(&Flow{
		Name:  "arenstorf",
		Title: "Arenstorf orbit (restricted three-body problem)",
		Doc:   "a periodic Earth–Moon satellite orbit in rotating coordinates; state (y1, y2, y1', y2')",
		Source: "E. Hairer, S. P. Nørsett, G. Wanner, Solving Ordinary Differential Equations I, 2nd ed., Springer 1993, " +
			"introduction to Ch. II (mu=0.012277471, period 17.0652165601579625588917206249)",
		States: []string{"y1", "y2", "v1", "v2"},
		Params: []Param{{"mu", mu, "reduced Moon mass"}},
		Y0:     []float64{0.994, 0, 0, -2.00158510637908252240537862224},
		Known:  map[string]float64{"period": 17.0652165601579625588917206249},
		Field: func(p []float64) func(float64, []float64, []float64) {
			m := p[0]
			mp := 1 - m
			return func(_ float64, y, d []float64) {
				y1, y2, v1, v2 := y[0], y[1], y[2], y[3]
				d1 := r3(y1+m, y2)
				d2 := r3(y1-mp, y2)
				d[0] = v1
				d[1] = v2
				d[2] = y1 + 2*v2 - float64(mp*(y1+m))/d1 - float64(m*(y1-mp))/d2
				d[3] = y2 - 2*v1 - float64(mp*y2)/d1 - float64(m*y2)/d2
			}
		},
	})
	register(&Flow{
		Name:   "vanderpol",
		Title:  "Van der Pol oscillator",
		Doc:    "a self-excited oscillator with a limit cycle; stiff for large mu",
		Source: "B. van der Pol, On relaxation-oscillations, Phil. Mag. 2 (1926) 978–992; mu=1000, y0=(2,0) is problem VDPOL of the Mazzia & Magherini IVP Test Set (2008)",
		States: []string{"x", "v"},
		Params: []Param{{"mu", 1, "damping strength"}},
		Y0:     []float64{2, 0},
		Field: func(p []float64) func(float64, []float64, []float64) {
			m := p[0]
			return func(_ float64, y, d []float64) {
				d[0] = y[1]
				d[1] = float64(m*float64((1-float64(y[0]*y[0]))*y[1])) - y[0]
			}
		},
		Jac: func(p []float64) func(float64, []float64, *mat.Dense) {
			m := p[0]
			return func(_ float64, y []float64, j *mat.Dense) {
				j.Set(0, 0, 0)
				j.Set(0, 1, 1)
				j.Set(1, 0, float64(-2*m*y[0]*y[1])-1)
				j.Set(1, 1, m*(1-float64(y[0]*y[0])))
			}
		},
	})
	const ecc = 0.6
	register(&Flow{
		Name:  "kepler",
		Title: "Kepler two-body problem",
		Doc:   "a body around a fixed centre, H = |p|²/2 - 1/|q|; state (q1, q2, p1, p2)",
		Source: "E. Hairer, C. Lubich, G. Wanner, Geometric Numerical Integration, 2nd ed., Springer 2006, Ch. I " +
			"(q0=(1-e,0), p0=(0,sqrt((1+e)/(1-e))), e=0.6; H=-1/2, L=sqrt(1-e^2), period 2*pi)",
		States: []string{"q1", "q2", "p1", "p2"},
		Params: []Param{{"e", ecc, "eccentricity of the start"}},
		Y0:     []float64{1 - ecc, 0, 0, math.Sqrt((1 + ecc) / (1 - ecc))},
		Known:  map[string]float64{"energy": -0.5, "angular_momentum": math.Sqrt(1 - ecc*ecc), "period": 2 * math.Pi},
		Field: func(_ []float64) func(float64, []float64, []float64) {
			return func(_ float64, y, d []float64) {
				r := r3(y[0], y[1])
				d[0] = y[2]
				d[1] = y[3]
				d[2] = -y[0] / r
				d[3] = -y[1] / r
			}
		},
		Separable: func(_ []float64) Parts {
			return Parts{
				DT: func(p, dst []float64) { copy(dst, p) },
				DV: func(q, dst []float64) {
					r := r3(q[0], q[1])
					dst[0] = q[0] / r
					dst[1] = q[1] / r
				},
				H: func(q, p []float64) float64 {
					return float64(0.5*(float64(p[0]*p[0])+float64(p[1]*p[1]))) - 1/math.Sqrt(float64(q[0]*q[0])+float64(q[1]*q[1]))
				},
			}
		},
	})
	// Start of Hénon–Heiles at energy E = 1/8 with x = 0, y = 0.1, py = 0:
	// px = sqrt(2E - y² + 2y³/3).
	const hhE, hhY = 1.0 / 8, 0.1
	register(&Flow{
		Name:   "henon-heiles",
		Title:  "Hénon–Heiles system",
		Doc:    "a star in an axisymmetric galactic potential, H = (px²+py²+x²+y²)/2 + x²y - y³/3; state (x, y, px, py)",
		Source: "M. Hénon, C. Heiles, The applicability of the third integral of motion, Astron. J. 69 (1964) 73–79",
		States: []string{"x", "y", "px", "py"},
		Params: nil,
		Y0:     []float64{0, hhY, math.Sqrt(2*hhE - hhY*hhY + 2*hhY*hhY*hhY/3), 0},
		Known:  map[string]float64{"energy": hhE},
		Field: func(_ []float64) func(float64, []float64, []float64) {
			return func(_ float64, y, d []float64) {
				x, yy := y[0], y[1]
				d[0] = y[2]
				d[1] = y[3]
				d[2] = -x - float64(2*x*yy)
				d[3] = -yy - float64(x*x) + float64(yy*yy)
			}
		},
		Jac: func(_ []float64) func(float64, []float64, *mat.Dense) {
			return func(_ float64, y []float64, j *mat.Dense) {
				j.Zero()
				j.Set(0, 2, 1)
				j.Set(1, 3, 1)
				j.Set(2, 0, -1-2*y[1])
				j.Set(2, 1, -2*y[0])
				j.Set(3, 0, -2*y[0])
				j.Set(3, 1, -1+2*y[1])
			}
		},
		Separable: func(_ []float64) Parts {
			return Parts{
				DT: func(p, dst []float64) { copy(dst, p) },
				DV: func(q, dst []float64) {
					dst[0] = q[0] + float64(2*q[0]*q[1])
					dst[1] = q[1] + float64(q[0]*q[0]) - float64(q[1]*q[1])
				},
				H: func(q, p []float64) float64 {
					x, y := q[0], q[1]
					return float64(0.5*(float64(p[0]*p[0])+float64(p[1]*p[1])+float64(x*x)+float64(y*y))) + float64(x*x*y) - float64(y*y*y)/3
				},
			}
		},
	})
	const l96n = 40
	l96names := make([]string, l96n)
	l96y0 := make([]float64, l96n)
	for i := range l96names {
		l96names[i] = "x" + itoa(i+1)
		l96y0[i] = 8
	}
	l96y0[19] = 8.01 // the usual small perturbation of the rest state x_i = F
	register(&Flow{
		Name:   "lorenz96",
		Title:  "Lorenz-96 (40 sites)",
		Doc:    "a ring of 40 sites with advection, damping and forcing, a test bed for atmospheric predictability",
		Source: "E. N. Lorenz, Predictability: a problem partly solved, Proc. ECMWF Seminar on Predictability (1996) 1–18 (K=40, F=8)",
		States: l96names,
		Params: []Param{{"F", 8, "forcing"}},
		Y0:     l96y0,
		Field: func(p []float64) func(float64, []float64, []float64) {
			f := p[0]
			return func(_ float64, x, d []float64) {
				n := len(x)
				for i := range n {
					ip1, im1, im2 := (i+1)%n, (i+n-1)%n, (i+n-2)%n
					d[i] = float64((x[ip1]-x[im2])*x[im1]) - x[i] + f
				}
			}
		},
		Jac: func(_ []float64) func(float64, []float64, *mat.Dense) {
			return func(_ float64, x []float64, j *mat.Dense) {
				n := len(x)
				j.Zero()
				for i := range n {
					ip1, im1, im2 := (i+1)%n, (i+n-1)%n, (i+n-2)%n
					j.Set(i, ip1, x[im1])
					j.Set(i, im2, j.At(i, im2)-x[im1])
					j.Set(i, im1, j.At(i, im1)+x[ip1]-x[im2])
					j.Set(i, i, j.At(i, i)-1)
				}
			}
		},
	})
}

func itoa(i int) string {
	if i < 10 {
		return string(rune('0' + i))
	}
	return itoa(i/10) + string(rune('0'+i%10))
}
