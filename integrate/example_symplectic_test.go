package integrate_test

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
)

// A survey probe on an eccentric orbit (eccentricity 0.6, units with
// GM = 1 and semi-major axis 1) is propagated for a thousand orbits with
// Yoshida's fourth-order method. The energy audit shows the energy error
// staying bounded, checks whether step doubling can estimate the position
// error at the end, and suggests the step for a tenfold smaller energy error.
func ExampleEnergyAudit() {
	probe := integrate.HamiltonianProblem{
		Q0: []float64{0.4, 0},
		P0: []float64{0, 2},
		DV: func(q, dst []float64) {
			r2 := float64(q[0]*q[0]) + float64(q[1]*q[1])
			r3 := r2 * math.Sqrt(r2)
			dst[0], dst[1] = q[0]/r3, q[1]/r3
		},
		Potential: func(q []float64) float64 { return -1 / math.Hypot(q[0], q[1]) },
	}
	p, err := probe.Problem()
	if err != nil {
		fmt.Println(err)
		return
	}
	period := 2 * math.Pi
	rep, err := integrate.EnergyAudit(context.Background(), p, 1000*period, integrate.Yoshida4, period/200, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s, %d steps\n", rep.Method, rep.Steps)
	fmt.Printf("energy error: max %.1e, first/last tenth ratio %.1f\n", rep.MaxError, rep.DriftRatio)
	// After a thousand orbits the phase error has saturated: step doubling
	// no longer behaves as C·h⁴, and the audit says so.
	fmt.Printf("position error estimate usable: %v\n", rep.Asymptotic())
	fmt.Printf("step for a tenfold smaller energy error: %.2g\n", rep.SuggestStep(rep.MaxError/10))
	// Output:
	// Yoshida 4, 200000 steps
	// energy error: max 4.8e-05, first/last tenth ratio 1.0
	// position error estimate usable: false
	// step for a tenfold smaller energy error: 0.017
}

// A comet on a very eccentric orbit (e = 0.9) passes the star at a tenth of
// its mean distance. Reversible adaptive steps, dense near the star, keep
// the energy error bounded at a fraction of the fixed-step cost.
func ExampleSolveReversible() {
	e := 0.9
	comet := integrate.HamiltonianProblem{
		Q0: []float64{1 - e, 0},
		P0: []float64{0, math.Sqrt((1 + e) / (1 - e))},
		DV: func(q, dst []float64) {
			r2 := float64(q[0]*q[0]) + float64(q[1]*q[1])
			r3 := r2 * math.Sqrt(r2)
			dst[0], dst[1] = q[0]/r3, q[1]/r3
		},
		Potential: func(q []float64) float64 { return -1 / math.Hypot(q[0], q[1]) },
	}
	p, err := comet.Problem()
	if err != nil {
		fmt.Println(err)
		return
	}
	sol, err := integrate.SolveReversible(context.Background(), p, 100*2*math.Pi, integrate.Verlet, 0.01,
		integrate.DistanceScale(1.5), nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	energy := comet.Energy()
	var worst float64
	for i := range sol.T {
		worst = math.Max(worst, math.Abs(energy(sol.Y[i*4:i*4+4])+0.5))
	}
	fmt.Printf("adaptive: %.2g steps, energy error %.1e\n", float64(sol.Stats.Accepted), worst)

	// The same number of fixed steps.
	t1 := 100 * 2 * math.Pi
	fixed, err := integrate.EnergyAudit(context.Background(), p, t1, integrate.Verlet, t1/float64(sol.Stats.Accepted), nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("fixed:    %.2g steps, energy error %.1e\n", float64(fixed.Steps), fixed.MaxError)
	// Output:
	// adaptive: 8.4e+04 steps, energy error 1.9e-04
	// fixed:    8.4e+04 steps, energy error 7.1e-02
}
