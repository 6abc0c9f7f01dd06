package plumb_test

import (
	"context"
	"fmt"

	"github.com/plumbdyn/plumb"
)

// A fish stock counted once a year follows the logistic map at r = 4: how
// many years of a float64 forecast agree with a double-double one to 0.1?
func ExampleSystem_Trust_map() {
	sys, err := plumb.Model("logistic")
	if err != nil {
		fmt.Println(err)
		return
	}
	rep, err := sys.Trust(context.Background(), 100, &plumb.TrustSettings{Tol: 0.1})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, r := range rep.Rungs {
		fmt.Printf("%-8s departs at iterate %3d (predicted %.0f)\n", r.Name, r.DepartsAt, r.Predicted)
	}
	fmt.Printf("exponent %.3f per iterate, verdict %s\n", rep.Exponent.Value, rep.Verdict)
	// Output:
	// float64  departs at iterate  52 (predicted 50)
	// 40 bits  departs at iterate  38 (predicted 37)
	// 24 bits  departs at iterate  22 (predicted 21)
	// restart  departs at iterate  89 (predicted 88)
	// exponent 0.693 per iterate, verdict not_trusted
}
