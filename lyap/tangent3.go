package lyap

import (
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
	"gonum.org/v1/gonum/mat"
)

// Tangent3 evaluates a three-dimensional flow's vector field and the
// product of its Jacobian with three tangent vectors in one call, the
// evaluation a full spectrum of a 3-D flow makes at every stage:
//
//	dx = F(t, x),   dv = J(t, x)·v,   trace = tr J(t, x),
//
// v and dv 3×3 row-major (the tangent vectors are the columns). It is an
// optional companion of a Problem's F and Jac (see Settings.Tangent3): the
// entries of J stay in registers, no matrix goes through memory and
// structurally zero entries cost nothing, which makes a Lorenz spectrum's
// field about half as expensive as F, Jac and the product taken apart.
//
// It must return the bits that F, Jac and the product of Exponents give:
// dx as F computes it, every entry of dv summed as
//
//	dv[3i+c] = ((0 + J[i][0]·v[c]) + J[i][1]·v[3+c]) + J[i][2]·v[6+c]
//
// with the products not fused (float64(a*b)), and trace as
// ((0 + J[0][0]) + J[1][1]) + J[2][2]. A term whose Jacobian entry is zero
// for every state may be left out: the sum starts at +0, a sum of finite
// terms that starts at +0 is never -0 (round-to-nearest gives -0 only for
// (-0) + (-0), and a sum that cancels exactly is +0), and s + (±0) = s for
// every other s, so a ±0 product changes nothing. (With an infinite or NaN
// tangent vector the full product gives NaN where the shortened one may
// not; the integrator refuses such a state either way.)
//
// It must not keep its arguments and must be safe for concurrent use when
// the Settings holding it serve runs in several goroutines.
type Tangent3 func(t float64, x, dx *[3]float64, v, dv *[9]float64) (trace float64)

// tangent33 is field33 through the caller's fused evaluation tf: the
// same bits and counts. The caller's function running is always tf (the
// vector field, for a recovered panic): it is named once here, and only
// the time is stored per call.
func (r *flowRun) tangent33(tf Tangent3) integrate.Func {
	r.calling = calleeField
	return func(t float64, y, dy []float64) {
		d, v := (*[13]float64)(dy), (*[13]float64)(y)
		r.evals++
		r.jacs++
		r.callT = t
		d[12] = tf(t, (*[3]float64)(v[:3]), (*[3]float64)(d[:3]), (*[9]float64)(v[3:12]), (*[9]float64)(d[3:12]))
	}
}

// tangentProbes are the tangent matrices of the set-up check of
// Settings.Tangent3 besides the identity: entries with full 53-bit
// mantissas (drawn once from a uniform distribution on [-2, 2]), so that
// the products round and a sum in another order, or a wrong entry of J,
// shows in the bits with high probability.
var tangentProbes = [...][9]float64{
	{-0.7046689406673505, -1.3966033043019923, 0.603737892159415, -1.710254853329829, 0.1435280172267568, -0.5372443323496578, -1.7680043009011728, 0.02974293275768103, -1.8500173662320605},
	{-0.2654172653504565, -1.7205783057015243, -1.6371479466245398, -0.30192324342994414, 1.3074084986881522, -1.5047921554014176, -1.1070441415719419, 0.5097328896223572, 1.7908357698280226},
}

// checkTangent3 evaluates tf at the start of p with the identity and with
// tangentProbes as tangent vectors and compares its bits with those of p.F,
// p.Jac and the product the run would otherwise take: a fused evaluation of
// another system, or at other parameters, is refused before it can give a
// silently wrong spectrum. A panic in one of the functions is returned as
// a *integrate.CallbackError.
func checkTangent3(p integrate.Problem, tf Tangent3) (err error) {
	calling := integrate.CallbackField
	defer func() {
		if v := recover(); v != nil {
			err = fmt.Errorf("lyap: at the start: %w", integrate.Recovered(calling, p.T0, v))
		}
	}()
	var x, f, fx [3]float64
	copy(x[:], p.Y0)
	p.F(p.T0, x[:], f[:])
	calling = integrate.CallbackJacobian
	J := mat.NewDense(3, 3, nil)
	p.Jac(p.T0, x[:], J)
	jd := J.RawMatrix().Data
	var tr float64
	tr += jd[0]
	tr += jd[4]
	tr += jd[8]
	probes := [1 + len(tangentProbes)][9]float64{{1, 0, 0, 0, 1, 0, 0, 0, 1}}
	copy(probes[1:], tangentProbes[:])
	for _, v := range probes {
		var want, got [9]float64
		mulTangent33(want[:], jd, v[:])
		calling = integrate.CallbackField
		xc := x
		gotTr := tf(p.T0, &xc, &fx, &v, &got)
		bad := func(what string, i int, g, w float64) error {
			return fmt.Errorf("lyap: Settings.Tangent3 disagrees with Problem.F and Problem.Jac at the start: %s[%d] = %v, want %v (another system or other parameters?): %w",
				what, i, g, w, ErrSettings)
		}
		for i := range f {
			if math.Float64bits(fx[i]) != math.Float64bits(f[i]) {
				return bad("dx", i, fx[i], f[i])
			}
		}
		for i := range want {
			if math.Float64bits(got[i]) != math.Float64bits(want[i]) {
				return bad("dv", i, got[i], want[i])
			}
		}
		if math.Float64bits(gotTr) != math.Float64bits(tr) {
			return bad("trace", 0, gotTr, tr)
		}
	}
	return nil
}
