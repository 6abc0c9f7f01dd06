package maps

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
)

// newtonIterations caps Newton's method per start: from a start in the
// basin of a cycle it converges in a handful of steps; a start that wanders
// for this long is abandoned (common practice).
const newtonIterations = 60

// newtonSearch is the workspace of Newton's method on G(x) = f^p(x) - x.
type newtonSearch struct {
	m       *Map
	p, n    int
	periods []float64
	y       []float64
	j, prod *mat.Dense
	tmp     *mat.Dense
	a       []float64 // n×n system, row-major
	rhs     []float64
}

// residual writes G(x) into g and its Jacobian ∏J - I into l.prod; false
// when not finite.
func (l *newtonSearch) residual(x, g []float64) bool {
	n := l.n
	copy(l.y, x)
	l.prod.Zero()
	for i := range n {
		l.prod.Set(i, i, 1)
	}
	for range l.p {
		l.m.Jacobian(l.y, l.j)
		l.tmp.Mul(l.j, l.prod)
		l.prod.Copy(l.tmp)
		l.m.Next(l.y, l.y)
	}
	for i := range n {
		g[i] = l.y[i] - x[i]
		if i < len(l.periods) {
			g[i] = wrappedDiff(g[i], l.periods[i])
		}
		if math.IsNaN(g[i]) || math.IsInf(g[i], 0) {
			return false
		}
	}
	return true
}

// solve solves (∏J - I) dx = -g by Gaussian elimination with partial
// pivoting; false when the matrix is singular.
func (l *newtonSearch) solve(g, dx []float64) bool {
	n := l.n
	for i := range n {
		for k := range n {
			v := l.prod.At(i, k)
			if i == k {
				v--
			}
			l.a[i*n+k] = v
		}
		l.rhs[i] = -g[i]
	}
	for c := range n {
		p := c
		for r := c + 1; r < n; r++ {
			if math.Abs(l.a[r*n+c]) > math.Abs(l.a[p*n+c]) {
				p = r
			}
		}
		if l.a[p*n+c] == 0 || math.IsNaN(l.a[p*n+c]) {
			return false
		}
		if p != c {
			for k := range n {
				l.a[c*n+k], l.a[p*n+k] = l.a[p*n+k], l.a[c*n+k]
			}
			l.rhs[c], l.rhs[p] = l.rhs[p], l.rhs[c]
		}
		for r := c + 1; r < n; r++ {
			f := l.a[r*n+c] / l.a[c*n+c]
			for k := c; k < n; k++ {
				l.a[r*n+k] -= float64(f * l.a[c*n+k])
			}
			l.rhs[r] -= float64(f * l.rhs[c])
		}
	}
	for r := n - 1; r >= 0; r-- {
		v := l.rhs[r]
		for k := r + 1; k < n; k++ {
			v -= float64(l.a[r*n+k] * dx[k])
		}
		dx[r] = v / l.a[r*n+r]
	}
	return true
}

// cyclesNewton is Cycles for a map of dimension 2 or more.
func cyclesNewton(ctx context.Context, m *Map, p int, s *CycleSettings) ([]Cycle, error) {
	n := m.Dim()
	l := &newtonSearch{m: m, p: p, n: n, periods: m.Periods(), y: make([]float64, n),
		j: mat.NewDense(n, n, nil), prod: mat.NewDense(n, n, nil), tmp: mat.NewDense(n, n, nil),
		a: make([]float64, n*n), rhs: make([]float64, n)}
	rng := rand.New(rand.NewPCG(s.Seed, 0x6d617073))
	x, g, dx := make([]float64, n), make([]float64, n), make([]float64, n)
	var out []Cycle
	var err error
	for start := 0; start < s.Starts; start++ {
		if start%64 == 0 {
			if cerr := ctx.Err(); cerr != nil {
				err = fmt.Errorf("maps: cycle search canceled after %d of %d starts: %w", start, s.Starts, cerr)
				break
			}
		}
		for i := range n {
			x[i] = s.Low[i] + float64((s.High[i]-s.Low[i])*rng.Float64())
		}
		if !l.converge(x, g, dx, s.Tol) {
			continue
		}
		pts, ok := l.orbitOf(x, s.Tol)
		if !ok || len(pts) != p || !inBox(pts, s) || known(out, pts[0], s.Tol, l.periods) {
			continue
		}
		out = append(out, newCycle(m, pts))
	}
	sortCycles(out)
	return out, err
}

// converge runs Newton's method from x (changed in place); true when it
// lands on a zero of G.
func (l *newtonSearch) converge(x, g, dx []float64, tol float64) bool {
	for range newtonIterations {
		if !l.residual(x, g) || !l.solve(g, dx) {
			return false
		}
		small := true
		for i := range x {
			x[i] += dx[i]
			if math.IsNaN(x[i]) || math.IsInf(x[i], 0) || math.Abs(x[i]) > 1e150 {
				return false
			}
			if math.Abs(dx[i]) > 1e-14*(1+math.Abs(x[i])) {
				small = false
			}
		}
		WrapPeriodic(x, l.periods)
		if small {
			if !l.residual(x, g) {
				return false
			}
			for i := range x {
				if math.Abs(g[i]) > tol*(1+math.Abs(x[i])) {
					return false
				}
			}
			return true
		}
	}
	return false
}

// orbitOf returns the points x, f(x), ... up to the first return to x
// within tol (at most p points); false when it does not return.
func (l *newtonSearch) orbitOf(x []float64, tol float64) ([][]float64, bool) {
	pts := [][]float64{append([]float64(nil), x...)}
	y := append([]float64(nil), x...)
	for range l.p {
		l.m.Next(y, y)
		if samePoint(x, y, tol, l.periods) {
			return pts, true
		}
		pts = append(pts, append([]float64(nil), y...))
	}
	return nil, false
}

// inBox reports whether every point lies in the box of s.
func inBox(pts [][]float64, s *CycleSettings) bool {
	for _, x := range pts {
		for i, v := range x {
			if v < s.Low[i] || v > s.High[i] {
				return false
			}
		}
	}
	return true
}

// known reports whether a cycle found already passes through x.
func known(cs []Cycle, x []float64, tol float64, periods []float64) bool {
	for _, c := range cs {
		for _, q := range c.Points {
			if samePoint(q, x, tol, periods) {
				return true
			}
		}
	}
	return false
}
