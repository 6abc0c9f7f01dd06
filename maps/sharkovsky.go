package maps

import (
	"context"
	"fmt"

	"github.com/plumbdyn/plumb/integrate"
)

// sharkovskyKey splits n >= 1 into n = 2^k·m with m odd.
func sharkovskyKey(n int) (k, m int) {
	for n%2 == 0 {
		n /= 2
		k++
	}
	return k, n
}

// SharkovskyBefore reports whether p comes strictly before q in
// Sharkovsky's order
//
//	3, 5, 7, ..., 2·3, 2·5, ..., 4·3, 4·5, ..., ..., 2^3, 2^2, 2, 1
//
// (odd numbers above 1 first, then twice them, four times them, ..., and
// the powers of two last, in decreasing order), so that a continuous map of
// an interval with a cycle of period p has cycles of period q. Both must be
// >= 1 (else false).
//
// References:
//
//	A. N. Sharkovsky, Coexistence of cycles of a continuous map of a line
//	  into itself, Ukrain. Mat. Zh. 16 (1964) 61–71.
//	T. Y. Li, J. A. Yorke, Period three implies chaos, Amer. Math. Monthly
//	  82 (1975) 985–992.
func SharkovskyBefore(p, q int) bool {
	if p < 1 || q < 1 || p == q {
		return false
	}
	kp, mp := sharkovskyKey(p)
	kq, mq := sharkovskyKey(q)
	switch {
	case mp == 1 && mq == 1: // both powers of two: the larger first
		return kp > kq
	case mp == 1: // powers of two come after everything else
		return false
	case mq == 1:
		return true
	case kp != kq:
		return kp < kq
	default:
		return mp < mq
	}
}

// Forces reports whether a cycle of period p forces one of period q in a
// continuous map of an interval: q = p or p comes before q in Sharkovsky's
// order.
func Forces(p, q int) bool { return p >= 1 && q >= 1 && (p == q || SharkovskyBefore(p, q)) }

// ForcedPeriods returns, ascending, every period q <= upTo that a cycle of
// period p forces (p itself included when p <= upTo).
func ForcedPeriods(p, upTo int) []int {
	var out []int
	for q := 1; q <= upTo; q++ {
		if Forces(p, q) {
			out = append(out, q)
		}
	}
	return out
}

// PeriodCheck is one forced period and the cycles of it found.
type PeriodCheck struct {
	Period int
	Cycles int
}

// MaxForcedBound is the largest bound ConfirmForced checks up to: the
// cycles of every period up to it are searched, and their number grows
// like e^(h·p).
const MaxForcedBound = 24

// ConfirmForced checks Sharkovsky's theorem on a concrete one-dimensional
// map: it finds the cycles of period p in the interval of s (there must be
// at least one), lists the periods up to bound that p forces, and searches
// each for cycles with Cycles. Every check has Cycles > 0 when the theorem
// holds for the map on that interval and the search finds what exists; a
// zero says the search missed a cycle or the map is not a continuous map of
// the interval into itself.
//
// Errors: a map of dimension other than 1 (integrate.ErrDimension), bound
// outside 1..MaxForcedBound (integrate.ErrSettings), no cycle of period p
// (ErrNoConvergence), and Cycles' errors with the checks done so far.
func ConfirmForced(ctx context.Context, m *Map, p, bound int, s *CycleSettings) ([]PeriodCheck, error) {
	if m.Dim() != 1 {
		return nil, fmt.Errorf("maps: Sharkovsky's theorem is about maps of an interval; this map has dimension %d: %w", m.Dim(), integrate.ErrDimension)
	}
	if bound < 1 || bound > MaxForcedBound {
		return nil, fmt.Errorf("maps: bound %d: must be in 1..%d: %w", bound, MaxForcedBound, integrate.ErrSettings)
	}
	own, err := Cycles(ctx, m, p, s)
	if err != nil {
		return nil, err
	}
	if len(own) == 0 {
		return nil, fmt.Errorf("maps: no cycle of period %d in the interval, so nothing is forced: %w", p, ErrNoConvergence)
	}
	var out []PeriodCheck
	for _, q := range ForcedPeriods(p, bound) {
		cs, err := Cycles(ctx, m, q, s)
		if err != nil {
			return out, err
		}
		out = append(out, PeriodCheck{Period: q, Cycles: len(cs)})
	}
	return out, nil
}
