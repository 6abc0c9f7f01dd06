package integrate_test

import (
	"context"
	"fmt"

	"github.com/plumbdyn/plumb/integrate"
)

// A lab's convection loop, modelled by the Lorenz equations, is run to t=60;
// a colleague restarts it at t=40 from the three-decimal numbers of a
// printout. How long do the two runs agree to within 1?
func ExampleAudit() {
	loop := integrate.Problem{
		F: func(_ float64, y, d []float64) {
			d[0] = 10 * (y[1] - y[0])
			d[1] = float64(y[0]*(28-y[2])) - y[1]
			d[2] = float64(y[0]*y[1]) - float64(8.0/3*y[2])
		},
		Y0: []float64{1, 1, 1},
	}
	ladder := integrate.DefaultLadder(0, 60)
	ladder.Rungs = []integrate.Rung{
		{Kind: integrate.KindRestart, RestartAt: 40, Restart: integrate.Places(3)},
		{Kind: integrate.KindPrecision, Rounding: integrate.Bits(24)},
	}
	res, err := integrate.Audit(context.Background(), loop, 60, ladder, &integrate.AuditSettings{Tol: 1, Lambda: 0.9056})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, r := range res.Rungs {
		fmt.Printf("%s: agrees until t=%.2g (predicted %.2g), %v growth\n", r.Rung.Name, r.Horizon, r.Predicted, r.Growth.Kind)
	}
	// Output:
	// restart at t=40, 3 places: agrees until t=46 (predicted 49), exponential growth
	// 24 bits: agrees until t=19 (predicted 15), exponential growth
}

// Rounding shows what float32 storage and a three-decimal printout keep of
// a number.
func ExampleRounding() {
	x := 2.0 / 3
	fmt.Println(integrate.Bits(24).Round(x) == float64(float32(x)))
	fmt.Println(integrate.Places(3).Round(x))
	fmt.Println(integrate.Digits(2).Round(-1234.5))
	// Output:
	// true
	// 0.667
	// -1200
}

// Rounded runs a method with its state stored at float32's precision.
func ExampleRounded() {
	decay := integrate.Problem{F: func(_ float64, y, d []float64) { d[0] = -y[0] }, Y0: []float64{1}}
	sol, err := integrate.Solve(context.Background(), decay, 1, integrate.Rounded(integrate.DormandPrince54, integrate.Bits(24)), nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	y := sol.Final[0]
	fmt.Println(sol.Method)
	fmt.Println(y == float64(float32(y)))
	fmt.Printf("%.5f\n", y)
	// Output:
	// Dormand–Prince 5(4) (24 bits)
	// true
	// 0.36788
}
