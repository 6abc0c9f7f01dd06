package lyap

import "github.com/plumbdyn/plumb/integrate"

// field33 is field for a full spectrum of a 3-D flow with an exact Jacobian
// (n = k = 3: the augmented state x, V, ∫tr J has 13 components), the most
// common run of all. It computes what field computes, the same sums in the
// same order, so the bits are those of field; it only works on fixed-size
// arrays, which lets the compiler drop the slice arithmetic and the index
// checks that cost more than the products at this size. It is returned
// as a closure over r, which the integrator calls directly (a method value
// goes through a wrapper, one call more per evaluation).
func (r *flowRun) field33() integrate.Func {
	return func(t float64, y, dy []float64) {
		d, v := (*[13]float64)(dy), (*[13]float64)(y)
		x := y[:3]
		r.evals++
		r.calling, r.callT = calleeField, t
		r.p.F(t, x, dy[:3])
		r.jacs++
		r.calling = calleeJacobian
		r.p.Jac(t, x, r.J)
		// J·V into dy[3:12] and tr J into dy[12]: the sums of mulTangent33
		// and of field's trace, term by term in the same order, the +0 start
		// of each sum kept (a -0 product gives +0, as there). Written out
		// here, not called: a call more per evaluation cost 2% of a Lorenz
		// spectrum run. The entries of V are read where they are used rather
		// than held in variables: nine of them and a row of J do not fit in
		// the registers, and the spills cost more than the loads. The rows
		// are written out, not looped over: the loop's counter, branch and
		// zeroing cost 17 instructions an evaluation (callgrind, Lorenz),
		// and a helper closure for a row is not inlined.
		j := (*[9]float64)(r.jd)
		{
			a0, a1, a2 := j[0], j[1], j[2]
			var s0, s1, s2 float64
			s0 += float64(a0 * v[3])
			s1 += float64(a0 * v[4])
			s2 += float64(a0 * v[5])
			s0 += float64(a1 * v[6])
			s1 += float64(a1 * v[7])
			s2 += float64(a1 * v[8])
			s0 += float64(a2 * v[9])
			s1 += float64(a2 * v[10])
			s2 += float64(a2 * v[11])
			d[3], d[4], d[5] = s0, s1, s2
		}
		{
			a0, a1, a2 := j[3], j[4], j[5]
			var s0, s1, s2 float64
			s0 += float64(a0 * v[3])
			s1 += float64(a0 * v[4])
			s2 += float64(a0 * v[5])
			s0 += float64(a1 * v[6])
			s1 += float64(a1 * v[7])
			s2 += float64(a1 * v[8])
			s0 += float64(a2 * v[9])
			s1 += float64(a2 * v[10])
			s2 += float64(a2 * v[11])
			d[6], d[7], d[8] = s0, s1, s2
		}
		{
			a0, a1, a2 := j[6], j[7], j[8]
			var s0, s1, s2 float64
			s0 += float64(a0 * v[3])
			s1 += float64(a0 * v[4])
			s2 += float64(a0 * v[5])
			s0 += float64(a1 * v[6])
			s1 += float64(a1 * v[7])
			s2 += float64(a1 * v[8])
			s0 += float64(a2 * v[9])
			s1 += float64(a2 * v[10])
			s2 += float64(a2 * v[11])
			d[9], d[10], d[11] = s0, s1, s2
		}
		var tr float64
		tr += j[0]
		tr += j[4]
		tr += j[8]
		d[12] = tr
	}
}

// fixedSize enables the fixed-size fields; the tests turn it off to compare
// them with the general ones bit for bit.
var fixedSize = true
