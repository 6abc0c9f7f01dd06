package enclose

import (
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/internal/expr"
)

// Formulas is a flow or a map given by formulas in plumb's formula
// language (the language of system files: + - * / ^, sin, exp, atan2,
// min, ..., see docs/system-file.md).
type Formulas struct {
	// States names the state components in order.
	States []string
	// Rates holds one formula per state: its rate dy_i/dt for a flow
	// (over t, the states and the parameters), its next value for a map
	// (over the states and the parameters).
	Rates []string
	// Params names the parameters; Values gives their values (float64,
	// exactly as written into the formulas).
	Params []string
	Values []float64
	// Map marks the formulas as a map's next values.
	Map bool
}

// Graph limits: formulas whose derivatives grow past them are refused
// rather than compiled (the same sizes as system files).
const (
	maxNodes    = 1 << 20
	maxDiffWork = 1 << 23
)

// compiled holds the programs an enclosure runs. Variable slots: 0 the
// time (unnamed for a map), 1..n the states, then the parameters, then
// n*n slots of the variational matrix V (row-major), which formulas
// cannot name.
type compiled struct {
	n      int
	isMap  bool
	params []float64
	// field: outputs the rates (a map: the next values).
	field *expr.Program
	// vari: outputs the rates, then the entries of J(t, y)·V row-major,
	// the variational equations V' = J V (flows only).
	vari *expr.Program
	// jac: outputs the entries of the Jacobian row-major (maps only).
	jac *expr.Program
	// yslots are the state slots, vslots the states and then V's slots.
	yslots, vslots []int
}

// compile parses and checks the formulas and builds the programs.
func (f *Formulas) compile() (*compiled, error) {
	if f == nil {
		return nil, fmt.Errorf("enclose: no formulas: %w", ErrFormulas)
	}
	n, np := len(f.States), len(f.Params)
	if n == 0 {
		return nil, fmt.Errorf("enclose: no states: %w", ErrFormulas)
	}
	if len(f.Rates) != n {
		return nil, fmt.Errorf("enclose: %d formulas for %d states: %w", len(f.Rates), n, ErrFormulas)
	}
	if len(f.Values) != np {
		return nil, fmt.Errorf("enclose: %d values for %d parameters: %w", len(f.Values), np, ErrFormulas)
	}
	names := make([]string, 0, 1+n+np+n*n)
	if f.Map {
		names = append(names, "")
	} else {
		names = append(names, "t")
	}
	seen := map[string]bool{names[0]: true}
	for _, s := range append(append([]string(nil), f.States...), f.Params...) {
		if s == "" || seen[s] || expr.IsReserved(s) {
			return nil, fmt.Errorf("enclose: name %q is empty, reserved or used twice: %w", s, ErrFormulas)
		}
		seen[s] = true
		names = append(names, s)
	}
	for i, v := range f.Values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("enclose: parameter %s = %v is not finite: %w", f.Params[i], v, ErrFormulas)
		}
	}
	for range n * n {
		names = append(names, "")
	}
	g := expr.NewGraph(names)
	g.SetLimits(maxNodes, maxDiffWork)
	rates := make([]expr.Expr, n)
	for i, src := range f.Rates {
		e, err := g.Parse(src)
		if err != nil {
			return nil, fmt.Errorf("enclose: formula %d (%s): %w: %w", i, f.States[i], ErrFormulas, err)
		}
		rates[i] = e
	}
	c := &compiled{n: n, isMap: f.Map, params: append([]float64(nil), f.Values...)}
	c.field = g.Compile(rates)
	for i := range n {
		c.yslots = append(c.yslots, 1+i)
	}
	// J[i][m] = d rate_i / d y_m; nil entries are structurally zero.
	jac := make([]expr.Expr, n*n)
	zero := g.Const(0)
	for i, r := range rates {
		for m := range n {
			d, err := g.Derivative(r, 1+m)
			if err != nil {
				return nil, fmt.Errorf("enclose: derivative of formula %d (%s): %w: %w", i, f.States[i], ErrFormulas, err)
			}
			jac[i*n+m] = d
		}
	}
	if f.Map {
		c.jac = g.Compile(jac)
		return c, nil
	}
	base := 1 + n + np
	outs := append([]expr.Expr(nil), rates...)
	for i := range n {
		for j := range n {
			sum := zero
			for m := range n {
				if jac[i*n+m] == zero {
					continue
				}
				sum = g.Add(sum, g.Mul(jac[i*n+m], g.Var(base+m*n+j)))
			}
			outs = append(outs, sum)
		}
	}
	c.vari = g.Compile(outs)
	c.vslots = append(c.vslots, c.yslots...)
	for k := range n * n {
		c.vslots = append(c.vslots, base+k)
	}
	return c, nil
}

// setParams writes the parameters into an evaluator's slots.
func (c *compiled) setParams(s *series) {
	for i, v := range c.params {
		s.setConst(1+c.n+i, pointOf(v))
	}
}
