package detmath_test

import (
	"fmt"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// The functions give the same bits on amd64 and arm64; printed here to 15
// digits (sin(π/6) = 1/2, e^(ln 10) = 10 and 2^0.5 = √2 up to the last
// bits; exact identities).
func Example() {
	fmt.Printf("%.15f\n", detmath.Sin(3.141592653589793/6))
	fmt.Printf("%.13f\n", detmath.Exp(detmath.Log(10)))
	fmt.Printf("%.15f\n", detmath.Pow(2, 0.5))
	// Output:
	// 0.500000000000000
	// 10.0000000000000
	// 1.414213562373095
}
