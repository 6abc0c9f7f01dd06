package integrate

// The explicit symplectic methods for separable Hamiltonians
// H(q, p) = T(p) + V(q), state y = (q, p). Each constructor takes the fixed
// step size h (> 0; the sign of the direction comes from the span) and
// returns a Method whose newScheme needs Problem.Split (ErrMethod without
// it). Stats.Evaluations counts evaluations of ∇V (Separable.DV); the
// derivative at each step end, for dense output, costs one more ∇V for
// methods that end with a drift, none for those that end with a kick. Dense
// output is the cubic Hermite interpolant of the step ends (order 3). With
// Separable.DT = UnitMass the drifts need no call (Runge–Kutta–Nyström form).
//
// Symmetric compositions of the Störmer–Verlet step S(h) have the form
//
//	Ψ(h) = S(γ_s h) ∘ … ∘ S(γ_2 h) ∘ S(γ_1 h),  γ palindromic, Σ γ = 1.

// Yoshida's (1990) composition weights, in the order w_m, …, w_1, w_0, w_1,
// …, w_m of the palindrome, with w_0 = 1 − 2(w_1 + … + w_m).
const (
	// Triple jump (Yoshida 1990; Forest & Ruth 1990):
	// w1 = 1/(2 − 2^(1/3)), w0 = −2^(1/3)/(2 − 2^(1/3)).
	yoshida4W1 = 1.351207191959657634047688
	yoshida4W0 = 1 - 2*yoshida4W1 // −1.702414383919315268095376

	// Yoshida (1990), Table 1, solution A (order 6, 7 stages).
	yoshida6W1 = -1.17767998417887
	yoshida6W2 = 0.235573213359357
	yoshida6W3 = 0.784513610477560
	yoshida6W0 = 1 - 2*(yoshida6W1+yoshida6W2+yoshida6W3)

	// Yoshida (1990), Table 2, solution D (order 8, 15 stages).
	yoshida8W1 = 0.102799849391985
	yoshida8W2 = -1.96061023297549
	yoshida8W3 = 1.93813913762276
	yoshida8W4 = -0.158240635368243
	yoshida8W5 = -1.44485223686048
	yoshida8W6 = 0.253693336566229
	yoshida8W7 = 0.914844246229740
	yoshida8W0 = 1 - 2*(yoshida8W1+yoshida8W2+yoshida8W3+yoshida8W4+yoshida8W5+yoshida8W6+yoshida8W7)

	// Omelyan, Mryglod & Folk (2002), position-extended Forest–Ruth-like
	// method (PEFRL), order 4, 4 force evaluations.
	pefrlXi     = 0.1786178958448091
	pefrlLambda = -0.2123418310626054
	pefrlChi    = -0.06626458266981849

	// Blanes & Moan (2002), SRKN_6^b (order 4, optimised for T quadratic in p,
	// 6 force evaluations): free parameters b1, b2, b3, a1, a2;
	// b4 = 1 − 2(b1 + b2 + b3), a3 = 1/2 − (a1 + a2).
	bm6B1 = 0.0829844064174052
	bm6B2 = 0.396309801498368
	bm6B3 = -0.0390563049223486
	bm6B4 = 1 - 2*(bm6B1+bm6B2+bm6B3)
	bm6A1 = 0.245298957184271
	bm6A2 = 0.604872665711080
	bm6A3 = 0.5 - (bm6A1 + bm6A2)
)

var (
	yoshida4Weights = []float64{yoshida4W1, yoshida4W0, yoshida4W1}
	yoshida6Weights = []float64{yoshida6W3, yoshida6W2, yoshida6W1, yoshida6W0, yoshida6W1, yoshida6W2, yoshida6W3}
	yoshida8Weights = []float64{yoshida8W7, yoshida8W6, yoshida8W5, yoshida8W4, yoshida8W3, yoshida8W2, yoshida8W1,
		yoshida8W0, yoshida8W1, yoshida8W2, yoshida8W3, yoshida8W4, yoshida8W5, yoshida8W6, yoshida8W7}
)

// composeVerlet returns the sub-flow coefficients of the composition of
// Störmer–Verlet steps with weights gamma, adjacent half steps merged: read
// as K D K … for kick-drift-kick steps, as D K D … for drift-kick-drift ones.
func composeVerlet(gamma []float64) []float64 {
	c := make([]float64, 0, 2*len(gamma)+1)
	c = append(c, gamma[0]/2)
	for i, g := range gamma {
		c = append(c, g)
		if i+1 < len(gamma) {
			c = append(c, (g+gamma[i+1])/2)
		}
	}
	c = append(c, gamma[len(gamma)-1]/2)
	return c
}

// Verlet returns the Störmer–Verlet (leapfrog) method in kick-drift-kick
// form ("velocity Verlet") with step h:
//
//	p½ = p − (h/2)∇V(q),  q1 = q + h∇T(p½),  p1 = p½ − (h/2)∇V(q1)
//
// Order 2, symmetric, symplectic; one evaluation of ∇V per step (the last
// kick's force is reused by the next step). Its energy error stays O(h²)
// over exponentially long times (backward error analysis).
//
// References:
//
//	L. Verlet, Computer "experiments" on classical fluids I, Phys. Rev. 159
//	  (1967) 98–103.
//	E. Hairer, C. Lubich, G. Wanner, Geometric numerical integration
//	  illustrated by the Störmer–Verlet method, Acta Numerica 12 (2003)
//	  399–450.
func Verlet(h float64) Method {
	return &splitting{name: "Störmer–Verlet (kick-drift-kick)", order: 2, h: h, first: kickFirst,
		coef: []float64{0.5, 1, 0.5}, symmetric: true}
}

// VerletDKD returns the Störmer–Verlet method in drift-kick-drift form
// ("position Verlet") with step h:
//
//	q½ = q + (h/2)∇T(p),  p1 = p − h∇V(q½),  q1 = q½ + (h/2)∇T(p1)
//
// Order 2, symmetric, symplectic, one evaluation of ∇V per step (plus one
// for the derivative at the step end when stepped by Solve or a Stepper).
//
// References:
//
//	E. Hairer, C. Lubich, G. Wanner, Geometric numerical integration
//	  illustrated by the Störmer–Verlet method, Acta Numerica 12 (2003)
//	  399–450.
func VerletDKD(h float64) Method {
	return &splitting{name: "Störmer–Verlet (drift-kick-drift)", order: 2, h: h, first: driftFirst,
		coef: []float64{0.5, 1, 0.5}, symmetric: true}
}

// ForestRuth returns the fourth-order method of Forest & Ruth: the triple
// jump S(w1 h) S(w0 h) S(w1 h) of drift-kick-drift Störmer–Verlet steps with
// w1 = 1/(2 − 2^(1/3)), w0 = 1 − 2w1. Order 4, symmetric, symplectic, three
// evaluations of ∇V per step (four through a Stepper).
//
// References:
//
//	E. Forest, R. D. Ruth, Fourth-order symplectic integration, Physica D 43
//	  (1990) 105–117.
//	J. Candy, W. Rozmus, A symplectic integration algorithm for separable
//	  Hamiltonian functions, J. Comput. Phys. 92 (1991) 230–256.
func ForestRuth(h float64) Method {
	return &splitting{name: "Forest–Ruth", order: 4, h: h, first: driftFirst,
		coef: composeVerlet(yoshida4Weights), symmetric: true}
}

// Yoshida4 returns Yoshida's fourth-order composition ("triple jump") of
// kick-drift-kick Störmer–Verlet steps, the same weights as ForestRuth
// (w1 = 1/(2 − 2^(1/3)), w0 = 1 − 2w1) on the momentum-first base. Order 4,
// symmetric, symplectic, three evaluations of ∇V per step.
//
// References:
//
//	H. Yoshida, Construction of higher order symplectic integrators, Phys.
//	  Lett. A 150 (1990) 262–268.
func Yoshida4(h float64) Method {
	return &splitting{name: "Yoshida 4", order: 4, h: h, first: kickFirst,
		coef: composeVerlet(yoshida4Weights), symmetric: true}
}

// Yoshida6 returns Yoshida's sixth-order composition of seven kick-drift-kick
// Störmer–Verlet steps, Table 1 solution A (w1 = −1.17767998417887,
// w2 = 0.235573213359357, w3 = 0.784513610477560, w0 = 1 − 2Σw). Order 6,
// symmetric, symplectic, seven evaluations of ∇V per step.
//
// References:
//
//	H. Yoshida, Construction of higher order symplectic integrators, Phys.
//	  Lett. A 150 (1990) 262–268, Table 1.
func Yoshida6(h float64) Method {
	return &splitting{name: "Yoshida 6 (A)", order: 6, h: h, first: kickFirst,
		coef: composeVerlet(yoshida6Weights), symmetric: true}
}

// Yoshida8 returns Yoshida's eighth-order composition of fifteen
// kick-drift-kick Störmer–Verlet steps, Table 2 solution D. Order 8,
// symmetric, symplectic, fifteen evaluations of ∇V per step. The weights are
// published to 15 digits, so the order conditions hold to about 1e-14; the
// error this leaves (about 1e-14·h²·t) is far below the O(h⁸) term for any
// useful h.
//
// References:
//
//	H. Yoshida, Construction of higher order symplectic integrators, Phys.
//	  Lett. A 150 (1990) 262–268, Table 2.
func Yoshida8(h float64) Method {
	return &splitting{name: "Yoshida 8 (D)", order: 8, h: h, first: kickFirst,
		coef: composeVerlet(yoshida8Weights), symmetric: true}
}

// PEFRL returns the position-extended Forest–Ruth-like method of Omelyan,
// Mryglod & Folk, an optimised fourth-order splitting
//
//	D(ξh) K((1−2λ)h/2) D(χh) K(λh) D((1−2(χ+ξ))h) K(λh) D(χh) K((1−2λ)h/2) D(ξh)
//
// with ξ = 0.1786178958448091, λ = −0.2123418310626054,
// χ = −0.06626458266981849. Order 4, symmetric, symplectic, four evaluations
// of ∇V per step (five through a Stepper: one more for the derivative at the
// step end). On Kepler (e = 0.6) at equal step size its error is about a
// tenth of Forest–Ruth's (measured in the package tests).
//
// References:
//
//	I. P. Omelyan, I. M. Mryglod, R. Folk, Optimized Forest–Ruth- and
//	  Suzuki-like algorithms for integration of motion in many-body systems,
//	  Comput. Phys. Commun. 146 (2002) 188–202.
func PEFRL(h float64) Method {
	return &splitting{name: "PEFRL", order: 4, h: h, first: driftFirst,
		coef: []float64{pefrlXi, (1 - 2*pefrlLambda) / 2, pefrlChi, pefrlLambda, 1 - 2*(pefrlChi+pefrlXi),
			pefrlLambda, pefrlChi, (1 - 2*pefrlLambda) / 2, pefrlXi}, symmetric: true}
}

// BlanesMoan4 returns the optimised symmetric Runge–Kutta–Nyström splitting
// SRKN_6^b of Blanes & Moan,
//
//	K(b1h) D(a1h) K(b2h) D(a2h) K(b3h) D(a3h) K(b4h) D(a3h) K(b3h) D(a2h) K(b2h) D(a1h) K(b1h)
//
// with b1 = 0.0829844064174052, b2 = 0.396309801498368,
// b3 = −0.0390563049223486, b4 = 1 − 2(b1+b2+b3), a1 = 0.245298957184271,
// a2 = 0.604872665711080, a3 = 1/2 − (a1+a2). Its free parameters minimise
// the error of the Nyström case, kinetic energy quadratic in p
// (T = ½pᵀM⁻¹p, d²q/dt² = −M⁻¹∇V(q)); being symmetric it satisfies the
// order-4 conditions of any separable Hamiltonian (the even-degree terms
// of its modified equation vanish), so it is of order 4 in general.
// Symmetric, symplectic, six evaluations of ∇V per step. On Kepler
// (e = 0.6) at equal step size its error is about 1/300 of PEFRL's
// (measured in the package tests).
//
// References:
//
//	S. Blanes, P. C. Moan, Practical symplectic partitioned Runge–Kutta and
//	  Runge–Kutta–Nyström methods, J. Comput. Appl. Math. 142 (2002)
//	  313–330 (method SRKN_6^b).
func BlanesMoan4(h float64) Method {
	return &splitting{name: "Blanes–Moan SRKN6b", order: 4, h: h, first: kickFirst,
		coef:      []float64{bm6B1, bm6A1, bm6B2, bm6A2, bm6B3, bm6A3, bm6B4, bm6A3, bm6B3, bm6A2, bm6B2, bm6A1, bm6B1},
		symmetric: true}
}
