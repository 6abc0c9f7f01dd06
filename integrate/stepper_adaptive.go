package integrate

import (
	"fmt"
	"math"
)

// stepSize is the size h of the next attempted step of an adaptive
// stepper at t heading for t1 in direction dir, from the proposed size
// prop: clipped to MaxStep, stretched to land on t1 when within 1% of it,
// raised to MinStep when below it. last reports that the step lands on t1;
// under that the step cannot be taken (a step of MinStep was rejected
// already, or h is too small to move t), and the stepper stops with a step
// underflow.
func (c *config) stepSize(t, t1, dir, prop, hTried float64, rejected bool) (h float64, last, under bool) {
	h = prop
	if math.Abs(h) > c.hmax {
		h = dir * c.hmax
	}
	if (t+float64(1.01*h)-t1)*dir >= 0 {
		h, last = t1-t, true
	}
	if math.Abs(h) < c.hmin && !last {
		// Below MinStep: try MinStep itself, and give up only when a
		// step of that size was rejected.
		if rejected && math.Abs(hTried) <= c.hmin {
			return h, last, true
		}
		h = dir * c.hmin
		if (t+float64(1.01*h)-t1)*dir >= 0 {
			h, last = t1-t, true
		}
	}
	if 0.1*math.Abs(h) <= math.Abs(t)*epsRound || h == 0 {
		return h, last, true
	}
	return h, last, false
}

func (st *Stepper) nextAdaptive() bool {
	c := st.cfg
	for {
		if st.stats.Accepted+st.stats.Rejected >= c.maxSteps {
			st.err = &StepError{T: st.t, H: st.h, Err: fmt.Errorf("%d steps: %w", c.maxSteps, ErrStepBudget)}
			return false
		}
		h, last, under := c.stepSize(st.t, st.t1, st.dir, st.h, st.hTried, st.rejected)
		if under {
			return st.underflow(h)
		}
		st.hTried = h
		// The error test works on x = err²: the squared norm comes straight
		// from the scheme when it offers it (no square root on the path from
		// one step to the next). pA = err^(-Alpha).
		var accepted, finite bool
		var x, pA, sBNext float64
		if st.sq != nil {
			e2, ev := st.sq.attemptSq(st.t, h, st.y, st.f0, st.y1, st.f1, c.rtol, c.atol)
			st.stats.Evaluations += ev
			finite = e2 <= math.MaxFloat64 // false for NaN and +Inf
			accepted = e2 <= 1
			if e2 >= 1e-8 && e2 < 0x1p65 {
				x = e2
				var pB float64
				pA, pB = st.tA.pow2(st.tB, x)
				sBNext = float64(c.safety * pB)
			} else if finite {
				x = max(e2, errSqFloor)
				pA, sBNext = st.errPow(x, 0)
			}
		} else {
			err, ev := st.sc.attempt(st.t, h, st.y, st.f0, st.y1, st.f1, c.rtol, c.atol)
			st.stats.Evaluations += ev
			finite = err <= math.MaxFloat64
			accepted = err <= 1
			if finite && accepted && st.fsal && (firstNonFinite(st.y1) >= 0 || firstNonFinite(st.f1) >= 0) {
				finite = false
			}
			if finite {
				x = max(float64(err*err), errSqFloor) // +Inf for err > 1e154: errPow then uses err
				pA, sBNext = st.errPow(x, err)
			}
		}
		if !finite {
			st.nonFinite(st.t + h)
			st.stats.Rejected++
			st.rejected = true
			st.h = 0.25 * h
			continue
		}
		if !accepted {
			// Rejected: shrink by Safety·err^(-Alpha), at least MinFactor.
			fac := float64(c.safety * pA)
			if fac < c.facMin {
				fac = c.facMin
			}
			st.stats.Rejected++
			st.rejected = true
			st.lastNonFin = nil
			st.h = h * fac
			continue
		}
		if !st.fsal {
			st.p.F(st.t+h, st.y1, st.f1)
			st.stats.Evaluations++
			if firstNonFinite(st.y1) >= 0 || firstNonFinite(st.f1) >= 0 {
				st.nonFinite(st.t + h)
				st.stats.Rejected++
				st.rejected = true
				st.h = 0.25 * h
				continue
			}
		}
		// Accepted: PI control, h_new = h·Safety·err^(-Alpha)·errold^Beta,
		// with sB = Safety·errold^Beta kept from the previous step, so that
		// only err^(-Alpha) (a table look-up and a quadratic, see powTable)
		// lies between this step's error and the next step.
		//
		// A dead band (keep h when 0.5 <= err <= 1 and skip the power, as
		// Boost.Odeint and GSL do) was measured on Lorenz to t = 100 against
		// the error at t = 20: with polynomial log2/exp2 it saved 5% at tol
		// 1e-12, broke even at 1e-10 and lost 4% at 1e-8 (more rejections,
		// larger errors); with the table power below it saves nothing (same
		// time, 10-20% larger errors at 1e-8 and 1e-10). It is not used: the
		// controller stays that of Hairer & Wanner's DOPRI5.
		fac := float64(pA * st.sB)
		if fac > c.facMax {
			fac = c.facMax
		}
		if fac < c.facMin {
			fac = c.facMin
		}
		if st.rejected && fac > 1 {
			fac = 1
		}
		st.sB = sBNext // errold = max(err, 1e-4), as Hairer's FACOLD
		if st.stiffDue() {
			st.stiffTest(h)
		}
		tNew := st.t + h
		if last {
			tNew = st.t1
		}
		st.accept(h, tNew)
		st.rejected = false
		st.lastNonFin = nil
		st.h = h * fac
		if last {
			st.done = true
		}
		return true
	}
}

// underflow ends stepping with ErrStepUnderflow at step size h; when the
// rejections that shrank the step were non-finite values, the error also
// wraps the FieldError that says where and which component.
func (st *Stepper) underflow(h float64) bool {
	var cause error = ErrStepUnderflow
	if st.lastNonFin != nil && st.rejected {
		cause = fmt.Errorf("%w: %w", ErrStepUnderflow, st.lastNonFin)
	}
	st.err = &StepError{T: st.t, H: h, Err: cause}
	return false
}

// sqAttempter is implemented by schemes whose trial step can return the
// squared error norm err² (NaN when y1 or f1 holds a NaN or Inf): the
// stepper then needs no square root and no scan for non-finite values per
// step. attempt must return the square root of the same value.
type sqAttempter interface {
	attemptSq(t, h float64, y, f0, y1, f1, rtol, atol []float64) (errSq float64, evals int)
}

// epsRound is the unit roundoff used in the step-size underflow test.
const epsRound = 2.3e-16
