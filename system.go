package plumb

import (
	"fmt"
	"math"
	"sync"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/expr"
	"github.com/plumbdyn/plumb/internal/models"
)

// System is a dynamical system ready to integrate or iterate: a built-in
// model (Model) or a system read from formulas (LoadSystem), with its
// parameters, which can be changed with Set.
//
// A System is not safe for concurrent use; the functions it returns (in
// Problem and Map) each own their workspace
// and are not safe for concurrent use either: call the method once per
// goroutine.
type System struct {
	// Name is the catalog name, Title a human name, Source where the
	// equations and parameters are published ("system file" for files).
	Name, Title, Source string
	// States names the state components in order.
	States []string

	kind    Kind
	flow    *models.Flow   // built-in, or nil
	form    *formulaSystem // formulas: the file's, or the built-in's catalog entry; may be nil for a built-in
	pinfo   []Param
	params  []float64
	y0      []float64
	periods []float64
	units   []string
}

// Model returns the built-in system with the given name, at its published
// parameters and start.
func Model(name string) (*System, error) {
	f, err := models.Lookup(name)
	if err != nil {
		return nil, fmt.Errorf("plumb: %w: %w", ErrUnknown, err)
	}
	s := &System{
		Name: f.Name, Title: f.Title, Source: f.Source,
		States: append([]string(nil), f.States...),
		kind:   KindFlow,
		flow:   f, params: f.Defaults(), y0: append([]float64(nil), f.Y0...),
	}
	for _, p := range f.Params {
		s.pinfo = append(s.pinfo, Param{Name: p.Name, Value: p.Value, Doc: p.Doc})
	}
	if f.Period != nil {
		s.periods = append([]float64(nil), f.Period...)
	}
	switch {
	case f.Map:
		s.kind = KindMap
	case f.Separable != nil:
		// Written in coordinates and momenta with H = T(p) + V(q).
		s.kind = KindHamiltonian
	}
	s.form = cachedFormulas(f)
	return s, nil
}

// builtinCache holds the compiled formulas of each built-in, made once: a
// formulaSystem is read-only after construction (its programs are
// immutable, evaluators are made per use), so systems can share it.
var builtinCache struct {
	sync.Mutex
	m map[string]*formulaSystem
}

// cachedFormulas returns the compiled catalog formulas of f, or nil when the
// catalog has none.
func cachedFormulas(f *models.Flow) *formulaSystem {
	builtinCache.Lock()
	defer builtinCache.Unlock()
	if fs, ok := builtinCache.m[f.Name]; ok {
		return fs
	}
	var fs *formulaSystem
	if rates, ok := models.Formulas[f.Name]; ok {
		var err error
		fs, err = builtinFormulas(f, rates)
		if err != nil {
			// The catalog's formulas are tested; a failure is a broken invariant.
			panic("plumb: built-in formulas of " + f.Name + ": " + err.Error())
		}
	}
	if builtinCache.m == nil {
		builtinCache.m = make(map[string]*formulaSystem)
	}
	builtinCache.m[f.Name] = fs
	return fs
}

// builtinFormulas compiles a catalog entry's formulas over t, the states and
// the parameters.
func builtinFormulas(f *models.Flow, rates []string) (*formulaSystem, error) {
	names := append([]string{"t"}, f.States...)
	for _, p := range f.Params {
		names = append(names, p.Name)
	}
	g := expr.NewGraph(names)
	fs := &formulaSystem{kind: KindFlow, g: g, n: len(f.States)}
	if f.Map {
		fs.kind = KindMap
	}
	if len(rates) != len(f.States) {
		return nil, fmt.Errorf("%d formulas for %d states", len(rates), len(f.States))
	}
	for _, r := range rates {
		e, err := g.Parse(r)
		if err != nil {
			return nil, err
		}
		fs.rates = append(fs.rates, e)
	}
	if err := fs.finish(); err != nil {
		return nil, err
	}
	return fs, nil
}

// Models returns the names of the built-in systems, sorted.
func Models() []string { return models.Names() }

// Param is a parameter's name, current value, description and unit (the
// unit only for systems from files; "" when not given).
type Param struct {
	Name  string
	Value float64
	Doc   string
	Unit  string
}

// Kind returns whether the system is a flow, a map or a Hamiltonian (a
// flow given by an energy function of coordinates and momenta: a file of
// kind hamiltonian, or a built-in whose catalog entry has the separable
// parts, such as kepler and henon-heiles).
func (s *System) Kind() Kind {
	if s == nil {
		return ""
	}
	return s.kind
}

// TimeUnit returns the unit of time given in a system file, or "".
func (s *System) TimeUnit() string {
	if s == nil || s.form == nil {
		return ""
	}
	return s.form.timeUnit
}

// Units returns the unit of each state component as given in a system file
// ("" where none was given), or nil for built-ins.
func (s *System) Units() []string {
	if s == nil {
		return nil
	}
	return append([]string(nil), s.units...)
}

// Params returns the parameters with their current values.
func (s *System) Params() []Param {
	if s == nil {
		return nil
	}
	out := make([]Param, len(s.pinfo))
	for i, p := range s.pinfo {
		out[i] = Param{Name: p.Name, Value: s.params[i], Doc: p.Doc, Unit: p.Unit}
	}
	return out
}

// Set changes a parameter. Unknown names and non-finite values are errors.
func (s *System) Set(name string, v float64) error {
	if err := s.check("Set"); err != nil {
		return err
	}
	i := -1
	for k, p := range s.pinfo {
		if p.Name == name {
			i = k
		}
	}
	if i < 0 {
		known := make([]string, len(s.pinfo))
		for k, p := range s.pinfo {
			known[k] = p.Name
		}
		return fmt.Errorf("plumb: model %s has no parameter %q (parameters: %v): %w", s.Name, name, known, ErrUnknown)
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Errorf("plumb: parameter %s = %v: %w", name, v, integrate.ErrNonFinite)
	}
	s.params[i] = v
	return nil
}

// Start returns a copy of the initial state.
func (s *System) Start() []float64 {
	if s == nil {
		return nil
	}
	return append([]float64(nil), s.y0...)
}

// SetStart replaces the initial state; its length must match States.
func (s *System) SetStart(y0 []float64) error {
	if err := s.check("SetStart"); err != nil {
		return err
	}
	if len(y0) != len(s.y0) {
		return fmt.Errorf("plumb: start has %d components, model %s has %d: %w", len(y0), s.Name, len(s.y0), integrate.ErrDimension)
	}
	copy(s.y0, y0)
	return nil
}

// Periods gives, per component, the period of an angle (0 for the others), or
// nil when no component is periodic. Distances between states use the
// wrapped difference on periodic components.
func (s *System) Periods() []float64 {
	if s == nil || s.periods == nil {
		return nil
	}
	return append([]float64(nil), s.periods...)
}

// known returns a published fact of the default configuration (e.g.
// "period", "energy"), and whether it exists. Systems from files have none.
func (s *System) known(key string) (float64, bool) {
	if s == nil || s.flow == nil {
		return 0, false
	}
	v, ok := s.flow.Known[key]
	return v, ok
}

// Separable reports whether the system is a Hamiltonian H = T(p) + V(q), so
// that Problem carries the parts symplectic methods need.
func (s *System) Separable() bool {
	if s.check("") != nil {
		return false
	}
	if s.flow != nil {
		return s.flow.Separable != nil
	}
	return s.form.ham != nil && s.form.ham.separable
}

// Problem returns the initial value problem at the current parameters and
// start, with T0 = 0, the exact Jacobian (hand-written for built-ins where
// the catalog has one, symbolic otherwise), and the separable Hamiltonian
// parts when the system has them. Later calls to Set do not change a
// returned Problem.
//
// A map has no vector field: its Problem has a nil F (which the integrators
// reject with integrate.ErrSettings); use Map instead.
//
// The Problem may be shared by runs in several goroutines: it is
// integrate.Forkable, which gives every run (Solve, NewStepper, the lyap entry points) evaluators of its
// own at set-up (integrate.Problem.Own). Its F and Jac themselves keep
// scratch space, so a caller who calls them directly from several
// goroutines calls Own once in each.
func (s *System) Problem() integrate.Problem {
	if s.check("") != nil {
		return integrate.Problem{}
	}
	if s.kind == KindMap {
		return integrate.Problem{Y0: append([]float64(nil), s.y0...)}
	}
	params := append([]float64(nil), s.params...)
	p := integrate.Forkable(func() integrate.Problem { return s.fields(params) })
	p.Y0 = append([]float64(nil), s.y0...)
	return p
}

// fields returns the vector field, Jacobian and separable parts at params
// (kept, not copied: the caller passes its own copy); Problem makes them
// through integrate.Forkable, so that runs in several goroutines can share
// the Problem (integrate.Problem.Own).
func (s *System) fields(params []float64) integrate.Problem {
	var p integrate.Problem
	if s.flow != nil {
		p.F = s.flow.Field(append([]float64(nil), params...))
		if s.flow.Jac != nil {
			p.Jac = s.flow.Jac(append([]float64(nil), params...))
		} else if s.form != nil {
			p.Jac = s.form.jacFunc(params)
		}
		if s.flow.Separable != nil {
			parts := s.flow.Separable(append([]float64(nil), params...))
			p.Split = &integrate.Separable{DT: parts.DT, DV: parts.DV, H: parts.H}
		}
	} else {
		p.F = s.form.fieldFunc(params)
		p.Jac = s.form.jacFunc(params)
		if h := s.form.ham; h != nil && h.separable {
			p.Split = h.split(params)
		}
	}
	return p
}
