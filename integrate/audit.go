package integrate

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
)

// maxGrid bounds the comparison grid: every rung keeps a curve on it and
// every run samples its states there.
const maxGrid = 1_000_000

// Audit runs the problem p over [p.T0, t1] on every rung of the ladder l,
// compares each run with the reference run on a common time grid, and
// reports per rung the divergence curve, the agreement horizon at the
// tolerance, the fitted growth law and, given the largest Lyapunov exponent,
// the predicted horizon. It answers "how far ahead can this run be believed,
// and which numerical effect limits it": tolerance, method, precision or a
// rounded restart.
//
// The distance between two states is the Euclidean norm of their
// difference, with periodic components wrapped (AuditSettings.Periods), over
// the observed components, each divided by its scale (AuditSettings.Scales).
// Audits run forward in time (t1 > p.T0; otherwise ErrSpan).
//
// Errors: invalid settings give ErrSettings, ErrDimension or ErrSpan; a
// ladder without a rung besides the reference, or an unusable rung, gives a
// *RungError wrapping ErrLadder; all before any run. A failing reference run
// ends the audit with its error and the partial result. A rung whose run
// fails is kept with its Err and its partial curve, and the audit goes on; a
// canceled context ends the audit with the rungs done so far.
//
// Cost: one solve per rung plus the reference (and one backward solve for
// the reversibility check); then, to locate the horizons (see
// RungResult.Horizon), each departed rung repeated up to its horizon, the
// reference repeated up to the latest horizon (or Ladder.Exact asked once
// more, for times up to it); memory O(grid·(rungs + n)) plus the steps of
// the runs inside the windows where the horizons are located.
//
// References:
//
//	G. Boffetta, M. Cencini, M. Falcioni, A. Vulpiani, Predictability: a way
//	  to characterize complexity, Phys. Rep. 356 (2002) 367–474, Sect. 2.1
//	  (the horizon ln(tol/delta0)/lambda).
//	D. Faranda, M. F. Mestre, G. Turchetti, Analysis of round off errors with
//	  reversibility test as a dynamical indicator, Int. J. Bifurcation Chaos
//	  22 (2012) 1250215 (the reversibility check).
func Audit(ctx context.Context, p Problem, t1 float64, l Ladder, s *AuditSettings) (*AuditResult, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if err := p.validate(t1); err != nil {
		return nil, err
	}
	if t1 < p.T0 {
		return nil, fmt.Errorf("integrate: audit needs t1 > t0, got t0=%g t1=%g: %w", p.T0, t1, ErrSpan)
	}
	n := len(p.Y0)
	if s == nil {
		return nil, fmt.Errorf("integrate: AuditSettings is nil (Tol is required): %w", ErrSettings)
	}
	if !(s.Tol > 0) || math.IsInf(s.Tol, 0) {
		return nil, auditErr("Tol", s.Tol, "must be finite and > 0")
	}
	if !positiveFinite(s.Every) {
		return nil, auditErr("Every", s.Every, "must be finite and >= 0")
	}
	if math.IsNaN(s.Lambda) || math.IsInf(s.Lambda, 0) {
		return nil, auditErr("Lambda", s.Lambda, "must be finite")
	}
	if s.MaxSteps < 0 {
		return nil, auditErr("MaxSteps", s.MaxSteps, "must be >= 0")
	}
	if s.Periods != nil {
		if len(s.Periods) != n {
			return nil, fmt.Errorf("integrate: AuditSettings.Periods has length %d, state has %d: %w", len(s.Periods), n, ErrDimension)
		}
		for i, v := range s.Periods {
			if !positiveFinite(v) {
				return nil, auditErr(fmt.Sprintf("Periods[%d]", i), v, "must be finite and >= 0")
			}
		}
	}
	if err := checkScales(s.Scales, n); err != nil {
		return nil, err
	}
	span := t1 - p.T0
	if s.Reverse && s.ReverseAt != 0 && !(s.ReverseAt > p.T0 && s.ReverseAt <= t1) {
		return nil, auditErr("ReverseAt", s.ReverseAt, fmt.Sprintf("not inside (%g, %g]", p.T0, t1))
	}
	every := s.Every
	if every == 0 {
		every = span / 1000
	}
	if span/every > maxGrid {
		return nil, auditErr("Every", s.Every, fmt.Sprintf("gives more than %g grid points over %g", float64(maxGrid), span))
	}
	if len(l.Rungs) == 0 {
		return nil, &RungError{Index: -1, Name: l.Reference.Name, Err: fmt.Errorf("no rung besides the reference: %w", ErrLadder)}
	}
	refRung := l.Reference
	if err := validateRung(refRung, p.T0, t1, true); err != nil {
		return nil, &RungError{Index: -1, Name: refRung.Name, Err: err}
	}
	runs := 0
	for i, r := range l.Rungs {
		if err := validateRung(r, p.T0, t1, false); err != nil {
			return nil, &RungError{Index: i, Name: r.Name, Err: err}
		}
		if r.Kind == KindRun {
			if runs++; runs > 1 {
				return nil, &RungError{Index: i, Name: r.Name, Err: fmt.Errorf("a second rung of kind run (a ladder audits one run of the caller's): %w", ErrLadder)}
			}
		}
	}

	a := &auditor{ctx: ctx, p: p, t1: t1, periods: s.Periods, scales: s.Scales, s: s, n: n}
	a.times = grid(p.T0, t1, every)
	res := &AuditResult{T0: p.T0, T1: t1, Times: a.times, Limit: -1}

	// The reference run keeps no steps: it is sampled on the grid and at
	// the restart times, so memory stays O(grid) however long the span.
	ref := refRung.resolve(nil, 0)
	if ref.m == nil {
		return nil, &RungError{Index: -1, Name: ref.Name, Err: fmt.Errorf("Fixed(%g) returned a nil method: %w", ref.Step, ErrLadder)}
	}
	res.Reference = RungResult{Rung: ref.Rung, Method: ref.m.Name()}
	var gridIdx []int
	a.refT, gridIdx = mergeTimes(a.times, l.Rungs)
	refSol, err := Solve(ctx, p, t1, ref.m, a.settings(ref, a.refT, true))
	if refSol != nil {
		res.Reference.Stats = refSol.Stats
	}
	if err != nil {
		res.Reference.Err = err
		return res, &RungError{Index: -1, Name: ref.Name, Err: err}
	}
	a.refStats = refSol.Stats
	total := len(l.Rungs) + 1
	if s.Reverse {
		total++
	}
	progress := func(done int) {
		if s.Progress != nil {
			s.Progress(done, total)
		}
	}
	progress(1)
	a.refS = make([][]float64, len(refSol.Samples))
	a.refY = make([][]float64, len(a.times))
	for i, smp := range refSol.Samples {
		a.refS[i] = smp.Y
		if g := gridIdx[i]; g >= 0 {
			a.refY[g] = smp.Y
		}
	}
	if l.Exact != nil {
		if err := a.exact(l.Exact, refSol, gridIdx, &res.Reference); err != nil {
			return res, &RungError{Index: -1, Name: ref.Name, Err: err}
		}
	}
	res.Spread, res.Magnitude, res.Reach = a.spread()
	res.Tol = s.Tol
	if s.Relative {
		res.Tol = s.Tol * res.Spread
		if !(res.Tol > 0) {
			return res, auditErr("Relative", true, "the reference run has zero spread, so a relative tolerance is zero")
		}
	}
	a.tol = res.Tol
	a.ceil = saturationFraction * res.Spread
	if a.ceil == 0 {
		a.ceil = math.Inf(1)
	}
	if l.Exact != nil {
		r := &res.Reference
		r.Horizon, r.Departed = a.horizon(r.Divergence, 0, p.T0)
		r.Growth = fitGrowth(a.times, r.Divergence, p.T0, a.ceil)
	}
	hRef := meanStep(refSol)
	if n := len(refSol.Samples); n != len(a.refT) {
		panic(fmt.Sprintf("integrate: audit reference has %d samples for %d times", n, len(a.refT)))
	}

	reruns := make([]*rerun, len(l.Rungs))
	for i, r := range l.Rungs {
		if err := ctx.Err(); err != nil {
			return res, fmt.Errorf("integrate: audit canceled before rung %d: %w", i, err)
		}
		rr := r.resolve(&ref, hRef)
		if rr.m == nil {
			res.Rungs = append(res.Rungs, RungResult{Rung: rr.Rung, Horizon: p.T0,
				Err: &RungError{Index: i, Name: rr.Name, Err: fmt.Errorf("Fixed(%g) returned a nil method: %w", rr.Step, ErrLadder)}})
			res.Failed++
			continue
		}
		out := a.run(rr, res.Magnitude)
		reruns[i] = a.lastRun
		res.Rungs = append(res.Rungs, out)
		progress(i + 2)
		if out.Err != nil {
			res.Failed++
			if errors.Is(out.Err, context.Canceled) || errors.Is(out.Err, context.DeadlineExceeded) {
				return res, &RungError{Index: i, Name: rr.Name, Err: out.Err}
			}
		}
	}

	// The grid brackets each horizon; the continuous solutions locate it.
	a.refine(a.subjects(res, reruns, rerun{p: p, r: ref}, l.Exact != nil), rerun{p: p, r: ref}, l.Exact)
	if err := ctx.Err(); err != nil {
		return res, fmt.Errorf("integrate: audit canceled while locating the horizons: %w", err)
	}
	res.Trusted = t1
	own := -1
	for i, r := range res.Rungs {
		if r.Rung.Kind == KindRun {
			own = i
		}
	}
	for i, r := range res.Rungs {
		switch {
		case own >= 0:
			// The caller's run: trusted until it departs (or stops).
			if i == own && (r.Departed || r.Err != nil) {
				res.Trusted, res.Limit = r.Horizon, i
			}
		case r.Departed && r.Horizon < res.Trusted:
			res.Trusted, res.Limit = r.Horizon, i
		}
	}
	for i, r := range res.Rungs {
		if own >= 0 && i != own {
			continue
		}
		for k, d := range r.Divergence {
			if a.times[r.Start+k] > res.Trusted {
				break
			}
			if d > res.MaxDivergence {
				res.MaxDivergence = d
			}
		}
	}
	res.Roundoff = roundoffFit(res.Rungs)
	res.Predict(s.Lambda)
	if s.Reverse {
		at := s.ReverseAt
		if at == 0 {
			at = res.Trusted
		}
		// Turn at the last grid time at or before it.
		k := sort.SearchFloat64s(a.times, at)
		if k == len(a.times) || a.times[k] > at {
			k--
		}
		if k > 0 {
			res.Reversal = a.reverse(ref, k)
		}
		progress(total)
	}
	return res, nil
}

func auditErr(field string, v any, why string) error {
	return fmt.Errorf("integrate: AuditSettings.%s = %v: %s: %w", field, v, why, ErrSettings)
}

// mergeTimes merges the grid with the restart times of the rungs. gridIdx[i]
// is the grid index of times[i], or -1 for a restart time off the grid.
func mergeTimes(grid []float64, rungs []Rung) (times []float64, gridIdx []int) {
	var rs []float64
	for _, r := range rungs {
		if r.Kind == KindRestart {
			rs = append(rs, r.RestartAt)
		}
	}
	sort.Float64s(rs)
	times = make([]float64, 0, len(grid)+len(rs))
	gridIdx = make([]int, 0, len(grid)+len(rs))
	i, j := 0, 0
	for i < len(grid) || j < len(rs) {
		switch {
		case j < len(rs) && i < len(grid) && rs[j] == grid[i]:
			j++ // on the grid: the grid point is taken next
		case j < len(rs) && (i == len(grid) || rs[j] < grid[i]):
			if len(times) == 0 || times[len(times)-1] != rs[j] {
				times = append(times, rs[j])
				gridIdx = append(gridIdx, -1)
			}
			j++
		default:
			times = append(times, grid[i])
			gridIdx = append(gridIdx, i)
			i++
		}
	}
	return times, gridIdx
}

// grid is t0 + i·dt while short of t1 by more than 1e-9·dt, then t1 (the
// grid of Settings.Every).
func grid(t0, t1, dt float64) []float64 {
	k := int(math.Ceil((t1-t0)/dt - 1e-9))
	g := make([]float64, k+1)
	for i := range k {
		g[i] = t0 + float64(float64(i)*dt)
	}
	g[k] = t1
	return g
}
