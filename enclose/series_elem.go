package enclose

import (
	"github.com/plumbdyn/plumb/internal/expr"
	"github.com/plumbdyn/plumb/internal/ival"
)

// elementary computes coefficient k of the elementary functions (exp,
// log, the circular and hyperbolic functions, atan, atan2, real powers):
// coefficient 0 from internal/ival's enclosure of the function, the rest
// by the recurrences of expr.Taylor in interval arithmetic.
func (s *series) elementary(i int, in expr.Instr, u, v, w []ival.Interval, k int, fk ival.Interval) error {
	switch in.Op {
	case expr.OpExp:
		if k == 0 {
			v[0] = ival.Exp(u[0])
		} else {
			v[k] = ival.Div(s.wconv(u, v, k, k), fk)
		}
	case expr.OpLog:
		if k == 0 {
			if !(u[0].Lo > 0) {
				return s.boxError(in, ErrDomain, "its argument can be 0 or negative in the box")
			}
			v[0] = ival.Log(u[0])
		} else {
			v[k] = ival.Div(ival.Sub(u[k], ival.Div(s.wconv(v, u, k, k-1), fk)), u[0])
		}
	case expr.OpSin, expr.OpCos, expr.OpSinh, expr.OpCosh:
		sn, co := v, s.aux[i]
		hyp := in.Op == expr.OpSinh || in.Op == expr.OpCosh
		if in.Op == expr.OpCos || in.Op == expr.OpCosh {
			sn, co = s.aux[i], v
		}
		if k == 0 {
			if hyp {
				sn[0], co[0] = ival.Sinh(u[0]), ival.Cosh(u[0])
			} else {
				sn[0], co[0] = ival.Sin(u[0]), ival.Cos(u[0])
			}
			break
		}
		sn[k] = ival.Div(s.wconv(u, co, k, k), fk)
		co[k] = ival.Div(s.wconv(u, sn, k, k), fk)
		if !hyp {
			co[k] = ival.Neg(co[k])
		}
	case expr.OpTan, expr.OpTanh:
		q := s.aux[i]
		if k == 0 {
			if in.Op == expr.OpTan {
				v[0] = ival.Tan(u[0])
				q[0] = ival.Add(ival.Point(1), ival.Sqr(v[0]))
			} else {
				v[0] = ival.Tanh(u[0])
				q[0] = ival.Sub(ival.Point(1), ival.Sqr(v[0]))
			}
			break
		}
		v[k] = ival.Div(s.wconv(u, q, k, k), fk)
		q[k] = sqconv(v, k, 0)
		if in.Op == expr.OpTanh {
			q[k] = ival.Neg(q[k])
		}
	case expr.OpAtan:
		q := s.aux[i]
		if k == 0 {
			v[0] = ival.Atan(u[0])
			q[0] = ival.Add(ival.Point(1), ival.Sqr(u[0]))
			break
		}
		q[k] = sqconv(u, k, 0)
		var r ival.Interval
		for j := 1; j <= k-1; j++ {
			r = ival.Add(r, ival.Mul(ival.Mul(q[j], v[k-j]), s.fk[k-j]))
		}
		v[k] = ival.Div(ival.Sub(ival.Mul(fk, u[k]), r), ival.Mul(fk, q[0]))
	case expr.OpAtan2:
		q := s.aux[i]
		if k == 0 {
			if hasZero(u[0]) && w[0].Lo <= 0 {
				return s.boxError(in, ErrKink, "its first argument can be 0 where the second is not positive in the box (its cut)")
			}
			v[0] = ival.Atan2(u[0], w[0])
			q[0] = ival.Add(ival.Sqr(u[0]), ival.Sqr(w[0]))
			break
		}
		q[k] = ival.Add(sqconv(u, k, 0), sqconv(w, k, 0))
		var g, r ival.Interval
		for j := 0; j <= k-1; j++ {
			g = ival.Add(g, ival.Mul(ival.Sub(ival.Mul(w[j], u[k-j]), ival.Mul(u[j], w[k-j])), s.fk[k-j]))
		}
		for j := 1; j <= k-1; j++ {
			r = ival.Add(r, ival.Mul(ival.Mul(q[j], v[k-j]), s.fk[k-j]))
		}
		v[k] = ival.Div(ival.Sub(g, r), ival.Mul(fk, q[0]))
	case expr.OpPow:
		l, m := s.aux[i], s.au2[i]
		if k == 0 {
			if !(u[0].Lo > 0) {
				return s.boxError(in, ErrKink, "its base can be 0 or negative in the box (a branch point)")
			}
			l[0] = ival.Log(u[0])
			m[0] = ival.Mul(w[0], l[0])
			v[0] = ival.Exp(m[0])
			break
		}
		l[k] = ival.Div(ival.Sub(u[k], ival.Div(s.wconv(l, u, k, k-1), fk)), u[0])
		m[k] = conv(w, l, k, 0, k)
		v[k] = ival.Div(s.wconv(m, v, k, k), fk)
	default:
		return s.boxError(in, ErrDomain, "no interval rule for this operation")
	}
	return nil
}
