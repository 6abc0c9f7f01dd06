package expr

import (
	"errors"
	"fmt"
	"math"
	"math/big"

	"github.com/plumbdyn/plumb/internal/dd"
)

// ErrNaN reports an operation of the big.Float evaluator whose result is not
// a real number (0/0, Inf - Inf, log of a negative number, ...): big.Float
// has no NaN.
var ErrNaN = errors.New("result is not a number")

// DD evaluates a Program in double-double arithmetic (internal/dd). The
// program's constants are the float64 values of the formulas (the literal
// 0.1 is the float64 nearest to 0.1), so a DD run computes the same model as
// a float64 run with about 32 significant digits per operation; the accuracy
// of each function is documented in internal/dd. Not safe for concurrent
// use; Run does not allocate.
type DD struct {
	p *Program
	r []dd.Float
}

// NewDD returns a double-double evaluator with its variables set to 0.
func (p *Program) NewDD() *DD {
	r := make([]dd.Float, p.nreg)
	for i, c := range p.consts {
		r[p.nvar+i] = dd.From(c)
	}
	return &DD{p: p, r: r}
}

// Vars returns the evaluator's variable slots, to be written before Run.
func (e *DD) Vars() []dd.Float { return e.r[:e.p.nvar:e.p.nvar] }

// Run executes the program at the current variables and writes the outputs
// into dst (length at least NumOut).
func (e *DD) Run(dst []dd.Float) error {
	if len(dst) < len(e.p.outs) {
		return fmt.Errorf("expr: output has length %d, the program has %d outputs", len(dst), len(e.p.outs))
	}
	r := e.r
	for _, in := range e.p.code {
		x := r[in.a]
		var v dd.Float
		switch in.op {
		case OpAdd:
			v = dd.Add(x, r[in.b])
		case OpSub:
			v = dd.Sub(x, r[in.b])
		case OpMul:
			v = dd.Mul(x, r[in.b])
		case OpDiv:
			v = dd.Div(x, r[in.b])
		case OpNeg:
			v = dd.Neg(x)
		case opSq:
			v = dd.Mul(x, x)
		case opPowi:
			v = dd.Powi(x, int(in.b))
		case OpPow:
			v = dd.Pow(x, r[in.b])
		case OpSin:
			v = dd.Sin(x)
		case OpCos:
			v = dd.Cos(x)
		case OpTan:
			v = dd.Tan(x)
		case OpExp:
			v = dd.Exp(x)
		case OpLog:
			v = dd.Log(x)
		case OpSqrt:
			v = dd.Sqrt(x)
		case OpAbs:
			v = dd.Abs(x)
		case OpTanh:
			v = dd.Tanh(x)
		case OpSinh:
			v = dd.Sinh(x)
		case OpCosh:
			v = dd.Cosh(x)
		case OpAtan:
			v = dd.Atan(x)
		case OpAtan2:
			v = dd.Atan2(x, r[in.b])
		case OpSign:
			v = dd.From(sign(x.Hi))
		case OpStep:
			v = dd.From(step(x.Hi))
		case OpMin, OpMax:
			y := r[in.b]
			if math.IsNaN(x.Hi) || math.IsNaN(y.Hi) {
				v = dd.From(math.NaN())
			} else if c := dd.Cmp(y, x); (in.op == OpMin && c < 0) || (in.op == OpMax && c > 0) {
				v = y
			} else {
				v = x
			}
		default:
			panic("expr: DD has no rule for " + in.op.String())
		}
		r[in.dst] = v
	}
	for i, o := range e.p.outs {
		dst[i] = r[o]
	}
	return nil
}

// Big evaluates a Program with math/big.Float at a fixed precision. The
// program's constants are the float64 values of the formulas, as for DD.
// Every operation rounds to the evaluator's precision (basic operations
// correctly, the elementary functions within a few ulps; see BigExp). Not
// safe for concurrent use.
type Big struct {
	p    *Program
	prec uint
	r    []*big.Float
	tmp  *big.Float
}

// NewBig returns an evaluator at prec bits (prec >= 2) with its variables
// set to 0.
func (p *Program) NewBig(prec uint) (*Big, error) {
	if prec < 2 || prec > big.MaxPrec {
		return nil, fmt.Errorf("expr: precision %d bits is out of range [2, %d]", prec, uint(big.MaxPrec))
	}
	r := make([]*big.Float, p.nreg)
	for i := range r {
		r[i] = new(big.Float).SetPrec(prec)
	}
	for i, c := range p.consts {
		if math.IsNaN(c) {
			return nil, fmt.Errorf("expr: constant %d is NaN: %w", i, ErrNaN)
		}
		r[p.nvar+i].SetFloat64(c)
	}
	return &Big{p: p, prec: prec, r: r, tmp: new(big.Float).SetPrec(prec)}, nil
}

// Prec returns the evaluator's precision in bits.
func (e *Big) Prec() uint { return e.prec }

// Vars returns the evaluator's variable slots, to be set (with Set, which
// rounds to the evaluator's precision) before Run.
func (e *Big) Vars() []*big.Float { return e.r[:e.p.nvar:e.p.nvar] }

// Run executes the program at the current variables and sets dst[i] to
// output i (rounded to dst[i]'s precision, or the evaluator's when it is 0).
// Nil entries of dst are allocated. A result that is not a real number
// gives an error wrapping ErrNaN that names the operation.
func (e *Big) Run(dst []*big.Float) (err error) {
	if len(dst) < len(e.p.outs) {
		return fmt.Errorf("expr: output has length %d, the program has %d outputs", len(dst), len(e.p.outs))
	}
	var cur Op
	defer func() {
		if v := recover(); v != nil {
			if _, ok := v.(big.ErrNaN); !ok {
				panic(v)
			}
			err = fmt.Errorf("expr: %s: %w", cur, ErrNaN)
		}
	}()
	r := e.r
	for _, in := range e.p.code {
		cur = in.op
		if in.op == opSq || in.op == opPowi {
			cur = OpPow
		}
		x, z := r[in.a], r[in.dst]
		var out *big.Float
		switch in.op {
		case OpAdd:
			out = z.Add(x, r[in.b])
		case OpSub:
			out = z.Sub(x, r[in.b])
		case OpMul:
			out = z.Mul(x, r[in.b])
		case OpDiv:
			out = z.Quo(x, r[in.b])
		case OpNeg:
			out = z.Neg(x)
		case opSq:
			out = z.Mul(x, x)
		case opPowi:
			out = bigPowi(z, x, int64(in.b))
		case OpPow:
			out = BigPow(z, x, r[in.b])
		case OpSin:
			out = BigSin(z, x)
		case OpCos:
			out = BigCos(z, x)
		case OpTan:
			out = BigTan(z, x)
		case OpExp:
			out = BigExp(z, x)
		case OpLog:
			out = BigLog(z, x)
		case OpSqrt:
			if x.Sign() < 0 {
				break
			}
			out = z.Sqrt(x)
		case OpAbs:
			out = z.Abs(x)
		case OpTanh:
			out = BigTanh(z, x)
		case OpSinh:
			out = BigSinh(z, x)
		case OpCosh:
			out = BigCosh(z, x)
		case OpAtan:
			out = BigAtan(z, x)
		case OpAtan2:
			out = BigAtan2(z, x, r[in.b])
		case OpSign:
			out = z.SetInt64(int64(x.Sign()))
		case OpStep:
			if x.Sign() >= 0 {
				out = z.SetInt64(1)
			} else {
				out = z.SetInt64(0)
			}
		case OpMin, OpMax:
			y := r[in.b]
			if c := y.Cmp(x); (in.op == OpMin && c < 0) || (in.op == OpMax && c > 0) {
				out = z.Set(y)
			} else {
				out = z.Set(x)
			}
		default:
			panic("expr: Big has no rule for " + in.op.String())
		}
		if out == nil {
			return fmt.Errorf("expr: %s: %w", cur, ErrNaN)
		}
	}
	for i, o := range e.p.outs {
		if dst[i] == nil {
			dst[i] = new(big.Float).SetPrec(e.prec)
		} else if dst[i].Prec() == 0 {
			dst[i].SetPrec(e.prec)
		}
		dst[i].Set(r[o])
	}
	return nil
}
