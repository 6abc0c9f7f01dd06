// Command printed-restart replays a familiar accident in a lab's convection
// loop model (the Lorenz equations, sigma=10, rho=28, beta=8/3): a long run
// is stopped at t=40, its state is printed to three decimals, and a colleague
// types the numbers back in to continue. When do the continued run and the
// uninterrupted one part, and does the largest Lyapunov exponent predict it?
package main

import (
	"context"
	"fmt"
	"io"
	"log"
	"math"
	"os"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
)

func main() {
	if _, err := run(os.Stdout); err != nil {
		log.Fatal(err)
	}
}

// outcome is what the replay found.
type outcome struct {
	Delta0    float64 // how far printing moved the state
	Parted    float64 // the time the runs first differ by more than 1 (NaN if never)
	Predicted float64 // the parting time predicted from the largest Lyapunov exponent
}

// run replays the printed restart, writes its story to w and returns it.
func run(w io.Writer) (outcome, error) {
	sys, err := plumb.Model("lorenz")
	if err != nil {
		return outcome{}, err
	}
	p := sys.Problem()
	ctx := context.Background()

	// The uninterrupted run and the printed state at t=40.
	s := &integrate.Settings{RelTol: 1e-12, AbsTol: 1e-12, Every: 0.01}
	full, err := integrate.Solve(ctx, p, 60, integrate.DormandPrince853, s)
	if err != nil {
		return outcome{}, err
	}
	at40 := full.At(40, nil)
	printed := integrate.Places(3).Vec(nil, at40)
	fmt.Fprintf(w, "state at t=40:   %.6f %.6f %.6f\n", at40[0], at40[1], at40[2])
	fmt.Fprintf(w, "as printed:      %.3f %.3f %.3f\n", printed[0], printed[1], printed[2])

	// The continued run from the printed numbers.
	q := p
	q.T0, q.Y0 = 40, printed
	cont, err := integrate.Solve(ctx, q, 60, integrate.DormandPrince853, s)
	if err != nil {
		return outcome{}, err
	}
	delta0, parted := 0.0, math.NaN()
	for i := 0; i <= 2000; i++ {
		t := 40 + float64(i)*0.01
		a, b := full.At(t, nil), cont.At(t, nil)
		d := math.Sqrt((a[0]-b[0])*(a[0]-b[0]) + (a[1]-b[1])*(a[1]-b[1]) + (a[2]-b[2])*(a[2]-b[2]))
		if i == 0 {
			delta0 = d
		}
		if d > 1 {
			parted = t
			break
		}
	}
	sp, err := lyap.Exponents(ctx, p, 1, nil)
	if err != nil {
		return outcome{}, err
	}
	lambda := sp.Exponents[0]
	fmt.Fprintf(w, "printing moved the state by %.2g\n", delta0)
	fmt.Fprintf(w, "the runs differ by more than 1 from t = %.2f\n", parted)
	fmt.Fprintf(w, "largest Lyapunov exponent %.3f ± %.3f: predicted parting after %.1f time units (measured %.1f)\n",
		lambda, sp.StdErr[0], lyap.Horizon(lambda, delta0, 1), parted-40)
	// One restart departs earlier or later than the prediction by the
	// finite-time growth rate at that place on the attractor; over many
	// restart times the median ratio is close to 1 (see plumb trust).
	fmt.Fprintln(w, "(one restart scatters around the prediction with the local growth rate)")
	return outcome{Delta0: delta0, Parted: parted, Predicted: 40 + lyap.Horizon(lambda, delta0, 1)}, nil
}
