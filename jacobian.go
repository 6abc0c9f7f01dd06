package plumb

import "gonum.org/v1/gonum/mat"

// rateError is an error in the Jacobian of rate row.
type rateError struct {
	row int
	err error
}

func (e *rateError) Error() string { return e.err.Error() }
func (e *rateError) Unwrap() error { return e.err }

// setSparse writes the n×n matrix with the entries vals at the places at
// (see formulaSystem.jacAt) and zeros elsewhere into dst; a dst of another
// size gets the overlapping block, a nil dst nothing.
func setSparse(dst *mat.Dense, n int, at []int, vals []float64) {
	if dst == nil {
		return
	}
	raw := dst.RawMatrix()
	if raw.Rows == n && raw.Cols == n && raw.Stride == n {
		// The usual case, dst n×n and contiguous: at holds the offsets,
		// and one clear does for the rows.
		d := raw.Data[:n*n]
		clear(d)
		for k, ij := range at {
			d[ij] = vals[k]
		}
		return
	}
	r, c := min(n, raw.Rows), min(n, raw.Cols)
	for i := 0; i < r; i++ {
		clear(raw.Data[i*raw.Stride : i*raw.Stride+c])
	}
	for k, ij := range at {
		if i, j := ij/n, ij%n; i < r && j < c {
			raw.Data[i*raw.Stride+j] = vals[k]
		}
	}
}
