package integrate

import "math"

// DormandPrince54 is the explicit Runge–Kutta pair of order 5(4) by Dormand &
// Prince, with local extrapolation (the 5th-order solution is propagated),
// the first-same-as-last property (6 evaluations per step), Shampine's
// continuous extension of order 4, and Hairer's stiffness test. Its default
// controller is the PI controller with Beta = 0.04, Alpha = 0.17, Safety 0.9
// and step factors in [0.2, 10], as in Hairer & Wanner's code DOPRI5.
//
// References:
//
//	J. R. Dormand, P. J. Prince, A family of embedded Runge-Kutta formulae,
//	  J. Comput. Appl. Math. 6 (1980) 19–26.
//	L. F. Shampine, Some practical Runge-Kutta formulas, Math. Comp. 46
//	  (1986) 135–150 (dense output).
//	E. Hairer, S. P. Nørsett, G. Wanner, Solving Ordinary Differential
//	  Equations I, 2nd ed., Springer 1993, Table 5.2 of Sect. II.5.
//	E. Hairer, G. Wanner, Solving Ordinary Differential Equations II, 2nd
//	  ed., Springer 1996, Sect. IV.2 (PI control, stiffness detection).
var DormandPrince54 Method = dopri54{}

type dopri54 struct{}

func (dopri54) Name() string       { return "Dormand–Prince 5(4)" }
func (dopri54) Order() int         { return 5 }
func (dopri54) errOrder() int      { return 4 }
func (dopri54) fixedStep() float64 { return 0 }
func (dopri54) controller() Controller {
	return Controller{Safety: 0.9, Beta: 0.04, Alpha: 0.2 - 0.75*0.04, MinFactor: 0.2, MaxFactor: 10}
}

func (dopri54) newScheme(p *Problem, n int) (scheme, error) {
	w := &dp54Work{f: p.F, sqrtInvN: math.Sqrt(1 / float64(n))}
	buf := make([]float64, 9*n)
	w.k2, w.k3, w.k4, w.k5, w.k6, w.ys, w.ysti = buf[:n:n], buf[n:2*n:2*n], buf[2*n:3*n:3*n],
		buf[3*n:4*n:4*n], buf[4*n:5*n:5*n], buf[5*n:6*n:6*n], buf[6*n:7*n:7*n]
	w.pw, w.ew = buf[7*n:8*n:8*n], buf[8*n:9*n:9*n]
	return dp54Scheme(w, n), nil // w, or w with vector kernels (amd64)
}

// Dormand–Prince 5(4) coefficients (Hairer, Nørsett & Wanner 1993, Table 5.2).
const (
	dpC2 = 1.0 / 5
	dpC3 = 3.0 / 10
	dpC4 = 4.0 / 5
	dpC5 = 8.0 / 9

	dpA21 = 1.0 / 5
	dpA31 = 3.0 / 40
	dpA32 = 9.0 / 40
	dpA41 = 44.0 / 45
	dpA42 = -56.0 / 15
	dpA43 = 32.0 / 9
	dpA51 = 19372.0 / 6561
	dpA52 = -25360.0 / 2187
	dpA53 = 64448.0 / 6561
	dpA54 = -212.0 / 729
	dpA61 = 9017.0 / 3168
	dpA62 = -355.0 / 33
	dpA63 = 46732.0 / 5247
	dpA64 = 49.0 / 176
	dpA65 = -5103.0 / 18656
	dpA71 = 35.0 / 384
	dpA73 = 500.0 / 1113
	dpA74 = 125.0 / 192
	dpA75 = -2187.0 / 6784
	dpA76 = 11.0 / 84

	// e = b - b̂, the error weights.
	dpE1 = 71.0 / 57600
	dpE3 = -71.0 / 16695
	dpE4 = 71.0 / 1920
	dpE5 = -17253.0 / 339200
	dpE6 = 22.0 / 525
	dpE7 = -1.0 / 40

	// Shampine's dense output coefficients.
	dpD1 = -12715105075.0 / 11282082432
	dpD3 = 87487479700.0 / 32700410799
	dpD4 = -10690763975.0 / 1880347072
	dpD5 = 701980252875.0 / 199316789632
	dpD6 = -1453857185.0 / 822651844
	dpD7 = 69997945.0 / 29380423
)

type dp54Work struct {
	f                      Func
	k2, k3, k4, k5, k6, ys []float64
	ysti                   []float64 // the argument of stage 6, for the stiffness test
	sqrtInvN               float64   // 1/√n, for the mean of squares
	pw, ew                 []float64 // error terms without k7, and e_7 weights
}

func (*dp54Work) fsal() bool     { return true }
func (*dp54Work) denseSize() int { return 5 }

func (w *dp54Work) attempt(t, h float64, y, k1, y1, k7, rtol, atol []float64) (float64, int) {
	e2, ev := w.attemptSq(t, h, y, k1, y1, k7, rtol, atol)
	return math.Sqrt(e2), ev
}

// attemptSq is the hot loop: one trial step and its squared error norm.
//
// Its speed on a cheap field is the latency of the chain from one stage
// to the next, so the arithmetic is arranged for it: the products h·a_ij
// are formed once, and each stage adds the newest k last,
//
//	Y_s = (y + Σ_{j<s-1} (h·a_sj)·k_j) + (h·a_s,s-1)·k_s-1,
//
// so that only one product and one addition wait for F. The error weights
// h/(sk·√n) and the part of the error without k7 are formed before
// F(t+h, y1), which leaves one product and one addition per component
// between k7 and err². Products are wrapped in float64() so that no
// architecture fuses them into FMAs, and every sum has a fixed order:
// results are bit-identical everywhere. A NaN or Inf in y1 or k7 makes err²
// NaN or Inf (y1 - y1 is NaN exactly then; k7 enters every term).
func (w *dp54Work) attemptSq(t, h float64, y, k1, y1, k7, rtol, atol []float64) (float64, int) {
	n := len(y)
	k2, k3, k4, k5, k6, ys, ysti := w.k2[:n], w.k3[:n], w.k4[:n], w.k5[:n], w.k6[:n], w.ys[:n], w.ysti[:n]
	pw, ew := w.pw[:n], w.ew[:n]
	k1, y1, k7, rtol, atol = k1[:n], y1[:n], k7[:n], rtol[:n], atol[:n]
	ha21 := float64(h * dpA21)
	for i := range ys {
		ys[i] = y[i] + float64(ha21*k1[i])
	}
	ha31, ha32 := float64(h*dpA31), float64(h*dpA32)
	w.f(t+float64(dpC2*h), ys, k2)
	for i := range ys {
		ys[i] = (y[i] + float64(ha31*k1[i])) + float64(ha32*k2[i])
	}
	ha41, ha42, ha43 := float64(h*dpA41), float64(h*dpA42), float64(h*dpA43)
	w.f(t+float64(dpC3*h), ys, k3)
	for i := range ys {
		ys[i] = (y[i] + (float64(ha41*k1[i]) + float64(ha42*k2[i]))) + float64(ha43*k3[i])
	}
	ha51, ha52, ha53, ha54 := float64(h*dpA51), float64(h*dpA52), float64(h*dpA53), float64(h*dpA54)
	w.f(t+float64(dpC4*h), ys, k4)
	for i := range ys {
		ys[i] = (y[i] + ((float64(ha51*k1[i]) + float64(ha52*k2[i])) + float64(ha53*k3[i]))) + float64(ha54*k4[i])
	}
	ha61, ha62, ha63, ha64, ha65 := float64(h*dpA61), float64(h*dpA62), float64(h*dpA63), float64(h*dpA64), float64(h*dpA65)
	w.f(t+float64(dpC5*h), ys, k5)
	for i := range ysti {
		ysti[i] = (y[i] + ((float64(ha61*k1[i]) + float64(ha62*k2[i])) + (float64(ha63*k3[i]) + float64(ha64*k4[i])))) + float64(ha65*k5[i])
	}
	ha71, ha73, ha74, ha75, ha76 := float64(h*dpA71), float64(h*dpA73), float64(h*dpA74), float64(h*dpA75), float64(h*dpA76)
	th := t + h
	w.f(th, ysti, k6)
	hs := float64(h * w.sqrtInvN)
	var sum float64
	for i := range y1 {
		yn := (y[i] + ((float64(ha71*k1[i]) + float64(ha73*k3[i])) + (float64(ha74*k4[i]) + float64(ha75*k5[i])))) + float64(ha76*k6[i])
		y1[i] = yn
		sum += yn - yn // 0, or NaN for a NaN or Inf in y1
		ay, ay1 := math.Abs(y[i]), math.Abs(yn)
		if ay1 > ay {
			ay = ay1 // max without math.Max, which is a call on amd64
		}
		wt := hs / (atol[i] + float64(rtol[i]*ay)) // h/(sk·√n)
		pe := ((float64(dpE1*k1[i]) + float64(dpE3*k3[i])) + (float64(dpE4*k4[i]) + float64(dpE5*k5[i]))) + float64(dpE6*k6[i])
		pw[i] = float64(pe * wt)
		ew[i] = float64(dpE7 * wt)
	}
	w.f(th, y1, k7)
	for i := range y1 {
		r := pw[i] + float64(ew[i]*k7[i]) // e_i/(sk_i·√n)
		sum += float64(r * r)
	}
	return sum, 6
}

func (w *dp54Work) stiffness(h float64, y1, k7 []float64) (float64, float64, bool) {
	var num, den float64
	for i := range y1 {
		a := k7[i] - w.k6[i]
		b := y1[i] - w.ysti[i]
		num += float64(a * a)
		den += float64(b * b)
	}
	if den == 0 {
		return 0, 3.25, true
	}
	return math.Abs(h) * math.Sqrt(num/den), 3.25, true
}

// dense writes Shampine's continuous extension as five vectors
// (Hairer's rcont1..rcont5).
func (w *dp54Work) dense(t, h float64, y, k1, y1, k7, coef []float64) int {
	n := len(y)
	r1, r2, r3, r4, r5 := coef[:n], coef[n:2*n], coef[2*n:3*n], coef[3*n:4*n], coef[4*n:5*n]
	for i := range y {
		yd := y1[i] - y[i]
		bspl := float64(h*k1[i]) - yd
		r1[i] = y[i]
		r2[i] = yd
		r3[i] = bspl
		r4[i] = yd - float64(h*k7[i]) - bspl
		r5[i] = float64(h * (float64(dpD1*k1[i]) + float64(dpD3*w.k3[i]) + float64(dpD4*w.k4[i]) + float64(dpD5*w.k5[i]) + float64(dpD6*w.k6[i]) + float64(dpD7*k7[i])))
	}
	return 0
}

// compactSize is the number of floats per step a Solution keeps: the end
// derivative k7, r5 and the step size h. r1 = y and r2 = y1 - y come from
// the stored states, and r3, r4 from h and the derivatives at both ends
// (k1 is the previous step's k7: the first same as last property), with
// the arithmetic of dense, so the same bits.
func (w *dp54Work) compactSize(n int) int { return 2*n + 1 }

// compact writes k7, r5 and h of st's last step into dst, r5 taken from
// the full dense record.
func (w *dp54Work) compact(st *Stepper, full, dst []float64) {
	n := len(full) / 5
	// Loops, not copy: records are short, and the runtime's memmove
	// costs more than the copy itself.
	for i, x := range st.f0[:n] {
		dst[i] = x
	}
	for i, x := range full[4*n : 5*n] {
		dst[n+i] = x
	}
	dst[2*n] = st.hLast
}

// denseCompact writes k7, r5 (with the arithmetic of dense) and h of st's
// last step into dst.
func (w *dp54Work) denseCompact(st *Stepper, dst []float64) int {
	h, k1 := st.hLast, st.fPrev
	n := len(k1)
	k7 := st.f0[:n]
	k3, k4, k5, k6 := w.k3[:n], w.k4[:n], w.k5[:n], w.k6[:n]
	d7, r5 := dst[:n], dst[n:2*n]
	for i := range k1 {
		d7[i] = k7[i]
		r5[i] = float64(h * (float64(dpD1*k1[i]) + float64(dpD3*k3[i]) + float64(dpD4*k4[i]) + float64(dpD5*k5[i]) + float64(dpD6*k6[i]) + float64(dpD7*k7[i])))
	}
	dst[2*n] = h
	return 0
}

// interpCompact is interp on a compact record c, prev[:n] holding the
// step's start derivative k1: r1..r4 are rebuilt with the operations of
// dense, so the result has the same bits.
func (w *dp54Work) interpCompact(y0, y1, prev, c []float64, theta float64, dst []float64) {
	n := len(dst)
	y0, y1, k1 := y0[:n], y1[:n], prev[:n]
	k7, r5, h := c[:n], c[n:2*n], c[2*n]
	t1 := 1 - theta
	for i := range dst {
		yd := y1[i] - y0[i]
		bspl := float64(h*k1[i]) - yd
		r4 := yd - float64(h*k7[i]) - bspl
		dst[i] = y0[i] + float64(theta*(yd+float64(t1*(bspl+float64(theta*(r4+float64(t1*r5[i])))))))
	}
}

func (w *dp54Work) interp(coef []float64, theta float64, dst []float64) {
	n := len(dst)
	r1, r2, r3, r4, r5 := coef[:n], coef[n:2*n], coef[2*n:3*n], coef[3*n:4*n], coef[4*n:5*n]
	t1 := 1 - theta
	for i := range dst {
		dst[i] = r1[i] + float64(theta*(r2[i]+float64(t1*(r3[i]+float64(theta*(r4[i]+float64(t1*r5[i])))))))
	}
}
