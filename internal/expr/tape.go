package expr

// Instr is one instruction of a Program's tape as other packages see it:
// register Dst = Op(register A, register B). For OpSquare B is unused; for
// OpPowInt the integer exponent is N and B is unused; one-operand
// operations leave B unused.
type Instr struct {
	Op   Op
	Dst  int
	A, B int
	N    int
}

// Tape operations beyond the graph's: compiled forms of integer powers.
const (
	// OpSquare is a*a.
	OpSquare = opSq
	// OpPowInt is a^N with a constant integer N (Instr.N).
	OpPowInt = opPowi
)

// Tape returns the program's instructions in execution order (operands
// before their uses), for evaluators in other arithmetics (the interval
// Taylor series of package enclose). Registers [0, NumVars) are the
// variables, [NumVars, NumVars+len(Consts)) the constants, the rest
// intermediate results; NumRegs is their total count.
func (p *Program) Tape() []Instr {
	out := make([]Instr, len(p.code))
	for i, in := range p.code {
		out[i] = Instr{Op: in.op, Dst: int(in.dst), A: int(in.a)}
		switch {
		case in.op == opPowi:
			out[i].N = int(in.b)
		case in.op == opSq:
		case in.op.arity() == 2:
			out[i].B = int(in.b)
		}
	}
	return out
}

// Consts returns the values of the constant registers, which follow the
// variables.
func (p *Program) Consts() []float64 { return append([]float64(nil), p.consts...) }

// Outputs returns the register of each output.
func (p *Program) Outputs() []int {
	out := make([]int, len(p.outs))
	for i, o := range p.outs {
		out[i] = int(o)
	}
	return out
}

// NumRegs returns the size of the program's register file.
func (p *Program) NumRegs() int { return p.nreg }
