package embed

import "testing"

// henon returns n iterates of the Hénon map's x (a = 1.4, b = 0.3).
func henon(n int) []float64 {
	x, y := 0.1, 0.1
	out := make([]float64, n)
	for i := -100; i < n; i++ {
		x, y = float64(1+y)-float64(1.4*x*x), 0.3*x
		if i >= 0 {
			out[i] = x
		}
	}
	return out
}

// TestSearchesDoNotAllocate proves that the neighbour searches, the hot
// loops of every method here, allocate nothing once the tree is built.
func TestSearchesDoNotAllocate(t *testing.T) {
	e, err := Embed(henon(2000), 1, 3)
	if err != nil {
		t.Fatal(err)
	}
	tr := newTree(e, e.Len(), maxNorm)
	edges := []float64{0.01, 0.03, 0.1, 0.3}
	hist := make([]int64, len(edges))
	idx := make([]int, 4)
	dist := make([]float64, 4)
	dst := make([]int, 0, e.Len())
	q := 0
	for _, c := range []struct {
		name string
		f    func()
	}{
		{"nearest", func() { tr.nearest(q%e.Len(), 2) }},
		{"countAround", func() { tr.countAround(q%e.Len(), 2, edges, hist) }},
		{"kNearest", func() { tr.kNearest(q%e.Len(), 2, 4, idx, dist) }},
		{"within", func() { dst = tr.within(q%e.Len(), 2, e.Len(), 0.05, dst[:0]) }},
	} {
		if a := testing.AllocsPerRun(100, func() { q += 17; c.f() }); a != 0 {
			t.Errorf("%s: %g allocations per search, want 0", c.name, a)
		}
	}
}

// TestKNearestBruteForce checks the k-nearest search against a linear scan
// (the oracle of gonum's own kd-tree tests).
func TestKNearestBruteForce(t *testing.T) {
	e, err := Embed(henon(800), 2, 3)
	if err != nil {
		t.Fatal(err)
	}
	for _, nm := range []norm{maxNorm, euclideanNorm} {
		tr := newTree(e, e.Len(), nm)
		const k, w = 5, 3
		idx := make([]int, k)
		dist := make([]float64, k)
		for q := 0; q < e.Len(); q += 7 {
			got := tr.kNearest(q, w, k, idx, dist)
			// brute force: the k smallest (distance, index) outside the window
			bi := make([]int, 0, k)
			bd := make([]float64, 0, k)
			for j := 0; j < e.Len(); j++ {
				if j-q <= w && q-j <= w {
					continue
				}
				d := tr.dist(q, j)
				pos := len(bi)
				for pos > 0 && (bd[pos-1] > d || bd[pos-1] == d && bi[pos-1] > j) {
					pos--
				}
				if pos < k {
					bi = append(bi[:pos], append([]int{j}, bi[pos:]...)...)
					bd = append(bd[:pos], append([]float64{d}, bd[pos:]...)...)
					if len(bi) > k {
						bi, bd = bi[:k], bd[:k]
					}
				}
			}
			if got != k {
				t.Fatalf("norm %d, point %d: found %d, want %d", nm, q, got, k)
			}
			for i := 0; i < k; i++ {
				if idx[i] != bi[i] || dist[i] != bd[i] {
					t.Fatalf("norm %d, point %d: neighbour %d is %d at %g, brute force %d at %g", nm, q, i, idx[i], dist[i], bi[i], bd[i])
				}
			}
			// nearest (distance > 0) agrees with the first of them
			j, d := tr.nearest(q, w)
			if bd[0] > 0 && (j != bi[0] || d != bd[0]) {
				t.Fatalf("norm %d, point %d: nearest %d at %g, brute force %d at %g", nm, q, j, d, bi[0], bd[0])
			}
		}
	}
}
