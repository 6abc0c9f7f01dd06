package integrate

import (
	"fmt"
	"math"
	"math/big"
	"testing"
)

// Order conditions of Runge–Kutta methods (Butcher 1963; J. C. Butcher,
// Numerical Methods for Ordinary Differential Equations, 2nd ed., Wiley 2008,
// Sect. 31; Hairer, Nørsett & Wanner, Solving ODEs I, 2nd ed. 1993,
// Sect. II.2, Theorem 2.13): a method with weights b has order p iff
//
//	Σ_i b_i Φ_i(t) = 1/γ(t)   for every rooted tree t with |t| <= p,
//
// where Φ_i(•) = 1, Φ_i([t1 … tm]) = Π_k (A Φ(t_k))_i, γ(•) = 1 and
// γ([t1 … tm]) = |t| Π_k γ(t_k). A continuous extension y0 + h Σ b_i(θ) k_i
// has order q iff Σ_i b_i(θ) Φ_i(t) = θ^|t|/γ(t) for |t| <= q (ibid.,
// Sect. II.6, Theorem 6.1). These are exact identities.
//
// The sums are evaluated exactly (big.Float at ocPrec bits) on the float64
// coefficients that the code uses, so the only residual is the rounding of
// the coefficients to float64.

const (
	// ocPrec is enough bits that every product and sum below is exact: a
	// product of at most 9 float64 coefficients has at most 477 significant
	// bits, and exponents of the coefficients span less than 2^±40.
	ocPrec = 2048
	// ocTol bounds the residual of a condition that holds. The only error
	// is the rounding of each coefficient to float64 (relative 2^-53); the
	// sums are O(1) with at most 16 terms, so residuals are a few 1e-16
	// (the largest seen is 1.1e-15, DP853's b̂5); 1e-14 leaves a margin of
	// ten while a wrong digit in the first 14 of any coefficient fails.
	ocTol = 1e-14
	// ocFailMin: a condition of order p+1 counts as violated only when its
	// residual exceeds this, 1e6 times ocTol.
	ocFailMin = 1e-8
	// ocMaxOrder is the highest tree order generated.
	ocMaxOrder = 8
)

// ocTree is a rooted tree given by its children (indices into the list of
// all trees, non-increasing).
type ocTree struct {
	order    int
	children []int
	gamma    float64 // density γ(t), exact in float64 for |t| <= 8
}

// ocTrees returns all rooted trees up to order maxOrder, ordered by order.
// A tree of order n is a multiset of trees whose orders sum to n-1; taking
// child indices in non-increasing order gives every multiset exactly once.
func ocTrees(maxOrder int) []ocTree {
	trees := []ocTree{{order: 1, gamma: 1}}
	for n := 2; n <= maxOrder; n++ {
		prev := len(trees)
		var rec func(rem, maxIdx int, kids []int)
		rec = func(rem, maxIdx int, kids []int) {
			if rem == 0 {
				g := float64(n)
				for _, k := range kids {
					g *= trees[k].gamma
				}
				trees = append(trees, ocTree{order: n, children: append([]int(nil), kids...), gamma: g})
				return
			}
			for k := maxIdx; k >= 0; k-- {
				if trees[k].order <= rem {
					rec(rem-trees[k].order, k, append(kids, k))
				}
			}
		}
		rec(n-1, prev-1, nil)
	}
	return trees
}

// ocTableau is an explicit Runge–Kutta tableau with its weight sets and
// continuous extensions, as float64 values used by the code.
type ocTableau struct {
	name    string
	c       []float64
	a       [][]float64 // a[i][j] for j < i; rows may be short
	weights []ocWeights
	dense   []ocDense
}

type ocWeights struct {
	name  string
	b     []*big.Float // exact, len <= stages
	order int
}

type ocDense struct {
	name  string
	w     func(theta float64) []*big.Float // b(θ), exact
	order int
}

func ocBig(x float64) *big.Float { return new(big.Float).SetPrec(ocPrec).SetFloat64(x) }

func ocVec(xs ...float64) []*big.Float {
	v := make([]*big.Float, len(xs))
	for i, x := range xs {
		v[i] = ocBig(x)
	}
	return v
}

// ocSub returns a - b exactly, padding the shorter with zeros.
func ocSub(a, b []*big.Float) []*big.Float {
	n := max(len(a), len(b))
	v := make([]*big.Float, n)
	for i := range v {
		v[i] = new(big.Float).SetPrec(ocPrec)
		if i < len(a) {
			v[i].Add(v[i], a[i])
		}
		if i < len(b) {
			v[i].Sub(v[i], b[i])
		}
	}
	return v
}

// ocAxpy returns x·a + y (x exact), padding with zeros.
func ocAxpy(x *big.Float, a, y []*big.Float) []*big.Float {
	n := max(len(a), len(y))
	v := make([]*big.Float, n)
	for i := range v {
		v[i] = new(big.Float).SetPrec(ocPrec)
		if i < len(a) {
			v[i].Mul(x, a[i])
		}
		if i < len(y) {
			v[i].Add(v[i], y[i])
		}
	}
	return v
}

func ocUnit(i, n int) []*big.Float {
	v := ocVec(make([]float64, n)...)
	v[i].SetFloat64(1)
	return v
}

// ocHermite returns the weights b(θ) of the cubic Hermite interpolant
// y0 + θ(r2 + (1−θ)(r3 + θ r4)) with r2 = hΣb k, r3 = h k1 − r2,
// r4 = r2 − h k_new − r3, where stage knew is F at the new point.
func ocHermite(b []*big.Float, knew, stages int) func(float64) []*big.Float {
	r2 := b
	r3 := ocSub(ocUnit(0, stages), r2)
	r4 := ocSub(ocSub(r2, ocUnit(knew, stages)), r3)
	return func(theta float64) []*big.Float {
		th, t1 := ocBig(theta), ocBig(1-theta)
		// θ(r2 + t1(r3 + θ r4))
		v := ocAxpy(th, r4, r3)
		v = ocAxpy(t1, v, r2)
		return ocAxpy(th, v, nil)
	}
}

func ocElementary(tab ocTableau, trees []ocTree) [][]*big.Float {
	s := len(tab.c)
	A := make([][]*big.Float, s)
	for i := range A {
		A[i] = make([]*big.Float, s)
		for j := range A[i] {
			x := 0.0
			if j < len(tab.a[i]) {
				x = tab.a[i][j]
			}
			A[i][j] = ocBig(x)
		}
	}
	mul := func(v []*big.Float) []*big.Float {
		out := make([]*big.Float, s)
		tmp := new(big.Float).SetPrec(ocPrec)
		for i := range out {
			out[i] = new(big.Float).SetPrec(ocPrec)
			for j := 0; j < i; j++ {
				out[i].Add(out[i], tmp.Mul(A[i][j], v[j]))
			}
		}
		return out
	}
	phis := make([][]*big.Float, len(trees))
	for k, tr := range trees {
		v := ocVec(make([]float64, s)...)
		for i := range v {
			v[i].SetFloat64(1)
		}
		for _, ch := range tr.children {
			av := mul(phis[ch])
			for i := range v {
				v[i].Mul(v[i], av[i])
			}
		}
		phis[k] = v
	}
	return phis
}

// ocResidual returns Σ b_i Φ_i(t) − θ^|t|/γ(t), computed exactly and then
// rounded to float64.
func ocResidual(b, phi []*big.Float, tr ocTree, theta float64) float64 {
	sum := new(big.Float).SetPrec(ocPrec)
	tmp := new(big.Float).SetPrec(ocPrec)
	for i, bi := range b {
		sum.Add(sum, tmp.Mul(bi, phi[i]))
	}
	want := ocBig(math.Pow(theta, float64(tr.order))) // θ is a dyadic fraction: exact
	want.Quo(want, ocBig(tr.gamma))
	sum.Sub(sum, want)
	r, _ := sum.Float64()
	return r
}

// TestTreeCounts checks the tree generator: the number of rooted trees of
// order 1..8 is 1, 1, 2, 4, 9, 20, 48, 115 (Butcher 2008, Table 302(I);
// OEIS A000081). Exact.
func TestTreeCounts(t *testing.T) {
	want := []int{1, 1, 2, 4, 9, 20, 48, 115}
	got := make([]int, ocMaxOrder)
	for _, tr := range ocTrees(ocMaxOrder) {
		got[tr.order-1]++
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("trees of order %d: got %d, want %d", i+1, got[i], want[i])
		}
	}
	// Densities of the trees of orders 3 and 4: {3, 6} and {4, 8, 12, 24}
	// in the generator's order (exact, from the definition of γ).
	wantGamma := map[int][]float64{3: {6, 3}, 4: {12, 24, 8, 4}}
	for order, gs := range wantGamma {
		var got []float64
		for _, tr := range ocTrees(order) {
			if tr.order == order {
				got = append(got, tr.gamma)
			}
		}
		if fmt.Sprint(got) != fmt.Sprint(gs) {
			t.Errorf("densities of order %d: got %v, want %v", order, got, gs)
		}
	}
}

func ocTableaus() []ocTableau {
	return []ocTableau{dp54Tableau(), dp853Tableau(), bs32Tableau(), rk4Tableau(), eulerTableau()}
}

// TestOrderConditions checks every weight set and continuous extension of
// every tableau against the order conditions: all trees up to the claimed
// order hold to rounding, and at least one tree of the next order fails.
func TestOrderConditions(t *testing.T) {
	trees := ocTrees(ocMaxOrder + 1)
	for _, tab := range ocTableaus() {
		phis := ocElementary(tab, trees)
		check := func(label string, order int, w func(theta float64) []*big.Float, thetas []float64) {
			worst, worstNext := 0.0, 0.0
			failed := false
			for _, theta := range thetas {
				b := w(theta)
				for k, tr := range trees {
					if tr.order > order+1 {
						break
					}
					r := ocResidual(b, phis[k], tr, theta)
					if tr.order <= order {
						if !(math.Abs(r) <= ocTol) {
							t.Errorf("%s %s θ=%v: tree %d (order %d, γ=%v): residual %.3g, want |r| <= %g",
								tab.name, label, theta, k, tr.order, tr.gamma, r, ocTol)
						}
						worst = max(worst, math.Abs(r))
					} else {
						worstNext = max(worstNext, math.Abs(r))
						if math.Abs(r) > ocFailMin {
							failed = true
						}
					}
				}
			}
			if !failed {
				t.Errorf("%s %s: every condition of order %d holds; the order is higher than claimed", tab.name, label, order+1)
			}
			t.Logf("%s %s: order %d: largest residual %.2g; largest at order %d: %.2g",
				tab.name, label, order, worst, order+1, worstNext)
		}
		for _, ws := range tab.weights {
			b := ws.b
			check(ws.name, ws.order, func(float64) []*big.Float { return b }, []float64{1})
		}
		for _, d := range tab.dense {
			check(d.name, d.order, d.w, []float64{0.25, 0.5, 0.75})
		}
	}
}

// TestRowSums checks Σ_j a_ij = c_i (the simplifying assumption the code
// relies on when it evaluates F at t + c_i h) to rounding (exact identity).
func TestRowSums(t *testing.T) {
	// rowSumSlack: c_i and the a_ij are each rounded once to float64;
	// 4 units of roundoff of Σ|a_ij| + |c_i| cover it.
	const rowSumSlack = 4 * 0x1p-53
	for _, tab := range ocTableaus() {
		for i, row := range tab.a {
			sum := new(big.Float).SetPrec(ocPrec)
			abs := math.Abs(tab.c[i])
			for _, x := range row {
				sum.Add(sum, ocBig(x))
				abs += math.Abs(x)
			}
			sum.Sub(sum, ocBig(tab.c[i]))
			r, _ := sum.Float64()
			if math.Abs(r) > rowSumSlack*abs {
				t.Errorf("%s row %d: Σa - c = %.3g, bound %.3g", tab.name, i+1, r, rowSumSlack*abs)
			}
		}
	}
}
