package plumb

import (
	"errors"
	"fmt"
	"math"
	"math/big"
	"sync"

	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/internal/expr"
	"github.com/plumbdyn/plumb/internal/models"
)

// ErrUnknown reports an unknown model or parameter name.
var ErrUnknown = errors.New("unknown name")

// ErrKind reports a request that does not fit the system's kind, such as the
// vector field of a map.
var ErrKind = errors.New("wrong kind of system")

// System is a dynamical system ready to integrate or iterate: a built-in
// model (Model) or a system read from formulas (LoadSystem), with its
// parameters, which can be changed with Set.
//
// A System is not safe for concurrent use; the functions it returns (in
// Problem, Evaluator, DoubleDoubleEvaluator, Map) each own their workspace
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

// Known returns a published fact of the default configuration (e.g.
// "period", "energy"), and whether it exists. Systems from files have none.
func (s *System) Known(key string) (float64, bool) {
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

// MapSystem is a map x -> f(x), built in or from a system file, with its
// exact Jacobian. It satisfies the lyap.Map interface. Components with a
// period (an angle) are reduced to [0, period) after every iterate. Not safe
// for concurrent use. A zero MapSystem (not made by System.Map) has
// dimension 0, and its Next and Jacobian do nothing.
type MapSystem struct {
	n    int
	next *expr.Float64 // formulas, or nil for a built-in's Go map
	jac  *expr.Float64
	buf  []float64
	jbuf []float64
	// jacAt places the entries jac computes (see formulaSystem.jacAt);
	// unused with goJac, whose dense n×n Jacobian jbuf holds.
	jacAt []int
	// goNext and goJac are a built-in's hand-written map and Jacobian.
	goNext  func(t float64, x, dst []float64)
	goJac   func(t float64, x []float64, dst *mat.Dense)
	jm      *mat.Dense // n×n scratch of goJac
	periods []float64
}

// Dim returns the dimension of the state (0 for a nil or zero MapSystem).
func (m *MapSystem) Dim() int {
	if m == nil {
		return 0
	}
	return m.n
}

// zero reports a nil MapSystem or one not made by System.Map, whose Next
// and Jacobian do nothing.
func (m *MapSystem) zero() bool { return m == nil || (m.goNext == nil && m.next == nil) }

// Next writes f(x) into dst. Both should have length Dim: Next reads the
// first Dim components of x (missing ones keep the previous call's values)
// and writes at most len(dst) components. It does not allocate.
func (m *MapSystem) Next(x, dst []float64) {
	if m.zero() {
		return
	}
	if m.goNext != nil {
		m.goNext(0, x, m.buf)
	} else {
		copy(m.next.Vars()[1:1+m.n], x)
		m.next.Run(m.buf)
	}
	wrapPeriodic(m.buf, m.periods)
	copy(dst, m.buf)
}

// Jacobian writes df/dx at x into dst, which should be Dim×Dim (a matrix of
// another size gets the overlapping block). It does not allocate.
func (m *MapSystem) Jacobian(x []float64, dst *mat.Dense) {
	if m.zero() || dst == nil {
		return
	}
	if m.goJac != nil {
		m.goJac(0, x, m.jm)
		copy(m.jbuf, m.jm.RawMatrix().Data)
	} else {
		copy(m.jac.Vars()[1:1+m.n], x)
		m.jac.Run(m.jbuf)
	}
	r, c := dst.Dims()
	if m.goJac == nil {
		setSparse(dst, m.n, m.jacAt, m.jbuf)
		return
	}
	for i := 0; i < min(m.n, r); i++ {
		for j := 0; j < min(m.n, c); j++ {
			dst.Set(i, j, m.jbuf[i*m.n+j])
		}
	}
}

// Map returns the map of a system of kind map at the current parameters, or
// an error wrapping ErrKind for flows and Hamiltonians.
func (s *System) Map() (*MapSystem, error) {
	if s == nil {
		return nil, s.check("Map")
	}
	if s.kind != KindMap {
		return nil, fmt.Errorf("plumb: %s is a %s, not a map: %w", s.Name, s.kind, ErrKind)
	}
	if err := s.check("Map"); err != nil {
		return nil, err
	}
	if s.flow != nil {
		return s.builtinMap(), nil
	}
	f := s.form
	m := &MapSystem{n: f.n, next: f.fieldProg.NewFloat64(), jac: f.jacProg.NewFloat64(),
		buf: make([]float64, f.n), jbuf: make([]float64, len(f.jacAt)), jacAt: f.jacAt, periods: s.Periods()}
	f.setParams(m.next.Vars(), s.params)
	f.setParams(m.jac.Vars(), s.params)
	return m, nil
}

// DoubleDouble is a double-double number Hi + Lo (about 32 significant
// digits), the arithmetic of DoubleDoubleEvaluator. Its operations are
// those of plumb's internal double-double package; see DDEvaluator.
type DoubleDouble = dd.Float

// BigEvaluator computes a system's right-hand side (the vector field of a
// flow or Hamiltonian, the next state of a map) in math/big.Float arithmetic
// at a fixed precision, for reference-precision runs. Not safe for
// concurrent use.
type BigEvaluator struct {
	n  int
	ev *expr.Big
}

// Evaluator returns the right-hand side at prec bits of precision (for
// instance 256 for a reference run to compare with float64). The formulas'
// numbers and the parameters are the float64 values the float64 field uses,
// so both compute the same model and differ only in rounding. Each
// operation rounds to prec bits; the elementary functions are accurate to a
// few ulps (Brent & Zimmermann, Modern Computer Arithmetic, 2010, ch. 4).
//
// Built-in models use their catalog formulas. prec must be in [2,
// big.MaxPrec].
func (s *System) Evaluator(prec uint) (*BigEvaluator, error) {
	if err := s.check("Evaluator"); err != nil {
		return nil, err
	}
	if s.form == nil {
		return nil, fmt.Errorf("plumb: model %s has no formulas for multiprecision evaluation: %w", s.Name, ErrKind)
	}
	ev, err := s.form.fieldProg.NewBig(prec)
	if err != nil {
		return nil, fmt.Errorf("plumb: %w", err)
	}
	vars := ev.Vars()
	for i, p := range s.params {
		vars[1+s.form.n+i].SetFloat64(p)
	}
	return &BigEvaluator{n: s.form.n, ev: ev}, nil
}

// Prec returns the evaluator's precision in bits.
func (e *BigEvaluator) Prec() uint {
	if e == nil || e.ev == nil {
		return 0
	}
	return e.ev.Prec()
}

// Eval writes the right-hand side at (t, y) into dydt (t is ignored for
// maps). Nil entries of dydt are allocated at the evaluator's precision.
// Wrong lengths are errors wrapping integrate.ErrDimension, a nil entry of
// y one wrapping integrate.ErrNonFinite; a value that is not a real number
// (0/0, log of a negative number) is an error wrapping expr's ErrNaN.
func (e *BigEvaluator) Eval(t *big.Float, y, dydt []*big.Float) error {
	if e == nil || e.ev == nil {
		return noEvaluator("BigEvaluator.Eval")
	}
	if len(y) != e.n || len(dydt) != e.n {
		return fmt.Errorf("plumb: Eval with %d states and %d outputs, system has %d: %w", len(y), len(dydt), e.n, integrate.ErrDimension)
	}
	for i, v := range y {
		if v == nil {
			return fmt.Errorf("plumb: Eval: y[%d] is nil, not a number: %w", i, integrate.ErrNonFinite)
		}
	}
	vars := e.ev.Vars()
	if t != nil {
		vars[0].Set(t)
	}
	for i, v := range y {
		vars[1+i].Set(v)
	}
	if err := e.ev.Run(dydt); err != nil {
		return fmt.Errorf("plumb: %w", err)
	}
	return nil
}

// DDEvaluator computes a system's right-hand side in double-double
// arithmetic: about 32 significant digits at a few times the cost of
// float64, for reference runs cheaper than big.Float. + - * / have relative
// error below 2e-31 (Joldes, Muller & Popescu, ACM TOMS 44, 2017); the
// elementary functions about 1e-31 (see internal/dd). Not safe for
// concurrent use; Eval does not allocate.
type DDEvaluator struct {
	n  int
	ev *expr.DD
}

// DoubleDoubleEvaluator returns the right-hand side in double-double
// arithmetic at the current parameters (see Evaluator for the model's
// numbers). Built-in models use their catalog formulas.
func (s *System) DoubleDoubleEvaluator() (*DDEvaluator, error) {
	if err := s.check("DoubleDoubleEvaluator"); err != nil {
		return nil, err
	}
	if s.form == nil {
		return nil, fmt.Errorf("plumb: model %s has no formulas for double-double evaluation: %w", s.Name, ErrKind)
	}
	ev := s.form.fieldProg.NewDD()
	vars := ev.Vars()
	for i, p := range s.params {
		vars[1+s.form.n+i] = dd.From(p)
	}
	return &DDEvaluator{n: s.form.n, ev: ev}, nil
}

// Eval writes the right-hand side at (t, y) into dydt (t is ignored for
// maps). Wrong lengths are errors wrapping integrate.ErrDimension.
func (e *DDEvaluator) Eval(t DoubleDouble, y, dydt []DoubleDouble) error {
	if e == nil || e.ev == nil {
		return noEvaluator("DDEvaluator.Eval")
	}
	if len(y) != e.n || len(dydt) != e.n {
		return fmt.Errorf("plumb: Eval with %d states and %d outputs, system has %d: %w", len(y), len(dydt), e.n, integrate.ErrDimension)
	}
	vars := e.ev.Vars()
	vars[0] = t
	copy(vars[1:], y)
	return e.ev.Run(dydt)
}

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

// TaylorStepper advances a flow by fixed steps of the Taylor method of a
// chosen order, with Taylor coefficients from the recurrences of Taylor-mode
// differentiation of the system's formulas (Jorba & Zou, Experimental
// Mathematics 14, 2005). Not safe for concurrent use; Step does not
// allocate.
type TaylorStepper struct {
	n  int
	ty *expr.Taylor
}

// Taylor returns a Taylor stepper of the given order (1 to 1000) at the
// current parameters, for flows and Hamiltonians (maps get an error
// wrapping ErrKind). Built-in models use their catalog formulas.
func (s *System) Taylor(order int) (*TaylorStepper, error) {
	if err := s.check("Taylor"); err != nil {
		return nil, err
	}
	if s.form == nil || s.kind == KindMap {
		return nil, fmt.Errorf("plumb: %s has no vector-field formulas for a Taylor method: %w", s.Name, ErrKind)
	}
	if order < 1 {
		return nil, fmt.Errorf("plumb: Taylor order %d, want at least 1: %w", order, integrate.ErrSettings)
	}
	ty, err := s.form.fieldProg.NewTaylor(order)
	if err != nil {
		return nil, fmt.Errorf("plumb: %w: %w", err, integrate.ErrSettings)
	}
	for i, p := range s.params {
		ty.SetParam(1+s.form.n+i, p)
	}
	return &TaylorStepper{n: s.form.n, ty: ty}, nil
}

// Order returns the stepper's order.
func (ts *TaylorStepper) Order() int {
	if ts == nil || ts.ty == nil {
		return 0
	}
	return ts.ty.Order()
}

// Step writes the Taylor polynomial's value at t+h, from y at t, into dst
// (which may be y). Wrong lengths are errors wrapping integrate.ErrDimension.
func (ts *TaylorStepper) Step(t float64, y []float64, h float64, dst []float64) error {
	if ts == nil || ts.ty == nil {
		return noEvaluator("TaylorStepper.Step")
	}
	if len(y) != ts.n || len(dst) != ts.n {
		return fmt.Errorf("plumb: Taylor step with %d states and %d outputs, system has %d: %w", len(y), len(dst), ts.n, integrate.ErrDimension)
	}
	return ts.ty.Step(t, y, h, dst)
}

// Coefficients writes the Taylor coefficients of the solution through
// (t, y): dst[i][k] is the coefficient of h^k of component i, k = 0..Order.
func (ts *TaylorStepper) Coefficients(t float64, y []float64, dst [][]float64) error {
	if ts == nil || ts.ty == nil {
		return noEvaluator("TaylorStepper.Coefficients")
	}
	if len(y) != ts.n || len(dst) != ts.n {
		return fmt.Errorf("plumb: Taylor coefficients with %d states and %d rows, system has %d: %w", len(y), len(dst), ts.n, integrate.ErrDimension)
	}
	for i := range dst {
		if len(dst[i]) < ts.Order()+1 {
			return fmt.Errorf("plumb: row %d has %d coefficients, want %d: %w", i, len(dst[i]), ts.Order()+1, integrate.ErrDimension)
		}
	}
	return ts.ty.ODE(t, y, dst)
}

// TaylorDDStepper is TaylorStepper in double-double arithmetic (about 32
// significant digits), for reference solutions. Not safe for concurrent
// use; Step does not allocate.
type TaylorDDStepper struct {
	n  int
	ty *expr.TaylorDD
}

// TaylorDD returns a double-double Taylor stepper of the given order (1 to
// 1000) at the current parameters; see Taylor.
func (s *System) TaylorDD(order int) (*TaylorDDStepper, error) {
	if err := s.check("TaylorDD"); err != nil {
		return nil, err
	}
	if s.form == nil || s.kind == KindMap {
		return nil, fmt.Errorf("plumb: %s has no vector-field formulas for a Taylor method: %w", s.Name, ErrKind)
	}
	if order < 1 {
		return nil, fmt.Errorf("plumb: Taylor order %d, want at least 1: %w", order, integrate.ErrSettings)
	}
	ty, err := s.form.fieldProg.NewTaylorDD(order)
	if err != nil {
		return nil, fmt.Errorf("plumb: %w: %w", err, integrate.ErrSettings)
	}
	for i, p := range s.params {
		ty.SetParam(1+s.form.n+i, dd.From(p))
	}
	return &TaylorDDStepper{n: s.form.n, ty: ty}, nil
}

// Order returns the stepper's order.
func (ts *TaylorDDStepper) Order() int {
	if ts == nil || ts.ty == nil {
		return 0
	}
	return ts.ty.Order()
}

// Step writes the Taylor polynomial's value at t+h, from y at t, into dst
// (which may be y). Wrong lengths are errors wrapping integrate.ErrDimension.
func (ts *TaylorDDStepper) Step(t DoubleDouble, y []DoubleDouble, h DoubleDouble, dst []DoubleDouble) error {
	if ts == nil || ts.ty == nil {
		return noEvaluator("TaylorDDStepper.Step")
	}
	if len(y) != ts.n || len(dst) != ts.n {
		return fmt.Errorf("plumb: Taylor step with %d states and %d outputs, system has %d: %w", len(y), len(dst), ts.n, integrate.ErrDimension)
	}
	return ts.ty.Step(t, y, h, dst)
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
	n, at := f.n, f.jacAt
	return func(t float64, y []float64, dst *mat.Dense) {
		vars[0] = t
		copy(state, y)
		ev.Run(buf)
		setSparse(dst, n, at, buf)
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
