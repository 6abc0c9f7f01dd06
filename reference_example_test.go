package plumb_test

import (
	"context"
	"fmt"

	"github.com/plumbdyn/plumb"
)

// A lab's convection loop modelled by the Lorenz equations: a reference
// trajectory to t = 20, correct to 20 digits at the end, with the
// precision chosen from the largest exponent.
func ExampleReference() {
	sys, err := plumb.Model("lorenz")
	if err != nil {
		fmt.Println(err)
		return
	}
	r, err := plumb.Reference(context.Background(), sys, 20, nil, &plumb.ReferenceSettings{Lambda: 0.9056})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d digits in %s; x(20) = %.6g; self-check below 1e-20: %v\n",
		r.Digits, r.Arithmetic, r.Float64[0][0], r.Check.Error < 1e-20)
	// Output:
	// 32 digits in big.Float; x(20) = 13.7932; self-check below 1e-20: true
}
