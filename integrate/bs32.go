package integrate

import "math"

// BogackiShampine32 is the explicit Runge–Kutta pair of order 3(2) by
// Bogacki & Shampine, with local extrapolation (the 3rd-order solution is
// propagated) and the first-same-as-last property: its fourth stage is the
// derivative at the new point, so a step costs 3 evaluations of F. Its
// continuous extension is the cubic Hermite interpolant of the two ends of
// the step (order 3, no extra evaluations). It has no stiffness test.
//
// The default controller is the elementary one, h_new = h·0.9·err^(-1/3),
// with step factors in [0.2, 10] (Hairer, Nørsett & Wanner 1993, Sect. II.4,
// with the safety factor and bounds of DOPRI5).
//
// References:
//
//	P. Bogacki, L. F. Shampine, A 3(2) pair of Runge-Kutta formulas, Appl.
//	  Math. Lett. 2 (1989) 321–325.
//	E. Hairer, S. P. Nørsett, G. Wanner, Solving Ordinary Differential
//	  Equations I, 2nd ed., Springer 1993, Sect. II.4 (step control) and
//	  II.6 (Hermite interpolation).
var BogackiShampine32 Method = bs32{}

type bs32 struct{}

func (bs32) Name() string       { return "Bogacki–Shampine 3(2)" }
func (bs32) Order() int         { return 3 }
func (bs32) errOrder() int      { return 2 }
func (bs32) fixedStep() float64 { return 0 }
func (bs32) controller() Controller {
	return Controller{Safety: 0.9, Beta: 0, Alpha: 1.0 / 3, MinFactor: 0.2, MaxFactor: 10}
}

func (bs32) newScheme(p *Problem, n int) (scheme, error) {
	buf := make([]float64, 3*n)
	return &bs32Work{f: p.F, k2: buf[:n:n], k3: buf[n : 2*n : 2*n], ys: buf[2*n:]}, nil
}

// Bogacki & Shampine (1989) coefficients. The 3rd-order weights b are the
// last row of A (FSAL); b̂ = (7/24, 1/4, 1/3, 1/8) is the 2nd-order solution.
const (
	bsC2  = 1.0 / 2
	bsC3  = 3.0 / 4
	bsA21 = 1.0 / 2
	bsA32 = 3.0 / 4
	bsA41 = 2.0 / 9
	bsA42 = 1.0 / 3
	bsA43 = 4.0 / 9

	// e = b - b̂.
	bsE1 = 2.0/9 - 7.0/24 // -5/72
	bsE2 = 1.0/3 - 1.0/4  // 1/12
	bsE3 = 4.0/9 - 1.0/3  // 1/9
	bsE4 = -1.0 / 8
)

type bs32Work struct {
	f          Func
	k2, k3, ys []float64
}

func (*bs32Work) fsal() bool     { return true }
func (*bs32Work) denseSize() int { return 4 }

func (w *bs32Work) attempt(t, h float64, y, k1, y1, k4, rtol, atol []float64) (float64, int) {
	n := len(y)
	y, k1, y1, k4, rtol, atol = y[:n], k1[:n], y1[:n], k4[:n], rtol[:n], atol[:n]
	k2, k3, ys := w.k2[:n], w.k3[:n], w.ys[:n]
	for i := range ys {
		ys[i] = y[i] + float64(h*float64(bsA21*k1[i]))
	}
	w.f(t+float64(bsC2*h), ys, k2)
	for i := range ys {
		ys[i] = y[i] + float64(h*float64(bsA32*k2[i]))
	}
	w.f(t+float64(bsC3*h), ys, k3)
	for i := range y1 {
		y1[i] = y[i] + float64(h*(float64(bsA41*k1[i])+float64(bsA42*k2[i])+float64(bsA43*k3[i])))
	}
	w.f(t+h, y1, k4)
	var sum float64
	for i := range y1 {
		e := float64(h * (float64(bsE1*k1[i]) + float64(bsE2*k2[i]) + float64(bsE3*k3[i]) + float64(bsE4*k4[i])))
		sk := atol[i] + float64(rtol[i]*math.Max(math.Abs(y[i]), math.Abs(y1[i])))
		r := e / sk
		sum += float64(r * r)
	}
	return math.Sqrt(sum / float64(n)), 3
}

func (*bs32Work) stiffness(float64, []float64, []float64) (float64, float64, bool) {
	return 0, 0, false
}

func (*bs32Work) dense(t, h float64, y, f0, y1, f1, coef []float64) int {
	hermiteDense(h, y, f0, y1, f1, coef)
	return 0
}

func (*bs32Work) interp(coef []float64, theta float64, dst []float64) {
	hermiteInterp(coef, theta, dst)
}

// hermiteDense writes the cubic Hermite interpolant of the step from (y, f0)
// to (y1, f1) as four vectors r1..r4 with
//
//	y(θ) = r1 + θ(r2 + (1−θ)(r3 + θ r4)),
//	r1 = y, r2 = y1 − y, r3 = h f0 − r2, r4 = r2 − h f1 − r3,
//
// which matches y, y1 and h·f0, h·f1 at θ = 0 and 1 (Hairer, Nørsett &
// Wanner 1993, Sect. II.6).
func hermiteDense(h float64, y, f0, y1, f1, coef []float64) {
	n := len(y)
	f0, y1, f1 = f0[:n], y1[:n], f1[:n]
	r1, r2, r3, r4 := coef[:n], coef[n:2*n], coef[2*n:3*n], coef[3*n:4*n]
	for i := range y {
		yd := y1[i] - y[i]
		b := float64(h*f0[i]) - yd
		r1[i] = y[i]
		r2[i] = yd
		r3[i] = b
		r4[i] = yd - float64(h*f1[i]) - b
	}
}

func hermiteInterp(coef []float64, theta float64, dst []float64) {
	n := len(dst)
	r1, r2, r3, r4 := coef[:n], coef[n:2*n], coef[2*n:3*n], coef[3*n:4*n]
	t1 := 1 - theta
	for i := range dst {
		dst[i] = r1[i] + float64(theta*(r2[i]+float64(t1*(r3[i]+float64(theta*r4[i])))))
	}
}
