package maps

import (
	"context"
	"fmt"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// lineEvalBudget bounds the evaluations of f^p one search of a
// one-dimensional map may spend refining its partition: about a second of
// work at period 64, and far more cells than the 2^p laps a map with
// entropy ln 2 has at the periods where listing cycles makes sense.
const lineEvalBudget = 1 << 23

// lineDedupTol merges roots of f^p(x) - x found twice (from the two cells
// beside a sample), relative to 1 + |x|: roots are polished to a few ulps,
// and distinct roots can be far closer than the tolerance of matching
// points (at r = 4 the logistic map's cycles of period 12 have points
// 1.4e-10 apart next to x = 1).
const lineDedupTol = 1e-13

// lineSearch is the workspace of one search for the cycles of period p of a
// one-dimensional map.
type lineSearch struct {
	m      *Map
	p      int
	period float64 // the component's period, 0 if none
	x      []float64
	j      *mat.Dense
	evals  int
}

// at returns g(x) = f^p(x) - x and g'(x), and false when the orbit or its
// derivative is not finite.
func (l *lineSearch) at(x float64) (g, dg float64, ok bool) {
	l.evals++
	l.x[0] = x
	d := 1.0
	for range l.p {
		l.m.Jacobian(l.x, l.j)
		d *= l.j.At(0, 0)
		l.m.Next(l.x, l.x)
	}
	g = l.x[0] - x
	if l.period > 0 {
		g = wrappedDiff(g, l.period)
	}
	ok = !math.IsNaN(g) && !math.IsInf(g, 0) && !math.IsNaN(d) && !math.IsInf(d, 0)
	return g, d - 1, ok
}

// sample is one point of the partition with g and g' there.
type sample struct {
	x, g, dg float64
	ok       bool
}

func (l *lineSearch) sample(x float64) sample {
	g, dg, ok := l.at(x)
	return sample{x, g, dg, ok}
}

// cyclesLine is Cycles for a one-dimensional map.
func cyclesLine(ctx context.Context, m *Map, p int, s *CycleSettings) ([]Cycle, error) {
	l := &lineSearch{m: m, p: p, x: make([]float64, 1), j: mat.NewDense(1, 1, nil)}
	if per := m.Periods(); per != nil {
		l.period = per[0]
	}
	roots, err := l.roots(ctx, s)
	cs := l.assemble(roots, s.Tol)
	sortCycles(cs)
	return cs, err
}

// roots returns the zeros of f^p(x) - x in [Low[0], High[0]], sorted and
// deduplicated.
func (l *lineSearch) roots(ctx context.Context, s *CycleSettings) ([]float64, error) {
	p := l.p
	lo, hi := s.Low[0], s.High[0]
	minW := (hi - lo) * 1e-13
	var roots []float64
	var err error
	cells := s.Cells
	left := l.sample(lo)
	if left.ok && left.g == 0 {
		roots = append(roots, lo)
	}
	var stack [][2]sample
	for i := 1; i <= cells && err == nil; i++ {
		x := hi
		if i < cells {
			x = lo + (hi-lo)*float64(i)/float64(cells)
		}
		right := l.sample(x)
		stack = append(stack[:0], [2]sample{left, right})
		for len(stack) > 0 {
			c := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			a, b := c[0], c[1]
			mid := l.sample(a.x + float64((b.x-a.x)/2))
			if !a.ok || !b.ok || !mid.ok {
				continue // the orbit leaves the finite numbers here: no cycle
			}
			if mid.g == 0 {
				roots = append(roots, mid.x)
			}
			if b.x-a.x > minW && !l.resolved(a, mid, b) {
				if l.evals > lineEvalBudget {
					err = fmt.Errorf("maps: period %d: the partition was refined %d times without resolving f^p; the list may be incomplete", p, l.evals)
					break
				}
				stack = append(stack, [2]sample{mid, b}, [2]sample{a, mid})
				continue
			}
			for _, h := range [2][2]sample{{a, mid}, {mid, b}} {
				if r, ok := l.root(h[0], h[1]); ok {
					roots = append(roots, r)
				}
			}
			if b.x-a.x <= minW && a.dg*b.dg < 0 && math.Abs(mid.g) <= s.Tol*(1+math.Abs(mid.x)) {
				roots = append(roots, mid.x) // a double root: the cycle touches the diagonal
			}
		}
		if right.ok && right.g == 0 {
			roots = append(roots, right.x)
		}
		left = right
		if i%64 == 0 {
			if cerr := ctx.Err(); cerr != nil {
				err = fmt.Errorf("maps: cycle search canceled at %v: %w", x, cerr)
			}
		}
	}
	return dedupSorted(roots, lineDedupTol), err
}

// resolved reports whether g is sampled finely enough on [a, b] (mid its
// midpoint) that a crossing of zero cannot hide between the samples: g
// keeps one sign and stays farther from zero than four times the width
// times the steepest sampled slope, or g' has
// one sign at all three, the cubic through the end values and slopes
// predicts the midpoint to a tenth of the rise, and Simpson's rule on g'
// gives the rise to a tenth (samples that fall on the same phase of an
// oscillation of g fail this test: the rise over whole oscillations is
// far smaller than the slope times the width).
func (l *lineSearch) resolved(a, mid, b sample) bool {
	if l.period > 0 && (math.Abs(b.g-a.g) > l.period/2 || math.Abs(mid.g-a.g) > l.period/2) {
		return true // g jumps by a period here (it is reduced to [-P/2, P/2]): no root to resolve
	}
	h := b.x - a.x
	steep := math.Max(math.Abs(a.dg), math.Max(math.Abs(mid.dg), math.Abs(b.dg)))
	if far := 4 * float64(h*steep); (a.g > far && mid.g > far && b.g > far) || (a.g < -far && mid.g < -far && b.g < -far) {
		return true // g stays too far from zero for its slopes to bring it there
	}
	if !(a.dg > 0 && mid.dg > 0 && b.dg > 0) && !(a.dg < 0 && mid.dg < 0 && b.dg < 0) {
		return false
	}
	rise := b.g - a.g
	hermite := float64((a.g+b.g)/2) + float64(float64(h*(a.dg-b.dg))/8)
	simpson := float64(h / 6 * (a.dg + float64(4*mid.dg) + b.dg))
	tenth := float64(0.1 * math.Abs(rise))
	return math.Abs(mid.g-hermite) <= tenth && math.Abs(rise-simpson) <= tenth
}

// root finds the zero of g in [a, b] when g changes sign there (not at a
// jump of a reduced angle): Newton's method kept inside a shrinking
// bracket, bisection where a step would leave it.
func (l *lineSearch) root(a, b sample) (float64, bool) {
	if !(a.g < 0 && b.g > 0) && !(a.g > 0 && b.g < 0) {
		return 0, false
	}
	if l.period > 0 && math.Abs(b.g-a.g) > l.period/2 {
		return 0, false
	}
	lo, hi := a.x, b.x
	if a.g > 0 {
		lo, hi = hi, lo // g(lo) < 0 < g(hi)
	}
	x := a.x + float64((b.x-a.x)/2)
	for range 200 {
		g, dg, ok := l.at(x)
		if !ok {
			return 0, false
		}
		if g == 0 {
			return x, true
		}
		if g < 0 {
			lo = x
		} else {
			hi = x
		}
		xn := x - g/dg
		if !(xn > math.Min(lo, hi) && xn < math.Max(lo, hi)) {
			xn = lo + float64((hi-lo)/2)
		}
		if math.Abs(xn-x) <= 2e-16*(1+math.Abs(x)) || math.Abs(hi-lo) <= 4e-16*(1+math.Abs(x)) {
			return xn, true
		}
		x = xn
	}
	return x, true
}

// dedupSorted sorts xs and merges values within tol·(1 + |x|) of the
// previous kept one.
func dedupSorted(xs []float64, tol float64) []float64 {
	sort.Float64s(xs)
	out := xs[:0]
	for _, x := range xs {
		if len(out) > 0 && x-out[len(out)-1] <= tol*(1+math.Abs(x)) {
			continue
		}
		out = append(out, x)
	}
	return out
}

// assemble links the roots of f^p(x) = x into cycles: each root's image is
// matched to the nearest root within tol·(1 + |x|) (the image carries the
// root's error times |f'|, and a root with a multiplier near 1 is known
// only to about the square root of the rounding); a chain that returns
// after p steps is a cycle of least period p, one that returns sooner
// belongs to a divisor's cycle and is skipped.
func (l *lineSearch) assemble(roots []float64, tol float64) []Cycle {
	used := make([]bool, len(roots))
	var out []Cycle
	x, y := make([]float64, 1), make([]float64, 1)
	chain := make([]int, 0, l.p)
	for i := range roots {
		if used[i] {
			continue
		}
		chain = append(chain[:0], i)
		k := i
		closed := false
		for range l.p {
			x[0] = roots[k]
			l.m.Next(x, y)
			k = nearest(roots, y[0], tol, l.period)
			if k < 0 {
				break
			}
			if k == i {
				closed = true
				break
			}
			chain = append(chain, k)
		}
		if !closed {
			continue
		}
		for _, k := range chain {
			used[k] = true
		}
		if len(chain) != l.p {
			continue
		}
		pts := make([][]float64, len(chain))
		for j, k := range chain {
			pts[j] = []float64{roots[k]}
		}
		out = append(out, newCycle(l.m, pts))
	}
	return out
}

// nearest returns the index of the sorted root nearest y if within
// tol·(1 + |y|) (on the circle when period > 0), else -1.
func nearest(roots []float64, y, tol, period float64) int {
	best, bd := -1, math.Inf(1)
	try := func(k int) {
		if k >= 0 && k < len(roots) {
			d := math.Abs(wrappedDiff(roots[k]-y, period))
			if d < bd {
				best, bd = k, d
			}
		}
	}
	k := sort.SearchFloat64s(roots, y)
	try(k - 1)
	try(k)
	if period > 0 {
		try(0)
		try(len(roots) - 1)
	}
	if bd <= tol*(1+math.Abs(y)) {
		return best
	}
	return -1
}
