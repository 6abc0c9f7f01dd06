package main

import (
	"strings"

	"github.com/plumbdyn/plumb/integrate"
)

// method maps a --method name to an integrate.Method.
type method struct {
	name  string // as typed after --method
	doc   string // one line for help
	fixed bool   // a fixed-step method: --step is required and is its step
	// make returns the method; h is --step (0 for adaptive methods).
	make func(h float64) integrate.Method
}

// methods is the table behind --method; the first entry is the default.
// Adding a method to the CLI is adding its line here (then refresh the
// README's usage with 'go test ./cmd/plumb -update').
var methods = []method{
	{"dp54", "Dormand–Prince 5(4), adaptive", false, func(float64) integrate.Method { return integrate.DormandPrince54 }},
	// To be enabled as package integrate provides them:
	// {"dp853", "Dormand–Prince 8(5,3), adaptive", false, func(float64) integrate.Method { return integrate.DormandPrince853 }},
	// {"bs32", "Bogacki–Shampine 3(2), adaptive", false, func(float64) integrate.Method { return integrate.BogackiShampine32 }},
	// {"rk4", "classical Runge–Kutta 4, fixed --step", true, func(h float64) integrate.Method { return integrate.RK4(h) }},
	// {"euler", "explicit Euler, fixed --step", true, func(h float64) integrate.Method { return integrate.Euler(h) }},
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

// methodHelp is the --method usage line.
func methodHelp() string {
	var parts []string
	for _, m := range methods {
		parts = append(parts, m.name+" ("+m.doc+")")
	}
	return "integration `METHOD`: " + strings.Join(parts, "; ")
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
