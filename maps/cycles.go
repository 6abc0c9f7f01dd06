package maps

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"

	"github.com/plumbdyn/plumb/integrate"
)

// ErrNoJacobian reports a cycle search on a map without a Jacobian (the
// multipliers, and the 1-D bracketing, need df/dx).
var ErrNoJacobian = errors.New("maps: the map has no Jacobian")

// Cycle is a periodic orbit of least period Period.
type Cycle struct {
	Period int
	// Points are the cycle's Period points in the order the map visits
	// them, starting from the least (lexicographically, first component
	// first).
	Points [][]float64
	// Multiplier is (f^p)'(x) for a one-dimensional map (the product of
	// f' over the points); 0 for higher dimensions.
	Multiplier float64
	// Eigenvalues are the eigenvalues of the Jacobian of f^p at the first
	// point (for a one-dimensional map, the multiplier alone).
	Eigenvalues []complex128
	// Modulus is the largest |eigenvalue|; the cycle is Stable
	// (attracting) when it is below 1.
	Modulus float64
	Stable  bool
}

// CycleSettings say where and how finely Cycles looks.
type CycleSettings struct {
	// Low and High bound the box searched, one entry per component
	// (required, Low[i] < High[i]). A one-dimensional map is searched on
	// [Low[0], High[0]], end points included.
	Low, High []float64
	// Cells is the number of equal cells the interval of a one-dimensional
	// map is first cut into before adaptive refinement; 0 means 4096.
	Cells int
	// Starts is the number of Newton starts, spread uniformly (seeded) in
	// the box, for a map of dimension 2 or more; 0 means 4000.
	Starts int
	// Seed seeds the starts (0 is a seed like any other).
	Seed uint64
	// Tol is the distance, relative to 1 + |x| per component, within which
	// the image of a point found matches a point found (so that cycles are
	// linked up) and two cycles are the same; 0 means 1e-7.
	Tol float64
}

// WithDefaults returns a copy with zero fields set to their documented
// defaults.
func (s CycleSettings) WithDefaults() CycleSettings {
	if s.Cells == 0 {
		s.Cells = 4096
	}
	if s.Starts == 0 {
		s.Starts = 4000
	}
	if s.Tol == 0 {
		s.Tol = 1e-7
	}
	s.Low = append([]float64(nil), s.Low...)
	s.High = append([]float64(nil), s.High...)
	return s
}

// Validate checks the settings for a map of dimension n; errors wrap
// integrate.ErrSettings and name the field.
func (s CycleSettings) Validate(n int) error {
	bad := func(field string, v any, format string, a ...any) error {
		return &integrate.SettingError{Pkg: "maps", Type: "CycleSettings", Field: field, Value: v,
			Reason: fmt.Sprintf(format, a...), Err: integrate.ErrSettings}
	}
	if len(s.Low) != n || len(s.High) != n {
		return bad("Low", s.Low, "the box has %d low and %d high bounds for a map of dimension %d", len(s.Low), len(s.High), n)
	}
	for i := range s.Low {
		lo, hi := s.Low[i], s.High[i]
		if math.IsNaN(lo) || math.IsInf(lo, 0) || math.IsNaN(hi) || math.IsInf(hi, 0) || !(lo < hi) {
			return bad(fmt.Sprintf("Low[%d]", i), lo, "component %d: bounds [%v, %v] must be finite with low < high", i, lo, hi)
		}
	}
	if s.Cells < 1 || s.Cells > 1<<24 {
		return bad("Cells", s.Cells, "must be in 1..%d", 1<<24)
	}
	if s.Starts < 1 || s.Starts > 1<<24 {
		return bad("Starts", s.Starts, "must be in 1..%d", 1<<24)
	}
	if !(s.Tol > 0 && s.Tol < 1e-2) {
		return bad("Tol", s.Tol, "must be in (0, 0.01)")
	}
	return nil
}

// MaxCyclePeriod is the longest period Cycles searches: the work of one
// search grows with the period and, for a chaotic map, the number of cycles
// grows like e^(h·p).
const MaxCyclePeriod = 64

// Cycles returns every cycle of least period p of m whose points lie in the
// box of s, each with its multipliers and stability, sorted by their first
// point. A one-dimensional map is searched by bracketing f^p(x) - x on an
// adaptively refined partition of the interval (cells are split until
// f^p is resolved, so that no crossing of the diagonal hides between two
// samples), each root polished by Newton's method; a cycle that only
// touches the diagonal (at the parameter of a tangent bifurcation) can be
// missed. A map of higher dimension is searched by Newton's method on
// f^p(x) - x from s.Starts seeded starts in the box, the results
// deduplicated: cycles whose basin of Newton's method misses every start
// are not found, so the list is what was found, not a proof that no other
// exists.
//
// Errors before any work: a nil or zero map, p outside 1..MaxCyclePeriod or
// invalid settings (integrate.ErrSettings, a *integrate.SettingError naming
// the field), a map without a Jacobian (ErrNoJacobian). A canceled ctx
// returns the cycles found so far with the context's error.
//
// References:
//
//	T. Y. Li, J. A. Yorke, Period three implies chaos, Amer. Math. Monthly
//	  82 (1975) 985–992 (cycles of one-dimensional maps and their count).
//	J. Stoer, R. Bulirsch, Introduction to Numerical Analysis, Springer
//	  (1980), ch. 5 (bracketing and Newton's method).
func Cycles(ctx context.Context, m *Map, p int, s *CycleSettings) ([]Cycle, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	n := m.Dim()
	if n == 0 {
		return nil, fmt.Errorf("maps: Cycles of a nil or zero map: %w", integrate.ErrSettings)
	}
	if p < 1 || p > MaxCyclePeriod {
		return nil, fmt.Errorf("maps: period %d: must be in 1..%d: %w", p, MaxCyclePeriod, integrate.ErrSettings)
	}
	var set CycleSettings
	if s != nil {
		set = *s
	}
	set = set.WithDefaults()
	if err := set.Validate(n); err != nil {
		return nil, fmt.Errorf("maps: cycle settings: %w", err)
	}
	if !m.HasJacobian() {
		return nil, ErrNoJacobian
	}
	if n == 1 {
		return cyclesLine(ctx, m, p, &set)
	}
	return cyclesNewton(ctx, m, p, &set)
}

// newCycle builds the Cycle through the points pts (in the map's order),
// rotated to start from the least point, with its multipliers.
func newCycle(m *Map, pts [][]float64) Cycle {
	p := len(pts)
	first := 0
	for i := 1; i < p; i++ {
		if lexLess(pts[i], pts[first]) {
			first = i
		}
	}
	c := Cycle{Period: p, Points: make([][]float64, p)}
	for i := range p {
		c.Points[i] = append([]float64(nil), pts[(first+i)%p]...)
	}
	n := m.Dim()
	prod := mat.NewDense(n, n, nil)
	for i := range n {
		prod.Set(i, i, 1)
	}
	j, tmp := mat.NewDense(n, n, nil), mat.NewDense(n, n, nil)
	for _, x := range c.Points {
		m.Jacobian(x, j)
		tmp.Mul(j, prod)
		prod.Copy(tmp)
	}
	if n == 1 {
		c.Multiplier = prod.At(0, 0)
		c.Eigenvalues = []complex128{complex(c.Multiplier, 0)}
	} else {
		var eig mat.Eigen
		if eig.Factorize(prod, mat.EigenNone) {
			c.Eigenvalues = eig.Values(nil)
			sort.Slice(c.Eigenvalues, func(a, b int) bool {
				return cmplx.Abs(c.Eigenvalues[a]) > cmplx.Abs(c.Eigenvalues[b])
			})
		}
	}
	c.Modulus = math.NaN()
	for i, e := range c.Eigenvalues {
		if a := cmplx.Abs(e); i == 0 || a > c.Modulus {
			c.Modulus = a
		}
	}
	c.Stable = c.Modulus < 1
	return c
}

// lexLess orders points by their first component, then the next, ...
func lexLess(a, b []float64) bool {
	for i := range a {
		if a[i] != b[i] {
			return a[i] < b[i]
		}
	}
	return false
}

// sortCycles orders cycles by their first point.
func sortCycles(cs []Cycle) {
	sort.SliceStable(cs, func(a, b int) bool { return lexLess(cs[a].Points[0], cs[b].Points[0]) })
}
