package integrate_test

import (
	"context"
	"fmt"

	"github.com/plumbdyn/plumb/integrate"
)

// Three copies of an oscillator x” = -x started at different amplitudes,
// integrated in lockstep; each member's phase is the same, its amplitude
// its own.
func ExampleSolveBatch() {
	// The batch field: component-major, x of all members, then v.
	field := func(_ float64, m int, y, dydt []float64) {
		x, v := y[:m], y[m:2*m]
		dx, dv := dydt[:m], dydt[m:2*m]
		for k := range x {
			dx[k] = v[k]
			dv[k] = -x[k]
		}
	}
	p := integrate.BatchProblem{F: field, Dim: 2, Starts: [][]float64{{1, 0}, {2, 0}, {3, 0}}}
	sol, err := integrate.SolveBatch(context.Background(), p, 3.141592653589793, &integrate.BatchSettings{
		Settings: integrate.Settings{RelTol: 1e-10, AbsTol: 1e-10}})
	if err != nil {
		fmt.Println(err)
		return
	}
	for k := 0; k < sol.Members; k++ {
		fmt.Printf("member %d at t=pi: x = %.6f\n", k, sol.Final[k*sol.Dim])
	}
	// Output:
	// member 0 at t=pi: x = -1.000000
	// member 1 at t=pi: x = -2.000000
	// member 2 at t=pi: x = -3.000000
}
