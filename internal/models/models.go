// Package models is plumb's catalog of built-in systems: published flows and
// maps with their published parameters, start values and sources, written as
// plain Go.
//
// Every entry is a Flow: state names, parameters with defaults, a start, the
// vector field (or, for a map, the next state) and its Jacobian where written
// out, the components that are angles, and, for Hamiltonian systems, the
// separable parts. Nothing here
// imports the integrators: the root package turns a Flow into an
// integrate.Problem.
package models

import (
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// Param is a named parameter with its published default.
type Param struct {
	Name  string
	Value float64
	Doc   string
}

// Flow is a built-in system: a continuous-time flow y' = f(t, y; params) or,
// with Map set, a discrete-time map x_{n+1} = f(x_n; params).
type Flow struct {
	Name   string // catalog key, lower case
	Title  string // human name
	Doc    string // one line: what it models
	Source string // where the equations and parameters are published
	// Map marks a discrete-time system: Field then writes the next state
	// f(x) into its last argument (the time argument is unused) and Jac
	// writes df/dx.
	Map    bool
	States []string // state names, in order
	Params []Param  // parameters with their defaults, in order
	Y0     []float64
	// Field returns the vector field for the parameter values p (in the
	// order of Params). The returned function does not allocate.
	Field func(p []float64) func(t float64, y, dydt []float64)
	// Jac, if not nil, returns the Jacobian df/dy for parameters p.
	Jac func(p []float64) func(t float64, y []float64, dst *mat.Dense)
	// Tangent3, if not nil (3-D flows with a Jacobian), returns for
	// parameters p the vector field and the Jacobian's product with three
	// tangent vectors in one call, with the bits of Field, Jac and the
	// product a tangent-space run takes (the contract of lyap.Tangent3):
	// dx = f(t, x), dv = J·v (3×3 row-major, tangent vectors as columns,
	// each entry ((0 + J[i][0]·v[c]) + J[i][1]·v[3+c]) + J[i][2]·v[6+c]
	// with the terms of zero entries left out), and tr J returned.
	Tangent3 func(p []float64) func(t float64, x, dx *[3]float64, v, dv *[9]float64) float64
	// Period, for components that are angles, gives their period (0 for the
	// others); nil when no component is periodic.
	Period []float64
	// Separable, if not nil, gives the parts of a separable Hamiltonian
	// H = T(p) + V(q) with the state laid out as (q, p).
	Separable func(p []float64) Parts
	// Known lists published facts about the default configuration, e.g. a
	// period; keys are documented per model.
	Known map[string]float64
}

// Parts are the pieces of a separable Hamiltonian.
type Parts struct {
	DT func(p, dst []float64) // dT/dp
	DV func(q, dst []float64) // dV/dq
	H  func(q, p []float64) float64
}

// Defaults returns a copy of the default parameter values.
func (f *Flow) Defaults() []float64 {
	v := make([]float64, len(f.Params))
	for i, p := range f.Params {
		v[i] = p.Value
	}
	return v
}

// ParamIndex returns the index of the named parameter, or -1.
func (f *Flow) ParamIndex(name string) int {
	for i, p := range f.Params {
		if p.Name == name {
			return i
		}
	}
	return -1
}

var catalog = map[string]*Flow{}

func register(f *Flow) {
	if _, dup := catalog[f.Name]; dup {
		panic("models: duplicate " + f.Name)
	}
	if len(f.States) != len(f.Y0) {
		panic("models: " + f.Name + ": states and Y0 differ in length")
	}
	catalog[f.Name] = f
}

// Lookup returns the named flow or an error listing the known names.
func Lookup(name string) (*Flow, error) {
	if f, ok := catalog[name]; ok {
		return f, nil
	}
	return nil, fmt.Errorf("models: unknown model %q (known: %v)", name, Names())
}

// Names returns the catalog's names in sorted order.
func Names() []string {
	names := make([]string, 0, len(catalog))
	for k := range catalog {
		names = append(names, k)
	}
	sort.Strings(names)
	return names
}

// hypot3 is r^3 for r = |(x, y)|, as r*sqrt(r) of r² (the form the peers use).
func r3(x, y float64) float64 {
	r2 := float64(x*x) + float64(y*y)
	return r2 * math.Sqrt(r2)
}
