package integrate

import (
	"fmt"
	"math"
)

// RK4 returns the classical Runge–Kutta method of order 4 with the fixed step
// size h (its sign is taken from the direction of integration). Step k ends
// at t0 + k·h exactly (by multiplication, not a running sum); the last step
// ends on t1 and may be shorter. A step costs 4 evaluations of F. Tolerances
// are validated but play no part; nothing is rejected. The continuous
// extension is the cubic Hermite interpolant of the two ends of a step
// (order 3). Use it, with Euler, to audit a run against the step size.
//
// Special cases:
//
//	h <= 0, NaN or ±Inf: Solve and NewStepper return an error wrapping ErrSettings
//	h > |t1 - t0|:        a single step of size |t1 - t0|
//
// References:
//
//	W. Kutta, Beitrag zur näherungsweisen Integration totaler
//	  Differentialgleichungen, Z. Math. Phys. 46 (1901) 435–453.
//	E. Hairer, S. P. Nørsett, G. Wanner, Solving Ordinary Differential
//	  Equations I, 2nd ed., Springer 1993, Sect. II.1.
func RK4(h float64) Method { return rk4{h: h} }

// Euler returns the explicit Euler method (order 1) with the fixed step size
// h, on the same grid as RK4. A step costs 1 evaluation of F. The continuous
// extension is the linear interpolant of the two ends of a step.
//
// Special cases:
//
//	h <= 0, NaN or ±Inf: Solve and NewStepper return an error wrapping ErrSettings
//	h > |t1 - t0|:        a single step of size |t1 - t0|
//
// References:
//
//	L. Euler, Institutionum calculi integralis, Vol. I, St. Petersburg 1768.
//	E. Hairer, S. P. Nørsett, G. Wanner, Solving Ordinary Differential
//	  Equations I, 2nd ed., Springer 1993, Sect. I.7 and II.1.
func Euler(h float64) Method { return euler{h: h} }

// checkStep validates the step size of a fixed-step method.
func checkStep(method string, h float64) error {
	if !(h > 0) || math.IsInf(h, 0) {
		return fmt.Errorf("integrate: %s step h = %v: must be finite and > 0: %w", method, h, ErrSettings)
	}
	return nil
}

// fixedController is reported by the fixed-step methods so that a shared
// Settings.Controller validates; the stepper does not use it.
func fixedController(order int) Controller {
	return Controller{Safety: 0.9, Alpha: 1 / float64(order+1), MinFactor: 0.2, MaxFactor: 10}
}

type rk4 struct{ h float64 }

func (rk4) Name() string           { return "RK4" }
func (rk4) Order() int             { return 4 }
func (rk4) errOrder() int          { return 0 }
func (m rk4) fixedStep() float64   { return m.h }
func (rk4) controller() Controller { return fixedController(4) }
func (m rk4) newScheme(p *Problem, n int) (scheme, error) {
	if err := checkStep("RK4", m.h); err != nil {
		return nil, err
	}
	buf := make([]float64, 4*n)
	return &rk4Work{f: p.F, k2: buf[:n:n], k3: buf[n : 2*n : 2*n], k4: buf[2*n : 3*n : 3*n], ys: buf[3*n:]}, nil
}

// rk4Work computes k1 = f0 (given), k2, k3, k4 and y1; F(t+h, y1) is
// evaluated by the stepper and becomes the next k1.
type rk4Work struct {
	f              Func
	k2, k3, k4, ys []float64
}

func (*rk4Work) fsal() bool     { return false }
func (*rk4Work) denseSize() int { return 4 }

func (w *rk4Work) attempt(t, h float64, y, k1, y1, _, _, _ []float64) (float64, int) {
	n := len(y)
	y, k1, y1 = y[:n], k1[:n], y1[:n]
	k2, k3, k4, ys := w.k2[:n], w.k3[:n], w.k4[:n], w.ys[:n]
	h2 := float64(0.5 * h)
	for i := range ys {
		ys[i] = y[i] + float64(h2*k1[i])
	}
	w.f(t+h2, ys, k2)
	for i := range ys {
		ys[i] = y[i] + float64(h2*k2[i])
	}
	w.f(t+h2, ys, k3)
	for i := range ys {
		ys[i] = y[i] + float64(h*k3[i])
	}
	w.f(t+h, ys, k4)
	h6 := h / 6
	for i := range y1 {
		y1[i] = y[i] + float64(h6*(k1[i]+float64(2*(k2[i]+k3[i]))+k4[i]))
	}
	return 0, 3
}

func (*rk4Work) stiffness(float64, []float64, []float64) (float64, float64, bool) {
	return 0, 0, false
}

func (*rk4Work) dense(t, h float64, y, f0, y1, f1, coef []float64) int {
	hermiteDense(h, y, f0, y1, f1, coef)
	return 0
}

func (*rk4Work) interp(coef []float64, theta float64, dst []float64) {
	hermiteInterp(coef, theta, dst)
}

type euler struct{ h float64 }

func (euler) Name() string           { return "Euler" }
func (euler) Order() int             { return 1 }
func (euler) errOrder() int          { return 0 }
func (m euler) fixedStep() float64   { return m.h }
func (euler) controller() Controller { return fixedController(1) }
func (m euler) newScheme(_ *Problem, _ int) (scheme, error) {
	if err := checkStep("Euler", m.h); err != nil {
		return nil, err
	}
	return eulerWork{}, nil
}

// eulerWork forms y1 = y + h·f0; F(t+h, y1) is evaluated by the stepper.
type eulerWork struct{}

func (eulerWork) fsal() bool     { return false }
func (eulerWork) denseSize() int { return 2 }

func (eulerWork) attempt(_, h float64, y, f0, y1, _, _, _ []float64) (float64, int) {
	n := len(y)
	f0, y1 = f0[:n], y1[:n]
	for i := range y1 {
		y1[i] = y[i] + float64(h*f0[i])
	}
	return 0, 0
}

func (eulerWork) stiffness(float64, []float64, []float64) (float64, float64, bool) {
	return 0, 0, false
}

// dense writes the linear interpolant y(θ) = y + θ(y1 − y).
func (eulerWork) dense(_, _ float64, y, _, y1, _, coef []float64) int {
	n := len(y)
	y1 = y1[:n]
	r1, r2 := coef[:n], coef[n:2*n]
	for i := range y {
		r1[i] = y[i]
		r2[i] = y1[i] - y[i]
	}
	return 0
}

func (eulerWork) interp(coef []float64, theta float64, dst []float64) {
	n := len(dst)
	r1, r2 := coef[:n], coef[n:2*n]
	for i := range dst {
		dst[i] = r1[i] + float64(theta*r2[i])
	}
}
