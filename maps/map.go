package maps

import (
	"fmt"

	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/dd"
)

// DoubleDouble is an unevaluated sum Hi + Lo of two float64 values, about 32
// significant digits: the arithmetic of the audit's reference orbit.
type DoubleDouble = dd.Float

// Funcs are the functions a Map is made of.
type Funcs struct {
	// Next writes f(x) into dst (both of the map's dimension). It must not
	// keep x or dst, nor allocate if the audit and iteration are not to.
	Next func(x, dst []float64)
	// Jacobian writes df/dx at x into dst, a dim×dim matrix, every entry.
	// Nil: the map has no Jacobian (Jacobian then leaves dst as it is).
	Jacobian func(x []float64, dst *mat.Dense)
	// NextDD is the same map in double-double arithmetic, the reference of
	// Audit; nil when there is none (Audit then refuses the map).
	NextDD func(x, dst []DoubleDouble) error
}

// Map is a map x -> f(x) with its Jacobian, made by New. Components with a
// period (an angle) are reduced to [0, period) after every iterate. It
// satisfies the lyap.Map interface. Not safe for concurrent use (its
// functions usually keep registers). A zero Map has dimension 0, and its
// Next and Jacobian do nothing.
type Map struct {
	n       int
	f       Funcs
	periods []float64
	buf     []float64
	jm      *mat.Dense // dim×dim scratch for a dst of another size
}

// New returns the map of dimension dim made of f; periods gives, per
// component, the period of an angle (0 for the others; nil: none). Errors
// (integrate.ErrSettings): dim < 1, a nil f.Next, periods of another
// length or with an entry that is negative or not finite.
func New(dim int, f Funcs, periods []float64) (*Map, error) {
	if dim < 1 {
		return nil, fmt.Errorf("maps: dimension %d: must be >= 1: %w", dim, integrate.ErrSettings)
	}
	if f.Next == nil {
		return nil, fmt.Errorf("maps: Funcs.Next is nil: %w", integrate.ErrSettings)
	}
	if periods != nil && len(periods) != dim {
		return nil, fmt.Errorf("maps: %d periods for %d components: %w", len(periods), dim, integrate.ErrSettings)
	}
	for i, p := range periods {
		if !(p >= 0) || p > 1e300 {
			return nil, fmt.Errorf("maps: periods[%d] = %v: must be finite and >= 0: %w", i, p, integrate.ErrSettings)
		}
	}
	// buf is written every iterate: a block of at least two cache lines,
	// so that maps iterated on different goroutines (a scan's workers)
	// never write to one line.
	return &Map{n: dim, f: f, periods: append([]float64(nil), periods...), buf: make([]float64, dim, max(dim, 16))}, nil
}

// Dim returns the dimension of the state (0 for a nil or zero Map).
func (m *Map) Dim() int {
	if m == nil {
		return 0
	}
	return m.n
}

// Periods returns a copy of the periods per component (nil: none).
func (m *Map) Periods() []float64 {
	if m == nil || m.periods == nil {
		return nil
	}
	return append([]float64(nil), m.periods...)
}

// HasJacobian reports whether the map has a Jacobian (lyap's estimators
// ask).
func (m *Map) HasJacobian() bool { return m != nil && m.f.Jacobian != nil }

// Next writes f(x) into dst, periodic components reduced to [0, period).
// Both should have length Dim; Next writes at most len(dst) components. It
// does not allocate beyond what f.Next does.
func (m *Map) Next(x, dst []float64) {
	if m == nil || m.f.Next == nil {
		return
	}
	m.f.Next(x, m.buf)
	WrapPeriodic(m.buf, m.periods)
	copy(dst, m.buf)
}

// Jacobian writes df/dx at x into dst, which should be Dim×Dim (a matrix of
// another size gets the overlapping block). It does not allocate after
// the first call with a matrix of another size.
func (m *Map) Jacobian(x []float64, dst *mat.Dense) {
	if m == nil || m.f.Jacobian == nil || dst == nil {
		return
	}
	if r, c := dst.Dims(); r == m.n && c == m.n {
		m.f.Jacobian(x, dst)
		return
	}
	if m.jm == nil {
		m.jm = mat.NewDense(m.n, m.n, nil)
	}
	m.f.Jacobian(x, m.jm)
	r, c := dst.Dims()
	for i := 0; i < min(m.n, r); i++ {
		for j := 0; j < min(m.n, c); j++ {
			dst.Set(i, j, m.jm.At(i, j))
		}
	}
}
