package expr

import "fmt"

// Batch evaluates a Program for many members at once: each register that
// depends on the state holds one value per member, in a contiguous run,
// and each instruction of the tape is dispatched once and then applied to
// the whole run, so the interpreter's dispatch is paid once per
// instruction, not once per member. Registers that depend only on the
// time, the parameters and constants are uniform: computed once per call,
// as scalars, and applied to the runs as such. The state registers read
// the caller's runs in place, and an output computed by an instruction is
// written straight into the caller's dydt. The arithmetic of each member is
// Float64's (products rounded before any sum, integer powers by repeated
// squaring, the same elementary functions), so every member gets the bits
// Float64.Field gives it alone.
//
// Time and parameters are shared by all members. A Batch does not allocate
// when run (after the first run with its largest member count) and is not
// safe for concurrent use; make one per goroutine.
type Batch struct {
	p      *Program
	nstate int         // state slots 1..nstate
	cap    int         // members the register storage holds
	buf    []float64   // storage of the vector registers, cap each
	vec    [][]float64 // per register: its run for this call (vector registers)
	uni    []bool      // per register: uniform (no state in it)
	sv     []float64   // per register: the value of a uniform register
	mode   []uint8     // per instruction: how its operands are laid out
	// alias[i] is the output index whose dydt run instruction-produced
	// register outs[i] is written into, or -1 when outs[i] is copied.
	alias []int
}

// Instruction modes: the operands' layout.
const (
	modeUni   uint8 = iota // every operand uniform: a scalar result
	modeVV                 // run op run
	modeVU                 // run op scalar
	modeUV                 // scalar op run
	modeUnary              // op run (one operand)
	modePowiV              // run^n
)

// NewBatch returns a batch evaluator for a vector field whose state is
// slots 1..nstate (slot 0 the time, the slots after the state parameters),
// with room for members members (it grows when run with more), its
// variables set to 0. nstate is clamped to [0, NumVars-1].
func (p *Program) NewBatch(nstate, members int) *Batch {
	nstate = max(0, min(nstate, p.nvar-1))
	e := &Batch{p: p, nstate: nstate, uni: make([]bool, p.nreg), sv: make([]float64, p.nreg), vec: make([][]float64, p.nreg)}
	for r := range e.uni {
		// Slot 0 is t, slots 1..nstate the state, then the parameters and
		// the constants.
		e.uni[r] = r == 0 || r > nstate
	}
	copy(e.sv[p.nvar:], p.consts)
	for _, in := range p.code {
		a := e.uni[in.a]
		two := in.op.arity() == 2 && in.op != opPowi && in.op != opSq
		b := !two || e.uni[in.b]
		var m uint8
		switch {
		case a && b:
			m = modeUni
		case !two && in.op == opPowi:
			m = modePowiV
		case !two:
			m = modeUnary
		case !a && !b:
			m = modeVV
		case !a:
			m = modeVU
		default:
			m = modeUV
		}
		e.uni[in.dst] = m == modeUni
		e.mode = append(e.mode, m)
	}
	// Outputs produced by an instruction on runs are written into dydt
	// directly, the first time a register is named.
	produced := make([]bool, p.nreg)
	for _, in := range p.code {
		produced[in.dst] = true
	}
	seen := make(map[int32]bool)
	e.alias = make([]int, len(p.outs))
	for i, o := range p.outs {
		e.alias[i] = -1
		if produced[o] && !e.uni[o] && !seen[o] {
			e.alias[i] = i
		}
		seen[o] = true
	}
	e.grow(max(members, 1))
	return e
}

// grow makes room for m members.
func (e *Batch) grow(m int) {
	e.cap = m
	e.buf = make([]float64, e.p.nreg*m)
}

// SetVar sets variable slot (a parameter, shared by all members) to v.
// Field sets slot 0 (the time) and reads the state slots from its y, so a
// value set there is not used.
func (e *Batch) SetVar(slot int, v float64) error {
	if slot < 0 || slot >= e.p.nvar {
		return fmt.Errorf("expr: variable slot %d out of range [0, %d)", slot, e.p.nvar)
	}
	e.sv[slot] = v
	return nil
}

// Field evaluates a program laid out as a vector field (slot 0 the time,
// slots 1..n the state, n as given to NewBatch) for m members: y holds their states
// component-major (component i of member k at y[i*m+k]; len(y) must be at
// least n*m) and dydt receives the outputs the same way (len(dydt) at
// least NumOut*m). y and dydt must not overlap. The other slots hold the
// values set with SetVar. Short slices panic, as an index out of range.
func (e *Batch) Field(t float64, m int, y, dydt []float64) {
	if m <= 0 {
		return
	}
	p := e.p
	if m > e.cap {
		e.grow(m)
	}
	nstate := e.nstate
	y, dydt = y[:nstate*m], dydt[:len(p.outs)*m]
	vec, sv, M := e.vec, e.sv, e.cap
	sv[0] = t
	for i := 0; i < nstate; i++ {
		vec[1+i] = y[i*m : (i+1)*m : (i+1)*m]
	}
	for r := p.nvar; r < p.nreg; r++ {
		vec[r] = e.buf[r*M : r*M+m : r*M+m]
	}
	for i, a := range e.alias {
		if a >= 0 {
			vec[p.outs[i]] = dydt[i*m : (i+1)*m : (i+1)*m]
		}
	}
	for j, in := range p.code {
		switch e.mode[j] {
		case modeUni:
			sv[in.dst] = scalarOp(in, sv)
		case modeVV:
			d, a, b := vec[in.dst][:m], vec[in.a][:m], vec[in.b][:m]
			switch in.op {
			case OpAdd:
				for k := range d {
					d[k] = a[k] + b[k]
				}
			case OpSub:
				for k := range d {
					d[k] = a[k] - b[k]
				}
			case OpMul:
				for k := range d {
					d[k] = float64(a[k] * b[k])
				}
			case OpDiv:
				for k := range d {
					d[k] = a[k] / b[k]
				}
			default:
				for k := range d {
					d[k] = eval2(in.op, a[k], b[k])
				}
			}
		case modeVU:
			d, a, c := vec[in.dst][:m], vec[in.a][:m], sv[in.b]
			switch in.op {
			case OpAdd:
				for k := range d {
					d[k] = a[k] + c
				}
			case OpSub:
				for k := range d {
					d[k] = a[k] - c
				}
			case OpMul:
				for k := range d {
					d[k] = float64(a[k] * c)
				}
			case OpDiv:
				for k := range d {
					d[k] = a[k] / c
				}
			default:
				for k := range d {
					d[k] = eval2(in.op, a[k], c)
				}
			}
		case modeUV:
			d, c, b := vec[in.dst][:m], sv[in.a], vec[in.b][:m]
			switch in.op {
			case OpAdd:
				for k := range d {
					d[k] = c + b[k]
				}
			case OpSub:
				for k := range d {
					d[k] = c - b[k]
				}
			case OpMul:
				for k := range d {
					d[k] = float64(c * b[k])
				}
			case OpDiv:
				for k := range d {
					d[k] = c / b[k]
				}
			default:
				for k := range d {
					d[k] = eval2(in.op, c, b[k])
				}
			}
		case modePowiV:
			d, a, n := vec[in.dst][:m], vec[in.a][:m], int(in.b)
			for k := range d {
				d[k] = powi(a[k], n)
			}
		default: // modeUnary
			d, a := vec[in.dst][:m], vec[in.a][:m]
			switch in.op {
			case OpNeg:
				for k := range d {
					d[k] = -a[k]
				}
			case opSq:
				for k := range d {
					d[k] = float64(a[k] * a[k])
				}
			default:
				for k := range d {
					d[k] = eval1(in.op, a[k])
				}
			}
		}
	}
	for i, o := range p.outs {
		if e.alias[i] >= 0 {
			continue
		}
		run := dydt[i*m : (i+1)*m]
		if e.uni[o] {
			v := sv[o]
			for k := range run {
				run[k] = v
			}
			continue
		}
		copy(run, vec[o][:m])
	}
}

// scalarOp applies instruction in to uniform registers, as Float64's
// interpreter does.
func scalarOp(in instr, r []float64) float64 {
	x := r[in.a]
	switch in.op {
	case OpAdd:
		return x + r[in.b]
	case OpSub:
		return x - r[in.b]
	case OpMul:
		return float64(x * r[in.b])
	case OpDiv:
		return x / r[in.b]
	case OpNeg:
		return -x
	case opSq:
		return float64(x * x)
	case opPowi:
		return powi(x, int(in.b))
	case OpPow, OpAtan2, OpMin, OpMax:
		return eval2(in.op, x, r[in.b])
	}
	return eval1(in.op, x)
}
