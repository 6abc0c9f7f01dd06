package integrate

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// AuditSettings controls Audit. A nil *AuditSettings is invalid (Tol has no
// default: it is the user's statement of what difference matters).
type AuditSettings struct {
	// Tol is the divergence the user accepts, in the units of the state
	// (or, with Relative, as a fraction of the reference run's spread).
	// Must be finite and > 0; otherwise ErrSettings.
	Tol float64
	// Relative makes Tol a fraction of the spread of the reference run (the
	// root-mean-square distance of its samples from their mean, see
	// AuditResult.Spread): the size of the attractor or orbit.
	Relative bool
	// Every is the spacing of the common time grid on which the runs are
	// compared. Zero means (t1 - t0)/1000. Must be finite and >= 0.
	Every float64
	// Periods gives, per state component, the period of an angle (0 for
	// the others); differences of periodic components are wrapped into
	// [-P/2, P/2]. Nil means no periodic component; otherwise its length
	// must equal the state's (ErrDimension).
	Periods []float64
	// Scales gives, per state component, the scale its difference is
	// divided by before the norm (after wrapping on periodic components),
	// so that components in different units compare; a zero scale leaves
	// the component out of the distance (it is not observed). Nil means
	// every component at scale 1. Otherwise its length must equal the
	// state's (ErrDimension), every entry must be finite and >= 0, and at
	// least one > 0 (ErrSettings). Spread, Magnitude, the tolerance with
	// Relative, Delta0 and the reversibility miss use the same distance.
	Scales []float64
	// Lambda is the largest Lyapunov exponent, for the predicted horizons
	// ln(tol/delta0)/Lambda. Zero means no predictions. Must be finite.
	Lambda float64
	// Reverse asks for the reversibility check: the reference state at
	// ReverseAt is integrated back to t0 and its distance from the start
	// reported.
	Reverse bool
	// ReverseAt is the turning time of the reversibility check; zero means
	// the trusted horizon (AuditResult.Trusted). The check turns at the last
	// grid time at or before it. Must lie in (t0, t1].
	ReverseAt float64
	// MaxSteps bounds every run's attempted steps; zero means
	// DefaultMaxSteps. Must be >= 0.
	MaxSteps int
	// Progress, if not nil, is called after each run (the reference first)
	// with the number of runs done and the total (rungs + 1, and one more
	// for the reversibility check). It must not block for long.
	Progress func(done, total int)
}

// GrowthKind names the law that fits a divergence curve best.
type GrowthKind int

const (
	// GrowthUnknown: too few points to fit (fewer than minFitPoints
	// positive divergences before saturation).
	GrowthUnknown GrowthKind = iota
	// GrowthExponential: log d is linear in t.
	GrowthExponential
	// GrowthPower: log d is linear in log(t - t_start) (polynomial growth).
	GrowthPower
	// GrowthBounded: the divergence does not grow: its envelope less than
	// doubles over the fitted range.
	GrowthBounded
)

// String returns "unknown", "exponential", "power law" or "bounded".
func (g GrowthKind) String() string {
	switch g {
	case GrowthExponential:
		return "exponential"
	case GrowthPower:
		return "power law"
	case GrowthBounded:
		return "bounded"
	}
	return "unknown"
}

// Growth is the fit of a divergence curve d(t) in its growth range: the grid
// points after the rung's start with 0 < d, up to the first one with d above
// a tenth of the reference's spread (beyond it the divergence saturates at
// the attractor's size). Two laws are fitted by least squares on log d,
//
//	exponential:  log d = a + Rate·t
//	power law:    log d = b + Power·log(t - t_start)
//
// and the one with the smaller residual sum of squares is chosen (both have
// two parameters). On a chaotic system Rate estimates the largest Lyapunov
// exponent; a finite-time value that scatters around it by the local growth
// fluctuations (Boffetta et al. 2002, Sect. 3).
type Growth struct {
	Kind             GrowthKind
	Rate, RateErr    float64 // exponential rate and its standard error (1/time)
	Power, PowerErr  float64 // power-law exponent and its standard error
	RSSExp, RSSPower float64 // residual sums of squares of the two fits
	From, To         float64 // the times of the first and last fitted points
	Points           int     // number of fitted points
}

// RungResult is one rung's comparison with the reference.
type RungResult struct {
	// Rung is the rung with its defaults filled in (Name, Method,
	// tolerances, Step).
	Rung Rung
	// Method is the name of the method run (with its rounding).
	Method string
	// Start is the index in AuditResult.Times of Divergence[0]; it is 0
	// except for restart rungs.
	Start int
	// Divergence[i] is the distance from the reference at Times[Start+i]
	// (wrapped on periodic components). A failed run's curve ends where it
	// failed.
	Divergence []float64
	// Horizon is the agreement horizon: the first time the divergence
	// exceeds the tolerance. The grid brackets it; it is then located on
	// the continuous solutions, independent of the grid's spacing: the run
	// is repeated (the same steps, bit for bit) over the bracket and up to
	// maxScanIntervals grid intervals before it (back to where the
	// divergence was below tol/1000), its distance from the reference is
	// checked at each of its step boundaries there, and the first crossing
	// is bisected to a relative 1e-9 of the time. The run's side is its own
	// continuous extension (Solution.At's); the reference's side is the
	// reference run's continuous extension, or for Ladder.Exact the exact
	// states at the run's step boundaries (each step divided in eight) joined
	// by cubic Hermite interpolation with the field's derivatives. A run
	// that cannot be repeated over the window, or a method without a
	// continuous extension, keeps the log-linear interpolation between grid
	// points. When the divergence never exceeds the tolerance, Horizon is
	// the last time compared (t1, or where a failed run stopped) and
	// Departed is false.
	Horizon  float64
	Departed bool
	// Delta0 is the a-priori size of the rung's perturbation: the exact
	// rounding at a restart; half a unit of the emulated precision times the
	// reference's root-mean-square magnitude for precision rungs;
	// RelTol·magnitude + AbsTol for error-controlled methods; 0 (unknown)
	// for fixed-step methods.
	Delta0 float64
	// Predicted is the horizon predicted from the largest Lyapunov exponent
	// (see AuditResult.Predict), or 0 when there is no prediction (no
	// exponent, or Delta0 unknown).
	Predicted float64
	// Growth is the fitted growth law of the divergence.
	Growth Growth
	// Stats are the run's work counts.
	Stats Stats
	// Err is why the run failed, or nil; it wraps the solver's error.
	Err error
}

// Reversal is the reversibility check: the reference state at T integrated
// back to t0, and how far it lands from the start.
type Reversal struct {
	T float64 // turning time
	// Miss is the distance from the start after the return (wrapped on
	// periodic components); +Inf when the return failed.
	Miss float64
	// Reached is the time the backward run reached (t0 when it completed).
	Reached float64
	Stats   Stats
	// Err is why the backward run failed, or nil.
	Err error
}

// RoundoffFit extrapolates the precision rungs to float64 itself: the
// agreement horizons of the BinaryBits rungs that departed are fitted by a
// line in the number of bits p, horizon = a + Slope·p, and evaluated at
// p = 53. The slope predicted by the largest exponent is ln 2/lambda: each
// bit halves the initial error, which the flow doubles back in ln 2/lambda
// time units.
type RoundoffFit struct {
	Slope          float64 // fitted time units per bit
	PredictedSlope float64 // ln 2/lambda, 0 without an exponent (see Predict)
	Float64Horizon float64 // a + Slope·53
	Points         int     // number of precision rungs in the fit
}

// AuditResult is the outcome of Audit.
type AuditResult struct {
	T0, T1 float64
	// Times is the common grid on which the runs are compared.
	Times []float64
	// Reference is the reference run's rung, method and work counts (its
	// Divergence is empty, unless Ladder.Exact is set: then it is the
	// reference run's divergence from the exact trajectory).
	Reference RungResult
	// Rungs are the compared runs in the ladder's order.
	Rungs []RungResult
	// Spread is the root-mean-square distance of the reference samples
	// from their mean (circular mean on periodic components): the size of
	// the attractor or orbit. Magnitude is the root-mean-square norm of the
	// reference samples. Both are in the audit's distance (observed
	// components divided by their scales, AuditSettings.Scales).
	Spread, Magnitude float64
	// Tol is the absolute divergence tolerance used (Tol·Spread with
	// Relative).
	Tol float64
	// Trusted is the earliest agreement horizon over the rungs that
	// departed (a failed run counts only if it departed before failing),
	// or T1 if none did. Limit is the index in Rungs of the rung that set
	// it, -1 if none departed. With a KindRun rung (the caller's own run)
	// Trusted is that rung's horizon (where it departed, or stopped) and
	// MaxDivergence its largest divergence up to there.
	Trusted float64
	Limit   int
	// MaxDivergence is the largest divergence of any rung on [T0, Trusted].
	MaxDivergence float64
	// Failed counts the rungs whose run failed.
	Failed int
	// Reversal is the reversibility check, nil unless requested.
	Reversal *Reversal
	// Roundoff is the extrapolation of the precision rungs to float64, nil
	// when fewer than two of them departed.
	Roundoff *RoundoffFit
}

// maxGrid bounds the comparison grid: every rung keeps a curve on it and
// every run samples its states there.
const maxGrid = 1_000_000

// Fit parameters of the growth range.
const (
	// minFitPoints is the least number of points for a two-parameter fit
	// with a meaningful residual comparison (common practice).
	minFitPoints = 8
	// saturationFraction: the growth range ends where the divergence
	// reaches this fraction of the spread; beyond it the distance saturates
	// at the attractor's size (common practice).
	saturationFraction = 0.1
)

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
	res.Spread, res.Magnitude = a.spread()
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

// refAt returns the reference state at a sampled time t (a grid or restart
// time), or nil.
func (a *auditor) refAt(t float64) []float64 {
	k := sort.SearchFloat64s(a.refT, t)
	if k < len(a.refT) && a.refT[k] == t {
		return a.refS[k]
	}
	return nil
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

type auditor struct {
	ctx     context.Context
	p       Problem
	t1      float64
	n       int
	s       *AuditSettings
	periods []float64
	scales  []float64 // AuditSettings.Scales: nil, or per component (0: not observed)
	times   []float64
	// The reference run: its sample times (grid and restart times), the
	// states there, the states on the grid alone, and its work counts.
	refT     []float64
	refS     [][]float64
	refY     [][]float64
	refStats Stats
	tol      float64
	ceil     float64
	// lastRun repeats the last rung run (for the refinement of horizons).
	lastRun *rerun
}

func (a *auditor) settings(r resolvedRung, times []float64, drop bool) *Settings {
	ms := r.MaxSteps
	if ms == 0 {
		ms = a.s.MaxSteps
	}
	return &Settings{RelTol: r.RelTol, AbsTol: r.AbsTol, Times: times, DropSteps: drop, MaxSteps: ms, StiffCheck: -1}
}

// dist is the Euclidean distance of a and b with periodic components
// wrapped into [-P/2, P/2], over the observed components, each difference
// divided by its scale (AuditSettings.Scales).
func (a *auditor) dist(x, y []float64) float64 {
	var s float64
	for i := range x {
		if a.scales != nil && a.scales[i] == 0 {
			continue
		}
		d := x[i] - y[i]
		if a.periods != nil && a.periods[i] > 0 {
			d = math.Remainder(d, a.periods[i])
		}
		if a.scales != nil {
			d /= a.scales[i]
		}
		s += float64(d * d)
	}
	return math.Sqrt(s)
}

// spread returns the root-mean-square distance of the reference samples from
// their mean (circular mean for periodic components) and their
// root-mean-square norm, in the audit's distance (observed components,
// divided by their scales).
func (a *auditor) spread() (spread, mag float64) {
	smp := a.refY
	m := float64(len(smp))
	for i := 0; i < a.n; i++ {
		P, sc := 0.0, 1.0
		if a.periods != nil {
			P = a.periods[i]
		}
		if a.scales != nil {
			if sc = a.scales[i]; sc == 0 {
				continue
			}
		}
		var mean, c, sn float64
		for _, v := range smp {
			x := v[i]
			xs := x / sc
			mag += float64(xs * xs)
			if P > 0 {
				sn0, c0 := detmath.Sincos(2 * math.Pi * x / P)
				sn += sn0
				c += c0
			} else {
				mean += x
			}
		}
		if P > 0 {
			mean = detmath.Atan2(sn, c) * P / (2 * math.Pi)
		} else {
			mean /= m
		}
		for _, v := range smp {
			d := v[i] - mean
			if P > 0 {
				d = math.Remainder(d, P)
			}
			d /= sc
			spread += float64(d * d)
		}
	}
	return math.Sqrt(spread / m), math.Sqrt(mag / m)
}

// run solves one rung and compares it with the reference.
func (a *auditor) run(r resolvedRung, mag float64) RungResult {
	out := RungResult{Rung: r.Rung, Method: r.m.Name()}
	p := a.p
	start := 0
	tStart := p.T0
	switch r.Kind {
	case KindRestart:
		y := a.refAt(r.RestartAt)
		if y == nil {
			panic(fmt.Sprintf("integrate: audit reference not sampled at restart time %g", r.RestartAt))
		}
		ry := r.Restart.Vec(nil, y)
		out.Delta0 = a.dist(ry, y)
		p.T0, p.Y0 = r.RestartAt, ry
		tStart = r.RestartAt
		for start < len(a.times) && a.times[start] < r.RestartAt {
			start++
		}
	case KindPrecision:
		p.Y0 = r.Rounding.Vec(nil, p.Y0)
		out.Delta0 = r.Rounding.unit(mag)
		if r.Rounding.Kind == DecimalPlaces {
			out.Delta0 *= absWeight(a.scales) // absolute per component
		}
	default:
		if r.Fixed == nil {
			out.Delta0 = float64(r.RelTol*mag) + float64(r.AbsTol*absWeight(a.scales))
		}
	}
	out.Start = start
	a.lastRun = &rerun{p: p, r: r}
	sol, err := Solve(a.ctx, p, a.t1, r.m, a.settings(r, a.times[start:], true))
	out.Err = err
	if sol == nil {
		out.Horizon = tStart
		return out
	}
	out.Stats = sol.Stats
	out.Divergence = make([]float64, len(sol.Samples))
	for k, smp := range sol.Samples {
		out.Divergence[k] = a.dist(smp.Y, a.refY[start+k])
	}
	out.Horizon, out.Departed = a.horizon(out.Divergence, start, tStart)
	if !out.Departed && err != nil {
		out.Horizon = sol.End
	}
	out.Growth = fitGrowth(a.times[start:start+len(out.Divergence)], out.Divergence, tStart, a.ceil)
	return out
}

// Predict sets the predicted horizons of the rungs and the predicted slope of
// the roundoff fit from the largest Lyapunov exponent lambda,
//
//	t_start + ln(tol/delta0)/lambda   (Boffetta et al. 2002, Sect. 2.1),
//
// with t_start the rung's start (the restart time for restart rungs) and
// delta0 its a-priori perturbation (RungResult.Delta0); a delta0 at or above
// the tolerance predicts t_start. A lambda <= 0 (or not finite) clears the
// predictions: without exponential growth the formula says nothing. Audit
// calls it with AuditSettings.Lambda; callers that estimate the exponent
// after the audit call it themselves.
func (res *AuditResult) Predict(lambda float64) {
	ok := lambda > 0 && !math.IsInf(lambda, 0)
	for i := range res.Rungs {
		r := &res.Rungs[i]
		r.Predicted = 0
		if !ok || !(r.Delta0 > 0) {
			continue
		}
		t0 := res.T0
		if r.Rung.Kind == KindRestart {
			t0 = r.Rung.RestartAt
		}
		r.Predicted = t0
		if r.Delta0 < res.Tol {
			r.Predicted = t0 + detmath.Log(res.Tol/r.Delta0)/lambda
		}
	}
	if res.Roundoff != nil {
		res.Roundoff.PredictedSlope = 0
		if ok {
			res.Roundoff.PredictedSlope = math.Ln2 / lambda
		}
	}
}

// horizon returns the first time d exceeds the tolerance (log-linear
// interpolation between grid points) and true, or the last grid time and
// false.
func (a *auditor) horizon(d []float64, start int, tStart float64) (float64, bool) {
	for k, v := range d {
		if v <= a.tol {
			continue
		}
		tk := a.times[start+k]
		if k == 0 {
			return math.Max(tStart, tk), true
		}
		tp, dp := a.times[start+k-1], d[k-1]
		if dp <= 0 {
			return tk, true
		}
		return tp + (tk-tp)*detmath.Log(a.tol/dp)/detmath.Log(v/dp), true
	}
	if len(d) == 0 {
		return tStart, false
	}
	return a.times[start+len(d)-1], false
}

// fitGrowth picks the growth range of d(t) and fits the exponential and
// power laws to its envelope there (FitGrowth).
func fitGrowth(t, d []float64, tStart, ceil float64) Growth {
	var x, ly []float64
	// The envelope (running maximum) removes the orbit-scale oscillation of
	// the distance. Its first plateau is skipped: a perturbation's stable
	// part decays before the unstable part regrows past the start level.
	env, env0 := 0.0, 0.0
	rising := false
	for k := range d {
		env = math.Max(env, d[k])
		if t[k] <= tStart || env <= 0 {
			continue
		}
		if env0 == 0 {
			env0 = env
		}
		if !rising && k+1 < len(d) && math.Max(env, d[k+1]) <= env0 {
			continue
		}
		rising = true
		x = append(x, t[k])
		ly = append(ly, detmath.Log(env))
		if env >= ceil {
			break
		}
	}
	if len(x) < minFitPoints {
		return Growth{Points: len(x)}
	}
	return FitGrowth(x, ly, tStart)
}

// FitGrowth fits the two laws of Growth by ordinary least squares to the
// points (t[k], logEnv[k]), logEnv being the log of a divergence envelope
// and tStart the start of the divergence (every t[k] > tStart):
//
//	exponential:  logEnv = a + Rate·t
//	power law:    logEnv = b + Power·log(t - tStart)
//
// and names the law: GrowthBounded when logEnv rises by less than ln 2 from
// the first point to the last (less than a doubling), else the law with the
// smaller residual sum of squares if its slope is positive, else
// GrowthExponential. The caller picks the points (the growth range) and the
// fewest it accepts; Audit takes eight. Fewer than three points, or fewer
// values of logEnv than of t, give GrowthUnknown with Points set and no fit.
//
// Cost: O(len(t)), one allocation.
//
// References:
//
//	G. Boffetta, M. Cencini, M. Falcioni, A. Vulpiani, Predictability: a way
//	  to characterize complexity, Phys. Rep. 356 (2002) 367–474, Sect. 3
//	  (the growth rate of a perturbation as a finite-time Lyapunov exponent).
func FitGrowth(t, logEnv []float64, tStart float64) Growth {
	g := Growth{Points: len(t)}
	if len(t) < 3 || len(logEnv) < len(t) {
		return g
	}
	ly := logEnv[:len(t)]
	lx := make([]float64, len(t))
	for k, tk := range t {
		lx[k] = detmath.Log(tk - tStart)
	}
	g.From, g.To = t[0], t[len(t)-1]
	g.Rate, g.RateErr, g.RSSExp = lineFit(t, ly)
	g.Power, g.PowerErr, g.RSSPower = lineFit(lx, ly)
	switch {
	case ly[len(ly)-1]-ly[0] < math.Ln2:
		// Less than a doubling over the whole range.
		g.Kind = GrowthBounded
	case g.RSSExp < g.RSSPower && g.Rate > 0:
		g.Kind = GrowthExponential
	case g.Power > 0:
		g.Kind = GrowthPower
	default:
		g.Kind = GrowthExponential
	}
	return g
}

// lineFit is the ordinary least-squares line y = a + b·x: it returns the
// slope b, its standard error and the residual sum of squares.
func lineFit(x, y []float64) (b, se, rss float64) {
	n := float64(len(x))
	var mx, my float64
	for i := range x {
		mx += x[i]
		my += y[i]
	}
	mx /= n
	my /= n
	var sxx, sxy float64
	for i := range x {
		dx := x[i] - mx
		sxx += float64(dx * dx)
		sxy += float64(dx * (y[i] - my))
	}
	if sxx == 0 {
		return 0, math.Inf(1), 0
	}
	b = sxy / sxx
	a0 := my - float64(b*mx)
	for i := range x {
		r := y[i] - (a0 + float64(b*x[i]))
		rss += float64(r * r)
	}
	if len(x) > 2 {
		se = math.Sqrt(rss / (n - 2) / sxx)
	}
	return b, se, rss
}

// roundoffFit fits the horizons of the departed BinaryBits precision rungs
// against their bits.
func roundoffFit(rs []RungResult) *RoundoffFit {
	var x, y []float64
	for _, r := range rs {
		if r.Rung.Kind == KindPrecision && r.Rung.Rounding.Kind == BinaryBits && r.Departed && r.Err == nil {
			x = append(x, float64(r.Rung.Rounding.N))
			y = append(y, r.Horizon)
		}
	}
	if len(x) < 2 {
		return nil
	}
	b, _, _ := lineFit(x, y)
	if math.IsInf(b, 0) || math.IsNaN(b) {
		return nil
	}
	var mx, my float64
	for i := range x {
		mx += x[i]
		my += y[i]
	}
	mx /= float64(len(x))
	my /= float64(len(x))
	return &RoundoffFit{Slope: b, Float64Horizon: my + float64(b*(53-mx)), Points: len(x)}
}

// reverse integrates the reference state at grid point k back to t0 with
// the reference's method and tolerances.
func (a *auditor) reverse(ref resolvedRung, k int) *Reversal {
	T := a.times[k]
	rv := &Reversal{T: T, Miss: math.Inf(1)}
	bp := Problem{F: a.p.F, Jac: a.p.Jac, T0: T, Y0: a.refY[k], Split: a.p.Split}
	s := a.settings(ref, nil, true)
	// The way back may explode (a dissipative flow expands volumes in
	// reverse); bound it by twice the forward work to T.
	fwd := float64(a.refStats.Accepted) * (T - a.p.T0) / (a.t1 - a.p.T0)
	if budget := 2*int(fwd) + 1000; s.MaxSteps == 0 || s.MaxSteps > budget {
		s.MaxSteps = budget
	}
	sol, err := Solve(a.ctx, bp, a.p.T0, ref.m, s)
	rv.Reached = T
	if sol != nil {
		rv.Stats = sol.Stats
		rv.Reached = sol.End
	}
	if err != nil {
		rv.Err = err
		return rv
	}
	rv.Miss = a.dist(sol.Final, a.p.Y0)
	return rv
}

// exact replaces the reference samples by the states of an exact
// trajectory at the same times, and sets the reference run's divergence
// from it on the grid.
func (a *auditor) exact(tr Trajectory, refSol *Solution, gridIdx []int, rr *RungResult) error {
	ys, err := tr(a.ctx, a.refT)
	if err != nil {
		return fmt.Errorf("exact trajectory: %w", err)
	}
	if len(ys) != len(a.refT) {
		return fmt.Errorf("exact trajectory gave %d states for %d times: %w", len(ys), len(a.refT), ErrDimension)
	}
	rr.Divergence = make([]float64, 0, len(a.times))
	for i, y := range ys {
		if len(y) != a.n {
			return fmt.Errorf("exact trajectory state %d has length %d, want %d: %w", i, len(y), a.n, ErrDimension)
		}
		for _, v := range y {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("exact trajectory state %d at t=%g: %w", i, a.refT[i], ErrNonFinite)
			}
		}
		if g := gridIdx[i]; g >= 0 {
			rr.Divergence = append(rr.Divergence, a.dist(refSol.Samples[i].Y, y))
			a.refY[g] = y
		}
		a.refS[i] = y
	}
	return nil
}
