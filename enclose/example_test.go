package enclose_test

import (
	"context"
	"fmt"

	"github.com/plumbdyn/plumb/enclose"
)

// A lab's convection loop modelled by Lorenz's three equations: how long
// is the computed state proven to within 1e-3?
func ExampleFlow() {
	loop := &enclose.Formulas{
		States: []string{"x", "y", "z"},
		Rates:  []string{"sigma*(y-x)", "x*(rho-z)-y", "x*y-beta*z"},
		Params: []string{"sigma", "rho", "beta"},
		Values: []float64{10, 28, 8.0 / 3},
	}
	res, err := enclose.Flow(context.Background(), loop, 0, []float64{1, 1, 1}, 5, &enclose.Settings{Tol: 1e-3})
	if err != nil {
		fmt.Println(err)
		return
	}
	end := res.Steps[len(res.Steps)-1]
	fmt.Printf("proven to t = %g, width there below 1e-8: %v\n", res.Horizon, end.Width < 1e-8)
	// Output:
	// proven to t = 5, width there below 1e-8: true
}

// A fish stock's yearly update by Hénon's quadratic map: iterates proven
// to within 1e-3.
func ExampleMap() {
	stock := &enclose.Formulas{
		States: []string{"x", "y"},
		Rates:  []string{"1 + y - a*x^2", "b*x"},
		Params: []string{"a", "b"},
		Values: []float64{1.4, 0.3},
		Map:    true,
	}
	res, err := enclose.Map(context.Background(), stock, []float64{0.1, 0.1}, 80, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("proven for %g iterates; stopped: %v\n", res.Horizon, res.Failure != nil)
	// Output:
	// proven for 57 iterates; stopped: true
}
