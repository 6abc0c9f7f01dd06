package plumb_test

import (
	"context"
	"fmt"

	"github.com/plumbdyn/plumb"
)

// Six copies of the convection loop, a millionth apart, run until they
// part; the pairs released along the orbit time the growth.
func ExampleEnsemble() {
	sys, err := plumb.Model("lorenz")
	if err != nil {
		fmt.Println(err)
		return
	}
	rep, err := plumb.Ensemble(context.Background(), sys, 30, &plumb.EnsembleSettings{
		Members: 6, Delta: 1e-6, Tol: 1, Releases: 16, ReleaseEvery: 5, Seed: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	parted := 0
	for _, t := range rep.PartingTimes {
		if t != nil {
			parted++
		}
	}
	fmt.Printf("%d of %d members parted by t=30\n", parted, rep.Members)
	fmt.Println("small-scale exponent measured:", rep.SmallScale != nil)
	// Output:
	// 5 of 6 members parted by t=30
	// small-scale exponent measured: true
}
