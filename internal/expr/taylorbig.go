package expr

import (
	"fmt"
	"math/big"

	"github.com/plumbdyn/plumb/internal/bigadd"
)

// TaylorBig is Taylor in math/big.Float arithmetic at a precision the
// caller chooses: the same recurrences (see Taylor), every operation
// rounded to the evaluator's precision, for reference solutions by a
// high-order Taylor method beyond double-double. The program's constants
// are its float64 values, as for Big. Not safe for concurrent use.
//
// Cost: O(K²) big.Float multiplications per product node for K
// coefficients. Sums and products go to scratch values that never alias
// their operands (big.Float allocates when they do); what allocates is
// left to divisions and the elementary functions, O(K) per node (measured:
// about 130 allocations per Lorenz step at order 48; see
// BenchmarkReferenceLorenz in package plumb).
//
// References: see Taylor.
type TaylorBig struct {
	p    *Program
	n    int
	prec uint
	c    [][]*big.Float
	aux  [][]*big.Float
	au2  [][]*big.Float
	s, m *big.Float // scratch for sums and products
	g, q *big.Float // small integers; products by them (big.Float's Mul
	// allocates when the result aliases an operand)
	// acc holds two partial sums used in turn: big.Float's Add allocates
	// when the result aliases an operand.
	acc [2]*big.Float
	// kinks and side: see TaylorDD.
	kinks []Kink
	side  []int8
}

// NewTaylorBig returns a big.Float Taylor evaluator of order n (n+1
// coefficients, 0 <= n <= 1000) at prec bits (2 <= prec <= big.MaxPrec).
func (p *Program) NewTaylorBig(n int, prec uint) (*TaylorBig, error) {
	if n < 0 || n > 1000 {
		return nil, fmt.Errorf("expr: Taylor order %d is out of range [0, 1000]", n)
	}
	if prec < 2 || prec > big.MaxPrec {
		return nil, fmt.Errorf("expr: precision %d bits is out of range [2, %d]", prec, uint(big.MaxPrec))
	}
	mk := func() []*big.Float {
		s := make([]*big.Float, n+1)
		for k := range s {
			s[k] = new(big.Float).SetPrec(prec)
		}
		return s
	}
	t := &TaylorBig{p: p, n: n, prec: prec,
		s: newF(prec), m: newF(prec), g: newF(prec), q: newF(prec),
		acc: [2]*big.Float{newF(prec), newF(prec)}}
	t.kinks, t.side = kinkSides(p)
	t.c = make([][]*big.Float, p.nreg)
	for i := range t.c {
		t.c[i] = mk()
	}
	for i, v := range p.consts {
		if v != v {
			return nil, fmt.Errorf("expr: constant %d is NaN: %w", i, ErrNaN)
		}
		t.c[p.nvar+i][0].SetFloat64(v)
	}
	t.aux = make([][]*big.Float, len(p.code))
	t.au2 = make([][]*big.Float, len(p.code))
	for i, in := range p.code {
		switch in.op {
		case OpSin, OpCos, OpSinh, OpCosh, OpTan, OpTanh, OpAtan, OpAtan2, OpPow, opPowi:
			t.aux[i] = mk()
			t.au2[i] = mk()
		}
	}
	return t, nil
}

// Order returns the series order n.
func (t *TaylorBig) Order() int { return t.n }

// Prec returns the working precision in bits.
func (t *TaylorBig) Prec() uint { return t.prec }

// Var returns the coefficients of variable slot i.
func (t *TaylorBig) Var(i int) []*big.Float { return t.c[i] }

// Out returns the coefficients of output i.
func (t *TaylorBig) Out(i int) []*big.Float { return t.c[t.p.outs[i]] }

// SetParam sets a variable slot to the constant v (rounded to Prec).
func (t *TaylorBig) SetParam(slot int, v *big.Float) {
	for _, x := range t.c[slot] {
		x.SetInt64(0)
	}
	t.c[slot][0].Set(v)
}

// bconv sets z = Σ_{j=lo..hi} a_j b_{k-j} and returns z. z must not alias
// an operand; t.m and t.acc are used as scratch.
func (t *TaylorBig) bconv(z *big.Float, a, b []*big.Float, k, lo, hi int) *big.Float {
	x, y := t.acc[0], t.acc[1]
	x.SetInt64(0)
	for j := lo; j <= hi; j++ {
		bigadd.Add(y, x, t.m.Mul(a[j], b[k-j]))
		x, y = y, x
	}
	return z.Set(x)
}

// bwconv sets z = Σ_{j=1..hi} j a_j b_{k-j} and returns z.
func (t *TaylorBig) bwconv(z *big.Float, a, b []*big.Float, k, hi int) *big.Float {
	x, y := t.acc[0], t.acc[1]
	x.SetInt64(0)
	for j := 1; j <= hi; j++ {
		t.m.Mul(a[j], b[k-j])
		bigadd.Add(y, x, t.q.Mul(t.m, t.g.SetInt64(int64(j))))
		x, y = y, x
	}
	return z.Set(x)
}

// need reports a nil result of a big math function (a value that is not
// real) as a panic that ODE turns into an error wrapping ErrNaN.
func need(x *big.Float, op Op) {
	if x == nil {
		panic(bigNaN{op})
	}
}

type bigNaN struct{ op Op }

func (t *TaylorBig) order(k int) {
	c := t.c
	fk := int64(k)
	s := t.s
	for i, in := range t.p.code {
		u := c[in.a]
		v := c[in.dst]
		var w []*big.Float
		if in.op.arity() == 2 && in.op != opPowi && in.op != opSq {
			w = c[in.b]
		}
		switch in.op {
		case OpAdd:
			bigadd.Add(v[k], u[k], w[k])
		case OpSub:
			bigadd.Sub(v[k], u[k], w[k])
		case OpNeg:
			v[k].Neg(u[k])
		case OpMul:
			v[k].Set(t.bconv(s, u, w, k, 0, k))
		case opSq:
			v[k].Set(t.bconv(s, u, u, k, 0, k))
		case OpDiv:
			t.bconv(s, v, w, k, 0, k-1)
			v[k].Quo(bigadd.Sub(s, u[k], s), w[0])
		case opPowi:
			t.powi(i, u, v, int(in.b), k)
		case OpPow:
			l, m := t.aux[i], t.au2[i]
			if k == 0 {
				need(BigLog(l[0], u[0]), OpPow)
				m[0].Mul(w[0], l[0])
				need(BigPow(v[0], u[0], w[0]), OpPow)
				break
			}
			t.bwconv(s, l, u, k, k-1)
			s.Quo(s, t.g.SetInt64(fk))
			l[k].Quo(bigadd.Sub(s, u[k], s), u[0])
			m[k].Set(t.bconv(s, w, l, k, 0, k))
			t.bwconv(s, m, v, k, k)
			v[k].Quo(s, t.g.SetInt64(fk))
		case OpExp:
			if k == 0 {
				need(BigExp(v[0], u[0]), OpExp)
			} else {
				t.bwconv(s, u, v, k, k)
				v[k].Quo(s, t.g.SetInt64(fk))
			}
		case OpLog:
			if k == 0 {
				need(BigLog(v[0], u[0]), OpLog)
			} else {
				t.bwconv(s, v, u, k, k-1)
				s.Quo(s, t.g.SetInt64(fk))
				v[k].Quo(bigadd.Sub(s, u[k], s), u[0])
			}
		case OpSqrt:
			if k == 0 {
				if u[0].Sign() < 0 {
					panic(bigNaN{OpSqrt})
				}
				v[0].Sqrt(u[0])
			} else {
				t.bconv(s, v, v, k, 1, k-1)
				bigadd.Sub(s, u[k], s)
				v[k].Quo(s, t.q.Mul(v[0], t.g.SetInt64(2)))
			}
		case OpSin, OpCos, OpSinh, OpCosh:
			sn, co := v, t.aux[i]
			hyp := in.op == OpSinh || in.op == OpCosh
			if in.op == OpCos || in.op == OpCosh {
				sn, co = t.aux[i], v
			}
			if k == 0 {
				if hyp {
					need(BigSinh(sn[0], u[0]), in.op)
					need(BigCosh(co[0], u[0]), in.op)
				} else {
					need(BigSin(sn[0], u[0]), in.op)
					need(BigCos(co[0], u[0]), in.op)
				}
				break
			}
			t.bwconv(s, u, co, k, k)
			sn[k].Quo(s, t.g.SetInt64(fk))
			t.bwconv(s, u, sn, k, k)
			co[k].Quo(s, t.g.SetInt64(fk))
			if !hyp {
				co[k].Neg(co[k])
			}
		case OpTan, OpTanh:
			q := t.aux[i]
			if k == 0 {
				if in.op == OpTan {
					need(BigTan(v[0], u[0]), OpTan)
					bigadd.Add(q[0], t.g.SetInt64(1), t.m.Mul(v[0], v[0]))
				} else {
					need(BigTanh(v[0], u[0]), OpTanh)
					bigadd.Sub(q[0], t.g.SetInt64(1), t.m.Mul(v[0], v[0]))
				}
				break
			}
			t.bwconv(s, u, q, k, k)
			v[k].Quo(s, t.g.SetInt64(fk))
			q[k].Set(t.bconv(s, v, v, k, 0, k))
			if in.op == OpTanh {
				q[k].Neg(q[k])
			}
		case OpAtan:
			q := t.aux[i]
			if k == 0 {
				need(BigAtan(v[0], u[0]), OpAtan)
				bigadd.Add(q[0], t.g.SetInt64(1), t.m.Mul(u[0], u[0]))
				break
			}
			q[k].Set(t.bconv(s, u, u, k, 0, k))
			// Σ_{j=1..k-1} (k-j) q_j v_{k-j}.
			s.SetInt64(0)
			for j := 1; j <= k-1; j++ {
				t.m.Mul(q[j], v[k-j])
				bigadd.Add(s, s, t.q.Mul(t.m, t.g.SetInt64(int64(k-j))))
			}
			t.m.Mul(t.g.SetInt64(fk), u[k])
			bigadd.Sub(s, t.m, s)
			v[k].Quo(s, t.m.Mul(t.g.SetInt64(fk), q[0]))
		case OpAtan2:
			q := t.aux[i]
			if k == 0 {
				need(BigAtan2(v[0], u[0], w[0]), OpAtan2)
				bigadd.Add(q[0], t.m.Mul(u[0], u[0]), t.g.Mul(w[0], w[0]))
				break
			}
			// q_k = (u²)_k + (w²)_k, with au2 as the second sum.
			t.bconv(s, u, u, k, 0, k)
			q[k].Set(s)
			t.bconv(s, w, w, k, 0, k)
			bigadd.Add(q[k], q[k], s)
			// g = Σ_{j=0..k-1} (k-j)(w_j u_{k-j} - u_j w_{k-j}), kept in au2[k].
			gs := t.au2[i][k]
			gs.SetInt64(0)
			for j := 0; j <= k-1; j++ {
				t.m.Mul(w[j], u[k-j])
				t.g.Mul(u[j], w[k-j])
				bigadd.Sub(t.m, t.m, t.g)
				bigadd.Add(gs, gs, t.q.Mul(t.m, t.g.SetInt64(int64(k-j))))
			}
			s.SetInt64(0)
			for j := 1; j <= k-1; j++ {
				t.m.Mul(q[j], v[k-j])
				bigadd.Add(s, s, t.q.Mul(t.m, t.g.SetInt64(int64(k-j))))
			}
			bigadd.Sub(s, gs, s)
			v[k].Quo(s, t.m.Mul(t.g.SetInt64(fk), q[0]))
		case OpAbs:
			if sd := sideOf(t.side[i], u[0].Sign()); sd < 0 {
				v[k].Neg(u[k])
			} else if sd > 0 {
				v[k].Set(u[k])
			} else {
				v[k].SetInt64(0)
			}
		case OpSign, OpStep:
			if k != 0 {
				v[k].SetInt64(0)
				break
			}
			sd := sideOf(t.side[i], u[0].Sign())
			sg := int64(sd)
			if in.op == OpStep {
				sg = 0
				if sd >= 0 {
					sg = 1
				}
			}
			v[0].SetInt64(sg)
		case OpMin, OpMax:
			// The side is that of u - w.
			pick := u
			if cm := -sideOf(t.side[i], u[0].Cmp(w[0])); (in.op == OpMin && cm < 0) || (in.op == OpMax && cm > 0) {
				pick = w
			}
			v[k].Set(pick[k])
		default:
			panic("expr: TaylorBig has no rule for " + in.op.String())
		}
	}
}

// powi computes coefficient k of u^n by binary powering of series.
func (t *TaylorBig) powi(i int, u, v []*big.Float, n, k int) {
	neg := n < 0
	if neg {
		n = -n
	}
	r, b := t.aux[i], t.au2[i]
	for j := 0; j <= k; j++ {
		r[j].SetInt64(0)
		b[j].Set(u[j])
	}
	r[0].SetInt64(1)
	for ; n > 0; n >>= 1 {
		if n&1 == 1 {
			for j := k; j >= 0; j-- {
				r[j].Set(t.bconv(t.s, r, b, j, 0, j))
			}
		}
		if n > 1 {
			for j := k; j >= 0; j-- {
				b[j].Set(t.bconv(t.s, b, b, j, 0, j))
			}
		}
	}
	if !neg {
		v[k].Set(r[k])
		return
	}
	t.bconv(t.s, v, r, k, 0, k-1)
	if k == 0 {
		bigadd.Sub(t.s, t.g.SetInt64(1), t.s)
	} else {
		t.s.Neg(t.s)
	}
	v[k].Quo(t.s, r[0])
}

// ODE computes the Taylor coefficients of the solution of y' = f(t, y)
// through (t0, y0) as Taylor.ODE does, in big.Float at Prec bits; dst[i][k]
// is set to coefficient k of y_i (nil entries are allocated), and a nil dst
// leaves them in Var(1+i). A value that is not a real number (0/0, Inf-Inf,
// log of a negative number) gives an error wrapping ErrNaN naming the
// operation.
func (t *TaylorBig) ODE(t0 *big.Float, y0 []*big.Float, dst [][]*big.Float) (err error) {
	n := len(y0)
	if t.p.NumOut() != n || t.p.nvar < 1+n {
		return fmt.Errorf("expr: ODE with %d states for a program with %d outputs and %d variables", n, t.p.NumOut(), t.p.nvar)
	}
	if dst != nil && len(dst) < n {
		return fmt.Errorf("expr: ODE output has %d rows, want %d", len(dst), n)
	}
	defer func() {
		if v := recover(); v != nil {
			switch e := v.(type) {
			case bigNaN:
				err = fmt.Errorf("expr: %s: %w", e.op, ErrNaN)
			case big.ErrNaN:
				err = fmt.Errorf("expr: %s: %w", e.Error(), ErrNaN)
			default:
				panic(v)
			}
		}
	}()
	ts := t.c[0]
	for _, x := range ts {
		x.SetInt64(0)
	}
	ts[0].Set(t0)
	if t.n >= 1 {
		ts[1].SetInt64(1)
	}
	for i := range n {
		for _, x := range t.c[1+i] {
			x.SetInt64(0)
		}
		t.c[1+i][0].Set(y0[i])
	}
	for k := 0; k < t.n; k++ {
		t.order(k)
		for i := range n {
			t.c[1+i][k+1].Quo(t.c[t.p.outs[i]][k], t.g.SetInt64(int64(k+1)))
		}
	}
	for i := range min(n, len(dst)) {
		for k := range min(len(dst[i]), t.n+1) {
			if dst[i][k] == nil {
				dst[i][k] = new(big.Float).SetPrec(t.prec)
			}
			dst[i][k].Set(t.c[1+i][k])
		}
	}
	return nil
}
