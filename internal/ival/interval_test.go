package ival

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestConstructors checks the documented special cases of Point and New.
func TestConstructors(t *testing.T) {
	inf := math.Inf(1)
	for name, x := range map[string]Interval{
		"Point(NaN)":     Point(math.NaN()),
		"Point(Inf)":     Point(inf),
		"New(2,1)":       New(2, 1),
		"New(NaN,1)":     New(math.NaN(), 1),
		"New(Inf,Inf)":   New(inf, inf),
		"New(-Inf,-Inf)": New(-inf, -inf),
	} {
		if !x.IsEmpty() {
			t.Errorf("%s = %v, want empty", name, x)
		}
	}
	for _, bad := range []Interval{{inf, inf}, {-inf, -inf}, {2, 1}, {math.NaN(), 1}} {
		if !bad.IsEmpty() || !Add(bad, Point(1)).IsEmpty() || !Exp(bad).IsEmpty() {
			t.Errorf("literal %v must count as empty", bad)
		}
	}
	if x := New(-inf, 1); x.IsEmpty() || x.IsBounded() {
		t.Errorf("New(-Inf, 1) = %v, want a nonempty unbounded interval", x)
	}
	if x := Entire(); !x.Contains(0) || x.Contains(inf) || x.Contains(math.NaN()) {
		t.Errorf("Entire().Contains wrong")
	}
	var zero Interval
	if zero != Point(0) {
		t.Errorf("zero value %v, want [0, 0]", zero)
	}
}

// TestMidRadWidth checks that Mid lies in x and [Mid-Rad, Mid+Rad] covers x
// (verified with exact math/big sums), and that Width bounds Hi-Lo, over
// random intervals including subnormal, huge and unbounded ones.
func TestMidRadWidth(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	for range randomCases {
		x := randInterval(rng)
		m, r, w := x.Mid(), x.Rad(), x.Width()
		if !x.Contains(m) {
			t.Fatalf("Mid(%v) = %g, not inside", x, m)
		}
		lo := bf(m)
		lo.Sub(lo, bf(r))
		hi := bf(m)
		hi.Add(hi, bf(r))
		if lo.Cmp(bf(x.Lo)) > 0 || hi.Cmp(bf(x.Hi)) < 0 {
			t.Fatalf("%v not inside Mid %g ± Rad %g", x, m, r)
		}
		d := bf(x.Hi)
		d.Sub(d, bf(x.Lo))
		if bf(w).Cmp(d) < 0 {
			t.Fatalf("Width(%v) = %g below Hi-Lo", x, w)
		}
	}
	if m := Entire().Mid(); m != 0 {
		t.Errorf("Mid(Entire) = %g, want 0", m)
	}
	tiny := math.SmallestNonzeroFloat64
	if m := New(tiny, tiny).Mid(); m != tiny {
		t.Errorf("Mid([tiny, tiny]) = %g", m)
	}
	if m := New(tiny, 2*tiny).Mid(); m < tiny || m > 2*tiny {
		t.Errorf("Mid([tiny, 2tiny]) = %g outside", m)
	}
	if w := New(-math.MaxFloat64, math.MaxFloat64).Width(); !math.IsInf(w, 1) {
		t.Errorf("Width of [-max, max] = %g, want +Inf (overflow rounded up)", w)
	}
	if w := New(1, 1+0x1p-52).Width(); w != 0x1p-52 {
		t.Errorf("Width([1, 1+2^-52]) = %g, want 2^-52 (exact)", w)
	}
	if e := Empty(); !math.IsNaN(e.Width()) || !math.IsNaN(e.Mid()) || !math.IsNaN(e.Rad()) {
		t.Errorf("Width/Mid/Rad of empty should be NaN")
	}
}

// TestPredicates checks Subset, Interior, Hull and Intersect, including the
// rule that empty operands never pass a containment test.
func TestPredicates(t *testing.T) {
	a, b := New(1, 2), New(0, 3)
	if !a.Subset(b) || b.Subset(a) || !a.Subset(a) {
		t.Error("Subset wrong on [1,2], [0,3]")
	}
	if !a.Interior(b) || a.Interior(a) || New(0, 2).Interior(b) {
		t.Error("Interior wrong")
	}
	if Entire().Interior(Entire()) || !Entire().Subset(Entire()) {
		t.Error("Entire: Subset of itself but not Interior")
	}
	e := Empty()
	if e.Subset(b) || e.Interior(b) || a.Subset(e) || e.Contains(0) {
		t.Error("empty must fail every predicate")
	}
	if h := Hull(a, New(5, 6)); h != New(1, 6) {
		t.Errorf("Hull = %v", h)
	}
	if h := Hull(e, a); h != a {
		t.Errorf("Hull(empty, a) = %v", h)
	}
	if i := Intersect(a, New(1.5, 9)); i != New(1.5, 2) {
		t.Errorf("Intersect = %v", i)
	}
	if i := Intersect(a, New(3, 4)); !i.IsEmpty() {
		t.Errorf("Intersect of disjoint = %v", i)
	}
	if s := New(0.1, 2).String(); s != "[0.1, 2]" {
		t.Errorf("String = %q", s)
	}
}

// TestMigInflate checks Mig, IsPoint and Inflate (exact identities of
// float64 arithmetic, and containment of the exact widened ends).
func TestMigInflate(t *testing.T) {
	if m := New(-2, 3).Mig(); m != 0 {
		t.Errorf("Mig([-2,3]) = %g", m)
	}
	if m := New(-3, -2).Mig(); m != 2 {
		t.Errorf("Mig([-3,-2]) = %g", m)
	}
	if !Point(1).IsPoint() || New(1, 2).IsPoint() || Empty().IsPoint() {
		t.Error("IsPoint wrong")
	}
	if x := Inflate(New(1, 2), 0.5); x != New(0.5, 2.5) {
		t.Errorf("Inflate([1,2], 0.5) = %v, want [0.5, 2.5] (exact)", x)
	}
	x := Inflate(Point(1), 1e-30)
	lo, hi := bf(1), bf(1)
	lo.Sub(lo, bf(1e-30))
	hi.Add(hi, bf(1e-30))
	if bf(x.Lo).Cmp(lo) > 0 || bf(x.Hi).Cmp(hi) < 0 || !Point(1).Interior(x) {
		t.Errorf("Inflate(1, 1e-30) = %v, want 1 strictly inside, holding 1 ± 1e-30", x)
	}
	if !Inflate(Point(1), math.NaN()).IsEmpty() || Inflate(Point(1), -1) != Point(1) {
		t.Error("Inflate special cases wrong")
	}
}
