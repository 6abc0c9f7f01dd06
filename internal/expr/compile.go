package expr

import (
	"fmt"
	"math"
)

// Internal opcodes of compiled programs, beyond the graph's operations.
const (
	opSq   = numOps + iota // a*a
	opPowi                 // a^n, n held in the instruction's b field
)

// instr is one step of a program: reg[dst] = op(reg[a], reg[b]).
type instr struct {
	op     Op
	dst, a int32
	b      int32
}

// Program is a compiled list of expressions: a flat instruction tape over a
// register file. Registers [0, NumVars) hold the variables (slot order),
// then come the constants, then one register per intermediate result.
// Every node reachable from the outputs is computed once per run, in an
// order where operands precede their uses, so shared subexpressions cost
// nothing extra.
//
// A Program is immutable and safe for concurrent use; each evaluator made
// from it (NewFloat64, NewDD, NewBig) owns its registers and is not.
type Program struct {
	nvar   int
	nreg   int
	consts []float64 // values of registers nvar .. nvar+len(consts)-1
	code   []instr
	outs   []int32
}

// NumVars returns the number of variable slots.
func (p *Program) NumVars() int { return p.nvar }

// NumOut returns the number of outputs.
func (p *Program) NumOut() int { return len(p.outs) }

// Len returns the number of instructions.
func (p *Program) Len() int { return len(p.code) }

// Compile turns the expressions outs (nodes of g) into a Program whose
// output i is outs[i].
func (g *Graph) Compile(outs []Expr) *Program {
	reach := make([]bool, len(g.nodes))
	var mark func(e Expr)
	mark = func(e Expr) {
		if reach[e] {
			return
		}
		reach[e] = true
		n := g.nodes[e]
		switch n.op.arity() {
		case 1:
			mark(n.a)
		case 2:
			mark(n.a)
			if !(n.op == OpPow && g.intExponent(n.b)) {
				mark(n.b)
			}
		}
	}
	for _, e := range outs {
		mark(e)
	}
	p := &Program{nvar: len(g.vars)}
	reg := make([]int32, len(g.nodes))
	next := int32(p.nvar)
	// Constants first, so they sit in one block loaded at set-up.
	for i, n := range g.nodes {
		if reach[i] && n.op == OpConst {
			reg[i] = next
			next++
			p.consts = append(p.consts, math.Float64frombits(n.bits))
		}
	}
	for i, n := range g.nodes {
		if !reach[i] {
			continue
		}
		switch n.op {
		case OpConst:
		case OpVar:
			reg[i] = int32(n.a)
		default:
			in := instr{op: n.op, dst: next, a: reg[n.a]}
			if n.op.arity() == 2 {
				in.b = reg[n.b]
			}
			if n.op == OpPow && g.intExponent(n.b) {
				c, _ := g.Value(n.b)
				in.op, in.b = opPowi, int32(c)
				if c == 2 {
					in.op = opSq
				}
			}
			reg[i] = next
			next++
			p.code = append(p.code, in)
		}
	}
	p.nreg = int(next)
	p.outs = make([]int32, len(outs))
	for i, e := range outs {
		p.outs[i] = reg[e]
	}
	return p
}

// intExponent reports whether e is an integer constant small enough for
// repeated squaring.
func (g *Graph) intExponent(e Expr) bool {
	c, ok := g.Value(e)
	return ok && c == math.Trunc(c) && math.Abs(c) <= maxIntPow
}

// Float64 evaluates a Program in float64 arithmetic. Products are rounded
// before any sum (no fused multiply-add), so results are bit-identical on
// every architecture; integer powers are computed by repeated squaring.
// A Float64 does not allocate when run and is not safe for concurrent use.
type Float64 struct {
	p *Program
	r []float64
}

// NewFloat64 returns a float64 evaluator with its variables set to 0.
func (p *Program) NewFloat64() *Float64 {
	r := make([]float64, p.nreg)
	copy(r[p.nvar:], p.consts)
	return &Float64{p: p, r: r}
}

// Vars returns the evaluator's variable slots, to be written before Run.
func (e *Float64) Vars() []float64 { return e.r[:e.p.nvar:e.p.nvar] }

// Run executes the program at the current variables and writes the outputs
// into dst, which must have length NumOut (a shorter dst is an error).
func (e *Float64) Run(dst []float64) error {
	if len(dst) < len(e.p.outs) {
		return fmt.Errorf("expr: output has length %d, the program has %d outputs", len(dst), len(e.p.outs))
	}
	e.run()
	r := e.r
	for i, o := range e.p.outs {
		dst[i] = r[o]
	}
	return nil
}

// Eval sets the variables to vars (which must have length NumVars) and runs
// the program into dst.
func (e *Float64) Eval(vars, dst []float64) error {
	if len(vars) != e.p.nvar {
		return fmt.Errorf("expr: %d variables given, the program has %d", len(vars), e.p.nvar)
	}
	copy(e.r, vars)
	return e.Run(dst)
}

// run is the interpreter loop.
func (e *Float64) run() {
	r := e.r
	for _, in := range e.p.code {
		x := r[in.a]
		var v float64
		switch in.op {
		case OpAdd:
			v = x + r[in.b]
		case OpSub:
			v = x - r[in.b]
		case OpMul:
			v = float64(x * r[in.b])
		case OpDiv:
			v = x / r[in.b]
		case OpNeg:
			v = -x
		case opSq:
			v = float64(x * x)
		case opPowi:
			v = powi(x, int(in.b))
		case OpPow:
			v = pow(x, r[in.b])
		case OpAtan2, OpMin, OpMax:
			v = eval2(in.op, x, r[in.b])
		default:
			v = eval1(in.op, x)
		}
		r[in.dst] = v
	}
}
