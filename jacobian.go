package plumb

import (
	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/internal/expr"
)

// rateError is an error in the Jacobian of rate row.
type rateError struct {
	row int
	err error
}

func (e *rateError) Error() string { return e.err.Error() }
func (e *rateError) Unwrap() error { return e.err }

// sparseJac is where a compiled Jacobian's entries go: the offsets
// i*n+j of the entries that are not structurally zero, and for a small
// system the offsets of the others.
type sparseJac struct {
	n    int
	at   []int // the entries given, increasing (see formulaSystem.jacAt)
	zero []int // the structurally zero entries, when n*n <= sparseZeroMax
}

// sparseZeroMax is the largest n*n for which set writes the structurally
// zero entries one by one rather than clearing the matrix first: for a
// small matrix a clear is a call into the runtime that costs more than
// the stores (Lorenz from formulas, callgrind: the clear took 28
// instructions per evaluation, for one structural zero), for a large one
// the offsets would cost memory.
const sparseZeroMax = 64

func newSparseJac(n int, at []int) sparseJac {
	s := sparseJac{n: n, at: at}
	if n*n > sparseZeroMax {
		return s
	}
	s.zero = []int{}
	k := 0
	for ij := 0; ij < n*n; ij++ {
		if k < len(at) && at[k] == ij {
			k++
			continue
		}
		s.zero = append(s.zero, ij)
	}
	return s
}

// contiguous returns dst's entries when dst is n×n and stored contiguously
// (the usual case: the offsets of s then index it directly), nil otherwise.
func (s sparseJac) contiguous(dst *mat.Dense) []float64 {
	if dst == nil {
		return nil
	}
	raw := dst.RawMatrix()
	if n := s.n; raw.Rows == n && raw.Cols == n && raw.Stride == n {
		return raw.Data[:n*n]
	}
	return nil
}

// zeros writes the structurally zero entries of d (from contiguous).
func (s sparseJac) zeros(d []float64) {
	if s.zero == nil {
		clear(d) // the entries given are written after
		return
	}
	for _, ij := range s.zero {
		d[ij] = 0
	}
}

// fill runs ev, a compiled Jacobian whose outputs are the entries at
// s.at, and writes the matrix into dst as set does: on the usual n×n
// contiguous matrix straight from the evaluator's registers into place,
// otherwise through buf (len(s.at)).
func (s sparseJac) fill(dst *mat.Dense, ev *expr.Float64, buf []float64) {
	if d := s.contiguous(dst); d != nil {
		s.zeros(d)
		ev.RunScatter(d, s.at)
		return
	}
	if dst != nil {
		ev.Run(buf)
		s.set(dst, buf)
	}
}

// set writes the n×n matrix with the entries vals at the places s.at and
// zeros elsewhere into dst; a dst of another size gets the overlapping
// block, a nil dst nothing.
func (s sparseJac) set(dst *mat.Dense, vals []float64) {
	if dst == nil {
		return
	}
	n, at := s.n, s.at
	if d := s.contiguous(dst); d != nil {
		s.zeros(d)
		for k, ij := range at {
			d[ij] = vals[k]
		}
		return
	}
	raw := dst.RawMatrix()
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
