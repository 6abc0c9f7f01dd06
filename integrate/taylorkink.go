package integrate

import (
	"errors"
	"fmt"
	"math"
	"math/big"

	"github.com/plumbdyn/plumb/internal/bigadd"
	"github.com/plumbdyn/plumb/internal/dd"
)

// ErrKink reports a field whose non-analytic function (see KinkSeries) the
// Taylor integrator cannot pass: a branch point reached, a jump whose side
// it cannot decide, kinks that accumulate. A Taylor series does not cross
// a kink, so SolveTaylor stops rather than step over one.
var ErrKink = errors.New("kink the Taylor series cannot cross")

// KinkKind says how a field's function behaves at its kink; the kinds are
// those of the formula compiler (internal/expr).
type KinkKind int

const (
	// KinkCorner: continuous, with an analytic branch on each side (abs,
	// min, max). SolveTaylor lands on the kink and restarts the series on
	// the other side's branch.
	KinkCorner KinkKind = iota + 1
	// KinkJump: the value jumps between constants (sign, step). Handled as
	// a corner when the solution crosses; refused when it slides along the
	// switching surface (the field points back from both sides) or cannot
	// be told which side it takes.
	KinkJump
	// KinkCut: atan2's 2π jump where its first argument crosses 0 with
	// the second negative. Refused there (analytic where the second
	// argument is positive).
	KinkCut
	// KinkBranch: sqrt or a non-integer power whose argument reaches 0.
	// Refused.
	KinkBranch
)

// Kink names one non-analytic function of a field and its kind.
type Kink struct {
	Name string
	Kind KinkKind
}

// KinkSeries is a Series whose field contains functions that are not
// analytic everywhere. Each kink j has a switching function g_j (for
// abs(u): u; for min(u, w) and max(u, w): u - w) whose Taylor series the
// jets expose; SolveTaylor finds its first zero within every step, lands
// the step on it and restarts the series on the branch of the side the
// solution moves into.
type KinkSeries interface {
	Series
	// Kinks lists the kinks, numbered as the jets number them.
	Kinks() []Kink
	// KinkDD and KinkBig return coefficient functions with kink control.
	KinkDD(order int) (KinkJetDD, error)
	KinkBig(order int, prec uint) (KinkJetBig, error)
}

// KinkJetDD computes the series of Series.DD with control of the branches
// taken at kinks.
type KinkJetDD interface {
	// Coef is Series.DD's function.
	Coef(t dd.Float, y []dd.Float, c [][]dd.Float) error
	// SetSide forces the branch of side s (+1: g_j > 0, -1: g_j < 0) at
	// kink j for the next Coef; 0 takes the sign of g_j's value.
	SetSide(j int, s int8)
	// Switch writes coefficients 0..order of g_j from the last Coef.
	Switch(j int, g []dd.Float)
	// Cut reports, for a KinkCut, whether its second argument is negative
	// at the last expansion point (true for the other kinds).
	Cut(j int) bool
}

// KinkJetBig is KinkJetDD in big.Float arithmetic.
type KinkJetBig interface {
	Coef(t *big.Float, y []*big.Float, c [][]*big.Float) error
	SetSide(j int, s int8)
	Switch(j int, g []*big.Float)
	Cut(j int) bool
}

// Kink tracking constants (common practice for event location in Taylor
// integrators: sample, bracket, polish).
const (
	// kinkNoise is the size of a switching value, in units of eps times
	// max(1, |y|_inf), that counts as zero: a restart lands within it.
	kinkNoise = 1e3
	// kinkSamples is the number of subintervals of a step on which each
	// switching polynomial's sign and slope are sampled to bracket its
	// first zero.
	kinkSamples = 24
	// kinkTinyRun is how many landings in a row, each shorter than
	// kinkTinyStep of the step the series allows, count as kinks that
	// accumulate (chattering); SolveTaylor then refuses.
	kinkTinyRun  = 50
	kinkTinyStep = 1e-6
	// kinkBranchNear is how close to 0, relative to max(1, |y|_inf), the
	// argument of a branch kind (sqrt) counts as the cause of a series
	// whose step has collapsed (its coefficients grow like the inverse
	// powers of the distance to the branch point).
	kinkBranchNear = 1e-6
)

// kinkJet is what the tracker needs from a run's arithmetic.
type kinkJet struct {
	coef    func() error                // the series at the current point with the current sides
	load    func(j int, g []float64)    // g_j's coefficients 0..p, rounded to float64
	loadBig func(j int, g []*big.Float) // the same at prec bits
	setSide func(j int, s int8)
	cut     func(j int) bool
	step    func() (h, scale float64) // the Jorba–Zou step of the current series
}

// kinkTrack locates kinks on the series of each step.
type kinkTrack struct {
	kinks    []Kink
	jet      kinkJet
	eps      float64
	prec     uint
	side     []int8 // forced side per kink, 0 from the value
	prev     []int8 // side in effect in the step just taken
	landed   []bool
	dormant  []bool // at the kink with g insignificant over the step
	at       []bool // at the kink (g zero to rounding) at the step's start
	bad      []bool // g's series is not finite
	dir      []int  // order of g's first significant term at a kink, 0 none
	gB       [][]*big.Float
	gF       [][]float64
	scale    float64 // max(1, |y|_inf) at the step's start
	tiny     int
	restarts int
}

func newKinkTrack(kinks []Kink, jet kinkJet, order int, eps float64, prec uint) *kinkTrack {
	m := len(kinks)
	k := &kinkTrack{kinks: kinks, jet: jet, eps: eps, prec: prec,
		side: make([]int8, m), prev: make([]int8, m), landed: make([]bool, m),
		dormant: make([]bool, m), at: make([]bool, m), bad: make([]bool, m), dir: make([]int, m),
		gB: make([][]*big.Float, m), gF: make([][]float64, m)}
	for j := range kinks {
		k.gB[j] = make([]*big.Float, order+1)
		for i := range k.gB[j] {
			k.gB[j][i] = new(big.Float).SetPrec(prec)
		}
		k.gF[j] = make([]float64, order+1)
	}
	return k
}

// compute runs the jet with the current sides and loads the switching
// series.
func (k *kinkTrack) compute() error {
	for j, s := range k.side {
		k.jet.setSide(j, s)
	}
	if err := k.jet.coef(); err != nil {
		return err
	}
	for j := range k.kinks {
		k.jet.load(j, k.gF[j])
		k.bad[j] = false
		for _, v := range k.gF[j] {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				// The series itself is not finite: the run fails on its
				// state; nothing to locate.
				k.bad[j] = true
				break
			}
		}
	}
	return nil
}

func sgn(x float64) int8 {
	switch {
	case x > 0:
		return 1
	case x < 0:
		return -1
	}
	return 0
}

// direction returns the sign and order of g_j's first term (k = 1, 2) that
// is significant over a step h: |g_k| h^k above the noise; 0, 0 when none
// is (g stays at its kink to rounding).
func (k *kinkTrack) direction(j int, h, noise float64) (int8, int) {
	g := k.gF[j]
	hk := 1.0
	for d := 1; d <= 2 && d < len(g); d++ {
		hk *= h
		if math.Abs(g[d])*hk > noise {
			return sgn(g[d]), d
		}
	}
	return 0, 0
}

// expand computes the series at the current point (time tf) and settles
// the side of every kink the point is on: the side the solution moves
// into, checked on that side's own series. It returns the step the series
// allows and the noise level of the switching values.
func (k *kinkTrack) expand(tf, rest float64) (h, noise float64, err error) {
	if err := k.compute(); err != nil {
		return 0, 0, err
	}
	h, scale := k.jet.step()
	k.scale = math.Max(1, scale)
	noise = kinkNoise * k.eps * k.scale
	if !(h > kinkTinyStep*k.eps*math.Max(1, math.Abs(tf))) {
		// The series has (nearly) no radius left: a branch point close by?
		for j, kd := range k.kinks {
			if kd.Kind == KinkBranch && math.Abs(k.gF[j][0]) < kinkBranchNear*math.Max(1, scale) {
				return 0, 0, fmt.Errorf("the argument of %s approaches 0 near t=%g: a branch point, where no series continues: %w", kd.Name, tf, ErrKink)
			}
		}
	}
	h = math.Min(h, rest)
	at := k.at
	clear(at)
	redo := false
	for j, kd := range k.kinks {
		k.dormant[j], k.dir[j] = false, 0
		g0 := k.gF[j][0]
		if k.bad[j] {
			k.dormant[j] = true
			continue
		}
		if math.Abs(g0) > noise && !k.landed[j] {
			if k.side[j] != 0 && k.side[j] != sgn(g0) {
				redo = true
			}
			k.side[j] = 0
			continue
		}
		if kd.Kind == KinkBranch {
			return 0, 0, fmt.Errorf("the argument of %s is 0 (to rounding) at t=%g: a branch point, where no series continues: %w", kd.Name, tf, ErrKink)
		}
		if kd.Kind == KinkCut {
			if k.jet.cut(j) {
				return 0, 0, fmt.Errorf("%s is on its cut at t=%g (first argument 0, second negative), where its value jumps by 2π: %w", kd.Name, tf, ErrKink)
			}
			continue
		}
		at[j] = true
		if k.side[j] == 0 {
			k.side[j], redo = 1, true
		}
	}
	for try := 0; ; try++ {
		if redo {
			if err := k.compute(); err != nil {
				return 0, 0, err
			}
			h, _ = k.jet.step()
			h = math.Min(h, rest)
		}
		redo = false
		bad := -1
		for j := range k.kinks {
			if !at[j] {
				continue
			}
			s, d := k.direction(j, h, noise)
			k.dir[j] = d
			switch {
			case s == 0:
				// g stays at the kink to rounding over the step: both
				// branches of a corner agree there; a jump takes its own
				// value at 0, as float64 does.
				k.dormant[j] = true
				if k.kinks[j].Kind == KinkJump && k.side[j] != 0 {
					k.side[j], redo = 0, true
				}
			case s != k.side[j]:
				bad = j
				k.side[j], redo = s, true
			}
		}
		if bad < 0 && !redo {
			break
		}
		if try == 1 && bad >= 0 {
			return 0, 0, fmt.Errorf("at t=%g the solution takes neither side of the kink of %s (a tangential touch, or the field points back from both sides): %w", tf, k.kinks[bad].Name, ErrKink)
		}
		if try > 2 {
			break
		}
	}
	clear(k.landed)
	return h, noise, nil
}

// limit returns the first zero in (0, h] of a switching function, as a
// step length at prec bits (nil when there is none), after which the
// landed kinks restart on their other side.
func (k *kinkTrack) limit(tf, h, noise float64) (*big.Float, error) {
	first, jf := math.Inf(1), -1
	var lo, hi float64
	for j, kd := range k.kinks {
		k.prev[j] = k.side[j]
		if k.prev[j] == 0 {
			k.prev[j] = sgn(k.gF[j][0])
		}
		if k.dormant[j] || k.bad[j] || k.prev[j] == 0 {
			continue
		}
		if kd.Kind == KinkCut && !k.jet.cut(j) {
			continue
		}
		if kd.Kind == KinkBranch && math.Abs(k.gF[j][0]) >= kinkBranchNear*k.scale {
			// Far from its branch point (whose nearness shortens the
			// steps, so that it is approached, not stepped over).
			continue
		}
		a, b, ok := k.bracket(j, math.Min(h, first))
		if !ok {
			continue
		}
		switch kd.Kind {
		case KinkBranch:
			return nil, fmt.Errorf("the argument of %s reaches 0 at t≈%g: a branch point, where no series continues: %w", kd.Name, tf+b, ErrKink)
		case KinkCut:
			return nil, fmt.Errorf("%s crosses its cut at t≈%g (first argument 0, second negative), where its value jumps by 2π: %w", kd.Name, tf+b, ErrKink)
		}
		if b < first {
			first, jf, lo, hi = b, j, a, b
		}
	}
	if jf < 0 {
		k.tiny = 0
		return nil, nil
	}
	tau := k.polish(jf, lo, hi)
	tf64, _ := tau.Float64()
	if tf64 < kinkTinyStep*h {
		k.tiny++
		if k.tiny > kinkTinyRun {
			return nil, fmt.Errorf("%d kinks in a row within %g of each other near t=%g: %w", k.tiny, kinkTinyStep*h, tf, ErrKink)
		}
	} else {
		k.tiny = 0
	}
	for j := range k.kinks {
		if j == jf || (!k.dormant[j] && k.kinks[j].Kind != KinkCut && math.Abs(horner64(k.gF[j], tf64, 0)) <= noise) {
			k.landed[j] = true
			k.side[j] = -k.prev[j]
		}
	}
	k.restarts++
	return tau, nil
}

// horner64 returns Σ_{i>=d} g_i τ^(i-d) (g deflated by τ^d).
func horner64(g []float64, tau float64, d int) float64 {
	s := 0.0
	for i := len(g) - 1; i >= d; i-- {
		s = float64(s*tau) + g[i]
	}
	return s
}

// slope64 returns the derivative of Σ_{i>=d} g_i τ^(i-d).
func slope64(g []float64, tau float64, d int) float64 {
	s := 0.0
	for i := len(g) - 1; i > d; i-- {
		s = float64(s*tau) + float64(float64(i-d)*g[i])
	}
	return s
}

// bracket returns an interval [a, b] within (0, h] holding the first zero
// of g_j on the step, from the signs at kinkSamples+1 points and, between
// two of the same sign, the extremum where the slope changes sign. At a
// kink (g_j(0) zero to rounding) the polynomial is deflated by τ^d, d the
// order of its first significant term, so that float64 sees its sign near
// 0.
func (k *kinkTrack) bracket(j int, h float64) (float64, float64, bool) {
	g, d := k.gF[j], k.dir[j]
	s0 := float64(k.prev[j])
	val := func(x float64) float64 { return s0 * horner64(g, x, d) }
	der := func(x float64) float64 { return s0 * slope64(g, x, d) }
	a, da := 0.0, der(0)
	for i := 1; i <= kinkSamples; i++ {
		b := h * float64(i) / kinkSamples
		vb, db := val(b), der(b)
		if vb <= 0 {
			return a, b, true
		}
		if da < 0 && db > 0 {
			// A minimum of s0·g inside: locate it by bisection on the slope.
			l, r := a, b
			for range 60 {
				m := 0.5 * (l + r)
				if der(m) < 0 {
					l = m
				} else {
					r = m
				}
			}
			if val(r) <= 0 {
				return a, r, true
			}
		}
		a, da = b, db
	}
	return 0, 0, false
}

// polish returns the zero of g_j in [a, b] (s0·g_j > 0 at a, <= 0 at b):
// bisection in float64 on the deflated polynomial, then Newton steps at
// prec bits on the full one (quadratic convergence from a float64 start).
func (k *kinkTrack) polish(j int, a, b float64) *big.Float {
	g, d := k.gF[j], k.dir[j]
	s0 := float64(k.prev[j])
	// Newton stays within the sampled bracket: the float64 bisection's own
	// bracket is only as good as float64's rounding of the polynomial.
	lo, hi := new(big.Float).SetFloat64(a), new(big.Float).SetFloat64(b)
	for range 80 {
		m := 0.5 * (a + b)
		if m <= a || m >= b {
			break
		}
		if s0*horner64(g, m, d) > 0 {
			a = m
		} else {
			b = m
		}
	}
	prec := k.prec
	tau := new(big.Float).SetPrec(prec).SetFloat64(b)
	gb := k.gB[j]
	k.jet.loadBig(j, gb)
	v, dv, x, tmp := new(big.Float).SetPrec(prec), new(big.Float).SetPrec(prec), new(big.Float).SetPrec(prec), new(big.Float).SetPrec(prec)
	lo.SetPrec(prec)
	hi.SetPrec(prec)
	for it := 0; it < 12; it++ {
		v.SetInt64(0)
		dv.SetInt64(0)
		for i := len(gb) - 1; i >= 0; i-- {
			bigadd.Add(dv, tmp.Mul(dv, tau), v)
			bigadd.Add(v, x.Mul(v, tau), gb[i])
		}
		if dv.Sign() == 0 {
			break
		}
		x.Quo(v, dv)
		bigadd.Sub(tmp, tau, x)
		if tmp.Cmp(lo) < 0 || tmp.Cmp(hi) > 0 {
			break // Newton leaves the bracket: keep the bisection value
		}
		tau.Set(tmp)
		if x.Sign() == 0 || x.MantExp(nil)-tau.MantExp(nil) < -int(prec) {
			break
		}
	}
	return tau
}

// kinkPrecDD is the precision, in bits, at which a double-double run
// polishes the zeros of its switching functions (above double-double's
// 106, so that the polish adds no error of its own).
const kinkPrecDD = 128

// kinkStep expands the series at the current point (time tf) with the
// kinks' sides settled and returns the step: the Jorba–Zou step, or the
// distance to the first kink within it (land, at the tracker's precision;
// nil when there is none).
func (r *taylorRun) kinkStep(kt *kinkTrack, tf float64) (land *big.Float, h float64, err error) {
	h, noise, err := kt.expand(tf, r.times[len(r.times)-1]-tf)
	if err != nil {
		return nil, 0, r.fail(tf, 0, err)
	}
	land, err = kt.limit(tf, h, noise)
	r.res.Stats.KinkRestarts = kt.restarts
	if err != nil {
		return nil, 0, r.fail(tf, h, err)
	}
	if land != nil {
		h, _ = land.Float64()
	}
	return land, h, nil
}

// kinkJetOfDD is the tracker's view of a double-double run: coef and step
// act on the run's current point and series.
func kinkJetOfDD(jet KinkJetDD, p int, coef func() error, step func() (float64, float64)) kinkJet {
	gd := make([]dd.Float, p+1)
	return kinkJet{
		coef: coef, setSide: jet.SetSide, cut: jet.Cut, step: step,
		load: func(j int, g []float64) {
			jet.Switch(j, gd)
			for i, v := range gd {
				g[i] = v.Hi
			}
		},
		loadBig: func(j int, g []*big.Float) {
			jet.Switch(j, gd)
			for i, v := range gd {
				g[i].Set(v.Big())
			}
		},
	}
}

// kinkJetOfBig is kinkJetOfDD for a big.Float run at prec bits.
func kinkJetOfBig(jet KinkJetBig, p int, prec uint, coef func() error, step func() (float64, float64)) kinkJet {
	gb := make([]*big.Float, p+1)
	for i := range gb {
		gb[i] = new(big.Float).SetPrec(prec)
	}
	return kinkJet{
		coef: coef, setSide: jet.SetSide, cut: jet.Cut, step: step,
		load: func(j int, g []float64) {
			jet.Switch(j, gb)
			for i, v := range gb {
				g[i], _ = v.Float64()
			}
		},
		loadBig: jet.Switch,
	}
}
