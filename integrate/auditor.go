package integrate

import (
	"context"
	"fmt"
	"math"
	"sort"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// refAt returns the reference state at a sampled time t (a grid or restart
// time), or nil.
func (a *auditor) refAt(t float64) []float64 {
	k := sort.SearchFloat64s(a.refT, t)
	if k < len(a.refT) && a.refT[k] == t {
		return a.refS[k]
	}
	return nil
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
// root-mean-square norm, and the largest distance of one sample from that
// mean, in the audit's distance (observed components, divided by their
// scales).
func (a *auditor) spread() (spread, mag, reach float64) {
	smp := a.refY
	m := float64(len(smp))
	// far[k] is the squared distance of sample k from the mean.
	far := make([]float64, len(smp))
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
		for k, v := range smp {
			d := v[i] - mean
			if P > 0 {
				d = math.Remainder(d, P)
			}
			d /= sc
			spread += float64(d * d)
			far[k] += float64(d * d)
		}
	}
	for _, f := range far {
		reach = math.Max(reach, f)
	}
	return math.Sqrt(spread / m), math.Sqrt(mag / m), math.Sqrt(reach)
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
			out.Delta0 *= AbsWeight(a.scales) // absolute per component
		}
	default:
		if r.Fixed == nil {
			out.Delta0 = float64(r.RelTol*mag) + float64(r.AbsTol*AbsWeight(a.scales))
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
