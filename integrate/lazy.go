package integrate

import (
	"fmt"
	"math"
	"sync"
)

// lazyDense is the dense output of a DormandPrince54 or DormandPrince853
// Solve that keeps its steps but needs no dense output while it runs (no
// sampling grid, no crossings). The continuous extension of a step needs
// the step's stages (and, for DormandPrince853, three further stages);
// building it for every kept step, or storing its stages (2n+1 floats more
// than T and Y for DormandPrince54 even when compact, 8n for
// DormandPrince853), costs the solve a large part of what its steps cost
// (BenchmarkKeepVsDrop), in time and memory. Most kept steps are never
// looked at, so the solve keeps only the method's step size h of each
// step (T's differences round it), and At rebuilds a step when first
// asked: it takes the step again from (T[k], Y[k]) with h, which gives
// the solve's stages bit for bit (the field being the same function), and
// then builds the extension with the scheme's dense, as Stepper.Dense
// does, on the same inputs. The bits are those of a solve that built the
// extension eagerly.
//
// A rebuild costs F at the step's start (the stepper evaluated the same
// call at the end of step k-1, or at the start for k = 0: T[k] is
// T[k-1] + h exactly for every step but the last), the attempt (6
// evaluations for DormandPrince54, whose last one is F at the end; 11 for
// DormandPrince853, then F at the end, as the stepper evaluates it after
// acceptance) and the extension's own (3 for DormandPrince853): 7 and 16
// evaluations. The attempt's y1 must equal Y[k+1] bit for bit; when it
// does not, the field no longer computes what it computed during the
// solve, and At refuses (ErrFieldChanged) rather than answer from stages
// that are not the solve's.
//
// The Solution takes over the solve's workspace when the solve ends: the
// field (Problem.Own made it for this solve) and the scheme with its stage
// vectors. A mutex serialises the rebuilds, so that the field is never
// called concurrently by one Solution; two cache slots keep the two steps
// used last, so that a sweep of At over increasing t builds each step
// once.
type lazyDense struct {
	h          []float64 // per step: the method's step size (set when the solve ends)
	rtol, atol []float64

	mu    sync.Mutex
	sc    scheme      // the Solution's own scheme, with its stage vectors
	sq    sqAttempter // sc, when the stepper attempts through it
	f     Func        // the Solution's own field
	fsal  bool        // sc's attempt leaves F at the step's end
	k1    []float64
	kEnd  []float64
	y1    []float64
	slots [2]lazySlot // the two steps used last
	older int         // the slot used less recently, to be replaced next
	evals int         // evaluations of F made by rebuilds
	err   error       // the first failure of a rebuild
}

// lazyScheme reports whether a solve with scheme sc may keep only its
// step sizes and let At rebuild the steps: the two Dormand–Prince pairs,
// whose attempt depends on nothing but (t, y, F(t, y), h).
func lazyScheme(sc scheme) bool {
	_, ok := sc.(rebuildable)
	return ok
}

// rebuildable marks the schemes lazyScheme accepts (and those that embed
// one, such as the amd64 form of DormandPrince54's step).
type rebuildable interface{ rebuildable() }

func (*dp54Work) rebuildable()  {}
func (*dp853Work) rebuildable() {}

// lazySlot is one built step: its continuous extension as dense writes
// it (r1..r8).
type lazySlot struct {
	step int // -1: empty
	coef []float64
}

// newLazyDense returns the lazy dense output of the solve stepped by st
// (the Solution takes over its scheme and field when the solve ends; the
// tolerances are not modified afterwards).
func newLazyDense(st *Stepper) *lazyDense {
	n, m := st.n, st.sc.denseSize()
	l := &lazyDense{rtol: st.cfg.rtol, atol: st.cfg.atol, sc: st.sc, sq: st.sq, f: st.p.F, fsal: st.fsal}
	buf := make([]float64, (3+2*m)*n)
	l.k1, l.kEnd, l.y1 = buf[:n:n], buf[n:2*n:2*n], buf[2*n:3*n:3*n]
	l.slots[0] = lazySlot{step: -1, coef: buf[3*n : (3+m)*n : (3+m)*n]}
	l.slots[1] = lazySlot{step: -1, coef: buf[(3+m)*n : (3+2*m)*n : (3+2*m)*n]}
	return l
}

// interp writes the extension of step k (from T[k], y0 to T[k+1], y1) at
// theta into dst and returns dst, or nil when the step could not be
// rebuilt (see err).
func (l *lazyDense) interp(k int, t0 float64, y0, y1 []float64, theta float64, dst []float64) []float64 {
	l.mu.Lock()
	defer l.mu.Unlock()
	s := l.slot(k, t0, y0, y1)
	if s == nil {
		return nil
	}
	l.sc.interp(s.coef, theta, dst)
	return dst
}

// slot returns the built step k, rebuilding it into the slot used less
// recently when it is not cached; nil when the rebuild failed (the slot is
// left empty and the failure kept in err). l.mu is held.
func (l *lazyDense) slot(k int, t0 float64, y0, y1 []float64) (s *lazySlot) {
	for i := range l.slots {
		if l.slots[i].step == k {
			l.older = i ^ 1
			return &l.slots[i]
		}
	}
	s = &l.slots[l.older]
	l.older ^= 1
	s.step = -1
	defer func() {
		if v := recover(); v != nil {
			if l.err == nil {
				l.err = Recovered(CallbackField, t0, v)
			}
			s = nil
		}
	}()
	h := l.h[k]
	// The calls and arguments of the stepper: Stepper.nextAdaptive, then
	// Stepper.prepareDense.
	l.f(t0, y0, l.k1)
	l.evals++
	var ev int
	if l.sq != nil {
		_, ev = l.sq.attemptSq(t0, h, y0, l.k1, l.y1, l.kEnd, l.rtol, l.atol)
	} else {
		_, ev = l.sc.attempt(t0, h, y0, l.k1, l.y1, l.kEnd, l.rtol, l.atol)
	}
	l.evals += ev
	if !l.fsal {
		l.f(t0+h, l.y1, l.kEnd)
		l.evals++
	}
	for i, v := range l.y1 {
		if math.Float64bits(v) != math.Float64bits(y1[i]) {
			if l.err == nil {
				l.err = fmt.Errorf("integrate: Solution.At: the step from t=%g taken again ends at %v, not at %v as during the solve (component %d): %w", t0, v, y1[i], i, ErrFieldChanged)
			}
			return nil
		}
	}
	l.evals += l.sc.dense(t0, h, y0, l.k1, y1, l.kEnd, s.coef)
	s.step = k
	return s
}

// AtEvaluations returns the evaluations of the field that At has made
// since Solve returned: for DormandPrince54 and DormandPrince853, when
// the solve kept its steps and needed no dense output (no Settings.Every,
// Times or Crossings), At rebuilds a step's continuous extension when
// first asked (7 and 16 evaluations a step; the two steps used last are
// kept; calls in a rebuild that panicked may be left out). 0 for every other solve. Safe
// for concurrent use.
func (s *Solution) AtEvaluations() int {
	if s.lazy == nil {
		return 0
	}
	s.lazy.mu.Lock()
	defer s.lazy.mu.Unlock()
	return s.lazy.evals
}

// AtErr returns the first failure of At to rebuild a step (such a call of At returned nil): a panic of the field (a
// *CallbackError wrapping ErrCallback, at the start of the step), or a
// field that no longer takes the solve's steps (ErrFieldChanged). nil
// when no rebuild failed, and for every other solve. Safe for concurrent
// use.
func (s *Solution) AtErr() error {
	if s.lazy == nil {
		return nil
	}
	s.lazy.mu.Lock()
	defer s.lazy.mu.Unlock()
	return s.lazy.err
}
