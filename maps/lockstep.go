package maps

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/dd"
	"github.com/plumbdyn/plumb/internal/detmath"
)

// CurvePoints bounds the points each divergence curve of a map audit
// keeps. An audit of more iterates than this keeps, per point, the largest
// distance over a run of AuditResult.Stride iterates (a power of two), so
// that its memory and output do not grow with the horizon; agreement
// horizons, departures and growth fits are still read iterate by iterate.
const CurvePoints = 4096

// fitPoints bounds the points a growth fit keeps: beyond it, every other
// point is dropped and the spacing doubles (the fit then sees the envelope
// at evenly spaced iterates; common practice for bounded-memory sampling).
const fitPoints = 8192

// curveStride is the smallest power of two s with ceil((steps+1)/s) <=
// CurvePoints.
func curveStride(steps int) int {
	s := 1
	for (steps+s)/s > CurvePoints {
		s *= 2
	}
	return s
}

// mapRun is one rung advancing in lockstep with the reference.
type mapRun struct {
	r     Rung
	out   RungResult
	store integrate.Rounding
	x, y  []float64
	live  bool // started and not stopped
	// bin is the index it/stride of the curve point being filled.
	bin int
	// env is the running maximum of the divergence; fitX, fitY the growth
	// fit's points (iterate, ln env) at spacing fitStep, until env first
	// reaches the tolerance (fitDone).
	env        float64
	fitEnv     float64 // env when the fit ended (or at the last iterate)
	fitX, fitY []float64
	fitStep    int
	fitDone    bool
}

// lockstep iterates the double-double reference and every rung together,
// one iterate at a time, so that nothing of length steps is stored.
type lockstep struct {
	m       *Map
	periods []float64
	scales  []float64 // Distance.PerComponent: nil, or per component (0: not observed)
	steps   int
	stride  int
	tol     float64
	runs    []*mapRun
	cur     []dd.Float // the reference at the current iterate
	nxt     []dd.Float
	// mean and sq accumulate the reference's size (orbitSize's sums).
	mean []float64
	sq   float64
	// reached is the last iterate the reference reached.
	reached int
	// trusted is the iterate up to which every rung agrees, fixed by the
	// first departure or failure (steps when there is none), and maxDiv
	// the largest divergence of any rung up to it.
	trusted int
	maxDiv  float64
	settled bool
	prevMax float64
}

// newLockstep prepares the reference orbit of m from x0 and the rungs for
// steps iterations at the absolute tolerance tol in the distance of scales.
func newLockstep(m *Map, rungs []Rung, x0 []float64, steps int, tol float64, scales []float64) *lockstep {
	n := len(x0)
	a := &lockstep{
		m: m, periods: m.periods, scales: scales, steps: steps, stride: curveStride(steps), tol: tol,
		cur: make([]dd.Float, n), nxt: make([]dd.Float, n), mean: make([]float64, n),
	}
	for i, v := range x0 {
		a.cur[i] = dd.From(v)
	}
	for _, r := range rungs {
		run := &mapRun{r: r, x: make([]float64, n), y: make([]float64, n), fitStep: 1}
		run.out = RungResult{Rung: r, AgreesUntil: -1, Divergence: []float64{}}
		switch r.Kind {
		case integrate.KindPrecision:
			run.store = r.Storage
			copy(run.x, x0)
			if run.store.Kind != integrate.NoRounding {
				run.store.Vec(run.x, run.x)
			}
			run.live = true
		case integrate.KindRestart:
			run.out.Start = r.RestartAt
		}
		run.bin = run.out.Start / a.stride
		a.runs = append(a.runs, run)
	}
	return a
}

// run iterates to a.steps. It returns the reference's failure or the
// context's error; every rung then stops at the last iterate reached, with
// the reason in its Err.
func (a *lockstep) run(ctx context.Context) error {
	n := len(a.cur)
	for it := 0; ; it++ {
		a.reached = it
		for i, v := range a.cur {
			h := v.Hi
			if a.scales != nil {
				if a.scales[i] == 0 {
					continue // not observed
				}
				h /= a.scales[i]
			}
			a.mean[i] += h
			a.sq += float64(h * h)
		}
		curMax, event, eventAt := 0.0, false, it
		for _, run := range a.runs {
			if !run.live && run.out.Err == nil && run.r.Kind == integrate.KindRestart && it == run.r.RestartAt {
				for i := range run.x {
					run.x[i] = run.r.Restart.Round(a.cur[i].Hi + a.cur[i].Lo)
				}
				WrapPeriodic(run.x, a.periods)
				run.live = true
			}
			if !run.live {
				continue
			}
			d := refDist(run.x, a.cur, a.periods, a.scales)
			curMax = math.Max(curMax, d)
			if at, ok := run.record(it, d, a); ok {
				event, eventAt = true, min(eventAt, at)
			}
			if it == a.steps {
				continue
			}
			if at, ok := run.advance(a.m, it); ok {
				event, eventAt = true, min(eventAt, at)
			}
		}
		if event && !a.settled {
			a.settled, a.trusted = true, eventAt
			a.maxDiv = a.prevMax
			if eventAt == it {
				a.maxDiv = math.Max(a.maxDiv, curMax)
			}
		}
		a.prevMax = math.Max(a.prevMax, curMax)
		if it == a.steps {
			break
		}
		var err error
		if it%1024 == 0 {
			err = ctx.Err()
		}
		if err == nil {
			err = a.m.f.NextDD(a.cur, a.nxt)
		}
		for i := 0; err == nil && i < n; i++ {
			if !a.nxt[i].IsFinite() {
				err = fmt.Errorf("component %d is %v: %w", i, a.nxt[i].Hi, integrate.ErrNonFinite)
			} else if i < len(a.periods) && a.periods[i] > 0 {
				a.nxt[i] = wrapAngleDD(a.nxt[i], a.periods[i])
			}
		}
		if err != nil {
			a.stopAll(it, err)
			return err
		}
		a.cur, a.nxt = a.nxt, a.cur
	}
	if !a.settled {
		a.trusted, a.maxDiv = a.steps, a.prevMax
	}
	return nil
}

// stopAll stops every live rung at iterate it because the reference stopped.
func (a *lockstep) stopAll(it int, err error) {
	if !a.settled {
		a.settled, a.trusted, a.maxDiv = true, it, a.prevMax
	}
	for _, run := range a.runs {
		if run.live {
			run.live = false
			run.out.Err = fmt.Errorf("stopped at iterate %d with the reference: %w", it, err)
		}
	}
}

// size returns the root-mean-square norm of the reference's iterates
// 0..reached and its root-mean-square distance from their mean, with the
// sums of orbitSize in the same order.
func (a *lockstep) size() (mag, spread float64) {
	cnt := float64(a.reached + 1)
	var msq float64
	for _, m := range a.mean {
		m /= cnt
		msq += float64(m * m)
	}
	return math.Sqrt(a.sq / cnt), math.Sqrt(math.Max(0, a.sq/cnt-msq))
}

// record takes the divergence d at iterate it into the curve, the fit and
// the departure. It reports a first departure with the rung's agreement
// horizon.
func (run *mapRun) record(it int, d float64, a *lockstep) (agreesUntil int, departed bool) {
	if b := it / a.stride; b != run.bin || len(run.out.Divergence) == 0 {
		if len(run.out.Divergence) > 0 {
			run.bin = b
		}
		run.out.Divergence = append(run.out.Divergence, d)
	} else if k := len(run.out.Divergence) - 1; d > run.out.Divergence[k] {
		run.out.Divergence[k] = d
	}
	run.env = math.Max(run.env, d)
	if !run.fitDone {
		run.fitEnv = run.env
	}
	if !run.fitDone && it > run.out.Start && run.env > 0 && (it-run.out.Start)%run.fitStep == 0 {
		if len(run.fitX) == fitPoints {
			run.thin()
		}
		if (it-run.out.Start)%run.fitStep == 0 {
			run.fitX = append(run.fitX, float64(it))
			run.fitY = append(run.fitY, detmath.Log(run.env))
		}
	}
	if run.env >= a.tol && run.env > 0 && it > run.out.Start {
		run.fitDone = true
	}
	if d > a.tol && !run.out.Departed {
		run.out.Departed, run.out.DepartsAt = true, it
		return max(run.out.AgreesUntil, run.out.Start), true
	}
	if !run.out.Departed {
		run.out.AgreesUntil = it
	}
	return 0, false
}

// thin drops every other fit point and doubles the spacing.
func (run *mapRun) thin() {
	k := 0
	for i := range run.fitX {
		if (int(run.fitX[i])-run.out.Start)%(2*run.fitStep) == 0 {
			run.fitX[k], run.fitY[k] = run.fitX[i], run.fitY[i]
			k++
		}
	}
	run.fitX, run.fitY = run.fitX[:k], run.fitY[:k]
	run.fitStep *= 2
}

// advance maps the rung from iterate it to it+1. A value that is not
// finite stops the rung; it then reports a failure with its agreement
// horizon (it has vouched for nothing beyond it).
func (run *mapRun) advance(m *Map, it int) (agreesUntil int, failed bool) {
	m.Next(run.x, run.y)
	if run.store.Kind != integrate.NoRounding {
		run.store.Vec(run.y, run.y)
	}
	bad := -1
	for i, v := range run.y {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			bad = i
		}
	}
	if bad >= 0 {
		run.out.Err = &NonFiniteError{Iterate: it + 1, Component: bad, Value: run.y[bad]}
		run.live = false
		if !run.out.Departed {
			return max(run.out.AgreesUntil, run.out.Start), true
		}
		return 0, false
	}
	copy(run.x, run.y)
	run.out.Iterates++
	return 0, false
}

// finish fixes the agreement horizon of a rung that never started and fits
// the growth law; out.Delta0 must be set first.
func (run *mapRun) finish() {
	if run.out.AgreesUntil < run.out.Start {
		run.out.AgreesUntil = run.out.Start
	}
	fitGrowth(&run.out, run.fitEnv, run.fitX, run.fitY)
}

// refDist is the Euclidean distance between the float64 state x and the
// double-double reference state ref over the observed components, with
// wrapped differences on periodic components, each divided by its scale
// (scales nil: all, at scale 1). The difference is taken in double-double,
// so it is exact to the reference's accuracy.
func refDist(x []float64, ref []dd.Float, periods, scales []float64) float64 {
	var s float64
	for i, v := range x {
		if scales != nil && scales[i] == 0 {
			continue
		}
		d := dd.Sub(dd.From(v), ref[i]).Float64()
		if i < len(periods) {
			d = wrappedDiff(d, periods[i])
		}
		if scales != nil {
			d /= scales[i]
		}
		s += float64(d * d)
	}
	return math.Sqrt(s)
}

// fitGrowth fits ln d = a + rate·n and ln d = a + power·ln(n - start) to
// the running maximum of the divergence (the points xs, ly, from its first
// positive value after the start up to the first iterate at or beyond the
// tolerance) and names the better law (integrate.FitGrowth). Fewer than
// mapFitMin points is undetermined; an envelope env that never passes
// boundedFactor·Delta0 is bounded. out.Delta0 must be set first.
func fitGrowth(out *RungResult, env float64, xs, ly []float64) {
	out.Growth = integrate.Growth{Kind: integrate.GrowthUndetermined, Points: len(xs)}
	if len(xs) < mapFitMin {
		return
	}
	out.Growth = integrate.FitGrowth(xs, ly, float64(out.Start))
	if env <= boundedFactor*out.Delta0 {
		// Rounding noise, however it is shaped.
		out.Growth.Kind = integrate.GrowthBounded
	}
}

// boundedFactor: a divergence that never exceeds this many times the
// rounding that started it is rounding noise, not growth (common practice:
// a stable orbit forgets each rounding, so the noise stays within a few
// units).
const boundedFactor = 10

// mapFitMin is the fewest points a growth fit takes (common practice:
// fewer cannot tell a line from a curve).
const mapFitMin = 5
