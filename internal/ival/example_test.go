package ival_test

import (
	"fmt"

	"github.com/plumbdyn/plumb/internal/ival"
)

// A damper's force law f = c v² with a coefficient known to ±1% and a
// speed known to ±0.5%: the interval result holds every force the model
// allows, with rounding accounted for.
func Example() {
	c := ival.New(0.99, 1.01)   // N s²/m²
	v := ival.New(2.985, 3.015) // m/s
	f := ival.Mul(c, ival.Sqr(v))
	fmt.Printf("force in [%.4f, %.4f] N\n", f.Lo, f.Hi)
	fmt.Println(ival.Add(ival.Point(1), ival.Point(2))) // exact results stay exact
	third := ival.Div(ival.Point(1), ival.Point(3))
	fmt.Println(third.Contains(1.0/3), third.Width() > 0)
	// Output:
	// force in [8.8211, 9.1811] N
	// [3, 3]
	// true true
}

// The range of sin over an interval holding π/2 reaches 1.
func ExampleSin() {
	s := ival.Sin(ival.New(1.5, 1.6))
	fmt.Printf("[%.6f, %g]\n", s.Lo, s.Hi)
	// Output: [0.997495, 1]
}
