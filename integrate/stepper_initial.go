package integrate

import "math"

// initialStep is the starting step of Hairer, Nørsett & Wanner (1993,
// Sect. II.4, the HINIT routine of DOPRI5). It uses one evaluation and the
// y1/f1 buffers as scratch.
func (st *Stepper) initialStep(order int) float64 {
	var d0, d1 float64
	for i := range st.y {
		sk := st.cfg.atol[i] + float64(st.cfg.rtol[i]*math.Abs(st.y[i]))
		a, b := st.y[i]/sk, st.f0[i]/sk
		d0 += float64(a * a)
		d1 += float64(b * b)
	}
	n := float64(st.n)
	d0, d1 = math.Sqrt(d0/n), math.Sqrt(d1/n)
	h0 := 1e-6
	if d0 >= 1e-10 && d1 >= 1e-10 {
		h0 = 0.01 * d0 / d1
	}
	h0 = math.Min(h0, st.cfg.hmax)
	for i := range st.y {
		st.y1[i] = st.y[i] + float64(st.dir*h0*st.f0[i])
	}
	st.p.F(st.t+float64(st.dir*h0), st.y1, st.f1)
	st.stats.Evaluations++
	var d2 float64
	for i := range st.y {
		sk := st.cfg.atol[i] + float64(st.cfg.rtol[i]*math.Abs(st.y[i]))
		a := (st.f1[i] - st.f0[i]) / sk
		d2 += float64(a * a)
	}
	d2 = math.Sqrt(d2/n) / h0
	if math.IsNaN(d2) || math.IsInf(d2, 0) {
		return h0 * 1e-3
	}
	der := math.Max(d2, d1)
	var h1 float64
	if der <= 1e-15 {
		h1 = math.Max(1e-6, h0*1e-3)
	} else if x := 0.01 / der; x > 0 {
		// (0.01/der)^(1/order) by the controller's own log2 and 2^x:
		// math.Pow is computed differently on amd64 and arm64 (assembly
		// or fused pure Go), and the first step would then differ in its
		// last bits from one architecture to the other, and with it the
		// whole run. A relative error of 4e-6 is nothing to a first guess.
		var lx float64
		if x < 0x1p-1022 { // subnormal: scale into the normal range first
			lx = log2Ctl(float64(x*0x1p54)) - 54
		} else {
			lx = log2Ctl(x)
		}
		h1 = exp2Ctl(lx / float64(order))
	}
	return math.Min(math.Min(100*h0, h1), st.cfg.hmax)
}
