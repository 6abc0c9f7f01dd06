package enclose

import (
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/internal/expr"
	"github.com/plumbdyn/plumb/internal/ival"
)

// series computes truncated Taylor series of a Program's outputs in
// interval arithmetic (internal/ival) when its variables are themselves
// truncated interval series: the recurrences of Taylor-mode automatic
// differentiation that expr.Taylor runs in float64 (see its doc comment
// for the table), each coefficient an interval that contains the exact
// coefficient for every point of the operands' intervals. With ode it
// computes enclosures of the Taylor coefficients of the solutions of
// y' = f(t, y) through every point of an interval box.
//
// Where the formulas are not analytic over the box, there is no series to
// enclose, and order(0) returns a *BoxError: a corner (abs, min, max) or a
// jump (sign, step) whose switching function can vanish in the box, a
// branch point (sqrt, log, a real power at a base that can be <= 0), a
// division by an interval holding 0, atan2's cut. Where the switching
// function keeps one sign over the box, the branch of that sign is the
// exact function there and the series is rigorous.
//
// Not safe for concurrent use; order and ode do not allocate.
//
// References:
//
//	A. Griewank, A. Walther, Evaluating Derivatives, 2nd ed., SIAM 2008,
//	  ch. 13 (Taylor arithmetic).
//	R. E. Moore, Interval Analysis, Prentice-Hall 1966 (interval Taylor
//	  coefficients of ODE solutions).
type series struct {
	tape []expr.Instr
	outs []int
	nvar int
	n    int               // order: coefficients 0..n
	c    [][]ival.Interval // c[reg][k]
	aux  [][]ival.Interval // per instruction: companion series
	au2  [][]ival.Interval
	side []int8 // per instruction: the branch at a corner or jump (order 0)
	fk   []ival.Interval
	// deg[reg] is the highest coefficient of a register that can be
	// nonzero: 0 for constants and parameters, n for the other variables,
	// propagated through the tape (a product's degrees add). Coefficients
	// above it are exact zeros, neither computed nor multiplied.
	deg []int
}

// newSeries returns an interval series evaluator of order n.
func newSeries(p *expr.Program, n int) *series {
	s := &series{tape: p.Tape(), outs: p.Outputs(), nvar: p.NumVars(), n: n}
	nreg := p.NumRegs()
	buf := make([]ival.Interval, nreg*(n+1))
	s.c = make([][]ival.Interval, nreg)
	for i := range s.c {
		s.c[i] = buf[i*(n+1) : (i+1)*(n+1) : (i+1)*(n+1)]
	}
	for i, v := range p.Consts() {
		s.c[s.nvar+i][0] = ival.Point(v)
	}
	s.aux = make([][]ival.Interval, len(s.tape))
	s.au2 = make([][]ival.Interval, len(s.tape))
	for i, in := range s.tape {
		switch in.Op {
		case expr.OpSin, expr.OpCos, expr.OpSinh, expr.OpCosh, expr.OpTan, expr.OpTanh,
			expr.OpAtan, expr.OpAtan2, expr.OpPow, expr.OpPowInt:
			s.aux[i] = make([]ival.Interval, n+2)
			s.au2[i] = make([]ival.Interval, n+2)
		}
	}
	s.deg = make([]int, nreg)
	for i := range s.nvar {
		s.deg[i] = n
	}
	s.propagate()
	s.side = make([]int8, len(s.tape))
	s.fk = make([]ival.Interval, n+2)
	for k := range s.fk {
		s.fk[k] = ival.Point(float64(k))
	}
	return s
}

// setConst makes variable slot i the constant v.
func (s *series) setConst(slot int, v ival.Interval) {
	clear(s.c[slot])
	s.c[slot][0] = v
	if s.deg[slot] != 0 {
		s.deg[slot] = 0
		s.propagate()
	}
}

// propagate sets the degree of every instruction's result from its
// operands' (see series.deg).
func (s *series) propagate() {
	n := s.n
	for _, in := range s.tape {
		a := s.deg[in.A]
		d := n
		switch in.Op {
		case expr.OpAdd, expr.OpSub, expr.OpMin, expr.OpMax:
			d = max(a, s.deg[in.B])
		case expr.OpNeg, expr.OpAbs:
			d = a
		case expr.OpMul:
			d = min(n, a+s.deg[in.B])
		case expr.OpSquare:
			d = min(n, 2*a)
		case expr.OpSign, expr.OpStep:
			d = 0
		case expr.OpDiv, expr.OpPow, expr.OpAtan2:
			if a == 0 && s.deg[in.B] == 0 {
				d = 0
			}
		default: // one-operand functions
			if a == 0 {
				d = 0
			}
		}
		s.deg[in.Dst] = d
	}
}

// out returns the coefficients of output i.
func (s *series) out(i int) []ival.Interval { return s.c[s.outs[i]] }

// run computes coefficients 0..n of every output from the variables'.
func (s *series) run() error {
	for k := 0; k <= s.n; k++ {
		if err := s.order(k); err != nil {
			return err
		}
	}
	return nil
}

// ode computes the coefficients 0..n of the solution of y' = f(t, y)
// through (t0, y0), t0 and y0 intervals: state i lives in variable slot
// slots[i] and its rate is output i. Slot 0 is the time (a map's
// programs have none and pass timed = false). The coefficients stay in
// the state slots (state(i)).
func (s *series) ode(timed bool, t0 ival.Interval, slots []int, y0 []ival.Interval) error {
	if timed {
		ts := s.c[0]
		clear(ts)
		ts[0] = t0
		if s.n >= 1 {
			ts[1] = ival.Point(1)
		}
	}
	for i, sl := range slots {
		clear(s.c[sl])
		s.c[sl][0] = y0[i]
	}
	for k := 0; k < s.n; k++ {
		if err := s.order(k); err != nil {
			return err
		}
		for i, sl := range slots {
			s.c[sl][k+1] = ival.Div(s.c[s.outs[i]][k], s.fk[k+1])
		}
	}
	return nil
}

// conv returns Σ_{j=lo..hi} a_j b_{k-j}.
func conv(a, b []ival.Interval, k, lo, hi int) ival.Interval {
	return convDeg(a, b, k, lo, hi, k, k)
}

// convDeg is conv for a of degree da and b of degree db: the terms with
// a_j or b_{k-j} an exact zero are left out.
func convDeg(a, b []ival.Interval, k, lo, hi, da, db int) ival.Interval {
	lo, hi = max(lo, k-db), min(hi, da)
	var s ival.Interval
	for j := lo; j <= hi; j++ {
		s = ival.Add(s, ival.Mul(a[j], b[k-j]))
	}
	return s
}

// sqconv returns Σ_{j=lo..k-lo} a_j a_{k-j}, pairing equal terms so that
// a square of an interval holding 0 stays tight.
func sqconv(a []ival.Interval, k, lo int) ival.Interval {
	var s ival.Interval
	for j := lo; 2*j < k; j++ {
		s = ival.Add(s, ival.Mul(a[j], a[k-j]))
	}
	s = ival.Scale(s, 2)
	if k%2 == 0 && k/2 >= lo {
		s = ival.Add(s, ival.Sqr(a[k/2]))
	}
	return s
}

// wconv returns Σ_{j=1..hi} j a_j b_{k-j}.
func (s *series) wconv(a, b []ival.Interval, k, hi int) ival.Interval {
	var r ival.Interval
	for j := 1; j <= hi; j++ {
		r = ival.Add(r, ival.Mul(ival.Mul(s.fk[j], a[j]), b[k-j]))
	}
	return r
}

// hasZero reports whether x holds 0 (or is not a finite interval).
func hasZero(x ival.Interval) bool {
	return !(x.Lo > 0 || x.Hi < 0)
}

// finite reports whether both ends of x are finite numbers.
func finite(x ival.Interval) bool {
	return !math.IsInf(x.Lo, 0) && !math.IsInf(x.Hi, 0) && !math.IsNaN(x.Lo) && !math.IsNaN(x.Hi)
}

// order computes coefficient k of every instruction's result.
func (s *series) order(k int) error {
	c := s.c
	fk := s.fk[k]
	for i, in := range s.tape {
		u := c[in.A]
		v := c[in.Dst]
		if k > s.deg[in.Dst] {
			v[k] = ival.Interval{}
			continue
		}
		var w []ival.Interval
		switch in.Op {
		case expr.OpAdd, expr.OpSub, expr.OpMul, expr.OpDiv, expr.OpPow, expr.OpAtan2, expr.OpMin, expr.OpMax:
			w = c[in.B]
		}
		switch in.Op {
		case expr.OpAdd:
			v[k] = ival.Add(u[k], w[k])
		case expr.OpSub:
			v[k] = ival.Sub(u[k], w[k])
		case expr.OpNeg:
			v[k] = ival.Neg(u[k])
		case expr.OpMul:
			v[k] = convDeg(u, w, k, 0, k, s.deg[in.A], s.deg[in.B])
		case expr.OpSquare:
			v[k] = sqconv(u, k, 0)
		case expr.OpDiv:
			if k == 0 && hasZero(w[0]) {
				return s.boxError(in, ErrDomain, "a divisor can be 0 in the box")
			}
			v[k] = ival.Div(ival.Sub(u[k], convDeg(v, w, k, 0, k-1, k, s.deg[in.B])), w[0])
		case expr.OpPowInt:
			if err := s.powi(i, in, u, v, in.N, k); err != nil {
				return err
			}
		case expr.OpSqrt:
			if k == 0 {
				if !(u[0].Lo > 0) {
					return s.boxError(in, ErrKink, "its argument can be 0 or negative in the box (a branch point)")
				}
				v[0] = ival.Sqrt(u[0])
			} else {
				v[k] = ival.Div(ival.Sub(u[k], sqconv(v, k, 1)), ival.Scale(v[0], 2))
			}
		case expr.OpAbs:
			if k == 0 {
				if hasZero(u[0]) {
					return s.boxError(in, ErrKink, "its argument can be 0 in the box (a corner)")
				}
				s.side[i] = 1
				if u[0].Hi < 0 {
					s.side[i] = -1
				}
			}
			v[k] = u[k]
			if s.side[i] < 0 {
				v[k] = ival.Neg(u[k])
			}
		case expr.OpMin, expr.OpMax:
			if k == 0 {
				d := ival.Sub(u[0], w[0])
				if hasZero(d) {
					return s.boxError(in, ErrKink, "its two arguments can tie in the box (a corner)")
				}
				// side +1: take u.
				s.side[i] = 1
				if (in.Op == expr.OpMin) == (d.Lo > 0) {
					s.side[i] = -1
				}
			}
			v[k] = u[k]
			if s.side[i] < 0 {
				v[k] = w[k]
			}
		case expr.OpSign, expr.OpStep:
			if k == 0 {
				if hasZero(u[0]) {
					return s.boxError(in, ErrKink, "its argument can be 0 in the box (a jump)")
				}
				x := 1.0
				if u[0].Hi < 0 {
					x = -1
					if in.Op == expr.OpStep {
						x = 0
					}
				}
				v[0] = ival.Point(x)
			} else {
				v[k] = ival.Interval{}
			}
		default:
			if err := s.elementary(i, in, u, v, w, k, fk); err != nil {
				return err
			}
		}
		if k == 0 && !finite(v[0]) {
			return s.boxError(in, ErrDomain, "its value over the box is not finite")
		}
	}
	return nil
}

// powi computes coefficient k of u^n by binary powering of series.
func (s *series) powi(i int, in expr.Instr, u, v []ival.Interval, n, k int) error {
	neg := n < 0
	if neg {
		n = -n
		if k == 0 && hasZero(u[0]) {
			return s.boxError(in, ErrDomain, "a negative power of an argument that can be 0 in the box")
		}
	}
	if k == 0 {
		v[0] = ival.PowInt(u[0], in.N)
		return nil
	}
	r, b := s.aux[i], s.au2[i]
	for j := 0; j <= k; j++ {
		r[j], b[j] = ival.Interval{}, u[j]
	}
	r[0] = ival.Point(1)
	for ; n > 0; n >>= 1 {
		if n&1 == 1 {
			for j := k; j >= 0; j-- {
				r[j] = conv(r, b, j, 0, j)
			}
		}
		if n > 1 {
			for j := k; j >= 0; j-- {
				b[j] = sqconv(b, j, 0)
			}
		}
	}
	if !neg {
		v[k] = r[k]
		return nil
	}
	// v = 1/r: v_k = -(Σ_{0..k-1} v_j r_{k-j}) / r_0 for k >= 1.
	v[k] = ival.Div(ival.Neg(conv(v, r, k, 0, k-1)), r[0])
	return nil
}

// boxError returns the error of an instruction not analytic over the box.
func (s *series) boxError(in expr.Instr, kind error, why string) error {
	return &BoxError{Func: opName(in), Reason: why, Err: kind}
}

// opName returns the formula spelling of an instruction's operation.
func opName(in expr.Instr) string {
	switch in.Op {
	case expr.OpSquare:
		return "^2"
	case expr.OpPowInt:
		return fmt.Sprintf("^%d", in.N)
	case expr.OpDiv:
		return "division"
	}
	return in.Op.String()
}
