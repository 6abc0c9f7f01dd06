package embed_test

import (
	"context"
	"fmt"

	"github.com/plumbdyn/plumb/embed"
)

// A signal from an unknown two-variable process (here the Hénon map's x):
// how many delay coordinates does it need?
func ExampleFalseNeighbours() {
	x := henonX(3000)
	f, err := embed.FalseNeighbours(context.Background(), x, 1, 4, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("dimension:", f.Dimension)
	// Output: dimension: 2
}
