package expr_test

import (
	"fmt"

	"github.com/plumbdyn/plumb/internal/expr"
)

// A lab convection loop's second rate, its derivative by the loop's flow
// speed x, and both evaluated at one state.
func Example() {
	g := expr.NewGraph([]string{"x", "y", "z", "rho"})
	f, err := g.Parse("x*(rho - z) - y")
	if err != nil {
		fmt.Println(err)
		return
	}
	dfdx := g.Diff(f, 0)
	fmt.Println(g.Format(dfdx))
	ev := g.Compile([]expr.Expr{f, dfdx}).NewFloat64()
	out := make([]float64, 2)
	ev.Eval([]float64{1, 2, 3, 28}, out)
	fmt.Printf("%.6g %.6g\n", out[0], out[1])

	_, err = g.Parse("x*(rh0 - z)")
	fmt.Println(err)
	// Output:
	// rho - z
	// 23 25
	// expr: line 1, column 4: unknown name "rh0" (variables: [x y z rho])
	//   x*(rh0 - z)
	//      ^
}
