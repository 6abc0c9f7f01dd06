package integrate

import (
	"context"
	"errors"
	"math"
)

// Solve integrates p from p.T0 to t1 with method m (nil: DormandPrince54) and
// settings s (nil: defaults). t1 may be below p.T0 (backward integration).
//
// It returns the solution and nil, or, once stepping has begun, the partial
// solution and an error wrapping one of the package's sentinels (or the
// context's error). Before stepping it returns nil and the error.
//
// Cost: per step, the method's evaluations of F plus O(n) work; per sample or
// probe, one evaluation of the continuous extension. With DropSteps, memory
// is bounded by the samples and crossings requested.
//
// A panic in a callback (the vector field, the Jacobian, a crossing
// function, the progress function) is recovered, once per call of Solve,
// into a *CallbackError (wrapping ErrCallback) that names the callback and
// the time, returned with the partial solution.
func Solve(ctx context.Context, p Problem, t1 float64, m Method, s *Settings) (*Solution, error) {
	return solve(ctx, p, t1, m, s, nil)
}

// solve is Solve, or with each != nil Stream: every sample (or, with no
// grid, every accepted step) goes to each as it is computed and none is
// kept.
func solve(ctx context.Context, p Problem, t1 float64, m Method, s *Settings, each func(t float64, y []float64) error) (out *Solution, err error) {
	if ctx == nil {
		ctx = context.Background()
	}
	st, err := NewStepper(p, t1, m, s)
	if err != nil {
		return nil, err
	}
	if m == nil {
		m = DormandPrince54
	}
	c := st.cfg
	n := st.n
	sol := &Solution{Method: m.Name(), Dim: n, T0: p.T0, End: p.T0, sc: st.sc,
		coef: newChunks(st.sc.denseSize() * n)}
	if cd, ok := st.sc.(compactDense); ok {
		sol.cd = cd
		sol.coef = newChunks(cd.compactSize(n))
	}
	defer sol.seal()
	var cf *crossFinder
	inEach := false
	defer func() {
		if v := recover(); v != nil {
			if inEach {
				out, err = sol, Recovered(CallbackSample, st.t, v)
			} else {
				out, err = sol, st.recovered(v, cf)
			}
			sol.Stats = st.stats
			sol.Status = Failed
			// The solution ends at the last point whose results are
			// complete: where the loop left it.
			switch sol.End {
			case st.t:
				sol.Final = append([]float64(nil), st.y...)
			case st.tPrev:
				sol.Final = append([]float64(nil), st.yPrev...)
			default:
				sol.Final = append([]float64(nil), p.Y0...)
			}
		}
	}()
	keep := !c.drop && each == nil
	if len(c.crossings) > 0 {
		cf = newCrossFinder(c.crossings, p.T0, p.Y0)
		if cf.err != nil {
			return nil, cf.err
		}
	}
	// emit passes one point to each; an error from it stops the run at
	// the start of the current step, the last point all of whose samples
	// were delivered.
	var ebuf []float64
	emit := func(t float64, y []float64) error {
		inEach = true
		err := each(t, y)
		inEach = false
		return err
	}
	stopped := func(err error) (*Solution, error) {
		sol.Stats = st.stats
		sol.End = st.tPrev
		sol.Final = append([]float64(nil), st.yPrev...)
		if st.stats.Accepted == 0 {
			sol.End, sol.Final = p.T0, append([]float64(nil), p.Y0...)
		}
		sol.Status = Failed
		return sol, err
	}

	// The sampling grid: t0 + i·Every, then t1; or the caller's Times.
	var grid gridIter
	if c.every > 0 {
		grid = newEveryGrid(p.T0, t1, c.every)
	} else if c.times != nil {
		grid = gridIter{times: c.times, n: len(c.times)}
	}
	if lazyScheme(st.sc) && keep && grid.n == 0 && cf == nil {
		// Nothing needs the dense output during the solve: keep the
		// step sizes, and let At take a step again when asked.
		sol.lazy = newLazyDense(st)
	} else if sol.cd != nil && keep {
		// The compact records: the first step's start derivative.
		sol.d0 = append([]float64(nil), st.f0...)
	}
	if keep {
		per := 1
		if sol.lazy != nil {
			per = 2
		}
		sol.tBuf, sol.yBuf = newChunks(per), newChunks(n)
		sol.tBuf.pool()
		sol.yBuf.pool()
		sol.tBuf.next()[0] = p.T0
		copy(sol.yBuf.next(), p.Y0)
	}
	if each != nil {
		ebuf = make([]float64, n)
		if grid.n == 0 {
			// The steps: the start first.
			copy(ebuf, p.Y0)
			if err := emit(p.T0, ebuf); err != nil {
				return stopped(err)
			}
		}
	}
	if grid.n > 0 {
		// Samples at t0.
		for grid.i < grid.n && grid.at(grid.i) == p.T0 {
			if each != nil {
				copy(ebuf, p.Y0)
				if err := emit(p.T0, ebuf); err != nil {
					return stopped(err)
				}
				grid.i++
				continue
			}
			smp := sol.newSample(n, grid.n)
			smp.T = p.T0
			copy(smp.Y, p.Y0)
			grid.i++
		}
	}
	eval := func(theta float64, dst []float64) {
		st.prepareDense()
		st.sc.interp(st.coef, theta, dst)
	}
	for st.Next(ctx) {
		// The step as stored: theta = (t - ta)/(tb - ta) here, in
		// Stepper.Dense and in Solution.At, so samples, crossings and At
		// agree bit for bit. (tb - ta is exact, and differs from the h the
		// method used only by the rounding of ta + h.)
		ta, tb := st.tPrev, st.t
		h := tb - ta
		end := tb
		stop := false
		if cf != nil {
			hits, stopHit := cf.scan(ta, h, st.y, eval)
			if cf.err != nil {
				// The solution ends at the start of this step, the last
				// point whose crossings are all known.
				sol.Stats = st.stats
				sol.End = ta
				sol.Final = append([]float64(nil), st.yPrev...)
				sol.Status = Failed
				return sol, cf.err
			}
			sol.Hits = append(sol.Hits, hits...)
			if stopHit {
				stop = true
				end = hits[len(hits)-1].T
			}
		}
		// Samples inside (ta, end].
		for grid.i < grid.n {
			tg := grid.at(grid.i)
			if (tg-end)*st.dir > 0 {
				break
			}
			if each != nil {
				if tg == tb {
					copy(ebuf, st.y)
				} else {
					eval((tg-ta)/h, ebuf)
				}
				if err := emit(tg, ebuf); err != nil {
					return stopped(err)
				}
				grid.i++
				continue
			}
			smp := sol.newSample(n, grid.n)
			smp.T = tg
			if tg == tb {
				copy(smp.Y, st.y)
			} else {
				eval((tg-ta)/h, smp.Y)
			}
			grid.i++
		}
		if each != nil && grid.n == 0 {
			// The step's end, or the stopping crossing within it.
			te, ye := tb, st.y
			if stop {
				hit := sol.Hits[len(sol.Hits)-1]
				te, ye = hit.T, hit.Y
			}
			copy(ebuf, ye)
			if err := emit(te, ebuf); err != nil {
				return stopped(err)
			}
		}
		if keep {
			switch {
			case sol.lazy != nil:
				// Nothing to build: the step's size goes into its record.
			case sol.cd != nil && !st.denseReady:
				// Only the part the solution keeps, straight into place.
				st.stats.Evaluations += sol.cd.denseCompact(st, sol.coef.next())
			case sol.cd != nil:
				sol.cd.compact(st, st.coef, sol.coef.next())
			case st.sc.denseSize() > 0:
				st.prepareDense()
				sol.coef.add(st.coef)
			}
			// The record last, after the dense output that may call F (and
			// panic): T and Y never hold a step whose extension is missing.
			// The slots, written out (not a call: this runs at every step).
			if !sol.tBuf.room() {
				sol.tBuf.grow1()
			}
			if !sol.yBuf.room() {
				sol.yBuf.grow1()
			}
			tr, y := sol.tBuf.take(), sol.yBuf.take()
			tr[0] = tb
			if sol.lazy != nil {
				tr[1] = st.hLast // the method's h, before t+h was rounded or replaced by t1
			}
			// A loop, not copy: states are often short, and the
			// runtime's memmove costs more than the copy itself.
			for i, x := range st.y[:len(y)] {
				y[i] = x
			}
		}
		sol.End = end
		if stop {
			hit := sol.Hits[len(sol.Hits)-1]
			sol.Final = append([]float64(nil), hit.Y...)
			sol.Status = Stopped
			sol.Stats = st.stats
			return sol, nil
		}
	}
	sol.Stats = st.stats
	sol.End = st.t
	sol.Final = append([]float64(nil), st.y...)
	if err := st.Err(); err != nil {
		sol.Status = Failed
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			sol.Status = Canceled
		}
		return sol, err
	}
	sol.Status = Completed
	return sol, nil
}

// gridIter walks a sampling grid.
type gridIter struct {
	t0, t1, dt float64
	times      []float64
	n, i       int
}

// newEveryGrid is t0 + i·dt for i = 0, 1, ... while short of t1 by more than
// 1e-9·dt, then t1 itself.
func newEveryGrid(t0, t1, dt float64) gridIter {
	span := math.Abs(t1 - t0)
	k := int(math.Ceil(span/dt - 1e-9)) // points t0 + i·dt, i < k, lie before t1
	return gridIter{t0: t0, t1: t1, dt: math.Copysign(dt, t1-t0), n: k + 1}
}

func (g *gridIter) at(i int) float64 {
	if g.times != nil {
		return g.times[i]
	}
	if i == g.n-1 {
		return g.t1
	}
	return g.t0 + float64(float64(i)*g.dt)
}

// firstSamples is the capacity of the first block of samples; later blocks
// double it (common practice for amortised growth).
const firstSamples = 256

// newSample appends a sample to sol.Samples and returns it, its Y of length
// n ready to fill. Storage grows in blocks that double, up to total samples
// in all, so that a long grid costs no time before the run starts (a
// preallocated grid of 10^7 samples took a second to zero, during which a
// Ctrl-C went unanswered) and the step loop allocates only O(log total)
// times.
func (sol *Solution) newSample(n, total int) *Sample {
	k := len(sol.Samples)
	if k == cap(sol.Samples) {
		grow := max(k, firstSamples)
		grow = min(grow, total-k)
		flat := make([]float64, grow*n)
		next := make([]Sample, k, k+grow)
		copy(next, sol.Samples)
		for i := 0; i < grow; i++ {
			next = append(next, Sample{Y: flat[i*n : (i+1)*n : (i+1)*n]})
		}
		sol.Samples = next[:k]
	}
	sol.Samples = sol.Samples[:k+1]
	return &sol.Samples[k]
}
