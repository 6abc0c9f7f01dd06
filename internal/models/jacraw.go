package models

import "gonum.org/v1/gonum/mat"

// rows3 returns the three rows of j as arrays the caller may write, when j
// is a 3×3 matrix; otherwise ok is false, and the caller writes through
// Set. Writing the rows directly costs a fraction of nine calls of Set,
// each of which checks its indices: the Jacobians of 3-D flows are written
// at every evaluation of a tangent-space run. (RawRowView rather than
// RawMatrix, whose struct the compiler copies through the stack twice.)
func rows3(j *mat.Dense) (r0, r1, r2 *[3]float64, ok bool) {
	if r, c := j.Dims(); r != 3 || c != 3 {
		return nil, nil, nil, false
	}
	return (*[3]float64)(j.RawRowView(0)), (*[3]float64)(j.RawRowView(1)), (*[3]float64)(j.RawRowView(2)), true
}
