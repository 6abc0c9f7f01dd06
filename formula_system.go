package plumb

import (
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/expr"
)

// Formulas returns the right-hand sides as formulas (rates of a flow, next
// values of a map; for a Hamiltonian, Hamilton's equations derived from H),
// or nil when the system has none. A derived formula writes shared
// subexpressions out in full and can be far longer than H; one longer than
// 1 MiB is cut there and ends with " ...".
func (s *System) Formulas() []string {
	if s == nil || s.form == nil {
		return nil
	}
	out := make([]string, len(s.form.rates))
	for i, e := range s.form.rates {
		f, whole := s.form.g.FormatMax(e, maxFormulaText)
		if !whole {
			f += " ..."
		}
		out[i] = f
	}
	return out
}

// maxFormulaText is the length at which Formulas cuts a formula.
const maxFormulaText = 1 << 20

// formulaSystem is a system given by formulas over the slots
// (t, y_1..y_n, p_1..p_k).
type formulaSystem struct {
	kind      Kind
	g         *expr.Graph
	n         int
	rates     []expr.Expr
	jac       []expr.Expr // the Jacobian's entries that are not structurally zero
	jacAt     []int       // jac[k] is entry (jacAt[k]/n, jacAt[k]%n); increasing
	fieldProg *expr.Program
	jacProg   *expr.Program
	ham       *hamiltonian
	timeUnit  string
}

// finish derives the Jacobian and compiles the programs. Each rate is
// differentiated only by the states it uses, so the cost follows the
// formulas' size, not n²; the other entries are zero. With limits set on
// the graph (LoadSystem), a Jacobian past them is an error naming the rate.
func (f *formulaSystem) finish() error {
	for i, r := range f.rates {
		for _, slot := range f.g.Slots(r) {
			if slot < 1 || slot > f.n {
				continue // t or a parameter
			}
			d, err := f.g.Derivative(r, slot)
			if err != nil {
				return &rateError{row: i, err: err}
			}
			if v, ok := f.g.Value(d); ok && math.Float64bits(v) == 0 {
				continue // +0, as the zeroed matrix holds
			}
			f.jac = append(f.jac, d)
			f.jacAt = append(f.jacAt, i*f.n+slot-1)
		}
	}
	f.fieldProg = f.g.Compile(f.rates)
	f.jacProg = f.g.Compile(f.jac)
	if f.ham != nil {
		f.ham.compile(f.g)
	}
	return nil
}

// setParams writes the parameter values into an evaluator's slots.
func (f *formulaSystem) setParams(vars, params []float64) {
	copy(vars[1+f.n:], params)
}

// fieldFunc returns the vector field at the parameters (copied now).
func (f *formulaSystem) fieldFunc(params []float64) integrate.Func {
	ev := f.fieldProg.NewFloat64()
	f.setParams(ev.Vars(), params)
	return ev.FieldFunc()
}

// jacFunc returns the symbolic Jacobian at the parameters (copied now).
func (f *formulaSystem) jacFunc(params []float64) func(float64, []float64, *mat.Dense) {
	ev := f.jacProg.NewFloat64()
	vars := ev.Vars()
	f.setParams(vars, params)
	state := vars[1 : 1+f.n]
	buf := make([]float64, len(f.jacAt))
	sp := newSparseJac(f.n, f.jacAt)
	return func(t float64, y []float64, dst *mat.Dense) {
		vars[0] = t
		// A loop, not copy: the state is often short, and the runtime's
		// memmove costs more than the copy itself.
		for i, x := range y[:min(len(y), len(state))] {
			state[i] = x
		}
		sp.fill(dst, ev, buf)
	}
}

// hamiltonian holds H and its derived parts; the state is (q, p), each of
// length m = n/2.
type hamiltonian struct {
	h         expr.Expr
	dHdq      []expr.Expr
	dHdp      []expr.Expr
	separable bool
	hProg     *expr.Program
	dtProg    *expr.Program // dH/dp
	dvProg    *expr.Program // dH/dq
	m         int
}

// setHamiltonian derives Hamilton's equations q' = ∂H/∂p, p' = -∂H/∂q from H
// and decides separability: H = T(p) + V(q) exactly when no ∂H/∂p depends
// on q or t and no ∂H/∂q depends on p or t (a structural test on the
// derivative graphs, so it never claims separability falsely).
func (f *formulaSystem) setHamiltonian(h expr.Expr) error {
	m := f.n / 2
	hm := &hamiltonian{h: h, m: m}
	for i := 0; i < m; i++ {
		dq, err := f.g.Derivative(h, 1+i)
		if err != nil {
			return err
		}
		dp, err := f.g.Derivative(h, 1+m+i)
		if err != nil {
			return err
		}
		hm.dHdq = append(hm.dHdq, dq)
		hm.dHdp = append(hm.dHdp, dp)
	}
	f.rates = nil
	f.rates = append(f.rates, hm.dHdp...)
	for _, d := range hm.dHdq {
		f.rates = append(f.rates, f.g.Neg(d))
	}
	// Slots 0 (t), 1..m (q), m+1..2m (p): dH/dp may use only p and the
	// parameters, dH/dq only q and the parameters.
	hm.separable = true
	for i := 0; i < m; i++ {
		for _, s := range f.g.Slots(hm.dHdp[i]) {
			if s <= m {
				hm.separable = false
			}
		}
		for _, s := range f.g.Slots(hm.dHdq[i]) {
			if s == 0 || (s > m && s <= 2*m) {
				hm.separable = false
			}
		}
	}
	f.ham = hm
	return nil
}

func (h *hamiltonian) compile(g *expr.Graph) {
	h.hProg = g.Compile([]expr.Expr{h.h})
	h.dtProg = g.Compile(h.dHdp)
	h.dvProg = g.Compile(h.dHdq)
}

// split returns the separable parts at the parameters (copied now).
func (h *hamiltonian) split(params []float64) *integrate.Separable {
	m := h.m
	mk := func(p *expr.Program) (*expr.Float64, []float64) {
		ev := p.NewFloat64()
		copy(ev.Vars()[1+2*m:], params)
		return ev, ev.Vars()
	}
	dt, dtv := mk(h.dtProg)
	dv, dvv := mk(h.dvProg)
	he, hv := mk(h.hProg)
	hout := make([]float64, 1)
	return &integrate.Separable{
		DT: func(p, dst []float64) {
			copy(dtv[1+m:1+2*m], p)
			dt.Run(dst)
		},
		DV: func(q, dst []float64) {
			copy(dvv[1:1+m], q)
			dv.Run(dst)
		},
		H: func(q, p []float64) float64 {
			copy(hv[1:1+m], q)
			copy(hv[1+m:1+2*m], p)
			he.Run(hout)
			return hout[0]
		},
	}
}
