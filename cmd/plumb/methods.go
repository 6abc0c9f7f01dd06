package main

import (
	"errors"
	"fmt"
	"strings"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
)

// method maps a --method name to an integrate.Method.
type method struct {
	name  string // as typed after --method
	doc   string // a few words for help
	fixed bool   // a fixed-step method: --step is required and is its step
	// make returns the method; h is --step (0 for adaptive methods).
	make func(h float64) integrate.Method
	// separable: the method needs a separable Hamiltonian T(p) + V(q)
	// (integrate.Problem.Split), which only some models have.
	separable bool
}

// methods is the table behind --method; the first entry is the default.
// Adding a method to the CLI is adding its line here (then refresh the
// README's usage with 'go test ./cmd/plumb -update').
var methods = []method{
	{"dp54", "Dormand–Prince 5(4), adaptive", false, func(float64) integrate.Method { return integrate.DormandPrince54 }, false},
	{"dp853", "Dormand–Prince 8(5,3), adaptive", false, func(float64) integrate.Method { return integrate.DormandPrince853 }, false},
	{"bs32", "Bogacki–Shampine 3(2), adaptive", false, func(float64) integrate.Method { return integrate.BogackiShampine32 }, false},
	{"rk4", "classical Runge–Kutta 4", true, integrate.RK4, false},
	{"euler", "explicit Euler", true, integrate.Euler, false},
	{"gauss1", "Gauss–Legendre 1-stage (implicit midpoint), order 2, symplectic", true, gauss(1), false},
	{"gauss2", "Gauss–Legendre 2-stage, order 4, symplectic", true, gauss(2), false},
	{"gauss3", "Gauss–Legendre 3-stage, order 6, symplectic", true, gauss(3), false},
	{"verlet", "Störmer–Verlet kick-drift-kick, order 2", true, integrate.Verlet, true},
	{"verlet-dkd", "Störmer–Verlet drift-kick-drift, order 2", true, integrate.VerletDKD, true},
	{"forest-ruth", "Forest–Ruth, order 4", true, integrate.ForestRuth, true},
	{"yoshida4", "Yoshida, order 4", true, integrate.Yoshida4, true},
	{"yoshida6", "Yoshida, order 6", true, integrate.Yoshida6, true},
	{"yoshida8", "Yoshida, order 8", true, integrate.Yoshida8, true},
	{"pefrl", "Omelyan–Mryglod–Folk PEFRL, order 4", true, integrate.PEFRL, true},
	{"blanes-moan4", "Blanes–Moan SRKN6b, order 4", true, integrate.BlanesMoan4, true},
}

// gauss returns the constructor of the s-stage Gauss–Legendre method.
func gauss(s int) func(h float64) integrate.Method {
	return func(h float64) integrate.Method { return integrate.GaussLegendre(s, h) }
}

// findMethod returns the table entry for name.
func findMethod(name string) (method, bool) {
	for _, m := range methods {
		if m.name == name {
			return m, true
		}
	}
	return method{}, false
}

// methodNames lists the names in table order.
func methodNames() []string {
	out := make([]string, len(methods))
	for i, m := range methods {
		out[i] = m.name
	}
	return out
}

// methodHelp is the --method usage line: adaptive methods, fixed-step
// methods (which take --step), and the splittings that need a separable
// Hamiltonian.
func methodHelp() string {
	var adaptive, fixed, split []string
	for _, m := range methods {
		e := m.name + " (" + m.doc + ")"
		switch {
		case m.separable:
			split = append(split, e)
		case m.fixed:
			fixed = append(fixed, e)
		default:
			adaptive = append(adaptive, e)
		}
	}
	return "integration `METHOD`: adaptive " + strings.Join(adaptive, ", ") +
		"; fixed --step " + strings.Join(fixed, ", ") +
		"; fixed --step, symplectic splittings for separable Hamiltonians (see 'plumb models') " + strings.Join(split, ", ")
}

// pickMethod resolves --method and --step into a method.
func pickMethod(name string, h float64, hGiven bool) (method, integrate.Method, error) {
	m, ok := findMethod(name)
	if !ok {
		return method{}, nil, usagef("--method %s: unknown method (known: %s)", name, strings.Join(methodNames(), ", "))
	}
	if m.fixed {
		if !hGiven || h <= 0 {
			return method{}, nil, usagef("--method %s is a fixed-step method: give its step with --step (> 0), got --step %s", name, formatFloat(h))
		}
		return m, m.make(h), nil
	}
	if hGiven {
		return method{}, nil, usagef("--step %s: only fixed-step methods take a step size; --method %s chooses its own", formatFloat(h), name)
	}
	return m, m.make(0), nil
}

// fits checks that method m can integrate the system sys, before any work:
// a splitting needs the separable parts of a Hamiltonian.
func (m method) fits(sys *plumb.System) error {
	if m.separable && sys.Problem().Split == nil {
		return m.misfit(sys, nil)
	}
	return nil
}

// misfit is the usage error for a method that does not fit the model,
// naming both; err is integrate's reason (ErrMethod), if there is one.
func (m method) misfit(sys *plumb.System, err error) error {
	msg := fmt.Sprintf("--method %s does not fit model %s", m.name, sys.Name)
	if m.separable {
		msg += fmt.Sprintf(": the splitting needs a separable Hamiltonian T(p) + V(q), which %s is not (models that are: %s)", sys.Name, strings.Join(separableModels(), ", "))
	}
	if err != nil && !m.separable {
		msg += ": " + err.Error()
	}
	return usagef("%s", msg)
}

// reword returns the job hook (see job.reword) that turns integrate's
// ErrMethod for sys into the usage error naming --method and the model.
func (m method) reword(sys *plumb.System) func(error) error {
	return func(err error) error {
		if errors.Is(err, integrate.ErrMethod) {
			return m.misfit(sys, err)
		}
		return nil
	}
}

// separableModels lists the built-in models whose Problem carries the
// separable parts that the splittings need.
func separableModels() []string {
	var out []string
	for _, name := range plumb.Models() {
		if sys, err := plumb.Model(name); err == nil && sys.Problem().Split != nil {
			out = append(out, name)
		}
	}
	return out
}
