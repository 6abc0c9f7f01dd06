package integrate_test

import (
	"context"
	"fmt"
	"log"
	"math"

	"github.com/plumbdyn/plumb/integrate"
)

// convectionLoop is the Lorenz model of a heated convection loop in a lab:
// x is the circulation speed of the water in the ring, y the temperature
// difference between the rising and the falling side, z the deviation of
// the vertical temperature profile from linear (sigma = 10, rho = 28,
// beta = 8/3; E. N. Lorenz 1963).
func convectionLoop(_ float64, s, ds []float64) {
	const sigma, rho, beta = 10, 28, 8.0 / 3
	x, y, z := s[0], s[1], s[2]
	ds[0] = sigma * (y - x)
	ds[1] = float64(x*(rho-z)) - y
	ds[2] = float64(x*y) - float64(beta*z)
}

// A convection loop starts from a slight circulation; how often does the flow
// reverse its direction in the first 20 time units, and where is it then?
func ExampleSolve() {
	p := integrate.Problem{F: convectionLoop, Y0: []float64{1, 1, 1}}
	reversal := integrate.Crossing{
		Name: "reversal",
		G:    func(_ float64, s []float64) float64 { return s[0] }, // circulation speed
	}
	sol, err := integrate.Solve(context.Background(), p, 20, integrate.DormandPrince54, &integrate.Settings{
		RelTol:    1e-12, // global error about 2e-6 at t = 20: six digits hold
		AbsTol:    1e-12,
		Every:     5,
		Crossings: []integrate.Crossing{reversal},
	})
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("flow reversals: %d, the first at t = %.6g\n", len(sol.Hits), sol.Hits[0].T)
	for _, s := range sol.Samples {
		fmt.Printf("t = %4.1f  speed %9.6g  temperature difference %9.6g\n", s.T, s.Y[0], s.Y[1])
	}
	fmt.Println(sol.Status)
	// Output:
	// flow reversals: 6, the first at t = 0.512724
	// t =  0.0  speed         1  temperature difference         1
	// t =  5.0  speed  -6.51211  temperature difference  -6.97404
	// t = 10.0  speed  -4.90269  temperature difference  -3.74387
	// t = 15.0  speed  -4.39311  temperature difference  -2.06913
	// t = 20.0  speed   13.7932  temperature difference   12.9518
	// completed
}

// A code that owns its loop takes one step at a time: here it watches for
// the fastest circulation of the loop over 20 time units.
func ExampleStepper() {
	p := integrate.Problem{F: convectionLoop, Y0: []float64{1, 1, 1}}
	st, err := integrate.NewStepper(p, 20, nil, &integrate.Settings{RelTol: 1e-10, AbsTol: 1e-10})
	if err != nil {
		log.Fatal(err)
	}
	var fastest, when float64
	for st.Next(context.Background()) {
		if x := math.Abs(st.Y()[0]); x > fastest {
			fastest, when = x, st.T()
		}
	}
	if err := st.Err(); err != nil {
		log.Fatal(err)
	}
	fmt.Printf("fastest circulation %.4g at t = %.4g; reached t = %g\n", fastest, when, st.T())
	// Output:
	// fastest circulation 19.57 at t = 0.3469; reached t = 20
}

// ExampleFitGrowth fits the growth of a gap between two measured runs of a
// fish-stock model that doubles every year from 1e-12 (an invented curve):
// the exponential law wins, at rate ln 2 per year.
func ExampleFitGrowth() {
	var years, logGap []float64
	for n := 1; n <= 12; n++ {
		years = append(years, float64(n))
		logGap = append(logGap, math.Log(1e-12)+float64(n)*math.Ln2)
	}
	g := integrate.FitGrowth(years, logGap, 0)
	fmt.Printf("%v, rate %.6g per year (ln 2 = %.6g), %d points\n", g.Kind, g.Rate, math.Ln2, g.Points)
	// Output: exponential, rate 0.693147 per year (ln 2 = 0.693147), 12 points
}
