package expr

import (
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// Taylor computes truncated Taylor series (jets) of a Program's outputs
// when its variables are themselves truncated series, by the recurrences
// of automatic differentiation in Taylor mode: coefficient k of every node
// from coefficients 0..k of its operands, in O(K²) per node for K
// coefficients. With ODE it computes the Taylor coefficients of the
// solution of y' = f(t, y), the core of a Taylor integrator.
//
// Recurrences (u, w operands; v the result; all sums over j):
//
//	v = u·w       v_k = Σ_{0..k} u_j w_{k-j}
//	v = u/w       v_k = (u_k - Σ_{0..k-1} v_j w_{k-j}) / w_0
//	v = exp u     v_k = (1/k) Σ_{1..k} j u_j v_{k-j}
//	v = log u     v_k = (u_k - (1/k) Σ_{1..k-1} j v_j u_{k-j}) / u_0
//	v = sqrt u    v_k = (u_k - Σ_{1..k-1} v_j v_{k-j}) / (2 v_0)
//	sin, cos      s_k = (1/k) Σ j u_j c_{k-j},  c_k = -(1/k) Σ j u_j s_{k-j}
//	sinh, cosh    as sin, cos with the minus sign dropped
//	tan, tanh     v_k = (1/k) Σ j u_j (1 ± v²)_{k-j}
//	atan u        from (1+u²)·v' = u'
//	atan2(u, w)   from (u²+w²)·v' = w u' - u w'
//
// Integer powers use repeated series multiplication (valid at u_0 = 0); any
// other power u^w is exp(w·log u), which needs u_0 > 0. abs, min, max, sign and step follow
// the branch taken at the expansion point (the convention of Diff at
// kinks), so a series is valid only up to the next kink (see Program.Kinks;
// TaylorDD and TaylorBig can take a forced branch there, SetSide). The
// arithmetic is float64 with products rounded before sums.
//
// A Taylor is not safe for concurrent use; its methods do not allocate.
//
// References:
//
//	A. Griewank, A. Walther, Evaluating Derivatives, 2nd ed., SIAM 2008,
//	  ch. 13 (Taylor arithmetic).
//	À. Jorba, M. Zou, A software package for the numerical integration of
//	  ODEs by means of high-order Taylor methods, Experimental Mathematics
//	  14 (2005) 99–117.
type Taylor struct {
	p   *Program
	n   int         // order: coefficients 0..n
	c   [][]float64 // c[reg][k]
	aux [][]float64 // per instruction: companion series (cos of sin, 1±v², ...)
	au2 [][]float64 // per instruction: a second companion where needed
}

// NewTaylor returns a Taylor evaluator for series of order n (n+1
// coefficients), n >= 0.
func (p *Program) NewTaylor(n int) (*Taylor, error) {
	if n < 0 || n > 1000 {
		return nil, fmt.Errorf("expr: Taylor order %d is out of range [0, 1000]", n)
	}
	t := &Taylor{p: p, n: n}
	buf := make([]float64, p.nreg*(n+1))
	t.c = make([][]float64, p.nreg)
	for i := range t.c {
		t.c[i] = buf[i*(n+1) : (i+1)*(n+1) : (i+1)*(n+1)]
	}
	for i, v := range p.consts {
		t.c[p.nvar+i][0] = v
	}
	t.aux = make([][]float64, len(p.code))
	t.au2 = make([][]float64, len(p.code))
	for i, in := range p.code {
		switch in.op {
		case OpSin, OpCos, OpSinh, OpCosh, OpTan, OpTanh, OpAtan, OpAtan2, OpPow, opPowi:
			t.aux[i] = make([]float64, n+1)
			t.au2[i] = make([]float64, n+1)
		}
	}
	return t, nil
}

// Order returns the series order n.
func (t *Taylor) Order() int { return t.n }

// Var returns the coefficients of variable slot i, to be written before Run
// (or, with Run at increasing orders, coefficient k before order k).
func (t *Taylor) Var(i int) []float64 { return t.c[i] }

// Out returns the coefficients of output i (valid up to the last order run).
func (t *Taylor) Out(i int) []float64 { return t.c[t.p.outs[i]] }

// Run computes the coefficients 0..n of every output from those of the
// variables.
func (t *Taylor) Run() {
	for k := 0; k <= t.n; k++ {
		t.order(k)
	}
}

// conv returns Σ_{j=lo..hi} a_j b_{k-j}, products rounded before sums.
func conv(a, b []float64, k, lo, hi int) float64 {
	s := 0.0
	for j := lo; j <= hi; j++ {
		s += float64(a[j] * b[k-j])
	}
	return s
}

// wconv returns Σ_{j=1..k} j a_j b_{k-j}.
func wconv(a, b []float64, k int) float64 {
	s := 0.0
	for j := 1; j <= k; j++ {
		s += float64(float64(float64(j)*a[j]) * b[k-j])
	}
	return s
}

// order computes coefficient k of every instruction's result.
func (t *Taylor) order(k int) {
	c := t.c
	fk := float64(k)
	for i, in := range t.p.code {
		u := c[in.a]
		v := c[in.dst]
		var w []float64
		if in.op.arity() == 2 && in.op != opPowi && in.op != opSq {
			w = c[in.b]
		}
		switch in.op {
		case OpAdd:
			v[k] = u[k] + w[k]
		case OpSub:
			v[k] = u[k] - w[k]
		case OpNeg:
			v[k] = -u[k]
		case OpMul:
			v[k] = conv(u, w, k, 0, k)
		case opSq:
			v[k] = conv(u, u, k, 0, k)
		case OpDiv:
			v[k] = (u[k] - conv(v, w, k, 0, k-1)) / w[0]
		case opPowi:
			t.powi(i, u, v, int(in.b), k)
		case OpPow:
			// u^w = exp(w·log u): aux = log u, au2 = w·log u.
			l, m := t.aux[i], t.au2[i]
			if k == 0 {
				l[0] = detmath.Log(u[0])
				m[0] = float64(w[0] * l[0])
				v[0] = pow(u[0], w[0])
				break
			}
			l[k] = (u[k] - wconvPart(l, u, k)/fk) / u[0]
			m[k] = conv(w, l, k, 0, k)
			v[k] = wconv(m, v, k) / fk
		case OpExp:
			if k == 0 {
				v[0] = detmath.Exp(u[0])
			} else {
				v[k] = wconv(u, v, k) / fk
			}
		case OpLog:
			if k == 0 {
				v[0] = detmath.Log(u[0])
			} else {
				v[k] = (u[k] - wconvPart(v, u, k)/fk) / u[0]
			}
		case OpSqrt:
			if k == 0 {
				v[0] = math.Sqrt(u[0])
			} else {
				v[k] = (u[k] - conv(v, v, k, 1, k-1)) / (2 * v[0])
			}
		case OpSin, OpCos, OpSinh, OpCosh:
			// s and co: the function and its companion.
			s, co := v, t.aux[i]
			sg := -1.0
			switch in.op {
			case OpSinh, OpCosh:
				sg = 1
			}
			if in.op == OpCos || in.op == OpCosh {
				s, co = t.aux[i], v
			}
			if k == 0 {
				if sg < 0 {
					s[0], co[0] = detmath.Sincos(u[0])
				} else {
					s[0], co[0] = detmath.Sinh(u[0]), detmath.Cosh(u[0])
				}
				break
			}
			s[k] = wconv(u, co, k) / fk
			co[k] = sg * wconv(u, s, k) / fk
		case OpTan, OpTanh:
			// v' = (1 ± v²)·u'; aux holds 1 ± v².
			q, sg := t.aux[i], 1.0
			if in.op == OpTanh {
				sg = -1
			}
			if k == 0 {
				if sg > 0 {
					v[0] = detmath.Tan(u[0])
				} else {
					v[0] = detmath.Tanh(u[0])
				}
				q[0] = 1 + float64(sg*float64(v[0]*v[0]))
				break
			}
			v[k] = wconv(u, q, k) / fk
			q[k] = sg * conv(v, v, k, 0, k)
		case OpAtan:
			// (1+u²)·v' = u'; aux holds 1+u².
			q := t.aux[i]
			if k == 0 {
				v[0] = detmath.Atan(u[0])
				q[0] = 1 + float64(u[0]*u[0])
				break
			}
			q[k] = conv(u, u, k, 0, k)
			// Σ_{j=0..k-1} q_j (k-j) v_{k-j} = k u_k, solved for v_k.
			s := 0.0
			for j := 1; j <= k-1; j++ {
				s += float64(float64(q[j]*float64(k-j)) * v[k-j])
			}
			v[k] = (float64(fk*u[k]) - s) / (fk * q[0])
		case OpAtan2:
			// v = atan2(u, w): (u²+w²)·v' = w·u' - u·w'; aux holds u²+w².
			q := t.aux[i]
			if k == 0 {
				v[0] = detmath.Atan2(u[0], w[0])
				q[0] = float64(u[0]*u[0]) + float64(w[0]*w[0])
				break
			}
			q[k] = conv(u, u, k, 0, k) + conv(w, w, k, 0, k)
			// (w·u' - u·w') coefficient k-1.
			g := 0.0
			for j := 0; j <= k-1; j++ {
				g += float64(w[j]*float64(k-j)*u[k-j]) - float64(u[j]*float64(k-j)*w[k-j])
			}
			s := 0.0
			for j := 1; j <= k-1; j++ {
				s += float64(float64(q[j]*float64(k-j)) * v[k-j])
			}
			v[k] = (g - s) / (fk * q[0])
		case OpAbs:
			v[k] = sign(u[0]) * u[k]
		case OpSign, OpStep:
			if k == 0 {
				v[0] = eval1(in.op, u[0])
			} else {
				v[k] = 0
			}
		case OpMin, OpMax:
			pick := u
			if (in.op == OpMin && w[0] < u[0]) || (in.op == OpMax && w[0] > u[0]) {
				pick = w
			}
			if math.IsNaN(u[0]) || math.IsNaN(w[0]) {
				v[k] = math.NaN()
			} else {
				v[k] = pick[k]
			}
		default:
			panic("expr: Taylor has no rule for " + in.op.String())
		}
	}
}

// wconvPart returns Σ_{j=1..k-1} j a_j b_{k-j} (wconv without the j = k term).
func wconvPart(a, b []float64, k int) float64 {
	s := 0.0
	for j := 1; j < k; j++ {
		s += float64(float64(float64(j)*a[j]) * b[k-j])
	}
	return s
}

// powi computes coefficient k of u^n by binary powering of series, with
// the instruction's two scratch series. At k == 0 it also resets them.
func (t *Taylor) powi(i int, u, v []float64, n, k int) {
	// Coefficient k of u^n depends on coefficients 0..k of u only, so the
	// whole product is recomputed up to k (O(K² log n) per order; integer
	// powers are short in practice).
	neg := n < 0
	if neg {
		n = -n
	}
	r, b := t.aux[i], t.au2[i]
	// r = 1, b = u, up to order k.
	for j := 0; j <= k; j++ {
		r[j], b[j] = 0, u[j]
	}
	r[0] = 1
	for ; n > 0; n >>= 1 {
		if n&1 == 1 {
			for j := k; j >= 0; j-- { // in place, highest first
				r[j] = conv(r, b, j, 0, j)
			}
		}
		if n > 1 {
			for j := k; j >= 0; j-- {
				b[j] = conv(b, b, j, 0, j)
			}
		}
	}
	if !neg {
		v[k] = r[k]
		return
	}
	// v = 1/r: v_k = (δ_k0 - Σ_{0..k-1} v_j r_{k-j}) / r_0.
	one := 0.0
	if k == 0 {
		one = 1
	}
	v[k] = (one - conv(v, r, k, 0, k-1)) / r[0]
}

// ODE computes the Taylor coefficients of the solution of y' = f(t, y)
// through (t0, y0), where output i of the program is f_i and variable slot
// 0 is t, slots 1..len(y0) the state, the remaining slots parameters
// (already set in coefficient 0 by SetParam). It writes coefficient k of
// y_i into dst[i][k], k = 0..Order; a nil dst leaves them in Var(1+i).
func (t *Taylor) ODE(t0 float64, y0 []float64, dst [][]float64) error {
	n := len(y0)
	if t.p.NumOut() != n || t.p.nvar < 1+n {
		return fmt.Errorf("expr: ODE with %d states for a program with %d outputs and %d variables", n, t.p.NumOut(), t.p.nvar)
	}
	if dst != nil && len(dst) < n {
		return fmt.Errorf("expr: ODE output has %d rows, want %d", len(dst), n)
	}
	ts := t.c[0]
	for k := range ts {
		ts[k] = 0
	}
	ts[0] = t0
	if t.n >= 1 {
		ts[1] = 1
	}
	for i := range n {
		ys := t.c[1+i]
		for k := range ys {
			ys[k] = 0
		}
		ys[0] = y0[i]
	}
	for k := 0; k < t.n; k++ {
		t.order(k)
		for i := range n {
			t.c[1+i][k+1] = t.c[t.p.outs[i]][k] / float64(k+1)
		}
	}
	for i := range min(n, len(dst)) {
		copy(dst[i], t.c[1+i])
	}
	return nil
}

// SetParam sets a variable slot to the constant v (coefficient 0, the rest 0).
func (t *Taylor) SetParam(slot int, v float64) {
	s := t.c[slot]
	for k := range s {
		s[k] = 0
	}
	s[0] = v
}

// Step advances y' = f(t, y) from (t0, y0) by h with the Taylor polynomial
// of the Taylor's order n (a one-step method of order n, local error
// O(h^(n+1))), writing y(t0 + h) into dst. The coefficients of the step
// stay readable through Var(1+i).
//
// References: Jorba & Zou (2005), see Taylor.
func (t *Taylor) Step(t0 float64, y0 []float64, h float64, dst []float64) error {
	n := len(y0)
	if len(dst) < n {
		return fmt.Errorf("expr: Step output has length %d, want %d", len(dst), n)
	}
	if err := t.ODE(t0, y0, nil); err != nil {
		return err
	}
	for i := range n {
		c := t.c[1+i]
		s := 0.0
		for k := t.n; k >= 0; k-- {
			s = float64(s*h) + c[k]
		}
		dst[i] = s
	}
	return nil
}
