package lyap

import "github.com/plumbdyn/plumb/integrate"

// field33 is field for a full spectrum of a 3-D flow with an exact Jacobian
// (n = k = 3: the augmented state x, V, ∫tr J has 13 components), the most
// common run of all. It computes what field computes, the same sums in the
// same order, so the bits are those of field; it only works on fixed-size
// arrays, which lets the compiler drop the slice arithmetic and the index
// checks that cost more than the products at this size.
func (r *flowRun) field33(t float64, y, dy []float64) {
	x := y[:3]
	r.evals++
	r.calling, r.callT = integrate.CallbackField, t
	r.p.F(t, x, dy[:3])
	r.jacs++
	r.calling = integrate.CallbackJacobian
	r.p.Jac(t, x, r.J)
	tangent33((*[13]float64)(dy), (*[9]float64)(r.jd), (*[13]float64)(y))
}

// tangent33 writes J·V into d[3:12] and tr J into d[12] for the 3×3
// Jacobian j and the tangent vectors v[3:12] (row-major, one vector per
// column): the sums of mulTangent33 and of field's trace, term by term in
// the same order, the +0 start of each sum kept (a -0 product gives +0, as
// there).
func tangent33(d *[13]float64, j *[9]float64, v *[13]float64) {
	v00, v01, v02 := v[3], v[4], v[5]
	v10, v11, v12 := v[6], v[7], v[8]
	v20, v21, v22 := v[9], v[10], v[11]
	for i := 0; i < 9; i += 3 {
		a0, a1, a2 := j[i], j[i+1], j[i+2]
		var s0, s1, s2 float64
		s0 += float64(a0 * v00)
		s1 += float64(a0 * v01)
		s2 += float64(a0 * v02)
		s0 += float64(a1 * v10)
		s1 += float64(a1 * v11)
		s2 += float64(a1 * v12)
		s0 += float64(a2 * v20)
		s1 += float64(a2 * v21)
		s2 += float64(a2 * v22)
		d[3+i], d[4+i], d[5+i] = s0, s1, s2
	}
	var tr float64
	tr += j[0]
	tr += j[4]
	tr += j[8]
	d[12] = tr
}

// fixedSize enables the fixed-size fields; the tests turn it off to compare
// them with the general ones bit for bit.
var fixedSize = true
