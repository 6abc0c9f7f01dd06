package plumb

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"strings"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/detmath"
	"github.com/plumbdyn/plumb/internal/runio"
)

// maxRunsGrid bounds the comparison grid of TrustRuns (every run is held on
// it, one run at a time besides the reference).
const maxRunsGrid = 20_000_000

// TrustRuns audits runs computed by any program: each run is compared with
// the one marked Reference on a common grid of times, and the report says,
// as TrustProblem does for the built-in ladder, per run the divergence curve, the
// agreement horizon (the first time the divergence exceeds the tolerance,
// located between grid times by log-linear interpolation) and the growth
// law fitted to the curve (integrate.FitDivergence); up to which time every
// run agrees, which effect limits that time, the verdict, and the caution.
//
// The compared span is the intersection of the runs' spans (a restart run
// may begin later: its curve starts at its first time), cut at
// RecordedSettings.Horizon; nothing is extrapolated, and the report says so
// (Report.Recorded). Runs not written at the grid's times are interpolated
// (runio.Resample: piecewise cubic Hermite with Bessel's slopes); the
// interpolation error adds to the measured divergence, so runs are best
// written at the reference's times.
//
// With no model to differentiate, the largest Lyapunov exponent is the
// growth rate fitted to the divergence curves that grow exponentially
// (those of the nudged-start and restart runs where there are any, else
// all), their inverse-variance weighted mean, with the larger of its
// standard error and the runs' scatter; Exponent.Source is then "runs", and
// the report says that it is an estimate from the runs. Predicted horizons
// ln(tol/delta0)/lambda stand beside runs whose perturbation size is known
// (RecordedRun.Delta0, or the measured first divergence of start and
// restart runs).
//
// Errors, before any work and with a nil Report: a nil settings or a bad
// tolerance (ErrTolerance), a bad Horizon (ErrHorizon: also one past the
// common span), a bad Every or Lambda (integrate.ErrSettings), a bad
// Distance (*DistanceError), and unusable runs (*RunsError wrapping
// ErrRuns, naming the run): no reference or two, no other run, fewer than
// two rows, non-finite or unordered values, a compared column missing,
// spans that do not overlap. A canceled context returns the runs compared
// so far in a Report with verdict Incomplete, with the error.
//
// # Caution
//
// A trust horizon is a numerical statement about a model, not a safety
// certificate for the real system; and runs that share a bug agree with
// each other: safety-critical use follows the field's own codes and
// licensed review.
//
// References:
//
//	G. Boffetta, M. Cencini, M. Falcioni, A. Vulpiani, Predictability: a way
//	  to characterize complexity, Phys. Rep. 356 (2002) 367–474 (growth of
//	  a perturbation at the largest exponent; the horizon
//	  ln(tol/delta0)/lambda_1).
func TrustRuns(ctx context.Context, runs []RecordedRun, settings *RecordedSettings) (*Report, error) {
	if ctx == nil {
		ctx = context.Background()
	}
	if settings == nil {
		return nil, fmt.Errorf("plumb: RecordedSettings is nil (Tol is required): %w", ErrTolerance)
	}
	s := *settings
	if err := checkTolLambda("RecordedSettings", s.Tol, s.Lambda); err != nil {
		return nil, err
	}
	if !(s.Horizon >= 0) || math.IsInf(s.Horizon, 0) {
		return nil, fmt.Errorf("plumb: RecordedSettings.Horizon = %v: must be >= 0 and finite: %w", s.Horizon, ErrHorizon)
	}
	if !(s.Every >= 0) || math.IsInf(s.Every, 0) {
		return nil, fmt.Errorf("plumb: RecordedSettings.Every = %v: must be >= 0 and finite: %w", s.Every, integrate.ErrSettings)
	}
	ri, err := checkRuns(runs)
	if err != nil {
		return nil, err
	}
	ref := &runs[ri]
	cols := s.Distance.Observe
	if len(cols) == 0 {
		cols = ref.Names
	}
	scales, err := s.Distance.PerComponent(cols)
	if err != nil {
		return nil, err
	}
	periods, err := columnPeriods(cols, s.Periods)
	if err != nil {
		return nil, err
	}
	for i := range runs {
		r := &runs[i]
		if r.Failure != nil {
			continue
		}
		for _, c := range cols {
			if indexOf(r.Names, c) < 0 {
				return nil, &RunsError{Index: i, Label: r.Label, Source: r.Source,
					Why: fmt.Sprintf("column %q is missing (the run has: %s)", c, joinNames(r.Names))}
			}
		}
	}
	from, to, err := commonSpan(runs, ri)
	if err != nil {
		return nil, err
	}
	if s.Horizon > 0 {
		if end := from + s.Horizon; end > to {
			return nil, fmt.Errorf("plumb: RecordedSettings.Horizon = %v reaches t = %v, past the end %v of the span [%v, %v] common to the runs (nothing is extrapolated): %w",
				s.Horizon, end, to, from, to, ErrHorizon)
		} else {
			to = end
		}
	}
	g, err := runsGrid(ref, from, to, s.Every)
	if err != nil {
		return nil, err
	}
	from, to = g[0], g[len(g)-1]

	rep := &Report{
		T0: from, Horizon: to - from, Tol: s.Tol, Relative: s.Relative, Times: g,
		Caution: Caution, Arch: runtime.GOARCH, Version: buildVersion(),
		Distance: newDistanceReport(cols, scales, periods),
		Recorded: &RecordedReport{
			From: from, To: to,
			SpanNote: fmt.Sprintf("the runs are compared on t = %.6g .. %.6g, inside every run's span (a restart run from its first time); nothing is extrapolated", from, to),
			Grid:     "reference", Every: s.Every,
			Interpolant: "runs not written at the grid's times: piecewise cubic Hermite interpolation with Bessel's slopes (gonum interp.PiecewiseCubic)",
		},
	}
	if s.Every > 0 {
		rep.Recorded.Grid = "every"
	}
	rc := rep.Recorded
	a := &runsAuditor{cols: cols, periods: periods, scales: scales, times: g}
	refY, interp, err := a.resample(ref, ri, 0)
	if err != nil {
		return nil, err
	}
	a.refY = refY
	rc.Runs = append(rc.Runs, recordedRunReport(ref, interp))
	var reach float64
	rep.Spread, reach = a.spread()
	rep.TolAbs = s.Tol
	if s.Relative {
		rep.TolAbs = s.Tol * rep.Spread
		if !(rep.TolAbs > 0) {
			return nil, &RunsError{Index: ri, Label: ref.Label, Source: ref.Source, Why: "the reference run has zero spread, so a relative tolerance is zero; give the tolerance in the runs' units"}
		}
	}
	if rep.TolAbs > 2*reach {
		rc.ToleranceNote = fmt.Sprintf("the tolerance %.4g exceeds %.4g, twice the reference's largest distance from its mean: runs that stay where it went cannot part by the tolerance, so their agreement says little", rep.TolAbs, 2*reach)
	}
	rep.Reference = RungReport{Name: ref.Label, ID: TightestID, Effect: integrate.KindReference, AgreesUntil: to, Growth: integrate.GrowthUndetermined, Divergence: []float64{}}

	var ids []*string
	total := len(runs)
	progress := func(done int) {
		if s.Progress != nil {
			s.Progress("audit", done, total)
		}
	}
	progress(1)
	var effects []RunEffect
	var fits []integrate.Growth // the rungs' growth fits
	for i := range runs {
		if i == ri {
			continue
		}
		if err := ctx.Err(); err != nil {
			rep.finishRuns(effects, fits, s.Lambda)
			rep.Verdict = Incomplete
			return rep, fmt.Errorf("plumb: runs: canceled before run %d (%s): %w", i+1, runs[i].Label, err)
		}
		r := &runs[i]
		rr, rd, fit, err := a.compare(r, i, rep.TolAbs, rep.Spread)
		if err != nil {
			return nil, err
		}
		rep.Rungs = append(rep.Rungs, rr)
		rc.Runs = append(rc.Runs, rd)
		effects = append(effects, r.Effect)
		fits = append(fits, fit)
		if rr.Error != "" {
			rep.Failed++
		}
		progress(len(rep.Rungs) + 1)
	}
	for i := range rep.Rungs {
		ids = append(ids, &rep.Rungs[i].ID)
	}
	uniqueIDs(ids, TightestID)
	rep.finishRuns(effects, fits, s.Lambda)
	return rep, nil
}

// finishRuns draws the conclusions of an audit of recorded runs from its
// rungs: the trusted horizon and its limit, the verdict, the growth vote,
// the exponent (given, or fitted to the rungs) and the predictions.
func (rep *Report) finishRuns(effects []RunEffect, fits []integrate.Growth, lambda float64) {
	end := rep.T0 + rep.Horizon
	rep.TrustedUntil = end
	for _, r := range rep.Rungs {
		if r.Departed && r.AgreesUntil < rep.TrustedUntil {
			rep.TrustedUntil, rep.LimitedBy, rep.LimitingRung = r.AgreesUntil, r.Effect, r.Name
		}
	}
	var maxDiv float64
	for _, r := range rep.Rungs {
		for k, d := range r.Divergence {
			if rep.Times[r.Start+k] > rep.TrustedUntil {
				break
			}
			maxDiv = math.Max(maxDiv, d)
		}
	}
	if rep.TolAbs > 0 {
		rep.TolUsed = maxDiv / rep.TolAbs
	}
	rep.Verdict = verdictOf(len(rep.Rungs), rep.Failed, rep.TrustedUntil < end, rep.TolUsed)
	var vote growthVote
	for _, r := range rep.Rungs {
		vote.add(r.Growth)
	}
	rep.Growth = vote.law()
	rc := rep.Recorded
	if lambda > 0 {
		rep.Exponent = givenExponent(lambda)
	} else {
		var why string
		var nudged bool
		rep.Exponent, rc.ExponentFrom, nudged, why = runsExponent(rep.Times, rep.Rungs, effects, fits)
		if rep.Exponent != nil {
			rc.ExponentNote = "an estimate from the runs: the growth rate fitted to the divergence of " + joinNames(rc.ExponentFrom) +
				", not a tangent-space computation on the model"
			if !nudged {
				rc.ExponentNote += " (no nudged-start or restart run grows exponentially: runs that keep adding error as they go, as at another tolerance, tend to grow slower than the exponent; add a run from a nudged start)"
			}
			lambda = math.Max(rep.Exponent.Value, 0)
		} else {
			rep.ExponentError = why
		}
	}
	for i := range rep.Rungs {
		r := &rep.Rungs[i]
		r.Predicted = 0
		if rep.Growth == "exponential" && lambda > 0 && r.Delta0 > 0 && r.Delta0 < rep.TolAbs {
			r.Predicted = rep.Times[r.Start] + detmath.Log(rep.TolAbs/r.Delta0)/lambda
			if rep.PredictedHorizon == 0 || r.Predicted < rep.PredictedHorizon {
				rep.PredictedHorizon = r.Predicted
			}
		}
	}
}

// runsExponent is the largest Lyapunov exponent fitted to the rungs'
// divergence curves: the inverse-variance weighted mean of the rates of the
// rungs that grow exponentially (of the start and restart runs among them
// where there are any), each rate's standard error widened for the serial
// correlation of its fit's residuals (serialRateErr on fits, the rungs'
// growth fits on times), with the
// larger of the mean's standard error and that of the rates' scatter; from
// names the rungs used, nudged whether they are start or restart runs, why
// says why there is none.
func runsExponent(times []float64, rungs []RungReport, effects []RunEffect, fits []integrate.Growth) (e *ExponentEstimate, from []string, nudged bool, why string) {
	var pick []int
	for pass := range 2 {
		nudged = pass == 0
		for i, r := range rungs {
			if r.Error != "" || r.Growth != integrate.GrowthExponential || !(r.Rate > 0) {
				continue
			}
			if pass == 0 && effects[i] != VariesStart && effects[i] != VariesRestart {
				continue
			}
			pick = append(pick, i)
		}
		if len(pick) > 0 {
			break
		}
	}
	if len(pick) == 0 {
		return nil, nil, false, "no run's divergence grows exponentially, so no growth rate estimates the exponent"
	}
	var sw, swr, mean float64
	weighted := true
	for _, i := range pick {
		r := rungs[i]
		from = append(from, r.Name)
		mean += r.Rate
		se := serialRateErr(times[r.Start:], r.Divergence, fits[i])
		if !(se > 0) || math.IsInf(se, 0) {
			weighted = false
			continue
		}
		w := 1 / float64(se*se)
		sw += w
		swr += float64(w * r.Rate)
	}
	n := float64(len(pick))
	mean /= n
	e = &ExponentEstimate{Value: mean, Source: exponentFromRuns}
	if weighted && sw > 0 {
		e.Value = swr / sw
		e.StdErr = math.Sqrt(1 / sw)
	}
	if len(pick) > 1 {
		var ss float64
		for _, i := range pick {
			d := rungs[i].Rate - mean
			ss += float64(d * d)
		}
		e.StdErr = math.Max(e.StdErr, math.Sqrt(ss/(n-1)/n))
	}
	if e.Value > 0 {
		e.LyapunovTime = clean(1 / e.Value)
	}
	return e, from, nudged, ""
}

// recordedRunReport describes run r in the report.
func recordedRunReport(r *RecordedRun, interpolated bool) RecordedRunReport {
	out := RecordedRunReport{Label: r.Label, Source: r.Source, Effect: r.Effect, Interpolated: interpolated, Failure: r.Failure}
	if r.Reference {
		out.Effect = "reference"
	}
	if r.Failure == nil && len(r.T) > 0 {
		out.Rows, out.From, out.To = len(r.T), r.T[0], r.T[len(r.T)-1]
	}
	return out
}

// runsAuditor holds the reference on the grid and compares runs with it.
type runsAuditor struct {
	cols            []string
	periods, scales []float64
	times           []float64
	refY            []float64 // the reference on times, flat
}

// resample puts run r (the i-th) on the grid from index start.
func (a *runsAuditor) resample(r *RecordedRun, i, start int) (y []float64, interpolated bool, err error) {
	rr := &runio.Run{Source: r.Label, Names: r.Names, T: r.T, Y: r.Y}
	c, err := runio.Resample([]*runio.Run{rr}, a.cols, runio.Grid{Times: a.times[start:]})
	if err != nil {
		return nil, false, &RunsError{Index: i, Label: r.Label, Source: r.Source, Why: "cannot be put on the comparison grid", Err: err}
	}
	return c.Y[0], c.Interpolated[0], nil
}

// compare compares run r (the i-th) with the reference.
func (a *runsAuditor) compare(r *RecordedRun, i int, tol, spread float64) (RungReport, RecordedRunReport, integrate.Growth, error) {
	out := RungReport{Name: r.Label, ID: labelID(r.Label), Effect: integrate.RungKind(r.Effect), Delta0: r.Delta0,
		Growth: integrate.GrowthUndetermined, AgreesUntil: a.times[0], Divergence: []float64{}}
	if r.Failure != nil {
		out.Error = r.Failure.Why
		return out, recordedRunReport(r, false), integrate.Growth{}, nil
	}
	start := 0
	if r.Effect == VariesRestart {
		for start < len(a.times) && a.times[start] < r.T[0] {
			start++
		}
	}
	if len(a.times)-start < 2 {
		return out, RecordedRunReport{}, integrate.Growth{}, &RunsError{Index: i, Label: r.Label, Source: r.Source,
			Why: fmt.Sprintf("begins at t = %v, with fewer than two comparison times left before %v", r.T[0], a.times[len(a.times)-1])}
	}
	y, interp, err := a.resample(r, i, start)
	if err != nil {
		return out, RecordedRunReport{}, integrate.Growth{}, err
	}
	rd := recordedRunReport(r, interp)
	nc := len(a.cols)
	d := make([]float64, len(a.times)-start)
	same := !interp
	for k := range d {
		x := a.refY[(start+k)*nc : (start+k+1)*nc]
		v := y[k*nc : (k+1)*nc]
		d[k] = a.dist(x, v)
		if same {
			for j := range x {
				if math.Float64bits(x[j]) != math.Float64bits(v[j]) {
					same = false
					break
				}
			}
		}
	}
	rd.SameAsReference = same
	out.Start = start
	ts := a.times[start:]
	if r.Effect == VariesRestart {
		out.RestartAt = ts[0]
	}
	out.AgreesUntil, out.Departed = horizonOn(ts, d, tol)
	g := integrate.FitDivergence(ts, d, ts[0], spread)
	out.Growth = g.Kind
	out.Rate, out.RateErr, out.Power, out.PowerErr = clean(g.Rate), clean(g.RateErr), clean(g.Power), clean(g.PowerErr)
	if out.Delta0 == 0 && (r.Effect == VariesStart || r.Effect == VariesRestart) && d[0] > 0 {
		out.Delta0 = d[0]
	}
	out.Divergence = d
	return out, rd, g, nil
}

// horizonOn is the first time the divergence d on times ts exceeds tol,
// log-linear between grid times (as integrate.Audit brackets it before
// refining); the last time and false when it never does.
func horizonOn(ts, d []float64, tol float64) (float64, bool) {
	for k, v := range d {
		if v <= tol {
			continue
		}
		if k == 0 {
			return ts[0], true
		}
		tp, dp := ts[k-1], d[k-1]
		if dp <= 0 {
			return ts[k], true
		}
		return tp + float64((ts[k]-tp)*detmath.Log(tol/dp))/detmath.Log(v/dp), true
	}
	return ts[len(d)-1], false
}

// dist is the distance of two states over the compared columns: angle
// differences wrapped into [-P/2, P/2], each divided by its scale.
func (a *runsAuditor) dist(x, y []float64) float64 {
	var s float64
	for j := range x {
		sc := 1.0
		if a.scales != nil {
			if sc = a.scales[j]; sc == 0 {
				continue
			}
		}
		d := x[j] - y[j]
		if p := a.periods[j]; p > 0 {
			d = math.Remainder(d, p)
		}
		d /= sc
		s += float64(d * d)
	}
	return math.Sqrt(s)
}

// spread is the reference's root-mean-square distance from its mean on the
// grid (the circular mean for angles), as integrate.Audit measures it;
// reach is its largest distance from the mean.
func (a *runsAuditor) spread() (spread, reach float64) {
	nc := len(a.cols)
	m := len(a.times)
	mean := make([]float64, nc)
	for j := range nc {
		P := a.periods[j]
		var sum, c, sn float64
		for k := range m {
			x := a.refY[k*nc+j]
			if P > 0 {
				s0, c0 := detmath.Sincos(2 * math.Pi * x / P)
				sn += s0
				c += c0
			} else {
				sum += x
			}
		}
		if P > 0 {
			mean[j] = detmath.Atan2(sn, c) * P / (2 * math.Pi)
		} else {
			mean[j] = sum / float64(m)
		}
	}
	for k := range m {
		d := a.dist(a.refY[k*nc:(k+1)*nc], mean)
		spread += float64(d * d)
		reach = math.Max(reach, d)
	}
	return math.Sqrt(spread / float64(m)), reach
}

// maxSerialCorrelation bounds the lag-1 autocorrelation used to widen a
// standard error: at 0.99 the effective number of points is 1/199 of the
// count, beyond which the correction says nothing more (common practice).
const maxSerialCorrelation = 0.99

// serialRateErr widens g.RateErr, the ordinary least-squares standard error
// of the exponential rate of g, the fit (integrate.FitDivergence) of the
// divergence d on times ts, for the serial correlation of the fit's
// residuals: the fit is to a running envelope,
// whose residuals are strongly correlated, so that the ordinary error is
// too small. With r1 the lag-1 autocorrelation of the residuals of the line
// fitted to log(envelope) over the growth range, the effective number of
// points is n(1-r1)/(1+r1), and the error grows by sqrt((1+r1)/(1-r1))
// (unchanged when r1 <= 0). The growth range is g's, [g.From, g.To].
//
// References:
//
//	B. D. Santer, T. M. L. Wigley, J. S. Boyle, D. J. Gaffen, J. J. Hnilo,
//	  D. Nychka, D. E. Parker, K. E. Taylor, Statistical significance of
//	  trends and trend differences in layer-average atmospheric temperature
//	  time series, J. Geophys. Res. 105 (2000) 7337–7356, Sect. 3
//	  (the effective sample size n(1-r1)/(1+r1)).
func serialRateErr(ts, d []float64, g integrate.Growth) float64 {
	se := g.RateErr
	if g.Points < 3 || g.Kind == integrate.GrowthUndetermined {
		return se
	}
	x := make([]float64, 0, g.Points)
	y := make([]float64, 0, g.Points)
	env := 0.0
	for k, v := range d {
		env = math.Max(env, v)
		if ts[k] >= g.From && ts[k] <= g.To && env > 0 {
			x = append(x, ts[k])
			y = append(y, detmath.Log(env))
		}
	}
	n := float64(len(x))
	if n < 3 {
		return se
	}
	var mx, my float64
	for i := range x {
		mx += x[i]
		my += y[i]
	}
	mx /= n
	my /= n
	var sxx, sxy float64
	for i := range x {
		sxx += float64((x[i] - mx) * (x[i] - mx))
		sxy += float64((x[i] - mx) * (y[i] - my))
	}
	if sxx == 0 {
		return se
	}
	b := sxy / sxx
	res := make([]float64, len(x))
	var s0, s1 float64
	for i := range x {
		res[i] = y[i] - my - float64(b*(x[i]-mx))
		s0 += float64(res[i] * res[i])
		if i > 0 {
			s1 += float64(res[i] * res[i-1])
		}
	}
	if s0 == 0 {
		return se
	}
	r1 := math.Min(s1/s0, maxSerialCorrelation)
	if r1 <= 0 {
		return se
	}
	return se * math.Sqrt((1+r1)/(1-r1))
}

// labelID is a run's label as a stable machine name (the CSV column): in
// lower case, with every character other than ASCII letters, digits, '_',
// '-' and '.' turned into '_' ("rung" when nothing is left).
func labelID(label string) string {
	b := []byte(strings.ToLower(strings.TrimSpace(label)))
	for i, c := range b {
		if !(c >= 'a' && c <= 'z' || c >= '0' && c <= '9' || c == '_' || c == '-' || c == '.') {
			b[i] = '_'
		}
	}
	if len(b) == 0 {
		return "rung"
	}
	return string(b)
}
