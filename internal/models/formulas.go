package models

import "fmt"

// Formulas gives each built-in's right-hand side (for a map, the next
// values) as formulas, one per state in the order of States, over the names
// t, the states and the parameters (the formula language of internal/expr). They are the same
// equations as the Go fields, checked against them at random points in
// formulas_test.go, and give every built-in a symbolic Jacobian and
// double-double and big.Float evaluators.
var Formulas = map[string][]string{
	"lorenz": {
		"sigma*(y - x)",
		"x*(rho - z) - y",
		"x*y - beta*z",
	},
	"rossler": {
		"-y - z",
		"x + a*y",
		"b + z*(x - c)",
	},
	"double-pendulum": {
		"omega1",
		"omega2",
		"(-g*(2*m1 + m2)*sin(theta1) - m2*g*sin(theta1 - 2*theta2)" +
			" - 2*sin(theta1 - theta2)*m2*(omega2^2*l2 + omega1^2*l1*cos(theta1 - theta2)))" +
			" / (l1*(2*m1 + m2 - m2*cos(2*(theta1 - theta2))))",
		"2*sin(theta1 - theta2)*(omega1^2*l1*(m1 + m2) + g*(m1 + m2)*cos(theta1)" +
			" + omega2^2*l2*m2*cos(theta1 - theta2))" +
			" / (l2*(2*m1 + m2 - m2*cos(2*(theta1 - theta2))))",
	},
	"arenstorf": {
		"v1",
		"v2",
		"y1 + 2*v2 - (1 - mu)*(y1 + mu)/((y1 + mu)^2 + y2^2)^1.5 - mu*(y1 - (1 - mu))/((y1 - (1 - mu))^2 + y2^2)^1.5",
		"y2 - 2*v1 - (1 - mu)*y2/((y1 + mu)^2 + y2^2)^1.5 - mu*y2/((y1 - (1 - mu))^2 + y2^2)^1.5",
	},
	"vanderpol": {
		"v",
		"mu*(1 - x^2)*v - x",
	},
	"kepler": {
		"p1",
		"p2",
		"-q1/(q1^2 + q2^2)^1.5",
		"-q2/(q1^2 + q2^2)^1.5",
	},
	"henon-heiles": {
		"px",
		"py",
		"-x - 2*x*y",
		"-y - x^2 + y^2",
	},
	"lorenz96": lorenz96Formulas(40),
	// Maps: the next value of each state.
	"henon":    {"1 + y - a*x^2", "b*x"},
	"logistic": {"r*x*(1 - x)"},
	"ricker":   {"x*exp(r*(1 - x))"},
	"tent":     {"mu*min(x, 1 - x)"},
	"sine":     {"r*sin(pi*x)"},
	"circle":   {"theta + omega - k/(2*pi)*sin(2*pi*theta)"},
	"gauss":    {"exp(-alpha*x^2) + beta"},
	"lozi":     {"1 + y - a*abs(x)", "b*x"},
	"standard": {"theta + p + k*sin(theta)", "p + k*sin(theta)"},
	"ikeda": {
		"1 + u*(x*cos(0.4 - 6/(1 + x^2 + y^2)) - y*sin(0.4 - 6/(1 + x^2 + y^2)))",
		"u*(x*sin(0.4 - 6/(1 + x^2 + y^2)) + y*cos(0.4 - 6/(1 + x^2 + y^2)))",
	},
}

// lorenz96Formulas writes dx_i/dt = (x_{i+1} - x_{i-2})·x_{i-1} - x_i + F on
// a ring of n sites named x1 ... xn.
func lorenz96Formulas(n int) []string {
	out := make([]string, n)
	site := func(i int) string { return fmt.Sprintf("x%d", (i+n)%n+1) }
	for i := range n {
		out[i] = fmt.Sprintf("(%s - %s)*%s - %s + F", site(i+1), site(i-2), site(i-1), site(i))
	}
	return out
}
