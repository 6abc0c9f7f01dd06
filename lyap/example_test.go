package lyap_test

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/lyap"
)

// A convection loop in a lab — a vertical ring of water heated from below —
// is modelled by the three-mode Lorenz equations at the classic parameters.
// How fast do small errors in the loop's temperature readings grow, and how
// long does a forecast started from readings good to 1e-3 stay within 1 of
// the truth? (The horizon describes the model, not the loop: it is no safety
// certificate.)
func Example() {
	sys, err := plumb.Model("lorenz")
	if err != nil {
		fmt.Println(err)
		return
	}
	sp, err := lyap.Exponents(context.Background(), sys.Problem(), 3, &lyap.Settings{Duration: 2000, Transient: 50})
	if err != nil {
		fmt.Println(err)
		return
	}
	l1, se1 := sp.Exponents[0], sp.StdErr[0]
	sum := sp.Exponents[0] + sp.Exponents[1] + sp.Exponents[2]
	fmt.Printf("largest exponent %.1f %s, standard error below 0.01: %v\n", l1, sp.Units, se1 < 0.01)
	fmt.Printf("published 0.9056 within 3 standard errors: %v\n", math.Abs(l1-0.9056) < 3*se1)
	fmt.Printf("smallest exponent %.3g\n", sp.Exponents[2])
	fmt.Printf("sum %.3g (the divergence is -(10+1+8/3))\n", sum)
	fmt.Printf("Kaplan–Yorke dimension %.3g\n", lyap.KaplanYorke(sp.Exponents))
	fmt.Printf("horizon from 1e-3 to 1: %.2g time units\n", lyap.Horizon(l1, 1e-3, 1))
	// Output:
	// largest exponent 0.9 1/time, standard error below 0.01: true
	// published 0.9056 within 3 standard errors: true
	// smallest exponent -14.6
	// sum -13.7 (the divergence is -(10+1+8/3))
	// Kaplan–Yorke dimension 2.06
	// horizon from 1e-3 to 1: 7.6 time units
}

// The Hénon map's two exponents, with their standard errors; their sum is
// ln 0.3 exactly, because the map's Jacobian determinant is constant.
func ExampleMapExponents() {
	f := func(x, dst []float64) {
		dst[0] = 1 + x[1] - 1.4*x[0]*x[0]
		dst[1] = 0.3 * x[0]
	}
	m := lyap.MapFunc{N: 2, F: f}
	_, err := lyap.MapExponents(context.Background(), m, []float64{0.1, 0.1}, 2, nil)
	fmt.Println(err)
	// Output:
	// lyap: the map has no Jacobian: no jacobian
}

// A fish-stock model with three age classes was run for only its largest
// exponent: 0.9056 ± 0.01 per year over 1000 years (invented numbers). The
// dimension and the entropy of one exponent are lower bounds on the
// model's, and the growth stands clear of its noise.
func ExampleSpectrum_KaplanYorke() {
	sp := &lyap.Spectrum{Dim: 3, Exponents: []float64{0.9056}, StdErr: []float64{0.01}, Duration: 1000}
	d, db, _ := sp.KaplanYorke()
	h, hb, _ := sp.Entropy()
	lt, _ := sp.LyapunovTime()
	fmt.Printf("Kaplan–Yorke dimension %.3g (%s bound)\n", d, db)
	fmt.Printf("entropy %.4g (%s bound)\n", h, hb)
	fmt.Printf("Lyapunov time %.3g, beyond noise: %v\n", lt, sp.BeyondNoise())
	// Output:
	// Kaplan–Yorke dimension 1 (lower bound)
	// entropy 0.9056 (lower bound)
	// Lyapunov time 1.1, beyond noise: true
}
