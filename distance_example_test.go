package plumb_test

import (
	"context"
	"fmt"

	"github.com/plumbdyn/plumb"
)

// A plant's two sensors follow the Hénon map; only the first reading is
// forecast, and a difference of 0.05 in it is what matters. The audit
// starts from the reading x = 0.1 and compares x alone, scaled so that the
// tolerance 1 means 0.05.
func ExampleDistance() {
	sys, err := plumb.Model("henon")
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := sys.SetStartValue("x", 0.1); err != nil {
		fmt.Println(err)
		return
	}
	rep, err := sys.Trust(context.Background(), 120, &plumb.TrustSettings{
		Tol: 1,
		Distance: plumb.Distance{
			Observe: []string{"x"},
			Scales:  []plumb.Scale{{Name: "x", Value: 0.05}},
		},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("distance:", rep.Distance)
	for _, r := range rep.Rungs {
		fmt.Printf("%-8s departs at iterate %d\n", r.Name, r.DepartsAt)
	}
	// Output:
	// distance: Euclidean over x with scales x/0.05 (y not compared)
	// float64  departs at iterate 86
	// 40 bits  departs at iterate 59
	// 24 bits  departs at iterate 39
	// restart  departs at iterate 105
}
