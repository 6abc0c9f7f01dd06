package expr

import (
	"math/big"

	"github.com/plumbdyn/plumb/internal/dd"
)

// KinkKind says what happens to a function of the formula language where
// it is not analytic, and so where a Taylor series of it stops converging
// to it.
type KinkKind uint8

const (
	// KinkCorner: abs(u) where u = 0, min(u, w) and max(u, w) where u = w.
	// The function is continuous there and each side is analytic (±u, u
	// or w), so a series that restarts at the point on the other side's
	// branch is exact.
	KinkCorner KinkKind = iota + 1
	// KinkJump: sign(u) and step(u) where u = 0. The value jumps; each
	// side is a constant.
	KinkJump
	// KinkCut: atan2(u, w) where u = 0 and w < 0, where the value jumps by
	// 2π (the series continues the angle instead). Where w > 0 atan2 is
	// analytic at u = 0.
	KinkCut
	// KinkBranch: sqrt(u) and pow(u, w) with a power that is not a
	// constant integer, where u = 0: a branch point with no analytic
	// continuation across it (the value is not real beyond it).
	KinkBranch
)

// String returns the kind's name: "corner", "jump", "cut" or "branch".
func (k KinkKind) String() string {
	switch k {
	case KinkCorner:
		return "corner"
	case KinkJump:
		return "jump"
	case KinkCut:
		return "cut"
	case KinkBranch:
		return "branch"
	}
	return "unknown"
}

// A Kink is one instruction of a Program whose function is not analytic
// everywhere, with its switching function: the argument u (abs, sign,
// step, atan2's first, sqrt, pow's base), or u - w (min, max), which
// vanishes at the kink and has one sign on each side of it.
type Kink struct {
	Op   Op
	Kind KinkKind
	inst int
}

// Kinks returns the program's non-analytic instructions in tape order; the
// Taylor evaluators number them the same way (SetSide, Switch).
func (p *Program) Kinks() []Kink {
	var ks []Kink
	for i, in := range p.code {
		var kind KinkKind
		switch in.op {
		case OpAbs, OpMin, OpMax:
			kind = KinkCorner
		case OpSign, OpStep:
			kind = KinkJump
		case OpAtan2:
			kind = KinkCut
		case OpSqrt, OpPow:
			kind = KinkBranch
		default:
			continue
		}
		ks = append(ks, Kink{Op: in.op, Kind: kind, inst: i})
	}
	return ks
}

// sideOf returns the branch a Taylor evaluator takes at a kink with forced
// side s (+1 or -1) or, for s == 0, from the sign of the switching value
// (sg, -1, 0 or 1).
func sideOf(s int8, sg int) int {
	if s != 0 {
		return int(s)
	}
	return sg
}

// kinkSides returns the per-instruction side table of a Taylor evaluator.
func kinkSides(p *Program) ([]Kink, []int8) {
	return p.Kinks(), make([]int8, len(p.code))
}

// SetSide makes the evaluator take the branch of side s (+1: the
// switching function positive, -1: negative) at kink j of Program.Kinks
// whatever the sign of the switching function's value at the expansion
// point, or, for s == 0, the branch of that sign (the default). A series
// that restarts on a kink needs it: there the value is zero up to
// rounding, and the side is the one the solution moves into. It applies
// to corners and jumps; atan2 and the branch kinds ignore it.
func (t *TaylorDD) SetSide(j int, s int8) { t.side[t.kinks[j].inst] = s }

// Switch writes coefficients 0..Order-1 of kink j's switching function
// (of the last ODE) into dst and zeroes the rest of dst.
func (t *TaylorDD) Switch(j int, dst []dd.Float) {
	in := t.p.code[t.kinks[j].inst]
	u := t.c[in.a]
	for k := range dst {
		switch {
		case k >= t.n:
			dst[k] = dd.Float{}
		case in.op == OpMin || in.op == OpMax:
			dst[k] = dd.Sub(u[k], t.c[in.b][k])
		default:
			dst[k] = u[k]
		}
	}
}

// Cut reports whether kink j is an atan2 whose second argument is
// negative at the expansion point of the last ODE (where a zero of the
// first argument is a jump of the value), and true for every other kind.
func (t *TaylorDD) Cut(j int) bool {
	in := t.p.code[t.kinks[j].inst]
	return in.op != OpAtan2 || t.c[in.b][0].Hi < 0
}

// SetSide is TaylorDD.SetSide for big.Float.
func (t *TaylorBig) SetSide(j int, s int8) { t.side[t.kinks[j].inst] = s }

// Switch is TaylorDD.Switch for big.Float: it sets dst[k] (allocated at
// Prec bits when nil).
func (t *TaylorBig) Switch(j int, dst []*big.Float) {
	in := t.p.code[t.kinks[j].inst]
	u := t.c[in.a]
	for k := range dst {
		if dst[k] == nil {
			dst[k] = new(big.Float).SetPrec(t.prec)
		}
		switch {
		case k >= t.n:
			dst[k].SetInt64(0)
		case in.op == OpMin || in.op == OpMax:
			dst[k].Sub(u[k], t.c[in.b][k])
		default:
			dst[k].Set(u[k])
		}
	}
}

// Cut is TaylorDD.Cut for big.Float.
func (t *TaylorBig) Cut(j int) bool {
	in := t.p.code[t.kinks[j].inst]
	return in.op != OpAtan2 || t.c[in.b][0].Sign() < 0
}
