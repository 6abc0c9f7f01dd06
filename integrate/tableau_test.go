package integrate

import "math/big"

// Tableaus of the small methods for the order-conditions test.

// bs32Tableau: Bogacki & Shampine (1989), from the constants of bs32.go;
// stage 4 is F at the new point (FSAL).
func bs32Tableau() ocTableau {
	b := ocVec(bsA41, bsA42, bsA43, 0)
	e := ocVec(bsE1, bsE2, bsE3, bsE4)
	return ocTableau{
		name: "BogackiShampine32",
		c:    []float64{0, bsC2, bsC3, 1},
		a:    [][]float64{{}, {bsA21}, {0, bsA32}, {bsA41, bsA42, bsA43}},
		weights: []ocWeights{
			{name: "b", b: b, order: 3},
			{name: "b̂ = b − e", b: ocSub(b, e), order: 2},
		},
		dense: []ocDense{{name: "Hermite dense output", w: ocHermite(b, 3, 4), order: 3}},
	}
}

// rk4Tableau: the classical method (Kutta 1901) as fixed.go computes it;
// stage 5 is F at the new point, used by the Hermite interpolant.
func rk4Tableau() ocTableau {
	b := ocVec(1.0/6, 1.0/3, 1.0/3, 1.0/6, 0)
	return ocTableau{
		name:    "RK4",
		c:       []float64{0, 0.5, 0.5, 1, 1},
		a:       [][]float64{{}, {0.5}, {0, 0.5}, {0, 0, 1}, {1.0 / 6, 1.0 / 3, 1.0 / 3, 1.0 / 6}},
		weights: []ocWeights{{name: "b", b: b, order: 4}},
		dense:   []ocDense{{name: "Hermite dense output", w: ocHermite(b, 4, 5), order: 3}},
	}
}

// eulerTableau: explicit Euler; stage 2 is F at the new point.
func eulerTableau() ocTableau {
	b := ocVec(1, 0)
	return ocTableau{
		name:    "Euler",
		c:       []float64{0, 1},
		a:       [][]float64{{}, {1}},
		weights: []ocWeights{{name: "b", b: b, order: 1}},
		dense: []ocDense{{name: "linear dense output", order: 1, w: func(theta float64) []*big.Float {
			return ocAxpy(ocBig(theta), b, nil)
		}}},
	}
}
