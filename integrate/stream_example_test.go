package integrate_test

import (
	"context"
	"fmt"
	"log"

	"github.com/plumbdyn/plumb/integrate"
)

// A lab logs its convection loop's circulation every 0.01 time units for
// a long run; the samples go straight to the log as they are computed, so
// memory does not grow with the span. Here the "log" keeps only the
// fastest circulation seen and counts the samples.
func ExampleStream() {
	p := integrate.Problem{F: convectionLoop, Y0: []float64{1, 1, 1}}
	s := &integrate.Settings{RelTol: 1e-10, AbsTol: 1e-10, Every: 0.01}
	fmt.Println("samples announced:", integrate.SampleCount(0, 50, s))
	n, fastest := 0, 0.0
	sol, err := integrate.Stream(context.Background(), p, 50, nil, s, func(t float64, y []float64) error {
		n++
		fastest = max(fastest, y[0], -y[0])
		return nil
	})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("samples written: %d, status %v, fastest circulation %.1f\n", n, sol.Status, fastest)
	// Output:
	// samples announced: 5001
	// samples written: 5001, status completed, fastest circulation 19.6
}
