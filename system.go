package plumb

import (
	"errors"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/models"
)

// ErrUnknown reports an unknown model or parameter name.
var ErrUnknown = errors.New("unknown name")

// System is a dynamical system ready to integrate: a built-in model (Model)
// with its parameters, which can be changed with Set.
type System struct {
	// Name is the catalog name, Title a human name, Source where the
	// equations and parameters are published.
	Name, Title, Source string
	// States names the state components in order.
	States []string

	flow   *models.Flow
	params []float64
	y0     []float64
}

// Model returns the built-in system with the given name, at its published
// parameters and start.
func Model(name string) (*System, error) {
	f, err := models.Lookup(name)
	if err != nil {
		return nil, fmt.Errorf("plumb: %w: %w", ErrUnknown, err)
	}
	return &System{
		Name: f.Name, Title: f.Title, Source: f.Source,
		States: append([]string(nil), f.States...),
		flow:   f, params: f.Defaults(), y0: append([]float64(nil), f.Y0...),
	}, nil
}

// Models returns the names of the built-in systems, sorted.
func Models() []string { return models.Names() }

// Param is a parameter's name, current value and description.
type Param struct {
	Name  string
	Value float64
	Doc   string
}

// Params returns the parameters with their current values.
func (s *System) Params() []Param {
	out := make([]Param, len(s.flow.Params))
	for i, p := range s.flow.Params {
		out[i] = Param{Name: p.Name, Value: s.params[i], Doc: p.Doc}
	}
	return out
}

// Set changes a parameter. Unknown names and non-finite values are errors.
func (s *System) Set(name string, v float64) error {
	i := s.flow.ParamIndex(name)
	if i < 0 {
		known := make([]string, len(s.flow.Params))
		for k, p := range s.flow.Params {
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
func (s *System) Start() []float64 { return append([]float64(nil), s.y0...) }

// SetStart replaces the initial state; its length must match States.
func (s *System) SetStart(y0 []float64) error {
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
	if s.flow.Period == nil {
		return nil
	}
	return append([]float64(nil), s.flow.Period...)
}

// Known returns a published fact of the default configuration (e.g.
// "period", "energy"), and whether it exists.
func (s *System) Known(key string) (float64, bool) {
	v, ok := s.flow.Known[key]
	return v, ok
}

// Problem returns the initial value problem at the current parameters and
// start, with T0 = 0, the exact Jacobian when the model has one, and the
// separable Hamiltonian parts when it has them.
func (s *System) Problem() integrate.Problem {
	p := integrate.Problem{F: s.flow.Field(s.params), Y0: append([]float64(nil), s.y0...)}
	if s.flow.Jac != nil {
		p.Jac = s.flow.Jac(s.params)
	}
	if s.flow.Separable != nil {
		parts := s.flow.Separable(s.params)
		p.Split = &integrate.Separable{DT: parts.DT, DV: parts.DV, H: parts.H}
	}
	return p
}
