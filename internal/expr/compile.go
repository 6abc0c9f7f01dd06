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
	nvar     int
	nreg     int
	consts   []float64 // values of registers nvar .. nvar+len(consts)-1
	code     []instr
	fast     []uint64 // the fused byte-indexed tape (packed finstr values), when nreg <= 256
	fastOuts []uint8
	outs     []int32
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
	// Mark the nodes the outputs need, by an explicit stack (a chain of a
	// million operations is too deep to recurse).
	reach := make([]bool, len(g.nodes))
	stack := append([]Expr(nil), outs...)
	for len(stack) > 0 {
		e := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if reach[e] {
			continue
		}
		reach[e] = true
		n := g.nodes[e]
		switch n.op.arity() {
		case 1:
			stack = append(stack, n.a)
		case 2:
			stack = append(stack, n.a)
			if !(n.op == OpPow && g.intExponent(n.b)) {
				stack = append(stack, n.b)
			}
		}
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
	if p.nreg <= 256 {
		p.fast = fuseCode(p.code, p.outs, p.nreg)
		for _, o := range p.outs {
			p.fastOuts = append(p.fastOuts, uint8(o))
		}
	}
	return p
}

// finstr is an instruction of the fast path: reg[dst] = op(reg[a], reg[b],
// reg[c], reg[d]) with byte indices (for opPowi, c holds the exponent as
// an int8).
type finstr struct {
	op              Op
	dst, a, b, c, d uint8
}

// pack returns the instruction as one word: op, dst, a, b, c, d in bytes 0
// to 5.
func (f finstr) pack() uint64 {
	return uint64(f.op) | uint64(f.dst)<<8 | uint64(f.a)<<16 | uint64(f.b)<<24 | uint64(f.c)<<32 | uint64(f.d)<<40
}

// opIndex returns 0, 1, 2 for add, sub, mul and -1 otherwise.
func opIndex(op Op) int {
	switch op {
	case OpAdd:
		return 0
	case OpSub:
		return 1
	case OpMul:
		return 2
	}
	return -1
}

// fuseCode builds the fast path's tape: each + - * instruction absorbs the
// + - * instructions computing its operands when they are used nowhere
// else, so up to three operations take one dispatch. Registers are
// assigned once (the tape is in single-assignment form), so an absorbed
// instruction's operands still hold their values where it is absorbed.
// Instructions are visited from the last, so roots absorb first.
func fuseCode(code []instr, outs []int32, nreg int) []uint64 {
	uses := make([]int, nreg)
	prod := make([]int, nreg) // instruction index producing a register, or -1
	for i := range prod {
		prod[i] = -1
	}
	for i, in := range code {
		prod[in.dst] = i
		uses[in.a]++
		if in.op.arity() == 2 && in.op != opPowi && in.op != opSq {
			uses[in.b]++
		}
	}
	for _, o := range outs {
		uses[o] += 2 // outputs are never absorbed
	}
	absorbed := make([]bool, len(code))
	fused := make([]finstr, len(code))
	// absorbable returns the instruction computing register r if it can be
	// absorbed by its only user.
	absorbable := func(r int32) (instr, bool) {
		j := prod[r]
		if j < 0 || uses[r] != 1 || absorbed[j] || opIndex(code[j].op) < 0 {
			return instr{}, false
		}
		return code[j], true
	}
	for i := len(code) - 1; i >= 0; i-- {
		if absorbed[i] {
			continue
		}
		in := code[i]
		f := finstr{op: in.op, dst: uint8(in.dst), a: uint8(in.a), b: uint8(in.b)}
		switch in.op {
		case opPowi:
			f.b, f.c = 0, uint8(int8(in.b))
		case opSq:
			f.b = 0
		}
		if outer := opIndex(in.op); outer >= 0 {
			l, okl := absorbable(in.a)
			r, okr := absorbable(in.b)
			if in.a == in.b {
				okr = false // x op x: one producer, used twice
				okl = false
			}
			switch {
			case okl && okr:
				f = finstr{op: fusedLR[opIndex(l.op)][outer][opIndex(r.op)], dst: uint8(in.dst),
					a: uint8(l.a), b: uint8(l.b), c: uint8(r.a), d: uint8(r.b)}
				absorbed[prod[in.a]], absorbed[prod[in.b]] = true, true
			case okl:
				f = finstr{op: fusedL[opIndex(l.op)][outer], dst: uint8(in.dst),
					a: uint8(l.a), b: uint8(l.b), c: uint8(in.b)}
				absorbed[prod[in.a]] = true
			case okr:
				f = finstr{op: fusedR[opIndex(r.op)][outer], dst: uint8(in.dst),
					a: uint8(in.a), b: uint8(r.a), c: uint8(r.b)}
				absorbed[prod[in.b]] = true
			}
		}
		fused[i] = f
	}
	var out []uint64
	for i, f := range fused {
		if !absorbed[i] {
			out = append(out, f.pack())
		}
	}
	return out
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
	p  *Program
	r  []float64
	rs *[256]float64 // the registers of the fast path, r's backing array
}

// NewFloat64 returns a float64 evaluator with its variables set to 0.
func (p *Program) NewFloat64() *Float64 {
	e := &Float64{p: p}
	if p.fast != nil {
		e.rs = new([256]float64)
		e.r = e.rs[:p.nreg]
	} else {
		e.r = make([]float64, p.nreg)
	}
	copy(e.r[p.nvar:], p.consts)
	return e
}

// Vars returns the evaluator's variable slots, to be written before Run.
func (e *Float64) Vars() []float64 { return e.r[:e.p.nvar:e.p.nvar] }

// Run executes the program at the current variables and writes the outputs
// into dst, which must have length NumOut (a shorter dst is an error).
func (e *Float64) Run(dst []float64) error {
	if len(dst) < len(e.p.outs) {
		return fmt.Errorf("expr: output has length %d, the program has %d outputs", len(dst), len(e.p.outs))
	}
	if rs := e.rs; rs != nil {
		runFast(rs, e.p.fast)
		outs := e.p.fastOuts
		dst = dst[:len(outs)]
		for i, o := range outs {
			dst[i] = rs[o]
		}
		return nil
	}
	e.run()
	r := e.r
	for i, o := range e.p.outs {
		dst[i] = r[o]
	}
	return nil
}

// RunScatter executes the program at the current variables and writes
// output k into dst[at[k]]: the values Run gives, placed where the caller
// wants them (a Jacobian's entries into its matrix) without a copy in
// between. at must have length NumOut and its entries must index dst; an
// at of another length is an error, an entry out of dst's range panics.
func (e *Float64) RunScatter(dst []float64, at []int) error {
	if len(at) != len(e.p.outs) {
		return fmt.Errorf("expr: %d places given, the program has %d outputs", len(at), len(e.p.outs))
	}
	if rs := e.rs; rs != nil {
		runFast(rs, e.p.fast)
		outs := e.p.fastOuts
		at = at[:len(outs)]
		for k, o := range outs {
			dst[at[k]] = rs[o]
		}
		return nil
	}
	e.run()
	r := e.r
	for k, o := range e.p.outs {
		dst[at[k]] = r[o]
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

// Field evaluates a program laid out as a vector field: it sets slot 0 to
// t and slots 1..len(y) to y, runs, and writes the outputs into dydt (at
// most len(dydt) of them). Other slots (parameters) keep their values. It
// does not allocate; y longer than the program's variables is cut short.
func (e *Float64) Field(t float64, y, dydt []float64) {
	r := e.r
	n := min(len(y), e.p.nvar-1)
	if n < 0 {
		return
	}
	r[0] = t
	for i, x := range y[:n] {
		r[1+i] = x
	}
	if rs := e.rs; rs != nil {
		runFast(rs, e.p.fast)
		outs := e.p.fastOuts
		if len(dydt) < len(outs) {
			outs = outs[:len(dydt)]
		}
		for i, o := range outs {
			dydt[i] = rs[o]
		}
		return
	}
	e.run()
	outs := e.p.outs
	if len(dydt) < len(outs) {
		outs = outs[:len(dydt)]
	}
	for i, o := range outs {
		dydt[i] = r[o]
	}
}

// FieldFunc returns Field as a function value that holds the evaluator's
// registers directly and evaluates each output by one specialised closure
// (see fieldPlan), written straight into dydt; for up to four outputs the
// calls are unrolled. When there are at most four outputs, every output
// has an inline kind (see inlineOut) and what is left to run on the tape is
// simple (+ - * /, squares and negations, see inlinePre), the outputs are
// evaluated in place instead, by a switch on each kind and no call
// (inline_gen.go). The parameters are read from the registers at
// every call, so values written into Vars later take effect. The results
// are bit-identical to Field.
func (e *Float64) FieldFunc() func(t float64, y, dydt []float64) {
	switch forceTier {
	case tierTape:
		return e.tapeField
	case tierFused:
		return e.Field
	}
	rs := e.rs
	nstate := e.p.nvar - 1
	if rs == nil || nstate < 0 {
		return e.Field
	}
	pl := e.p.plan()
	pre, outs := pl.pre, pl.outs
	// slow is the general path: any number of outputs, a short y or dydt.
	slow := func(t float64, y, dydt []float64) {
		setState(rs, t, y, nstate)
		if pre != nil {
			runFast(rs, pre)
		}
		o := outs
		if len(dydt) < len(o) {
			o = o[:len(dydt)]
		}
		for i, f := range o {
			dydt[i] = f(rs)
		}
	}
	// When there are at most four outputs, every output has an inline kind
	// and the tape instructions left are simple, the outputs are evaluated
	// in place, with no call at all (inline_gen.go).
	if len(outs) <= nstate && pl.inline && inlinePre(pre) && forceTier != tierClosure {
		switch k := pl.kinds; len(k) {
		case 1:
			return inlineField1(rs, (*[1]inlineOut)(k), pre, nstate)
		case 2:
			return inlineField2(rs, (*[2]inlineOut)(k), pre, nstate)
		case 3:
			return inlineField3(rs, (*[3]inlineOut)(k), pre, nstate)
		case 4:
			return inlineField4(rs, (*[4]inlineOut)(k), pre, nstate)
		}
	}
	// Up to four outputs the calls are unrolled; when y has one value per
	// output and nothing runs on the tape, the lean version copies the
	// state without a loop.
	if len(outs) <= nstate && len(pre) == 0 {
		switch len(outs) {
		case 1:
			f0 := outs[0]
			return func(t float64, y, dydt []float64) {
				if len(y) != 1 || len(dydt) < 1 {
					slow(t, y, dydt)
					return
				}
				s, d := (*[1]float64)(y), (*[1]float64)(dydt)
				rs[0], rs[1] = t, s[0]
				d[0] = f0(rs)
			}
		case 2:
			f0, f1 := outs[0], outs[1]
			return func(t float64, y, dydt []float64) {
				if len(y) != 2 || len(dydt) < 2 {
					slow(t, y, dydt)
					return
				}
				s, d := (*[2]float64)(y), (*[2]float64)(dydt)
				rs[0], rs[1], rs[2] = t, s[0], s[1]
				d[0] = f0(rs)
				d[1] = f1(rs)
			}
		case 3:
			f0, f1, f2 := outs[0], outs[1], outs[2]
			return func(t float64, y, dydt []float64) {
				if len(y) != 3 || len(dydt) < 3 {
					slow(t, y, dydt)
					return
				}
				s, d := (*[3]float64)(y), (*[3]float64)(dydt)
				rs[0], rs[1], rs[2], rs[3] = t, s[0], s[1], s[2]
				d[0] = f0(rs)
				d[1] = f1(rs)
				d[2] = f2(rs)
			}
		case 4:
			f0, f1, f2, f3 := outs[0], outs[1], outs[2], outs[3]
			return func(t float64, y, dydt []float64) {
				if len(y) != 4 || len(dydt) < 4 {
					slow(t, y, dydt)
					return
				}
				s, d := (*[4]float64)(y), (*[4]float64)(dydt)
				rs[0], rs[1], rs[2], rs[3], rs[4] = t, s[0], s[1], s[2], s[3]
				d[0] = f0(rs)
				d[1] = f1(rs)
				d[2] = f2(rs)
				d[3] = f3(rs)
			}
		}
	}
	switch len(outs) {
	case 1:
		f0 := outs[0]
		return func(t float64, y, dydt []float64) {
			if len(dydt) < 1 {
				slow(t, y, dydt)
				return
			}
			setState(rs, t, y, nstate)
			if pre != nil {
				runFast(rs, pre)
			}
			d := (*[1]float64)(dydt)
			d[0] = f0(rs)
		}
	case 2:
		f0, f1 := outs[0], outs[1]
		return func(t float64, y, dydt []float64) {
			if len(dydt) < 2 {
				slow(t, y, dydt)
				return
			}
			setState(rs, t, y, nstate)
			if pre != nil {
				runFast(rs, pre)
			}
			d := (*[2]float64)(dydt)
			d[0] = f0(rs)
			d[1] = f1(rs)
		}
	case 3:
		f0, f1, f2 := outs[0], outs[1], outs[2]
		return func(t float64, y, dydt []float64) {
			if len(dydt) < 3 {
				slow(t, y, dydt)
				return
			}
			setState(rs, t, y, nstate)
			if pre != nil {
				runFast(rs, pre)
			}
			d := (*[3]float64)(dydt)
			d[0] = f0(rs)
			d[1] = f1(rs)
			d[2] = f2(rs)
		}
	case 4:
		f0, f1, f2, f3 := outs[0], outs[1], outs[2], outs[3]
		return func(t float64, y, dydt []float64) {
			if len(dydt) < 4 {
				slow(t, y, dydt)
				return
			}
			setState(rs, t, y, nstate)
			if pre != nil {
				runFast(rs, pre)
			}
			d := (*[4]float64)(dydt)
			d[0] = f0(rs)
			d[1] = f1(rs)
			d[2] = f2(rs)
			d[3] = f3(rs)
		}
	}
	return slow
}

// setState sets the time and state slots of the fast registers (at most
// nstate state values).
func setState(rs *[256]float64, t float64, y []float64, nstate int) {
	rs[0] = t
	for i, x := range y[:min(len(y), nstate)] {
		rs[1+i] = x
	}
}
