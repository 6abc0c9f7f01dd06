package integrate

import (
	"math"
	"sort"
)

// Refinement of the agreement horizons: the comparison grid only brackets
// the first time a run's divergence exceeds the tolerance; the time itself
// is located on the runs' continuous solutions, so that it does not depend
// on the grid's spacing (and so not on the audited span).
const (
	// refineRelTol is the relative accuracy in time to which a horizon is
	// bisected: far below the spread of horizons between rungs.
	refineRelTol = 1e-9
	// refineMaxIter bounds the bisection (2^-60 of a grid interval is
	// below the rounding of any time).
	refineMaxIter = 60
	// scanBackFactor: the fine scan for the first crossing starts at the
	// last grid point before the bracket where the divergence is below
	// tol/scanBackFactor, so that an excursion above the tolerance between
	// two grid points where it was already near is found (three decades
	// below it: ln(1000) ≈ 7 e-foldings of growth; common practice).
	scanBackFactor = 1e3
	// hermiteSubdiv divides each step of a rung's repeat into that many
	// intervals of the exact reference's resample: the cubic Hermite error
	// h^4/384·max|y^(4)| falls by hermiteSubdiv^4 = 4096 below that on the
	// rung's own steps (about 1e-6 in the distance on Lorenz at the largest
	// steps of DormandPrince853 at 1e-8, a relative 1e-8 in the horizon).
	hermiteSubdiv = 8
	// maxScanIntervals bounds the fine scan to that many grid intervals
	// before the bracket (memory: the runs' steps there are kept).
	maxScanIntervals = 16
)

// rerun is what it takes to repeat a rung's run bit for bit: the problem
// (with its start) and the resolved rung. The repeat is the same Stepper
// with the same settings and end time, so it takes the same steps.
type rerun struct {
	p Problem
	r resolvedRung
}

// segment is one accepted step of a repeated run: its span, end state and
// the coefficients of its continuous extension.
type segment struct {
	ta, tb float64
	yb     []float64
	coef   []float64
}

// denseWindow is a run's continuous solution on a window of time: the
// steps that overlap it.
type denseWindow struct {
	sc   scheme
	n    int
	segs []segment
}

// at writes the run's state at t (inside the window) into dst: the step's
// continuous extension at theta = (t - ta)/(tb - ta), as Solve samples it,
// and the step's end state at its end time. It returns false outside.
func (w *denseWindow) at(t float64, dst []float64) bool {
	k := sort.Search(len(w.segs), func(i int) bool { return w.segs[i].tb >= t })
	if k == len(w.segs) || w.segs[k].ta > t {
		return false
	}
	s := &w.segs[k]
	if t == s.tb {
		copy(dst, s.yb)
		return true
	}
	w.sc.interp(s.coef, (t-s.ta)/(s.tb-s.ta), dst)
	return true
}

// times returns the window's step boundaries inside [a, b].
func (w *denseWindow) times(a, b float64) []float64 {
	var out []float64
	for _, s := range w.segs {
		if s.ta >= a && s.ta <= b {
			out = append(out, s.ta)
		}
	}
	if n := len(w.segs); n > 0 && w.segs[n-1].tb <= b {
		out = append(out, w.segs[n-1].tb)
	}
	return out
}

// windows repeats the run rr and keeps its steps that overlap any of the
// windows [w[i][0], w[i][1]] (sorted by start), one denseWindow per window;
// it stops once past the last window's end. A scheme without a continuous
// extension, or a repeat that fails early, gives nil windows (no
// refinement).
func (a *auditor) windows(rr rerun, ws [][2]float64) []*denseWindow {
	if len(ws) == 0 {
		return nil
	}
	end := ws[0][1]
	for _, w := range ws {
		end = math.Max(end, w[1])
	}
	st, err := NewStepper(rr.p, a.t1, rr.r.m, a.settings(rr.r, nil, true))
	if err != nil || st.sc.denseSize() == 0 {
		return nil
	}
	out := make([]*denseWindow, len(ws))
	for i := range out {
		out[i] = &denseWindow{sc: st.sc, n: st.n}
	}
	for st.t < end && st.Next(a.ctx) {
		ta, tb := st.tPrev, st.t
		for i, w := range ws {
			if tb < w[0] || ta > w[1] {
				continue
			}
			st.prepareDense()
			out[i].segs = append(out[i].segs, segment{ta: ta, tb: tb,
				yb: append([]float64(nil), st.y...), coef: append([]float64(nil), st.coef...)})
		}
	}
	if st.t < end {
		return nil
	}
	return out
}

// refTraj evaluates the reference at any time of the windows: the
// reference run's continuous solution (dense), or, for an exact
// trajectory, its states resampled at the step boundaries of the rungs'
// repeats inside their windows, each step divided in hermiteSubdiv, and
// joined by cubic Hermite interpolation with the field's derivatives there
// (error h^4/384·max|y^(4)| for a resample spacing h).
type refTraj struct {
	dense *denseWindow
	t     []float64
	y, f  [][]float64
	p     Problem
}

func (r *refTraj) at(t float64, dst []float64) bool {
	if r.dense != nil {
		return r.dense.at(t, dst)
	}
	k := sort.SearchFloat64s(r.t, t)
	if k == len(r.t) {
		return false
	}
	if r.t[k] == t {
		copy(dst, r.y[k])
		return true
	}
	if k == 0 {
		return false
	}
	t0, t1 := r.t[k-1], r.t[k]
	h := t1 - t0
	s := (t - t0) / h
	// Cubic Hermite basis (exact identity for cubics).
	s2 := float64(s * s)
	s3 := float64(s2 * s)
	h00 := float64(2*s3) - float64(3*s2) + 1
	h10 := s3 - float64(2*s2) + s
	h01 := float64(-2*s3) + float64(3*s2)
	h11 := s3 - s2
	y0, y1, f0, f1 := r.y[k-1], r.y[k], r.f[k-1], r.f[k]
	for i := range dst {
		v := float64(h00*y0[i]) + float64(h*float64(h10*f0[i]))
		v += float64(h01 * y1[i])
		dst[i] = v + float64(h*float64(h11*f1[i]))
	}
	return true
}

// subject is one run whose horizon is refined: its result, its repeat and
// the window of its fine scan.
type subject struct {
	out    *RungResult
	rr     rerun
	k      int // index in out.Divergence of the first grid point above tol
	win    [2]float64
	dense  *denseWindow
	tStart float64
}

// refine locates the agreement horizon of every departed run in subs on
// the continuous solutions: within the window from the last grid point
// well below the tolerance (tol/scanBackFactor, at most maxScanIntervals
// intervals back) to the first grid point above it, the divergence is
// checked at every step boundary of the run's repeat; the first one above
// the tolerance and the one before bracket the crossing, which bisection on
// the distance of the run's continuous extension from the reference
// interpolant (refTraj) then locates to refineRelTol of the time. The
// reference run, when there is no exact trajectory, is repeated once over
// all windows; an exact trajectory is asked once for the resample times.
// A run whose repeat or reference fails keeps its grid horizon.
func (a *auditor) refine(subs []*subject, ref rerun, exact Trajectory) {
	var live []*subject
	for _, s := range subs {
		o := s.out
		if !o.Departed || s.k <= 0 {
			continue
		}
		start := o.Start
		kb := s.k
		ka := kb - 1
		for ka > 0 && kb-ka < maxScanIntervals && o.Divergence[ka] > a.tol/scanBackFactor {
			ka--
		}
		s.win = [2]float64{a.times[start+ka], a.times[start+kb]}
		ws := a.windows(s.rr, [][2]float64{s.win})
		if ws == nil || a.ctx.Err() != nil {
			continue
		}
		s.dense = ws[0]
		live = append(live, s)
	}
	if len(live) == 0 {
		return
	}
	sort.Slice(live, func(i, j int) bool { return live[i].win[0] < live[j].win[0] })
	rt := &refTraj{p: a.p}
	if exact == nil {
		// One repeat of the reference keeps its steps in each window
		// (not between them).
		wins := make([][2]float64, len(live))
		for i, s := range live {
			wins[i] = s.win
		}
		dw := a.windows(ref, wins)
		if dw == nil {
			return
		}
		for i, s := range live {
			a.bisect(s, &refTraj{dense: dw[i]})
		}
		return
	}
	var ts []float64
	for _, s := range live {
		bt := append(s.dense.times(s.win[0], s.win[1]), s.win[0], s.win[1])
		sort.Float64s(bt)
		for j, t := range bt {
			ts = append(ts, t)
			if j+1 < len(bt) {
				h := (bt[j+1] - t) / hermiteSubdiv
				for q := 1; q < hermiteSubdiv; q++ {
					ts = append(ts, t+float64(float64(q)*h))
				}
			}
		}
	}
	sort.Float64s(ts)
	u := ts[:0]
	for _, t := range ts {
		if len(u) == 0 || t > u[len(u)-1] {
			u = append(u, t)
		}
	}
	ys, err := exact(a.ctx, u)
	if err != nil || len(ys) != len(u) {
		return
	}
	rt.t, rt.y = u, ys
	rt.f = make([][]float64, len(u))
	for i, y := range ys {
		if len(y) != a.n {
			return
		}
		rt.f[i] = make([]float64, a.n)
		a.p.F(u[i], y, rt.f[i])
	}
	for _, s := range live {
		a.bisect(s, rt)
	}
}

// bisect scans the subject's window at its step boundaries and bisects the
// first crossing of the tolerance.
func (a *auditor) bisect(s *subject, ref *refTraj) {
	yr := make([]float64, a.n)
	yx := make([]float64, a.n)
	d := func(t float64) (float64, bool) {
		if !s.dense.at(t, yr) || !ref.at(t, yx) {
			return 0, false
		}
		return a.dist(yr, yx), true
	}
	pts := append(s.dense.times(s.win[0], s.win[1]), s.win[0], s.win[1])
	sort.Float64s(pts)
	lo := math.Inf(-1)
	hi := math.NaN()
	for _, t := range pts {
		if t < s.win[0] || t > s.win[1] {
			continue
		}
		v, ok := d(t)
		if !ok {
			return
		}
		if v > a.tol {
			hi = t
			break
		}
		lo = t
	}
	if math.IsNaN(hi) || math.IsInf(lo, -1) {
		return
	}
	for range refineMaxIter {
		if hi-lo <= float64(refineRelTol*math.Max(math.Abs(hi), 1)) {
			break
		}
		mid := lo + float64(0.5*(hi-lo))
		v, ok := d(mid)
		if !ok {
			return
		}
		if v > a.tol {
			hi = mid
		} else {
			lo = mid
		}
	}
	s.out.Horizon = math.Max(s.tStart, hi)
}

// subjects lists the runs of res whose horizons refine locates: the rungs
// (reruns[i] repeats rung i; nil for a rung that did not run) and, with an
// exact trajectory, the reference run itself.
func (a *auditor) subjects(res *AuditResult, reruns []*rerun, refRR rerun, exact bool) []*subject {
	var subs []*subject
	add := func(o *RungResult, rr rerun, tStart float64) {
		for k, v := range o.Divergence {
			if v > a.tol {
				subs = append(subs, &subject{out: o, rr: rr, k: k, tStart: tStart})
				return
			}
		}
	}
	for i := range res.Rungs {
		if i >= len(reruns) || reruns[i] == nil {
			continue
		}
		o := &res.Rungs[i]
		tStart := a.p.T0
		if o.Rung.Kind == KindRestart {
			tStart = o.Rung.RestartAt
		}
		add(o, *reruns[i], tStart)
	}
	if exact {
		add(&res.Reference, refRR, a.p.T0)
	}
	return subs
}
