package plumb_test

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb"
)

// A run made by another program, audited against the one trusted most: a
// second run whose state parts from the reference's by 0.001·e^t. It
// exceeds the tolerance 1 at t = ln(1000) = 6.91, found between the grid
// times 6.9 and 7.0.
func ExampleTrustRuns() {
	run := func(label string, off float64) plumb.RecordedRun {
		r := plumb.RecordedRun{Label: label, Names: []string{"x"}}
		for k := 0; k <= 100; k++ {
			t := float64(k) / 10
			r.T = append(r.T, t)
			r.Y = append(r.Y, 5+off*math.Exp(t))
		}
		return r
	}
	runs := []plumb.RecordedRun{run("tight", 0), run("loose", 0.001)}
	runs[0].Reference = true
	runs[1].Effect = plumb.VariesTolerance
	rep, err := plumb.TrustRuns(context.Background(), runs, &plumb.RecordedSettings{Tol: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("trusted until t = %.2f, limited by %s (%s): %s\n", rep.TrustedUntil, rep.LimitedBy, rep.LimitingRung, rep.Verdict)
	// Output:
	// trusted until t = 6.91, limited by tolerance (loose): not_trusted
}
