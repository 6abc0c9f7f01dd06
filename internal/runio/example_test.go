package runio_test

import (
	"fmt"
	"strings"

	"github.com/plumbdyn/plumb/internal/runio"
)

// Two runs of a lab's convection loop, one written every 0.5 s and one at
// other times, compared on the times of the first over their common span.
func Example() {
	a, err := runio.ReadCSV(strings.NewReader("t,x,z\n0,1,20\n0.5,2,21\n1,3,22\n1.5,4,23\n"), runio.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	b, err := runio.ReadJSONL(strings.NewReader(
		`{"t": 0.25, "x": 1.5, "z": 20.5}`+"\n"+
			`{"t": 0.75, "x": 2.5, "z": 21.5}`+"\n"+
			`{"t": 1.25, "x": 3.5, "z": 22.5}`+"\n"), runio.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	c, err := runio.Resample([]*runio.Run{a, b}, []string{"x", "z"}, runio.Grid{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("compared span [%v, %v] at times %v\n", c.T0, c.T1, c.T)
	for k, t := range c.T {
		fmt.Printf("t=%v  x: %v vs %.3g\n", t, c.Y[0][2*k], c.Y[1][2*k])
	}

	_, err = runio.ReadCSV(strings.NewReader("t,x\n0,1\n0.5,NaN\n"), runio.Options{Source: "loop.csv"})
	fmt.Println(err)
	// Output:
	// compared span [0.25, 1.25] at times [0.5 1]
	// t=0.5  x: 2 vs 2
	// t=1  x: 3 vs 3
	// runio: loop.csv:3: column 2 "x": not a finite number: found "NaN"
}
