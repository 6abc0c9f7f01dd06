package models

import "gonum.org/v1/gonum/mat"

// entries3 returns the nine entries of j, row-major, as an array the caller
// may write, when j is a 3×3 matrix stored without gaps between its rows;
// otherwise nil, and the caller writes through Set. Writing the entries
// directly costs a fraction of nine calls of Set, which check their
// indices one by one: the Jacobians of 3-D flows are written at every
// evaluation of a tangent-space run.
func entries3(j *mat.Dense) *[9]float64 {
	m := j.RawMatrix()
	if m.Rows != 3 || m.Cols != 3 || m.Stride != 3 || len(m.Data) < 9 {
		return nil
	}
	return (*[9]float64)(m.Data[:9])
}
