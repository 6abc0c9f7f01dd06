package embed

import (
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/kdtree"
)

// norm chooses the distance between delay vectors.
type norm int

const (
	maxNorm       norm = iota // Chebyshev: the largest coordinate difference
	euclideanNorm             // the square root of the sum of squares
)

// point is one delay vector as a kdtree.Comparable: its index into the
// embedding. Points live in one slice and are handed to gonum by pointer,
// so that searches allocate nothing.
type point struct {
	e *Embedding
	i int
}

// Compare returns the difference of the two points' coordinate d.
func (p *point) Compare(c kdtree.Comparable, d kdtree.Dim) float64 {
	q := c.(*point)
	return p.e.Coord(p.i, int(d)) - q.e.Coord(q.i, int(d))
}

// Dims returns the embedding dimension.
func (p *point) Dims() int { return p.e.Dim }

// Distance returns the squared Euclidean distance, as gonum's own searches
// expect; the package's searches below use their own norms.
func (p *point) Distance(c kdtree.Comparable) float64 {
	q := c.(*point)
	var s float64
	for k := 0; k < p.e.Dim; k++ {
		d := p.e.Coord(p.i, k) - q.e.Coord(q.i, k)
		s += float64(d * d)
	}
	return s
}

// pointPlane orders points by one coordinate, for gonum's tree building.
type pointPlane struct {
	pts []*point
	dim kdtree.Dim
}

func (p pointPlane) Len() int { return len(p.pts) }
func (p pointPlane) Less(i, j int) bool {
	a, b := p.pts[i], p.pts[j]
	return a.e.Coord(a.i, int(p.dim)) < b.e.Coord(b.i, int(p.dim))
}
func (p pointPlane) Swap(i, j int) { p.pts[i], p.pts[j] = p.pts[j], p.pts[i] }
func (p pointPlane) Slice(start, end int) kdtree.SortSlicer {
	p.pts = p.pts[start:end]
	return p
}

// pointSet is a set of points as a kdtree.Interface.
type pointSet []*point

func (s pointSet) Index(i int) kdtree.Comparable { return s[i] }
func (s pointSet) Len() int                      { return len(s) }
func (s pointSet) Slice(start, end int) kdtree.Interface {
	return s[start:end]
}

// pivotSample is how many points gonum's median-of-randoms looks at to
// choose each split (gonum's own Points use 100).
const pivotSample = 100

func (s pointSet) Pivot(d kdtree.Dim) int {
	p := pointPlane{pts: s, dim: d}
	return kdtree.Partition(p, kdtree.MedianOfRandoms(p, pivotSample))
}

// tree finds neighbours among the first m points of an embedding, with a
// k-d tree built by gonum's spatial/kdtree and searched here (exactly, in
// the chosen norm, with the Theiler window excluded). The tree's shape
// depends on gonum's random pivots; the neighbours found do not: ties are
// broken towards the smaller index.
type tree struct {
	e    Embedding
	pts  []point
	root *kdtree.Node
	norm norm
}

// newTree builds a tree over points 0..m-1 of e.
func newTree(e Embedding, m int, nm norm) *tree {
	t := &tree{e: e, norm: nm}
	t.pts = make([]point, m)
	set := make(pointSet, m)
	for i := range t.pts {
		t.pts[i] = point{e: &t.e, i: i}
		set[i] = &t.pts[i]
	}
	t.root = kdtree.New(set, false).Root
	return t
}

// dist returns the distance between points i and j in the tree's norm.
func (t *tree) dist(i, j int) float64 {
	x, lag := t.e.x, t.e.Lag
	if t.norm == maxNorm {
		var m float64
		for k := 0; k < t.e.Dim; k++ {
			m = max(m, math.Abs(x[i+k*lag]-x[j+k*lag]))
		}
		return m
	}
	var s float64
	for k := 0; k < t.e.Dim; k++ {
		d := x[i+k*lag] - x[j+k*lag]
		s += float64(d * d)
	}
	return math.Sqrt(s)
}

// nearest returns the nearest point to point q whose index differs from q
// by more than theiler and whose distance is above zero (an exact copy
// says nothing about how neighbours separate), with its distance; -1 and
// +Inf when there is none.
func (t *tree) nearest(q, theiler int) (int, float64) {
	best, bd := -1, math.Inf(1)
	t.nearestIn(t.root, q, theiler, &best, &bd)
	return best, bd
}

func (t *tree) nearestIn(n *kdtree.Node, q, theiler int, best *int, bd *float64) {
	for n != nil {
		p := n.Point.(*point)
		j := p.i
		if j-q > theiler || q-j > theiler {
			d := t.dist(q, j)
			if d > 0 && (d < *bd || d == *bd && j < *best) {
				*best, *bd = j, d
			}
		}
		c := t.e.Coord(q, int(n.Plane)) - t.e.Coord(j, int(n.Plane))
		near, far := n.Left, n.Right
		if c > 0 {
			near, far = n.Right, n.Left
		}
		t.nearestIn(near, q, theiler, best, bd)
		if math.Abs(c) > *bd {
			return
		}
		n = far
	}
}

// countAround adds to hist[b] the number of points j with |j-q| > theiler
// whose distance to q is at most edges[b] but above edges[b-1] (b = 0
// counts distances up to edges[0]); edges increase. Points beyond the last
// edge are not counted.
func (t *tree) countAround(q, theiler int, edges []float64, hist []int64) {
	t.countIn(t.root, q, theiler, edges, hist)
}

func (t *tree) countIn(n *kdtree.Node, q, theiler int, edges []float64, hist []int64) {
	rmax := edges[len(edges)-1]
	for n != nil {
		p := n.Point.(*point)
		j := p.i
		if j-q > theiler || q-j > theiler {
			if d := t.dist(q, j); d <= rmax {
				hist[binOf(edges, d)]++
			}
		}
		c := t.e.Coord(q, int(n.Plane)) - t.e.Coord(j, int(n.Plane))
		if c <= 0 {
			t.countIn(n.Left, q, theiler, edges, hist)
			if -c > rmax {
				return
			}
			n = n.Right
		} else {
			t.countIn(n.Right, q, theiler, edges, hist)
			if c > rmax {
				return
			}
			n = n.Left
		}
	}
}

// within appends to dst the points j with |j-q| > theiler, j < limit, whose
// distance to q is at most r, in increasing order of j, and returns dst.
// The order matters: a caller that sums over the points gets the same bits
// whatever the tree's random shape (the search visits them in an order that
// depends on it).
func (t *tree) within(q, theiler, limit int, r float64, dst []int) []int {
	n := len(dst)
	dst = t.withinIn(t.root, q, theiler, limit, r, dst)
	slices.Sort(dst[n:])
	return dst
}

func (t *tree) withinIn(n *kdtree.Node, q, theiler, limit int, r float64, dst []int) []int {
	for n != nil {
		p := n.Point.(*point)
		j := p.i
		if (j-q > theiler || q-j > theiler) && j < limit {
			if t.dist(q, j) <= r {
				dst = append(dst, j)
			}
		}
		c := t.e.Coord(q, int(n.Plane)) - t.e.Coord(j, int(n.Plane))
		near, far := n.Left, n.Right
		if c > 0 {
			near, far = n.Right, n.Left
		}
		dst = t.withinIn(near, q, theiler, limit, r, dst)
		if math.Abs(c) > r {
			return dst
		}
		n = far
	}
	return dst
}

// binOf returns the first b with d <= edges[b] (edges increase, d <=
// the last edge), by bisection.
func binOf(edges []float64, d float64) int {
	lo, hi := 0, len(edges)-1
	for lo < hi {
		mid := (lo + hi) / 2
		if d <= edges[mid] {
			hi = mid
		} else {
			lo = mid + 1
		}
	}
	return lo
}

// kNearest finds the k nearest points to point q outside the Theiler
// window (distance 0 allowed), ordered by distance and then index, into
// idx and dist (each of length >= k); it returns how many it found.
func (t *tree) kNearest(q, theiler, k int, idx []int, dist []float64) int {
	found := 0
	t.kNearestIn(t.root, q, theiler, k, idx, dist, &found)
	return found
}

func (t *tree) kNearestIn(n *kdtree.Node, q, theiler, k int, idx []int, dist []float64, found *int) {
	for n != nil {
		p := n.Point.(*point)
		j := p.i
		if j-q > theiler || q-j > theiler {
			d := t.dist(q, j)
			if *found < k || d < dist[k-1] || d == dist[k-1] && j < idx[k-1] {
				// insert (d, j) in order, dropping the last when full
				pos := min(*found, k-1)
				for pos > 0 && (dist[pos-1] > d || dist[pos-1] == d && idx[pos-1] > j) {
					if pos < k {
						dist[pos], idx[pos] = dist[pos-1], idx[pos-1]
					}
					pos--
				}
				dist[pos], idx[pos] = d, j
				if *found < k {
					*found++
				}
			}
		}
		c := t.e.Coord(q, int(n.Plane)) - t.e.Coord(j, int(n.Plane))
		near, far := n.Left, n.Right
		if c > 0 {
			near, far = n.Right, n.Left
		}
		t.kNearestIn(near, q, theiler, k, idx, dist, found)
		if *found == k && math.Abs(c) > dist[k-1] {
			return
		}
		n = far
	}
}
