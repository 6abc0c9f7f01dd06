package integrate

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// The order conditions of a splitting are checked through the
// Baker–Campbell–Hausdorff formula (exact identity): for linear vector
// fields y' = Ay and y' = By the sub-flows are exp(c·h·A) and exp(c·h·B), and
// a splitting of order p has
//
//	log Π exp(c_i h X_i) = h(A + B) + O(h^(p+1)),
//
// so the Taylor coefficients of the logarithm at h², …, h^p vanish. With
// random 8×8 matrices no Lie polynomial of degree below 16 vanishes
// identically (Amitsur–Levitzki: M_8 satisfies no polynomial identity of
// degree < 16), so each vanishing coefficient certifies all the order
// conditions of that degree at once. The series are computed in 160-bit
// binary floating point (math/big), so rounding is far below the 15-digit
// precision of the published coefficients.

const (
	bchDim  = 8   // matrix size (see above)
	bchPrec = 160 // bits of the big.Float arithmetic
)

// bchSeries is a truncated power series in h with bchDim×bchDim matrix
// coefficients: s[k] is the coefficient of h^k, row-major.
type bchSeries [][]*big.Float

func bchNewBig() *big.Float { return new(big.Float).SetPrec(bchPrec) }

func bchZero(deg int) bchSeries {
	s := make(bchSeries, deg+1)
	for k := range s {
		s[k] = make([]*big.Float, bchDim*bchDim)
		for i := range s[k] {
			s[k][i] = bchNewBig()
		}
	}
	return s
}

func bchIdentity(deg int) bchSeries {
	s := bchZero(deg)
	for i := 0; i < bchDim; i++ {
		s[0][i*bchDim+i].SetInt64(1)
	}
	return s
}

// bchMatMulAdd adds a·b to dst (all bchDim×bchDim).
func bchMatMulAdd(dst, a, b []*big.Float, tmp *big.Float) {
	for i := 0; i < bchDim; i++ {
		for k := 0; k < bchDim; k++ {
			aik := a[i*bchDim+k]
			if aik.Sign() == 0 {
				continue
			}
			for j := 0; j < bchDim; j++ {
				tmp.Mul(aik, b[k*bchDim+j])
				dst[i*bchDim+j].Add(dst[i*bchDim+j], tmp)
			}
		}
	}
}

func bchMul(a, b bchSeries) bchSeries {
	deg := len(a) - 1
	c := bchZero(deg)
	tmp := bchNewBig()
	for i := 0; i <= deg; i++ {
		for j := 0; i+j <= deg; j++ {
			bchMatMulAdd(c[i+j], a[i], b[j], tmp)
		}
	}
	return c
}

// bchExp returns exp(c·h·X) as a series: coefficient k is c^k X^k / k!.
func bchExp(c float64, x []*big.Float, deg int) bchSeries {
	s := bchIdentity(deg)
	pow := s[0]
	tmp := bchNewBig()
	ck := new(big.Float).SetPrec(bchPrec).SetInt64(1)
	cb := new(big.Float).SetPrec(bchPrec).SetFloat64(c)
	for k := 1; k <= deg; k++ {
		next := make([]*big.Float, bchDim*bchDim)
		for i := range next {
			next[i] = bchNewBig()
		}
		bchMatMulAdd(next, pow, x, tmp)
		pow = next
		ck.Mul(ck, cb)
		ck.Quo(ck, new(big.Float).SetPrec(bchPrec).SetInt64(int64(k)))
		for i := range pow {
			s[k][i].Mul(pow[i], ck)
		}
	}
	return s
}

// bchLog returns log(P) for a series P with P(0) = I: Σ (−1)^(k+1) W^k / k,
// W = P − I.
func bchLog(p bchSeries) bchSeries {
	deg := len(p) - 1
	w := bchZero(deg)
	for k := 1; k <= deg; k++ {
		for i := range w[k] {
			w[k][i].Set(p[k][i])
		}
	}
	out := bchZero(deg)
	pow := w
	for k := 1; k <= deg; k++ {
		f := bchNewBig().Quo(bchNewBig().SetInt64(1), bchNewBig().SetInt64(int64(k)))
		if k%2 == 0 {
			f.Neg(f)
		}
		tmp := bchNewBig()
		for d := range pow {
			for i := range pow[d] {
				tmp.Mul(pow[d][i], f)
				out[d][i].Add(out[d][i], tmp)
			}
		}
		if k < deg {
			pow = bchMul(pow, w)
		}
	}
	return out
}

// bchSplitting returns log of the one-step map of the sub-flow sequence
// coef (starting with a kick when kickFirst) for the generators a (drift,
// the flow of T) and b (kick, the flow of V).
func bchSplitting(first splitKind, coef []float64, a, b []*big.Float, deg int) bchSeries {
	prod := bchIdentity(deg)
	kick := first == kickFirst
	// Sub-flows act in sequence: the first applied is the rightmost factor.
	for _, c := range coef {
		x := a
		if kick {
			x = b
		}
		prod = bchMul(bchExp(c, x, deg), prod)
		kick = !kick
	}
	return bchLog(prod)
}

func bchRandomMatrix(rng *rand.Rand) []*big.Float {
	x := make([]*big.Float, bchDim*bchDim)
	for i := range x {
		x[i] = bchNewBig().SetFloat64(rng.NormFloat64() / math.Sqrt(bchDim))
	}
	return x
}

func bchFrobenius(m []*big.Float) float64 {
	var s float64
	for _, v := range m {
		f, _ := v.Float64()
		s += f * f
	}
	return math.Sqrt(s)
}

// TestSplittingOrderConditions checks, for every splitting method, that the
// Taylor coefficients of log(Ψ(h)) vanish at degrees 2 … p and that the first
// equals A + B (consistency), and that the coefficient at degree p+1 does not
// vanish (the leading error term exists, so the published order is the
// order). "Vanish" is measured against the noise that 1e-15 relative
// perturbations of the coefficients (the precision of the published digits)
// produce in the same coefficient.
// Source: BCH formula, exact identity; orders as published (Verlet 1967;
// Forest & Ruth 1990; Yoshida 1990 Tables 1–2; Omelyan, Mryglod & Folk 2002;
// Blanes & Moan 2002).
func TestSplittingOrderConditions(t *testing.T) {
	// A condition that holds to the published digits changes by about the
	// noise when the digits change; 1e3 × noise leaves room for the number
	// of digits and terms. A violated condition is of order one.
	const noiseFactor = 1e3
	// An absolute floor for coefficients that vanish exactly (even degrees
	// of palindromic sequences), far above 160-bit rounding (~1e-48).
	const floor = 1e-35
	rng := rand.New(rand.NewPCG(7, 11))
	a := bchRandomMatrix(rng)
	b := bchRandomMatrix(rng)
	for _, m := range symMethods {
		t.Run(m.name, func(t *testing.T) {
			sp := m.make(0.1).(*splitting)
			if testing.Short() && sp.order >= 8 {
				t.Skip("degree-9 series in big.Float: about half a second")
			}
			deg := sp.order + 1
			l := bchSplitting(sp.first, sp.coef, a, b, deg)
			// The same with coefficients perturbed by 1e-15 relative,
			// keeping the palindrome.
			pc := append([]float64(nil), sp.coef...)
			for i := 0; i < (len(pc)+1)/2; i++ {
				f := 1 + 1e-15*float64(1-2*rng.IntN(2))
				pc[i] *= f
				pc[len(pc)-1-i] = pc[i]
			}
			lp := bchSplitting(sp.first, pc, a, b, deg)
			diff := func(x, y []*big.Float) float64 {
				d := make([]*big.Float, len(x))
				for i := range x {
					d[i] = bchNewBig().Sub(x[i], y[i])
				}
				return bchFrobenius(d)
			}
			sum := make([]*big.Float, bchDim*bchDim)
			for i := range sum {
				sum[i] = bchNewBig().Add(a[i], b[i])
			}
			if e, noise := diff(l[1], sum), diff(lp[1], l[1]); e > noiseFactor*noise+floor {
				t.Errorf("degree 1: |log Ψ − (A+B)| = %.3g, noise %.3g", e, noise)
			}
			for d := 2; d <= deg; d++ {
				got, noise := bchFrobenius(l[d]), diff(lp[d], l[d])
				t.Logf("degree %d: |coefficient| = %.3g (noise %.3g)", d, got, noise)
				if d <= sp.order && got > noiseFactor*noise+floor {
					t.Errorf("degree %d: |coefficient| = %.3g, noise %.3g: order condition violated", d, got, noise)
				}
				if d == sp.order+1 && got < noiseFactor*noise+floor {
					t.Errorf("degree %d: |coefficient| = %.3g, noise %.3g: order higher than published?", d, got, noise)
				}
			}
		})
	}
}

// TestCompositionWeights checks the symmetric compositions' weights: Σγ = 1
// (consistency) and the odd power sums that the linear part of the BCH
// series makes necessary, Σγ³ = 0 (order 4), Σγ⁵ = 0 (order 6), Σγ⁷ = 0
// (order 8). Source: exact identities (Yoshida 1990, Sect. 3–5).
func TestCompositionWeights(t *testing.T) {
	// The weights are published to 15 digits: each power sum vanishes to
	// about 1e-15 of the sum of its absolute terms; 1e-13 gives margin.
	const relTol = 1e-13
	for _, c := range []struct {
		name  string
		w     []float64
		order int
	}{
		{"Yoshida4", yoshida4Weights, 4},
		{"Yoshida6", yoshida6Weights, 6},
		{"Yoshida8", yoshida8Weights, 8},
	} {
		for k := 1; k < c.order; k += 2 {
			var s, sa float64
			for _, g := range c.w {
				v := math.Pow(g, float64(k))
				s += v
				sa += math.Abs(v)
			}
			want := 0.0
			if k == 1 {
				want = 1
			}
			if math.Abs(s-want) > relTol*sa {
				t.Errorf("%s: Σγ^%d = %.17g, want %g (to %g relative)", c.name, k, s, want, relTol)
			}
		}
		// Palindrome (symmetric composition), exact.
		for i := range c.w {
			if c.w[i] != c.w[len(c.w)-1-i] {
				t.Errorf("%s: weights not palindromic at %d", c.name, i)
			}
		}
	}
	// Sub-flow weights: drifts and kicks each sum to 1 (exact identity),
	// and the sequences are palindromes (symmetric methods).
	for _, m := range symMethods {
		sp := m.make(1).(*splitting)
		var sk, sd, ak, ad float64
		for i, c := range sp.coef {
			if sp.isKick(i) {
				sk += c
				ak += math.Abs(c)
			} else {
				sd += c
				ad += math.Abs(c)
			}
			if c != sp.coef[len(sp.coef)-1-i] {
				t.Errorf("%s: sequence not palindromic at %d", m.name, i)
			}
		}
		if math.Abs(sk-1) > 1e-15*ak*4 || math.Abs(sd-1) > 1e-15*ad*4 {
			t.Errorf("%s: Σ kicks = %.17g, Σ drifts = %.17g, want 1", m.name, sk, sd)
		}
	}
}
