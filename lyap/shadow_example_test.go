package lyap_test

import (
	"context"
	"fmt"

	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/lyap"
	"gonum.org/v1/gonum/mat"
)

// fishStock is a made-up yearly stock model, x' = 3.9·x·(1 − x) (the
// logistic map), with its double-double form.
type fishStock struct{}

func (fishStock) Dim() int                             { return 1 }
func (fishStock) Next(x, dst []float64)                { dst[0] = 3.9 * x[0] * (1 - x[0]) }
func (fishStock) Jacobian(x []float64, dst *mat.Dense) { dst.Set(0, 0, 3.9*(1-2*x[0])) }
func (fishStock) NextDD(x, dst []lyap.DoubleDouble) error {
	dst[0] = dd.MulFloat(dd.Mul(x[0], dd.Sub(dd.From(1), x[0])), 3.9)
	return nil
}

// A float64 simulation of 5000 years of the stock is wrong, year by year,
// after a few dozen years; ShadowMap says whether it is still a true orbit
// of the model to within a small distance.
func ExampleShadowMap() {
	m := fishStock{}
	const years = 5000
	orbit := make([]float64, years+1)
	orbit[0] = 0.2
	for i := 0; i < years; i++ {
		m.Next(orbit[i:i+1], orbit[i+1:i+2])
	}
	sh, err := lyap.ShadowMap(context.Background(), m, orbit, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("shadowed %d of %d years, within 1e-10: %v, one-step errors below 1e-26 after: %v\n",
		sh.Shadowed, sh.Iterates, sh.Distance < 1e-10, sh.StepErrorAfter < 1e-26)
	// Output: shadowed 5000 of 5000 years, within 1e-10: true, one-step errors below 1e-26 after: true
}
