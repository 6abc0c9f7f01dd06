package integrate

import "math/big"

// dp54Tableau is the tableau of DormandPrince54 built from the constants of
// dopri54.go: 7 stages (the 7th is F at the new point, FSAL), b = row 7,
// b̂ = b − e, and Shampine's continuous extension
// y0 + θ(r2 + (1−θ)(r3 + θ(r4 + (1−θ) r5))) with r5 = hΣ d k.
func dp54Tableau() ocTableau {
	b := ocVec(dpA71, 0, dpA73, dpA74, dpA75, dpA76, 0)
	e := ocVec(dpE1, 0, dpE3, dpE4, dpE5, dpE6, dpE7)
	d := ocVec(dpD1, 0, dpD3, dpD4, dpD5, dpD6, dpD7)
	r2 := b
	r3 := ocSub(ocUnit(0, 7), r2)
	r4 := ocSub(ocSub(r2, ocUnit(6, 7)), r3)
	shampine := func(theta float64) []*big.Float {
		th, t1 := ocBig(theta), ocBig(1-theta)
		v := ocAxpy(t1, d, r4)
		v = ocAxpy(th, v, r3)
		v = ocAxpy(t1, v, r2)
		return ocAxpy(th, v, nil)
	}
	return ocTableau{
		name: "DormandPrince54",
		c:    []float64{0, dpC2, dpC3, dpC4, dpC5, 1, 1},
		a: [][]float64{
			{},
			{dpA21},
			{dpA31, dpA32},
			{dpA41, dpA42, dpA43},
			{dpA51, dpA52, dpA53, dpA54},
			{dpA61, dpA62, dpA63, dpA64, dpA65},
			{dpA71, 0, dpA73, dpA74, dpA75, dpA76},
		},
		weights: []ocWeights{
			{name: "b", b: b, order: 5},
			{name: "b̂ = b − e", b: ocSub(b, e), order: 4},
		},
		dense: []ocDense{{name: "Shampine dense output", w: shampine, order: 4}},
	}
}
