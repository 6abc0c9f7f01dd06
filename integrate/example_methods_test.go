package integrate_test

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
)

// A convection loop in a lab, reduced to three modes (the Lorenz equations),
// solved with the 8th-order pair at a tight tolerance. Runs that keep no
// steps form no dense output, so each step costs 12 evaluations.
func ExampleDormandPrince853() {
	const sigma, rho, beta = 10.0, 28.0, 8.0 / 3.0
	loop := integrate.Problem{
		F: func(_ float64, y, d []float64) {
			d[0] = sigma * (y[1] - y[0])
			d[1] = y[0]*(rho-y[2]) - y[1]
			d[2] = y[0]*y[1] - beta*y[2]
		},
		Y0: []float64{1, 1, 1},
	}
	sol, err := integrate.Solve(context.Background(), loop, 10, integrate.DormandPrince853,
		&integrate.Settings{RelTol: 1e-12, AbsTol: 1e-12, DropSteps: true})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("y(10) = (%.6g, %.6g, %.6g)\n", sol.Final[0], sol.Final[1], sol.Final[2])
	// Output:
	// y(10) = (-4.90269, -3.74387, 24.6909)
}

// A step-size audit of a crane's load swinging on its cable (a pendulum of
// length 2 m, released at 60°): halving the step of RK4 shrinks the change
// of the angle after 5 s by about 2^4, the mark of order 4.
func ExampleRK4() {
	const g, l = 9.81, 2.0
	swing := integrate.Problem{
		F: func(_ float64, y, d []float64) {
			d[0] = y[1]
			d[1] = -g / l * math.Sin(y[0])
		},
		Y0: []float64{math.Pi / 3, 0},
	}
	angle := func(h float64) float64 {
		sol, err := integrate.Solve(context.Background(), swing, 5, integrate.RK4(h), &integrate.Settings{DropSteps: true})
		if err != nil {
			panic(err)
		}
		return sol.Final[0]
	}
	d1 := math.Abs(angle(0.02) - angle(0.01))
	d2 := math.Abs(angle(0.01) - angle(0.005))
	fmt.Printf("angle after 5 s: %.5f rad\n", angle(0.005))
	fmt.Printf("observed order: %.1f\n", math.Log2(d1/d2))
	// Output:
	// angle after 5 s: -0.66581 rad
	// observed order: 3.9
}
