package embed

import "strconv"

// Embedding is the delay embedding of a scalar series (Takens 1981): point
// i is the vector
//
//	(x[i], x[i+Lag], x[i+2·Lag], ..., x[i+(Dim-1)·Lag]),   i = 0 .. Len()-1,
//
// read from the series when asked for, never copied.
//
// References:
//
//	F. Takens, "Detecting strange attractors in turbulence", in Dynamical
//	  Systems and Turbulence, Springer LNM 898 (1981) 366–381.
//	T. Sauer, J. A. Yorke, M. Casdagli, "Embedology", J. Stat. Phys. 65
//	  (1991) 579–616.
type Embedding struct {
	x        []float64
	Lag, Dim int
	n        int
}

// Embed returns the delay embedding of x with the given lag (in samples)
// and dimension. A lag or dimension below 1 is an ErrSettings error; a
// (Dim-1)·Lag that leaves fewer than 2 points is an ErrEmbedding error.
func Embed(x []float64, lag, dim int) (Embedding, error) {
	if lag < 1 {
		return Embedding{}, settingf("lag %d (want >= 1 sample)", lag)
	}
	if dim < 1 {
		return Embedding{}, settingf("dimension %d (want >= 1)", dim)
	}
	span := (dim - 1) * lag
	if dim > 1 && (span/(dim-1) != lag || span >= len(x)-1) {
		return Embedding{}, &InputError{Index: -1, Err: ErrEmbedding,
			Detail: embedDetail(len(x), lag, dim)}
	}
	return Embedding{x: x, Lag: lag, Dim: dim, n: len(x) - span}, nil
}

func embedDetail(n, lag, dim int) string {
	return "lag " + strconv.Itoa(lag) + " x (dimension " + strconv.Itoa(dim) + " - 1) spans " + strconv.Itoa((dim-1)*lag) +
		" samples of a series of " + strconv.Itoa(n)
}

// Len returns the number of delay vectors.
func (e Embedding) Len() int { return e.n }

// Coord returns component k (0 <= k < Dim) of point i: x[i+k·Lag].
func (e Embedding) Coord(i, k int) float64 { return e.x[i+k*e.Lag] }

// At writes point i into dst (grown when short) and returns it.
func (e Embedding) At(i int, dst []float64) []float64 {
	if cap(dst) < e.Dim {
		dst = make([]float64, e.Dim)
	}
	dst = dst[:e.Dim]
	for k := range dst {
		dst[k] = e.x[i+k*e.Lag]
	}
	return dst
}
