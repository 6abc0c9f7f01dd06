package main

import (
	"context"
	"os"
	"strings"
)

// The convection-loop demo for a few hundredths of a time unit, as a table.
func Example_solve() {
	run(context.Background(), []string{"solve", "--t1", "0.03", "--quiet"}, strings.NewReader(""), os.Stdout, os.Stderr)
	// Output:
	// t     x            y            z
	// 0     1            1            1
	// 0.01  1.012565733  1.259920026  0.9848910449
	// 0.02  1.048821456  1.524000849  0.973114339
	// 0.03  1.10720628   1.798314612  0.9651590915
	//
	// system  lorenz (Lorenz convection) sigma=10 rho=28 beta=2.6666666666666665
	// method  Dormand–Prince 5(4), rtol 1e-10, atol 1e-10
	// status  completed at t=0.03
	// work    14 accepted steps, 0 rejected, 86 evaluations
}

// One built-in system with a changed parameter.
func Example_models() {
	run(context.Background(), []string{"models", "--model", "vanderpol", "--set", "mu=5"}, strings.NewReader(""), os.Stdout, os.Stderr)
	// Output:
	// vanderpol: Van der Pol oscillator (flow)
	//   state  start  period
	//   x      2      -
	//   v      0      -
	//   parameter  value  meaning
	//   mu         5      damping strength
	//   source: B. van der Pol, On relaxation-oscillations, Phil. Mag. 2 (1926) 978–992; mu=1000, y0=(2,0) is problem VDPOL of the Mazzia & Magherini IVP Test Set (2008)
}

// The demo's largest Lyapunov exponent from a short run, with what follows
// from it. A single exponent gives only lower bounds of the dimension and
// the entropy.
func Example_spectrum() {
	run(context.Background(), []string{"spectrum", "--exponents", "1", "--t1", "300", "--quiet"}, strings.NewReader(""), os.Stdout, os.Stderr)
	// Output:
	// system: lorenz (Lorenz convection) sigma=10 rho=28 beta=2.6666666666666665
	//
	// exponent  value     std err
	// lambda_1  0.896869  0.047
	// (per unit time, natural log)
	//
	// Kaplan–Yorke dimension               1 (a lower bound: more exponents could raise it)
	// entropy (sum of positive exponents)  0.8969 per unit time (a lower bound: more exponents could raise it)
	// Lyapunov time 1/lambda_max           1.115
	// run                                  averaged t = 100.0017276 .. 300 in 32 blocks; Dormand–Prince 5(4), exact Jacobian
	// work                                 55050 steps, 25 rejected, 331028 evaluations, 576 re-orthonormalisations
	// status                               completed
}
