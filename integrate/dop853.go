package integrate

import "math"

// DormandPrince853 is the explicit Runge–Kutta method of order 8 by Prince &
// Dormand with the embedded error estimators of orders 5 and 3 of Hairer &
// Wanner's code DOP853 and its continuous extension of order 7.
//
// A step uses 12 stages; the first is the derivative at the start of the
// step, so an attempt costs 11 evaluations of F and an accepted step one more
// (the derivative at the new point, which becomes the next step's first
// stage). The continuous extension needs three further stages; they are
// evaluated only when dense output of the step is asked for (Solution.At,
// samples, crossings, Stepper.Dense), so runs that need none do not pay.
//
// The local error is the combined estimate of DOP853,
//
//	err5 = Σ (e5_i / sk_i)²,  err3 = Σ (e3_i / sk_i)²,
//	err  = |h| · err5 · sqrt(1 / (n · (err5 + 0.01·err3))),
//	sk_i = atol_i + rtol_i · max(|y_i|, |y1_i|),
//
// with e5 and e3 the differences between the 8th-order solution and the
// embedded 5th- and 3rd-order ones; it behaves like O(h^8) for small h and
// like the 5th-order estimate for large steps. The default controller is that
// of DOP853: Beta 0, Alpha 1/8, Safety 0.9, step factors in [0.333, 6]. The
// stiffness test is Hairer's, |h|·‖F(t+h, y1) − k12‖ / ‖y1 − Y12‖ > 6.1
// (Y12 the argument of stage 12, also at t+h).
//
// The coefficients are those of dop853.f, copied digit for digit (up to 30
// significant digits, rounded once to float64).
//
// References:
//
//	P. J. Prince, J. R. Dormand, High order embedded Runge-Kutta formulae,
//	  J. Comput. Appl. Math. 7 (1981) 67–75.
//	E. Hairer, S. P. Nørsett, G. Wanner, Solving Ordinary Differential
//	  Equations I, 2nd ed., Springer 1993, Sect. II.6 (dense output) and
//	  II.10 (the code DOP853).
//	E. Hairer, G. Wanner, dop853.f, version of April 25, 1996 (bug fix of
//	  August 8, 2005), as kept in SciPy's repository at
//	  scipy/integrate/dop/dop853.f (coefficients, error estimate, defaults).
//	E. Hairer, G. Wanner, Solving Ordinary Differential Equations II, 2nd
//	  ed., Springer 1996, Sect. IV.2 (stiffness detection).
var DormandPrince853 Method = dop853{}

type dop853 struct{}

func (dop853) Name() string { return "Dormand–Prince 8(5,3)" }
func (dop853) Order() int   { return 8 }

// errOrder is 7: the combined estimate behaves like O(h^8), so the
// controller's exponent is 1/8 (DOP853's EXPO1 = 1/8 - 0.2·Beta).
func (dop853) errOrder() int      { return 7 }
func (dop853) fixedStep() float64 { return 0 }
func (dop853) controller() Controller {
	return Controller{Safety: 0.9, Beta: 0, Alpha: 1.0 / 8, MinFactor: 0.333, MaxFactor: 6}
}

func (dop853) newScheme(p *Problem, n int) (scheme, error) {
	w := &dp853Work{f: p.F}
	const nv = 13 // k2..k12, the stage argument, the argument of stage 12
	buf := make([]float64, nv*n)
	v := func(i int) []float64 { return buf[i*n : (i+1)*n : (i+1)*n] }
	w.k2, w.k3, w.k4, w.k5, w.k6, w.k7 = v(0), v(1), v(2), v(3), v(4), v(5)
	w.k8, w.k9, w.k10, w.k11, w.k12 = v(6), v(7), v(8), v(9), v(10)
	w.ys, w.y12 = v(11), v(12)
	return w, nil
}

// Coefficients of DOP853 (Prince & Dormand 1981; Hairer, Nørsett & Wanner
// 1993, Sect. II.6), copied from dop853.f. Zero entries are omitted.
const (
	d8C2  = 0.526001519587677318785587544488e-01
	d8C3  = 0.789002279381515978178381316732e-01
	d8C4  = 0.118350341907227396726757197510e+00
	d8C5  = 0.281649658092772603273242802490e+00
	d8C6  = 0.333333333333333333333333333333e+00
	d8C7  = 0.25e+00
	d8C8  = 0.307692307692307692307692307692e+00
	d8C9  = 0.651282051282051282051282051282e+00
	d8C10 = 0.6e+00
	d8C11 = 0.857142857142857142857142857142e+00
	d8C14 = 0.1e+00
	d8C15 = 0.2e+00
	d8C16 = 0.777777777777777777777777777778e+00

	// Weights of the 8th-order solution (stages 1, 6..12).
	d8B1  = 5.42937341165687622380535766363e-2
	d8B6  = 4.45031289275240888144113950566e0
	d8B7  = 1.89151789931450038304281599044e0
	d8B8  = -5.8012039600105847814672114227e0
	d8B9  = 3.1116436695781989440891606237e-1
	d8B10 = -1.52160949662516078556178806805e-1
	d8B11 = 2.01365400804030348374776537501e-1
	d8B12 = 4.47106157277725905176885569043e-2

	// Weights of the embedded 3rd-order solution (stages 1, 9, 12).
	d8BHH1 = 0.244094488188976377952755905512e+00
	d8BHH2 = 0.733846688281611857341361741547e+00
	d8BHH3 = 0.220588235294117647058823529412e-01

	// e5 = b - b̂5: the error weights of the 5th-order estimator.
	d8ER1  = 0.1312004499419488073250102996e-01
	d8ER6  = -0.1225156446376204440720569753e+01
	d8ER7  = -0.4957589496572501915214079952e+00
	d8ER8  = 0.1664377182454986536961530415e+01
	d8ER9  = -0.3503288487499736816886487290e+00
	d8ER10 = 0.3341791187130174790297318841e+00
	d8ER11 = 0.8192320648511571246570742613e-01
	d8ER12 = -0.2235530786388629525884427845e-01

	d8A21 = 5.26001519587677318785587544488e-2

	d8A31 = 1.97250569845378994544595329183e-2
	d8A32 = 5.91751709536136983633785987549e-2

	d8A41 = 2.95875854768068491816892993775e-2
	d8A43 = 8.87627564304205475450678981324e-2

	d8A51 = 2.41365134159266685502369798665e-1
	d8A53 = -8.84549479328286085344864962717e-1
	d8A54 = 9.24834003261792003115737966543e-1

	d8A61 = 3.7037037037037037037037037037e-2
	d8A64 = 1.70828608729473871279604482173e-1
	d8A65 = 1.25467687566822425016691814123e-1

	d8A71 = 3.7109375e-2
	d8A74 = 1.70252211019544039314978060272e-1
	d8A75 = 6.02165389804559606850219397283e-2
	d8A76 = -1.7578125e-2

	d8A81 = 3.70920001185047927108779319836e-2
	d8A84 = 1.70383925712239993810214054705e-1
	d8A85 = 1.07262030446373284651809199168e-1
	d8A86 = -1.53194377486244017527936158236e-2
	d8A87 = 8.27378916381402288758473766002e-3

	d8A91 = 6.24110958716075717114429577812e-1
	d8A94 = -3.36089262944694129406857109825e0
	d8A95 = -8.68219346841726006818189891453e-1
	d8A96 = 2.75920996994467083049415600797e1
	d8A97 = 2.01540675504778934086186788979e1
	d8A98 = -4.34898841810699588477366255144e1

	d8A101 = 4.77662536438264365890433908527e-1
	d8A104 = -2.48811461997166764192642586468e0
	d8A105 = -5.90290826836842996371446475743e-1
	d8A106 = 2.12300514481811942347288949897e1
	d8A107 = 1.52792336328824235832596922938e1
	d8A108 = -3.32882109689848629194453265587e1
	d8A109 = -2.03312017085086261358222928593e-2

	d8A111  = -9.3714243008598732571704021658e-1
	d8A114  = 5.18637242884406370830023853209e0
	d8A115  = 1.09143734899672957818500254654e0
	d8A116  = -8.14978701074692612513997267357e0
	d8A117  = -1.85200656599969598641566180701e1
	d8A118  = 2.27394870993505042818970056734e1
	d8A119  = 2.49360555267965238987089396762e0
	d8A1110 = -3.0467644718982195003823669022e0

	d8A121  = 2.27331014751653820792359768449e0
	d8A124  = -1.05344954667372501984066689879e1
	d8A125  = -2.00087205822486249909675718444e0
	d8A126  = -1.79589318631187989172765950534e1
	d8A127  = 2.79488845294199600508499808837e1
	d8A128  = -2.85899827713502369474065508674e0
	d8A129  = -8.87285693353062954433549289258e0
	d8A1210 = 1.23605671757943030647266201528e1
	d8A1211 = 6.43392746015763530355970484046e-1

	// Stages 14, 15, 16 of the continuous extension. Stage 13 is
	// F(t+h, y1), the derivative at the new point.
	d8A141  = 5.61675022830479523392909219681e-2
	d8A147  = 2.53500210216624811088794765333e-1
	d8A148  = -2.46239037470802489917441475441e-1
	d8A149  = -1.24191423263816360469010140626e-1
	d8A1410 = 1.5329179827876569731206322685e-1
	d8A1411 = 8.20105229563468988491666602057e-3
	d8A1412 = 7.56789766054569976138603589584e-3
	d8A1413 = -8.298e-3

	d8A151  = 3.18346481635021405060768473261e-2
	d8A156  = 2.83009096723667755288322961402e-2
	d8A157  = 5.35419883074385676223797384372e-2
	d8A158  = -5.49237485713909884646569340306e-2
	d8A1511 = -1.08347328697249322858509316994e-4
	d8A1512 = 3.82571090835658412954920192323e-4
	d8A1513 = -3.40465008687404560802977114492e-4
	d8A1514 = 1.41312443674632500278074618366e-1

	d8A161  = -4.28896301583791923408573538692e-1
	d8A166  = -4.69762141536116384314449447206e0
	d8A167  = 7.68342119606259904184240953878e0
	d8A168  = 4.06898981839711007970213554331e0
	d8A169  = 3.56727187455281109270669543021e-1
	d8A1613 = -1.39902416515901462129418009734e-3
	d8A1614 = 2.9475147891527723389556272149e0
	d8A1615 = -9.15095847217987001081870187138e0

	// Dense output coefficients (Hairer's d4j..d7j).
	d8D41  = -0.84289382761090128651353491142e+01
	d8D46  = 0.56671495351937776962531783590e+00
	d8D47  = -0.30689499459498916912797304727e+01
	d8D48  = 0.23846676565120698287728149680e+01
	d8D49  = 0.21170345824450282767155149946e+01
	d8D410 = -0.87139158377797299206789907490e+00
	d8D411 = 0.22404374302607882758541771650e+01
	d8D412 = 0.63157877876946881815570249290e+00
	d8D413 = -0.88990336451333310820698117400e-01
	d8D414 = 0.18148505520854727256656404962e+02
	d8D415 = -0.91946323924783554000451984436e+01
	d8D416 = -0.44360363875948939664310572000e+01

	d8D51  = 0.10427508642579134603413151009e+02
	d8D56  = 0.24228349177525818288430175319e+03
	d8D57  = 0.16520045171727028198505394887e+03
	d8D58  = -0.37454675472269020279518312152e+03
	d8D59  = -0.22113666853125306036270938578e+02
	d8D510 = 0.77334326684722638389603898808e+01
	d8D511 = -0.30674084731089398182061213626e+02
	d8D512 = -0.93321305264302278729567221706e+01
	d8D513 = 0.15697238121770843886131091075e+02
	d8D514 = -0.31139403219565177677282850411e+02
	d8D515 = -0.93529243588444783865713862664e+01
	d8D516 = 0.35816841486394083752465898540e+02

	d8D61  = 0.19985053242002433820987653617e+02
	d8D66  = -0.38703730874935176555105901742e+03
	d8D67  = -0.18917813819516756882830838328e+03
	d8D68  = 0.52780815920542364900561016686e+03
	d8D69  = -0.11573902539959630126141871134e+02
	d8D610 = 0.68812326946963000169666922661e+01
	d8D611 = -0.10006050966910838403183860980e+01
	d8D612 = 0.77771377980534432092869265740e+00
	d8D613 = -0.27782057523535084065932004339e+01
	d8D614 = -0.60196695231264120758267380846e+02
	d8D615 = 0.84320405506677161018159903784e+02
	d8D616 = 0.11992291136182789328035130030e+02

	d8D71  = -0.25693933462703749003312586129e+02
	d8D76  = -0.15418974869023643374053993627e+03
	d8D77  = -0.23152937917604549567536039109e+03
	d8D78  = 0.35763911791061412378285349910e+03
	d8D79  = 0.93405324183624310003907691704e+02
	d8D710 = -0.37458323136451633156875139351e+02
	d8D711 = 0.10409964950896230045147246184e+03
	d8D712 = 0.29840293426660503123344363579e+02
	d8D713 = -0.43533456590011143754432175058e+02
	d8D714 = 0.96324553959188282948394950600e+02
	d8D715 = -0.39177261675615439165231486172e+02
	d8D716 = -0.14972683625798562581422125276e+03
)

// dp853Work holds the stages of one step. k1 is the stepper's f0 and k13
// its f1; k2..k5 are free once the step is formed and serve as scratch
// for the three stages of the continuous extension.
type dp853Work struct {
	f                                   Func
	k2, k3, k4, k5, k6, k7, k8, k9, k10 []float64
	k11, k12                            []float64
	ys                                  []float64 // stage argument
	y12                                 []float64 // argument of stage 12, for the stiffness test
}

func (*dp853Work) fsal() bool     { return false }
func (*dp853Work) denseSize() int { return 8 }

// attempt is attemptSq's trial step with the error itself, err = √err².
func (w *dp853Work) attempt(t, h float64, y, k1, y1, k13, rtol, atol []float64) (float64, int) {
	e2, ev := w.attemptSq(t, h, y, k1, y1, k13, rtol, atol)
	return math.Sqrt(e2), ev
}

// attemptSq is the hot loop: one trial step (11 evaluations) and the
// square of DOP853's combined error,
//
//	err² = (h²/n) · err5² / (err5 + 0.01·err3).
//
// On a cheap field its speed is the latency of the chain from one stage to
// the next, so each stage adds the newest k last,
//
//	Y_s = (y + h·Σ_{j<s-1} a_sj·k_j) + (h·a_s,s-1)·k_s-1,
//
// and only one product and one addition wait for F. The last loop forms
// the parts of y1, e5 and e3 without k12 first (they need not wait for
// F(t+h, Y12)), so that k12 enters each through one product and one
// addition (e3 = (Σ_{j<12} b_j·k_j − bhh1·k1 − bhh2·k9) + (b12 − bhh3)·k12,
// the same linear combination as dop853.f's). Products are wrapped in
// float64() so that no architecture fuses them into FMAs, and every sum has
// a fixed order: results are bit-identical everywhere. A NaN or Inf that
// reaches the error sums makes err² NaN or Inf; y1 itself is checked by the
// stepper after F(t+h, y1) (the scheme is not FSAL).
func (w *dp853Work) attemptSq(t, h float64, y, k1, y1, _, rtol, atol []float64) (float64, int) {
	n := len(y)
	y, k1, y1, rtol, atol = y[:n], k1[:n], y1[:n], rtol[:n], atol[:n]
	k2, k3, k4, k5, k6, k7 := w.k2[:n], w.k3[:n], w.k4[:n], w.k5[:n], w.k6[:n], w.k7[:n]
	k8, k9, k10, k11, k12 := w.k8[:n], w.k9[:n], w.k10[:n], w.k11[:n], w.k12[:n]
	ys, y12 := w.ys[:n], w.y12[:n]

	ha := float64(h * d8A21)
	for i := range ys {
		ys[i] = y[i] + float64(ha*k1[i])
	}
	w.f(t+float64(d8C2*h), ys, k2)
	ha = float64(h * d8A32)
	for i := range ys {
		ys[i] = (y[i] + float64(h*float64(d8A31*k1[i]))) + float64(ha*k2[i])
	}
	w.f(t+float64(d8C3*h), ys, k3)
	ha = float64(h * d8A43)
	for i := range ys {
		ys[i] = (y[i] + float64(h*float64(d8A41*k1[i]))) + float64(ha*k3[i])
	}
	w.f(t+float64(d8C4*h), ys, k4)
	ha = float64(h * d8A54)
	for i := range ys {
		ys[i] = (y[i] + float64(h*(float64(d8A51*k1[i])+float64(d8A53*k3[i])))) + float64(ha*k4[i])
	}
	w.f(t+float64(d8C5*h), ys, k5)
	ha = float64(h * d8A65)
	for i := range ys {
		ys[i] = (y[i] + float64(h*(float64(d8A61*k1[i])+float64(d8A64*k4[i])))) + float64(ha*k5[i])
	}
	w.f(t+float64(d8C6*h), ys, k6)
	ha = float64(h * d8A76)
	for i := range ys {
		s := (float64(d8A71*k1[i]) + float64(d8A74*k4[i])) + float64(d8A75*k5[i])
		ys[i] = (y[i] + float64(h*s)) + float64(ha*k6[i])
	}
	w.f(t+float64(d8C7*h), ys, k7)
	ha = float64(h * d8A87)
	for i := range ys {
		s := (float64(d8A81*k1[i]) + float64(d8A84*k4[i])) + (float64(d8A85*k5[i]) + float64(d8A86*k6[i]))
		ys[i] = (y[i] + float64(h*s)) + float64(ha*k7[i])
	}
	w.f(t+float64(d8C8*h), ys, k8)
	ha = float64(h * d8A98)
	for i := range ys {
		s := ((float64(d8A91*k1[i]) + float64(d8A94*k4[i])) + (float64(d8A95*k5[i]) + float64(d8A96*k6[i]))) +
			float64(d8A97*k7[i])
		ys[i] = (y[i] + float64(h*s)) + float64(ha*k8[i])
	}
	w.f(t+float64(d8C9*h), ys, k9)
	ha = float64(h * d8A109)
	for i := range ys {
		s := ((float64(d8A101*k1[i]) + float64(d8A104*k4[i])) + (float64(d8A105*k5[i]) + float64(d8A106*k6[i]))) +
			(float64(d8A107*k7[i]) + float64(d8A108*k8[i]))
		ys[i] = (y[i] + float64(h*s)) + float64(ha*k9[i])
	}
	w.f(t+float64(d8C10*h), ys, k10)
	ha = float64(h * d8A1110)
	for i := range ys {
		s := ((float64(d8A111*k1[i]) + float64(d8A114*k4[i])) + (float64(d8A115*k5[i]) + float64(d8A116*k6[i]))) +
			((float64(d8A117*k7[i]) + float64(d8A118*k8[i])) + float64(d8A119*k9[i]))
		ys[i] = (y[i] + float64(h*s)) + float64(ha*k10[i])
	}
	w.f(t+float64(d8C11*h), ys, k11)
	ha = float64(h * d8A1211)
	for i := range y12 {
		s := ((float64(d8A121*k1[i]) + float64(d8A124*k4[i])) + (float64(d8A125*k5[i]) + float64(d8A126*k6[i]))) +
			((float64(d8A127*k7[i]) + float64(d8A128*k8[i])) + (float64(d8A129*k9[i]) + float64(d8A1210*k10[i])))
		y12[i] = (y[i] + float64(h*s)) + float64(ha*k11[i])
	}
	hb := float64(h * d8B12)
	hn := float64(float64(h*h) / float64(n))
	w.f(t+h, y12, k12)

	var err5, err3 float64
	for i := range y1 {
		c1, c6, c7, c8, c9, c10, c11, yi := k1[i], k6[i], k7[i], k8[i], k9[i], k10[i], k11[i], y[i]
		b := ((float64(d8B1*c1) + float64(d8B6*c6)) + (float64(d8B7*c7) + float64(d8B8*c8))) +
			((float64(d8B9*c9) + float64(d8B10*c10)) + float64(d8B11*c11))
		p3 := b - (float64(d8BHH1*c1) + float64(d8BHH2*c9))
		p5 := ((float64(d8ER1*c1) + float64(d8ER6*c6)) + (float64(d8ER7*c7) + float64(d8ER8*c8))) +
			((float64(d8ER9*c9) + float64(d8ER10*c10)) + float64(d8ER11*c11))
		k := k12[i]
		yn := (yi + float64(h*b)) + float64(hb*k)
		y1[i] = yn
		ay, ay1 := math.Abs(yi), math.Abs(yn)
		if ay1 > ay {
			ay = ay1 // max without math.Max, which is a call on amd64
		}
		sk := atol[i] + float64(rtol[i]*ay)
		e5 := (p5 + float64(d8ER12*k)) / sk
		e3 := (p3 + float64((d8B12-d8BHH3)*k)) / sk
		err5 += float64(e5 * e5)
		err3 += float64(e3 * e3)
	}
	deno := err5 + float64(0.01*err3)
	if deno <= 0 {
		deno = 1
	}
	return float64(hn*float64(err5*err5)) / deno, 11
}

// stiffness is Hairer's test of DOP853: stage 12 and F(t+h, y1) are both at
// t+h, so their difference over the difference of their arguments estimates
// the dominant eigenvalue.
func (w *dp853Work) stiffness(h float64, y1, f1 []float64) (float64, float64, bool) {
	const limit = 6.1 // dop853.f
	n := len(y1)
	k12, y12, f1 := w.k12[:n], w.y12[:n], f1[:n]
	var num, den float64
	for i := range y1 {
		a := f1[i] - k12[i]
		b := y1[i] - y12[i]
		num += float64(a * a)
		den += float64(b * b)
	}
	if den == 0 {
		return 0, limit, true
	}
	return math.Abs(h) * math.Sqrt(num/den), limit, true
}

// dense evaluates the three extra stages and writes the continuous extension
// of order 7 as eight vectors (Hairer's cont(1..8)): 3 evaluations of F.
func (w *dp853Work) dense(t, h float64, y, k1, y1, k13, coef []float64) int {
	n := len(y)
	r1, r2 := coef[:n], coef[n:2*n]
	for i := range y[:n] {
		r1[i] = y[i]
		r2[i] = y1[i] - y[i]
	}
	return w.denseRest(t, h, y, k1, y1, k13, coef[2*n:8*n])
}

// compactSize is the number of floats per step a Solution keeps: r3..r8
// (r1 = y and r2 = y1 - y are rebuilt from the stored states).
func (w *dp853Work) compactSize(n int) int { return 6 * n }

// compact copies r3..r8 of a full dense record into dst.
func (w *dp853Work) compact(_ *Stepper, full, dst []float64) {
	n := len(full) / 8
	// A loop, not copy: records are short, and the runtime's memmove
	// costs more than the copy itself.
	for i, x := range full[2*n : 8*n][:len(dst)] {
		dst[i] = x
	}
}

// denseCompact writes r3..r8 of the last step's continuous extension
// straight into dst, with the arithmetic of dense (the same bits): 3
// evaluations of F.
func (w *dp853Work) denseCompact(st *Stepper, dst []float64) int {
	return w.denseRest(st.tPrev, st.hLast, st.yPrev, st.fPrev, st.y, st.f0, dst)
}

// denseRest evaluates the three extra stages and writes r3..r8 of the
// continuous extension into rest (6n floats).
func (w *dp853Work) denseRest(t, h float64, y, k1, y1, k13, rest []float64) int {
	n := len(y)
	k1, y1, k13 = k1[:n], y1[:n], k13[:n]
	k6, k7, k8, k9, k10 := w.k6[:n], w.k7[:n], w.k8[:n], w.k9[:n], w.k10[:n]
	k11, k12 := w.k11[:n], w.k12[:n]
	k14, k15, k16, ys := w.k2[:n], w.k3[:n], w.k4[:n], w.k5[:n]
	r3, r4 := rest[:n], rest[n:2*n]
	r5, r6, r7, r8 := rest[2*n:3*n], rest[3*n:4*n], rest[4*n:5*n], rest[5*n:6*n]

	for i := range ys {
		ys[i] = y[i] + float64(h*(float64(d8A141*k1[i])+float64(d8A147*k7[i])+float64(d8A148*k8[i])+
			float64(d8A149*k9[i])+float64(d8A1410*k10[i])+float64(d8A1411*k11[i])+float64(d8A1412*k12[i])+
			float64(d8A1413*k13[i])))
	}
	w.f(t+float64(d8C14*h), ys, k14)
	for i := range ys {
		ys[i] = y[i] + float64(h*(float64(d8A151*k1[i])+float64(d8A156*k6[i])+float64(d8A157*k7[i])+
			float64(d8A158*k8[i])+float64(d8A1511*k11[i])+float64(d8A1512*k12[i])+float64(d8A1513*k13[i])+
			float64(d8A1514*k14[i])))
	}
	w.f(t+float64(d8C15*h), ys, k15)
	for i := range ys {
		ys[i] = y[i] + float64(h*(float64(d8A161*k1[i])+float64(d8A166*k6[i])+float64(d8A167*k7[i])+
			float64(d8A168*k8[i])+float64(d8A169*k9[i])+float64(d8A1613*k13[i])+float64(d8A1614*k14[i])+
			float64(d8A1615*k15[i])))
	}
	w.f(t+float64(d8C16*h), ys, k16)

	for i := range y {
		yd := y1[i] - y[i]
		bspl := float64(h*k1[i]) - yd
		r3[i] = bspl
		r4[i] = yd - float64(h*k13[i]) - bspl
		r5[i] = float64(h * (float64(d8D41*k1[i]) + float64(d8D46*k6[i]) + float64(d8D47*k7[i]) +
			float64(d8D48*k8[i]) + float64(d8D49*k9[i]) + float64(d8D410*k10[i]) + float64(d8D411*k11[i]) +
			float64(d8D412*k12[i]) + float64(d8D413*k13[i]) + float64(d8D414*k14[i]) + float64(d8D415*k15[i]) +
			float64(d8D416*k16[i])))
		r6[i] = float64(h * (float64(d8D51*k1[i]) + float64(d8D56*k6[i]) + float64(d8D57*k7[i]) +
			float64(d8D58*k8[i]) + float64(d8D59*k9[i]) + float64(d8D510*k10[i]) + float64(d8D511*k11[i]) +
			float64(d8D512*k12[i]) + float64(d8D513*k13[i]) + float64(d8D514*k14[i]) + float64(d8D515*k15[i]) +
			float64(d8D516*k16[i])))
		r7[i] = float64(h * (float64(d8D61*k1[i]) + float64(d8D66*k6[i]) + float64(d8D67*k7[i]) +
			float64(d8D68*k8[i]) + float64(d8D69*k9[i]) + float64(d8D610*k10[i]) + float64(d8D611*k11[i]) +
			float64(d8D612*k12[i]) + float64(d8D613*k13[i]) + float64(d8D614*k14[i]) + float64(d8D615*k15[i]) +
			float64(d8D616*k16[i])))
		r8[i] = float64(h * (float64(d8D71*k1[i]) + float64(d8D76*k6[i]) + float64(d8D77*k7[i]) +
			float64(d8D78*k8[i]) + float64(d8D79*k9[i]) + float64(d8D710*k10[i]) + float64(d8D711*k11[i]) +
			float64(d8D712*k12[i]) + float64(d8D713*k13[i]) + float64(d8D714*k14[i]) + float64(d8D715*k15[i]) +
			float64(d8D716*k16[i])))
	}
	return 3
}

// interp evaluates
//
//	y(θ) = r1 + θ(r2 + (1−θ)(r3 + θ(r4 + (1−θ)(r5 + θ(r6 + (1−θ)(r7 + θ r8))))))
//
// (dop853.f, function CONTD8).
func (w *dp853Work) interp(coef []float64, theta float64, dst []float64) {
	n := len(dst)
	r1, r2, r3, r4 := coef[:n], coef[n:2*n], coef[2*n:3*n], coef[3*n:4*n]
	r5, r6, r7, r8 := coef[4*n:5*n], coef[5*n:6*n], coef[6*n:7*n], coef[7*n:8*n]
	t1 := 1 - theta
	for i := range dst {
		p := r5[i] + float64(theta*(r6[i]+float64(t1*(r7[i]+float64(theta*r8[i])))))
		dst[i] = r1[i] + float64(theta*(r2[i]+float64(t1*(r3[i]+float64(theta*(r4[i]+float64(t1*p)))))))
	}
}

// interpCompact is interp with r1 = y0 and r2 = y1 - y0 rebuilt from the
// step's end states (the same operations as dense, so the same bits).
func (w *dp853Work) interpCompact(y0, y1, _, c []float64, theta float64, dst []float64) {
	n := len(dst)
	y0, y1 = y0[:n], y1[:n]
	r3, r4 := c[:n], c[n:2*n]
	r5, r6, r7, r8 := c[2*n:3*n], c[3*n:4*n], c[4*n:5*n], c[5*n:6*n]
	t1 := 1 - theta
	for i := range dst {
		r2 := y1[i] - y0[i]
		p := r5[i] + float64(theta*(r6[i]+float64(t1*(r7[i]+float64(theta*r8[i])))))
		dst[i] = y0[i] + float64(theta*(r2+float64(t1*(r3[i]+float64(theta*(r4[i]+float64(t1*p)))))))
	}
}
