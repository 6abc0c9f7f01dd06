package dd_test

import (
	"fmt"

	"github.com/plumbdyn/plumb/internal/dd"
)

// One tenth summed ten times: float64 misses 1 by half an ulp of 1 (1.1e-16),
// double-double by about 1e-33, far below its 106-bit resolution of 1 (1.2e-32).
func Example() {
	tenth := dd.Div(dd.From(1), dd.From(10)) // 0.1 to about 32 digits
	s, f := dd.From(0), 0.0
	for range 10 {
		s = dd.Add(s, tenth)
		f += 0.1
	}
	fmt.Printf("float64:       1 - sum = %.3g\n", 1-f)
	fmt.Printf("double-double: 1 - sum = %.3g\n", dd.Sub(dd.From(1), s).Float64())
	fmt.Printf("sqrt(2) = %.17g + %.3g\n", dd.Sqrt(dd.From(2)).Hi, dd.Sqrt(dd.From(2)).Lo)
	// Output:
	// float64:       1 - sum = 1.11e-16
	// double-double: 1 - sum = 1.54e-33
	// sqrt(2) = 1.4142135623730951 + -9.67e-17
}
