package expr

import (
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/internal/dd"
)

// TaylorDD is Taylor in double-double arithmetic (internal/dd): the same
// recurrences (see Taylor) with about 32 significant digits, for reference
// solutions by a high-order Taylor method. The program's constants are its
// float64 values, as for DD. Not safe for concurrent use; its methods do not
// allocate.
//
// References: see Taylor.
type TaylorDD struct {
	p   *Program
	n   int
	c   [][]dd.Float
	aux [][]dd.Float
	au2 [][]dd.Float
	// kinks and side: the non-analytic instructions and the branch forced
	// at each (per instruction, see SetSide).
	kinks []Kink
	side  []int8
}

// NewTaylorDD returns a double-double Taylor evaluator of order n (n+1
// coefficients), 0 <= n <= 1000.
func (p *Program) NewTaylorDD(n int) (*TaylorDD, error) {
	if n < 0 || n > 1000 {
		return nil, fmt.Errorf("expr: Taylor order %d is out of range [0, 1000]", n)
	}
	t := &TaylorDD{p: p, n: n}
	t.kinks, t.side = kinkSides(p)
	buf := make([]dd.Float, p.nreg*(n+1))
	t.c = make([][]dd.Float, p.nreg)
	for i := range t.c {
		t.c[i] = buf[i*(n+1) : (i+1)*(n+1) : (i+1)*(n+1)]
	}
	for i, v := range p.consts {
		t.c[p.nvar+i][0] = dd.From(v)
	}
	t.aux = make([][]dd.Float, len(p.code))
	t.au2 = make([][]dd.Float, len(p.code))
	for i, in := range p.code {
		switch in.op {
		case OpSin, OpCos, OpSinh, OpCosh, OpTan, OpTanh, OpAtan, OpAtan2, OpPow, opPowi:
			t.aux[i] = make([]dd.Float, n+1)
			t.au2[i] = make([]dd.Float, n+1)
		}
	}
	return t, nil
}

// Order returns the series order n.
func (t *TaylorDD) Order() int { return t.n }

// Var returns the coefficients of variable slot i.
func (t *TaylorDD) Var(i int) []dd.Float { return t.c[i] }

// Out returns the coefficients of output i.
func (t *TaylorDD) Out(i int) []dd.Float { return t.c[t.p.outs[i]] }

// SetParam sets a variable slot to the constant v.
func (t *TaylorDD) SetParam(slot int, v dd.Float) {
	s := t.c[slot]
	clear(s)
	s[0] = v
}

// Run computes the coefficients 0..n of every output from the variables'.
func (t *TaylorDD) Run() {
	for k := 0; k <= t.n; k++ {
		t.order(k)
	}
}

// dconv returns Σ_{j=lo..hi} a_j b_{k-j}.
func dconv(a, b []dd.Float, k, lo, hi int) dd.Float {
	var s dd.Float
	for j := lo; j <= hi; j++ {
		s = dd.Add(s, dd.Mul(a[j], b[k-j]))
	}
	return s
}

// dwconv returns Σ_{j=1..hi} j a_j b_{k-j}.
func dwconv(a, b []dd.Float, k, hi int) dd.Float {
	var s dd.Float
	for j := 1; j <= hi; j++ {
		s = dd.Add(s, dd.MulFloat(dd.Mul(a[j], b[k-j]), float64(j)))
	}
	return s
}

func (t *TaylorDD) order(k int) {
	c := t.c
	fk := dd.From(float64(k))
	for i, in := range t.p.code {
		u := c[in.a]
		v := c[in.dst]
		var w []dd.Float
		if in.op.arity() == 2 && in.op != opPowi && in.op != opSq {
			w = c[in.b]
		}
		switch in.op {
		case OpAdd:
			v[k] = dd.Add(u[k], w[k])
		case OpSub:
			v[k] = dd.Sub(u[k], w[k])
		case OpNeg:
			v[k] = dd.Neg(u[k])
		case OpMul:
			v[k] = dconv(u, w, k, 0, k)
		case opSq:
			v[k] = dconv(u, u, k, 0, k)
		case OpDiv:
			v[k] = dd.Div(dd.Sub(u[k], dconv(v, w, k, 0, k-1)), w[0])
		case opPowi:
			t.powi(i, u, v, int(in.b), k)
		case OpPow:
			l, m := t.aux[i], t.au2[i]
			if k == 0 {
				l[0] = dd.Log(u[0])
				m[0] = dd.Mul(w[0], l[0])
				v[0] = dd.Pow(u[0], w[0])
				break
			}
			l[k] = dd.Div(dd.Sub(u[k], dd.Div(dwconv(l, u, k, k-1), fk)), u[0])
			m[k] = dconv(w, l, k, 0, k)
			v[k] = dd.Div(dwconv(m, v, k, k), fk)
		case OpExp:
			if k == 0 {
				v[0] = dd.Exp(u[0])
			} else {
				v[k] = dd.Div(dwconv(u, v, k, k), fk)
			}
		case OpLog:
			if k == 0 {
				v[0] = dd.Log(u[0])
			} else {
				v[k] = dd.Div(dd.Sub(u[k], dd.Div(dwconv(v, u, k, k-1), fk)), u[0])
			}
		case OpSqrt:
			if k == 0 {
				v[0] = dd.Sqrt(u[0])
			} else {
				v[k] = dd.Div(dd.Sub(u[k], dconv(v, v, k, 1, k-1)), dd.MulFloat(v[0], 2))
			}
		case OpSin, OpCos, OpSinh, OpCosh:
			s, co := v, t.aux[i]
			hyp := in.op == OpSinh || in.op == OpCosh
			if in.op == OpCos || in.op == OpCosh {
				s, co = t.aux[i], v
			}
			if k == 0 {
				if hyp {
					s[0], co[0] = dd.Sinh(u[0]), dd.Cosh(u[0])
				} else {
					s[0], co[0] = dd.SinCos(u[0])
				}
				break
			}
			s[k] = dd.Div(dwconv(u, co, k, k), fk)
			co[k] = dd.Div(dwconv(u, s, k, k), fk)
			if !hyp {
				co[k] = dd.Neg(co[k])
			}
		case OpTan, OpTanh:
			q := t.aux[i]
			if k == 0 {
				if in.op == OpTan {
					v[0] = dd.Tan(u[0])
					q[0] = dd.Add(dd.From(1), dd.Mul(v[0], v[0]))
				} else {
					v[0] = dd.Tanh(u[0])
					q[0] = dd.Sub(dd.From(1), dd.Mul(v[0], v[0]))
				}
				break
			}
			v[k] = dd.Div(dwconv(u, q, k, k), fk)
			q[k] = dconv(v, v, k, 0, k)
			if in.op == OpTanh {
				q[k] = dd.Neg(q[k])
			}
		case OpAtan:
			q := t.aux[i]
			if k == 0 {
				v[0] = dd.Atan(u[0])
				q[0] = dd.Add(dd.From(1), dd.Mul(u[0], u[0]))
				break
			}
			q[k] = dconv(u, u, k, 0, k)
			var s dd.Float
			for j := 1; j <= k-1; j++ {
				s = dd.Add(s, dd.MulFloat(dd.Mul(q[j], v[k-j]), float64(k-j)))
			}
			v[k] = dd.Div(dd.Sub(dd.Mul(fk, u[k]), s), dd.Mul(fk, q[0]))
		case OpAtan2:
			q := t.aux[i]
			if k == 0 {
				v[0] = dd.Atan2(u[0], w[0])
				q[0] = dd.Add(dd.Mul(u[0], u[0]), dd.Mul(w[0], w[0]))
				break
			}
			q[k] = dd.Add(dconv(u, u, k, 0, k), dconv(w, w, k, 0, k))
			var g, s dd.Float
			for j := 0; j <= k-1; j++ {
				kj := float64(k - j)
				g = dd.Add(g, dd.MulFloat(dd.Sub(dd.Mul(w[j], u[k-j]), dd.Mul(u[j], w[k-j])), kj))
			}
			for j := 1; j <= k-1; j++ {
				s = dd.Add(s, dd.MulFloat(dd.Mul(q[j], v[k-j]), float64(k-j)))
			}
			v[k] = dd.Div(dd.Sub(g, s), dd.Mul(fk, q[0]))
		case OpAbs:
			v[k] = dd.MulFloat(u[k], float64(sideOf(t.side[i], int(sign(u[0].Hi)))))
		case OpSign, OpStep:
			if k == 0 {
				x := u[0].Hi
				if t.side[i] != 0 {
					x = float64(t.side[i])
				}
				v[0] = dd.From(eval1(in.op, x))
			} else {
				v[k] = dd.Float{}
			}
		case OpMin, OpMax:
			// The side is that of u - w.
			pick := u
			if c := -sideOf(t.side[i], dd.Cmp(u[0], w[0])); (in.op == OpMin && c < 0) || (in.op == OpMax && c > 0) {
				pick = w
			}
			if math.IsNaN(u[0].Hi) || math.IsNaN(w[0].Hi) {
				v[k] = dd.From(math.NaN())
			} else {
				v[k] = pick[k]
			}
		default:
			panic("expr: TaylorDD has no rule for " + in.op.String())
		}
	}
}

// powi computes coefficient k of u^n by binary powering of series.
func (t *TaylorDD) powi(i int, u, v []dd.Float, n, k int) {
	neg := n < 0
	if neg {
		n = -n
	}
	r, b := t.aux[i], t.au2[i]
	for j := 0; j <= k; j++ {
		r[j], b[j] = dd.Float{}, u[j]
	}
	r[0] = dd.From(1)
	for ; n > 0; n >>= 1 {
		if n&1 == 1 {
			for j := k; j >= 0; j-- {
				r[j] = dconv(r, b, j, 0, j)
			}
		}
		if n > 1 {
			for j := k; j >= 0; j-- {
				b[j] = dconv(b, b, j, 0, j)
			}
		}
	}
	if !neg {
		v[k] = r[k]
		return
	}
	var one dd.Float
	if k == 0 {
		one = dd.From(1)
	}
	v[k] = dd.Div(dd.Sub(one, dconv(v, r, k, 0, k-1)), r[0])
}

// ODE computes the Taylor coefficients of the solution of y' = f(t, y)
// through (t0, y0) as Taylor.ODE does, in double-double; a nil dst leaves
// them in Var(1+i).
func (t *TaylorDD) ODE(t0 dd.Float, y0 []dd.Float, dst [][]dd.Float) error {
	n := len(y0)
	if t.p.NumOut() != n || t.p.nvar < 1+n {
		return fmt.Errorf("expr: ODE with %d states for a program with %d outputs and %d variables", n, t.p.NumOut(), t.p.nvar)
	}
	if dst != nil && len(dst) < n {
		return fmt.Errorf("expr: ODE output has %d rows, want %d", len(dst), n)
	}
	ts := t.c[0]
	clear(ts)
	ts[0] = t0
	if t.n >= 1 {
		ts[1] = dd.From(1)
	}
	for i := range n {
		clear(t.c[1+i])
		t.c[1+i][0] = y0[i]
	}
	for k := 0; k < t.n; k++ {
		t.order(k)
		for i := range n {
			t.c[1+i][k+1] = dd.Div(t.c[t.p.outs[i]][k], dd.From(float64(k+1)))
		}
	}
	for i := range min(n, len(dst)) {
		copy(dst[i], t.c[1+i])
	}
	return nil
}

// Step advances y' = f(t, y) from (t0, y0) by h with the Taylor polynomial
// of order n, writing y(t0 + h) into dst (which may be y0).
func (t *TaylorDD) Step(t0 dd.Float, y0 []dd.Float, h dd.Float, dst []dd.Float) error {
	n := len(y0)
	if len(dst) < n {
		return fmt.Errorf("expr: Step output has length %d, want %d", len(dst), n)
	}
	if err := t.ODE(t0, y0, nil); err != nil {
		return err
	}
	for i := range n {
		c := t.c[1+i]
		var s dd.Float
		for k := t.n; k >= 0; k-- {
			s = dd.Add(dd.Mul(s, h), c[k])
		}
		dst[i] = s
	}
	return nil
}
