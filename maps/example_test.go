package maps_test

import (
	"context"
	"fmt"

	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/maps"
)

// A fish stock counted once a year follows the logistic map at r = 4: how
// many years of a float64 forecast agree with a double-double one to 0.1?
func ExampleAudit() {
	const r = 4
	m, err := maps.New(1, maps.Funcs{
		Next: func(x, dst []float64) { dst[0] = float64(r*x[0]) * (1 - x[0]) },
		NextDD: func(x, dst []maps.DoubleDouble) error {
			dst[0] = dd.Mul(dd.MulFloat(x[0], r), dd.Sub(dd.From(1), x[0]))
			return nil
		},
	}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := maps.Audit(context.Background(), m, []float64{0.3}, 100, &maps.AuditSettings{Tol: 0.1})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, rung := range res.Rungs {
		fmt.Printf("%-8s departs at iterate %d\n", rung.Rung.Name, rung.DepartsAt)
	}
	fmt.Println("trusted until iterate", res.Trusted)
	// Output:
	// float64  departs at iterate 52
	// 40 bits  departs at iterate 38
	// 24 bits  departs at iterate 22
	// restart  departs at iterate 89
	// trusted until iterate 21
}

// The logistic map at r = 3.83 sits in its period-3 window: one 3-cycle
// attracts, its twin born at the same tangent bifurcation repels.
func ExampleCycles() {
	const r = 3.83
	m, err := maps.New(1, maps.Funcs{
		Next:     func(x, dst []float64) { dst[0] = float64(r*x[0]) * (1 - x[0]) },
		Jacobian: func(x []float64, dst *mat.Dense) { dst.Set(0, 0, r-float64(2*r*x[0])) },
	}, nil)
	if err != nil {
		panic(err)
	}
	cs, err := maps.Cycles(context.Background(), m, 3, &maps.CycleSettings{Low: []float64{0}, High: []float64{1}})
	if err != nil {
		panic(err)
	}
	for _, c := range cs {
		fmt.Printf("from %.4f: multiplier %.4f, stable %v\n", c.Points[0][0], c.Multiplier, c.Stable)
	}
	// Output:
	// from 0.1561: multiplier 0.3299, stable true
	// from 0.1636: multiplier 1.6523, stable false
}
