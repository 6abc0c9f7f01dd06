package integrate

import "math/big"

// dp853Tableau is the tableau of DormandPrince853 built from the constants of
// dop853.go: 12 stages of the step, stage 13 = F at the new point (row b),
// stages 14–16 of the continuous extension. Weight sets: b (order 8),
// b̂5 = b − e5 (order 5), b̂3 = bhh on stages 1, 9, 12 (order 3); the
// continuous extension of order 7 is
//
//	y0 + θ(r2 + (1−θ)(r3 + θ(r4 + (1−θ)(r5 + θ(r6 + (1−θ)(r7 + θ r8))))))
//
// with r2 = hΣb k, r3 = h k1 − r2, r4 = r2 − h k13 − r3, r5..r8 = hΣ d k.
func dp853Tableau() ocTableau {
	b := ocVec(d8B1, 0, 0, 0, 0, d8B6, d8B7, d8B8, d8B9, d8B10, d8B11, d8B12)
	e5 := ocVec(d8ER1, 0, 0, 0, 0, d8ER6, d8ER7, d8ER8, d8ER9, d8ER10, d8ER11, d8ER12)
	bhh := ocVec(d8BHH1, 0, 0, 0, 0, 0, 0, 0, d8BHH2, 0, 0, d8BHH3)
	const s = 16
	r2 := b
	r3 := ocSub(ocUnit(0, s), r2)
	r4 := ocSub(ocSub(r2, ocUnit(12, s)), r3)
	r5 := ocVec(d8D41, 0, 0, 0, 0, d8D46, d8D47, d8D48, d8D49, d8D410, d8D411, d8D412, d8D413, d8D414, d8D415, d8D416)
	r6 := ocVec(d8D51, 0, 0, 0, 0, d8D56, d8D57, d8D58, d8D59, d8D510, d8D511, d8D512, d8D513, d8D514, d8D515, d8D516)
	r7 := ocVec(d8D61, 0, 0, 0, 0, d8D66, d8D67, d8D68, d8D69, d8D610, d8D611, d8D612, d8D613, d8D614, d8D615, d8D616)
	r8 := ocVec(d8D71, 0, 0, 0, 0, d8D76, d8D77, d8D78, d8D79, d8D710, d8D711, d8D712, d8D713, d8D714, d8D715, d8D716)
	dense := func(theta float64) []*big.Float {
		th, t1 := ocBig(theta), ocBig(1-theta)
		v := ocAxpy(th, r8, r7)
		v = ocAxpy(t1, v, r6)
		v = ocAxpy(th, v, r5)
		v = ocAxpy(t1, v, r4)
		v = ocAxpy(th, v, r3)
		v = ocAxpy(t1, v, r2)
		return ocAxpy(th, v, nil)
	}
	return ocTableau{
		name: "DormandPrince853",
		c:    []float64{0, d8C2, d8C3, d8C4, d8C5, d8C6, d8C7, d8C8, d8C9, d8C10, d8C11, 1, 1, d8C14, d8C15, d8C16},
		a: [][]float64{
			{},
			{d8A21},
			{d8A31, d8A32},
			{d8A41, 0, d8A43},
			{d8A51, 0, d8A53, d8A54},
			{d8A61, 0, 0, d8A64, d8A65},
			{d8A71, 0, 0, d8A74, d8A75, d8A76},
			{d8A81, 0, 0, d8A84, d8A85, d8A86, d8A87},
			{d8A91, 0, 0, d8A94, d8A95, d8A96, d8A97, d8A98},
			{d8A101, 0, 0, d8A104, d8A105, d8A106, d8A107, d8A108, d8A109},
			{d8A111, 0, 0, d8A114, d8A115, d8A116, d8A117, d8A118, d8A119, d8A1110},
			{d8A121, 0, 0, d8A124, d8A125, d8A126, d8A127, d8A128, d8A129, d8A1210, d8A1211},
			{d8B1, 0, 0, 0, 0, d8B6, d8B7, d8B8, d8B9, d8B10, d8B11, d8B12},
			{d8A141, 0, 0, 0, 0, 0, d8A147, d8A148, d8A149, d8A1410, d8A1411, d8A1412, d8A1413},
			{d8A151, 0, 0, 0, 0, d8A156, d8A157, d8A158, 0, 0, d8A1511, d8A1512, d8A1513, d8A1514},
			{d8A161, 0, 0, 0, 0, d8A166, d8A167, d8A168, d8A169, 0, 0, 0, d8A1613, d8A1614, d8A1615},
		},
		weights: []ocWeights{
			{name: "b", b: b, order: 8},
			{name: "b̂5 = b − e5", b: ocSub(b, e5), order: 5},
			{name: "b̂3 = bhh", b: bhh, order: 3},
		},
		dense: []ocDense{{name: "dense output", w: dense, order: 7}},
	}
}
