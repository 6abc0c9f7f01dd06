package expr

import "fmt"

// Batch evaluates a Program for many members at once: each register holds
// one value per member, in a contiguous run, and each instruction of the
// tape is dispatched once and then applied to the whole run, so the
// interpreter's dispatch is paid once per instruction, not once per member.
// The arithmetic of each member is Float64's (products rounded before any
// sum, integer powers by repeated squaring, the same elementary
// functions), so every member gets the bits Float64.Field gives it alone.
//
// Time and parameters are shared by all members. A Batch does not allocate
// when run (after the first run with its largest member count) and is not
// safe for concurrent use; make one per goroutine.
type Batch struct {
	p    *Program
	cap  int       // members the registers hold
	r    []float64 // register j of member k at r[j*cap+k]
	vars []float64 // the variables' values, broadcast at each run
}

// NewBatch returns a batch evaluator with room for members members (it
// grows when run with more), its variables set to 0.
func (p *Program) NewBatch(members int) *Batch {
	e := &Batch{p: p, vars: make([]float64, p.nvar)}
	e.grow(max(members, 1))
	return e
}

// grow makes room for m members and writes the constants.
func (e *Batch) grow(m int) {
	p := e.p
	e.cap = m
	e.r = make([]float64, p.nreg*m)
	for j, c := range p.consts {
		run := e.r[(p.nvar+j)*m : (p.nvar+j+1)*m]
		for k := range run {
			run[k] = c
		}
	}
}

// SetVar sets variable slot (a parameter, shared by all members) to v.
func (e *Batch) SetVar(slot int, v float64) error {
	if slot < 0 || slot >= e.p.nvar {
		return fmt.Errorf("expr: variable slot %d out of range [0, %d)", slot, e.p.nvar)
	}
	e.vars[slot] = v
	return nil
}

// Field evaluates a program laid out as a vector field (slot 0 the time,
// slots 1..n the state) for m members: y holds their states
// component-major (component i of member k at y[i*m+k], n = len(y)/m
// components, at most NumVars-1), and dydt receives the outputs the same
// way (as many as fit in len(dydt)/m). The other slots hold the values set
// with SetVar.
func (e *Batch) Field(t float64, m int, y, dydt []float64) {
	if m <= 0 {
		return
	}
	p := e.p
	if m > e.cap {
		e.grow(m)
	}
	M, r := e.cap, e.r
	nstate := min(len(y)/m, p.nvar-1)
	for j := 0; j < p.nvar; j++ {
		run := r[j*M : j*M+m]
		if j >= 1 && j <= nstate {
			copy(run, y[(j-1)*m:j*m])
			continue
		}
		v := e.vars[j]
		if j == 0 {
			v = t
		}
		for k := range run {
			run[k] = v
		}
	}
	for _, in := range p.code {
		d := r[int(in.dst)*M : int(in.dst)*M+m]
		a := r[int(in.a)*M : int(in.a)*M+m]
		switch in.op {
		case OpAdd:
			b := r[int(in.b)*M : int(in.b)*M+m]
			for k := range d {
				d[k] = a[k] + b[k]
			}
		case OpSub:
			b := r[int(in.b)*M : int(in.b)*M+m]
			for k := range d {
				d[k] = a[k] - b[k]
			}
		case OpMul:
			b := r[int(in.b)*M : int(in.b)*M+m]
			for k := range d {
				d[k] = float64(a[k] * b[k])
			}
		case OpDiv:
			b := r[int(in.b)*M : int(in.b)*M+m]
			for k := range d {
				d[k] = a[k] / b[k]
			}
		case OpNeg:
			for k := range d {
				d[k] = -a[k]
			}
		case opSq:
			for k := range d {
				d[k] = float64(a[k] * a[k])
			}
		case opPowi:
			n := int(in.b)
			for k := range d {
				d[k] = powi(a[k], n)
			}
		case OpPow, OpAtan2, OpMin, OpMax:
			b := r[int(in.b)*M : int(in.b)*M+m]
			for k := range d {
				d[k] = eval2(in.op, a[k], b[k])
			}
		default:
			for k := range d {
				d[k] = eval1(in.op, a[k])
			}
		}
	}
	nout := min(len(p.outs), len(dydt)/m)
	for i, o := range p.outs[:nout] {
		copy(dydt[i*m:(i+1)*m], r[int(o)*M:int(o)*M+m])
	}
}
