package enclose

import (
	"math"

	"github.com/plumbdyn/plumb/internal/ival"
)

// The linear algebra of Lohner's method on small dense n×n matrices,
// row-major: point matrices as []float64, interval matrices and vectors as
// []ival.Interval. Every interval result encloses the exact result of
// the operation on every point of its operands.

// pointOf returns the degenerate interval [v, v].
func pointOf(v float64) ival.Interval { return ival.Point(v) }

// imatPoint writes C = J·A (J interval, A point) into dst.
func imatPoint(dst, j []ival.Interval, a []float64, n int) {
	for i := range n {
		for k := range n {
			var s ival.Interval
			for m := range n {
				s = ival.Add(s, ival.Mul(j[i*n+m], ival.Point(a[m*n+k])))
			}
			dst[i*n+k] = s
		}
	}
}

// imat writes C = X·Y (both interval) into dst.
func imat(dst, x, y []ival.Interval, n int) {
	for i := range n {
		for k := range n {
			var s ival.Interval
			for m := range n {
				s = ival.Add(s, ival.Mul(x[i*n+m], y[m*n+k]))
			}
			dst[i*n+k] = s
		}
	}
}

// ivec writes dst = X·v (X interval matrix, v interval vector).
func ivec(dst, x, v []ival.Interval, n int) {
	for i := range n {
		var s ival.Interval
		for m := range n {
			s = ival.Add(s, ival.Mul(x[i*n+m], v[m]))
		}
		dst[i] = s
	}
}

// pvec writes dst = A·v (A point matrix, v interval vector).
func pvec(dst []ival.Interval, a []float64, v []ival.Interval, n int) {
	for i := range n {
		var s ival.Interval
		for m := range n {
			s = ival.Add(s, ival.Mul(ival.Point(a[i*n+m]), v[m]))
		}
		dst[i] = s
	}
}

// widthOf returns the largest width of the components of x (rounded up);
// +Inf when a component is not finite.
func widthOf(x []ival.Interval) float64 {
	w := 0.0
	for _, v := range x {
		if !finite(v) {
			return math.Inf(1)
		}
		w = max(w, v.Width())
	}
	return w
}

// qr writes into q an orthonormal basis (columns, row-major n×n) from the
// columns of m by modified Gram–Schmidt with pivoting: at each stage the
// remaining column of largest norm times its weight (the radius of the
// coordinate it multiplies) is taken next, so that the first columns of
// q follow the directions in which the set is longest (Lohner's choice).
// It reports false when the columns are numerically dependent; q is then
// undefined. w and col are workspaces of length n and n*n.
func qr(q, m, wt []float64, col []float64, used []bool, n int) bool {
	copy(col, m) // column j of col: col[i*n+j]
	for j := range used {
		used[j] = false
	}
	for stage := range n {
		best, bestv := -1, -1.0
		for j := range n {
			if used[j] {
				continue
			}
			s := 0.0
			for i := range n {
				s += float64(col[i*n+j] * col[i*n+j])
			}
			v := math.Sqrt(s) * wt[j]
			if v > bestv {
				best, bestv = j, v
			}
		}
		used[best] = true
		s := 0.0
		for i := range n {
			s += float64(col[i*n+best] * col[i*n+best])
		}
		norm := math.Sqrt(s)
		if !(norm > 1e-150) || math.IsInf(norm, 0) {
			return false
		}
		for i := range n {
			q[i*n+stage] = col[i*n+best] / norm
		}
		for j := range n {
			if used[j] {
				continue
			}
			d := 0.0
			for i := range n {
				d += float64(q[i*n+stage] * col[i*n+j])
			}
			for i := range n {
				col[i*n+j] -= float64(d * q[i*n+stage])
			}
		}
	}
	// A second pass against the columns taken restores orthogonality lost
	// to rounding (reorthogonalisation; Giraud, Langou & Rozložník 2005).
	for stage := 1; stage < n; stage++ {
		for prev := range stage {
			d := 0.0
			for i := range n {
				d += float64(q[i*n+prev] * q[i*n+stage])
			}
			for i := range n {
				q[i*n+stage] -= float64(d * q[i*n+prev])
			}
		}
		s := 0.0
		for i := range n {
			s += float64(q[i*n+stage] * q[i*n+stage])
		}
		norm := math.Sqrt(s)
		if !(norm > 0.5) {
			return false
		}
		for i := range n {
			q[i*n+stage] /= norm
		}
	}
	return true
}

// inverse writes into dst an interval matrix that contains the inverse of
// the point matrix q, which is close to orthogonal, and reports whether
// it could. With R = I - QᵀQ (enclosed in intervals) and δ >= ‖R‖∞ < 1/2,
// (QᵀQ)⁻¹ = Σ_{m>=0} Rᵐ = I + E with every |E_ij| <= ‖E‖∞ <= δ/(1-δ), and
// Q⁻¹ = (QᵀQ)⁻¹Qᵀ. tmp and tmp2 are workspaces of n*n intervals.
func inverse(dst []ival.Interval, q []float64, tmp, tmp2 []ival.Interval, n int) bool {
	// tmp = I - QᵀQ
	for i := range n {
		for k := range n {
			var s ival.Interval
			for m := range n {
				s = ival.Add(s, ival.Mul(ival.Point(q[m*n+i]), ival.Point(q[m*n+k])))
			}
			if i == k {
				s = ival.Sub(ival.Point(1), s)
			} else {
				s = ival.Neg(s)
			}
			tmp[i*n+k] = s
		}
	}
	delta := ival.Interval{}
	for i := range n {
		row := ival.Interval{}
		for k := range n {
			v := tmp[i*n+k]
			row = ival.Add(row, ival.Point(max(math.Abs(v.Lo), math.Abs(v.Hi))))
		}
		if row.Hi > delta.Hi {
			delta = ival.Point(row.Hi)
		}
	}
	if !(delta.Hi < 0.5) {
		return false
	}
	e := ival.Div(delta, ival.Sub(ival.Point(1), delta)).Hi
	// tmp = I + [-e, e] in every entry; tmp2 = Qᵀ.
	for i := range n {
		for k := range n {
			v := ival.New(-e, e)
			if i == k {
				v = ival.Add(ival.Point(1), v)
			}
			tmp[i*n+k] = v
			tmp2[i*n+k] = ival.Point(q[k*n+i])
		}
	}
	imat(dst, tmp, tmp2, n)
	return true
}
