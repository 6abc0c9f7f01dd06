package plumb_test

import (
	ctx "context"
	"fmt"
	"strings"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
)

// A convection loop in the lab, read from a system file, integrated to t = 1.
func ExampleLoadSystem() {
	const file = `{
	  "name": "lab-loop",
	  "description": "thermal convection loop, heated below and cooled above",
	  "kind": "flow",
	  "parameters": [
	    {"name": "prandtl", "value": 10},
	    {"name": "heating", "value": 28},
	    {"name": "shape", "value": 2.6666666666666665}
	  ],
	  "variables": [
	    {"name": "speed", "start": 1, "rate": "prandtl*(across - speed)"},
	    {"name": "across", "start": 1, "rate": "speed*(heating - profile) - across"},
	    {"name": "profile", "start": 1, "rate": "speed*across - shape*profile"}
	  ]
	}`
	s, err := plumb.LoadSystem(strings.NewReader(file))
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(s.Name, s.Kind(), s.States)
	sol, err := integrate.Solve(ctx.Background(), s.Problem(), 1, nil, &integrate.Settings{RelTol: 1e-10, AbsTol: 1e-10})
	if err != nil {
		fmt.Println(err)
		return
	}
	y := sol.At(1, nil)
	fmt.Printf("y(1) = (%.4f, %.4f, %.4f)\n", y[0], y[1], y[2])
	// Output:
	// lab-loop flow [speed across profile]
	// y(1) = (-9.3786, -8.3570, 29.3623)
}

// A typo in a formula is reported with its field and a caret under it.
func ExampleLoadSystem_error() {
	const file = `{"kind": "flow", "parameters": [{"name": "k", "value": 0.3}],
	  "variables": [{"name": "heat", "start": 1, "rate": "-kk*heat"}]}`
	_, err := plumb.LoadSystem(strings.NewReader(file))
	fmt.Println(err)
	// Output:
	// plumb: system file: variables[0].rate: expr: line 1, column 2: unknown name "kk" (variables: [t heat k])
	//   -kk*heat
	//    ^
}

// A crane's swinging load as a Hamiltonian: plumb derives Hamilton's
// equations and sees that H is separable.
func ExampleSystem_Formulas() {
	const file = `{"kind": "hamiltonian",
	  "parameters": [{"name": "g", "value": 9.81}, {"name": "L", "value": 12}],
	  "coordinates": [{"name": "angle", "start": 0.4, "period": 6.283185307179586}],
	  "momenta": [{"name": "swing", "start": 0}],
	  "energy": "swing^2/(2*L^2) - g*L*cos(angle)"}`
	s, err := plumb.LoadSystem(strings.NewReader(file))
	if err != nil {
		fmt.Println(err)
		return
	}
	for i, f := range s.Formulas() {
		fmt.Printf("d%s/dt = %s\n", s.States[i], f)
	}
	fmt.Println("separable:", s.Separable())
	// Output:
	// dangle/dt = 2*swing/(2*L^2)
	// dswing/dt = g*L*(-sin(angle))
	// separable: true
}
