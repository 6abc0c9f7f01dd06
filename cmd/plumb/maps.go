package main

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/lyap"
	"github.com/plumbdyn/plumb/maps"
)

// The map side of solve, spectrum and trust: a map is iterated, so its
// "time" is the iterate n and the flow flags (--t1, --rtol, --method ...)
// do not apply.

// Defaults for maps.
const (
	mapSteps        = 1000   // iterates plumb solve writes
	mapDiscard      = 10_000 // iterates plumb spectrum discards first
	mapTrustHorizon = 100    // iterates plumb trust audits: past float64's ~50 for a doubling map
	mapTrustTol     = 0.1    // a tenth of a state unit
)

// refuseFlags is a usage error naming the first of names that the command
// line set: those flags do not apply to sys's kind.
func refuseFlags(cl *call, sys *plumb.System, why string, names ...string) error {
	for _, n := range names {
		if cl.sh.given[n] {
			return usagef("--%s: %s is a %s; %s", n, sys.Name, sys.Kind(), why)
		}
	}
	return nil
}

// flowOnlySolve are plumb solve's flags that only a flow takes.
var flowOnlySolve = []string{"t0", "t1", "dt", "rtol", "atol", "method", "step", "max-steps", "cross-state", "cross-sense", "rows"}

// flowOnlyTrust are plumb trust's flags that only a flow takes.
var flowOnlyTrust = []string{"max-steps", "method", "rtol", "atol", "step"}

// mapSolveJSON is the --format json result of plumb solve on a map.
type mapSolveJSON struct {
	header
	// System is the map iterated, with the parameters as used.
	System systemJSON `json:"system"`
	// Settings echoes the flags that shaped the run.
	Settings mapSolveSettingsJSON `json:"settings"`
	// Units says in what units the numbers are.
	Units mapSolveUnitsJSON `json:"units"`
	// Status is completed, canceled or failed; Error says why.
	Status string  `json:"status"`
	Error  errText `json:"error"`
	// End is the last iterate computed and Final the state there.
	End   int       `json:"end"`
	Final []float64 `json:"final"`
	// Orbit holds the iterates 0..End.
	Orbit []iterateJSON `json:"orbit"`
}

// mapSolveSettingsJSON echoes the settings of a map's orbit.
type mapSolveSettingsJSON struct {
	Steps int `json:"steps"`
}

// mapSolveUnitsJSON says in what units the numbers of an orbit are.
type mapSolveUnitsJSON struct {
	N     string `json:"n"`
	State string `json:"state"`
}

var mapSolveUnits = mapSolveUnitsJSON{
	N:     "iterates from the start (steps, end, orbit[].n)",
	State: "each state component in the model's own unit, angles reduced to [0, period) (start, final, orbit[].x)",
}

// iterateJSON is the state X at iterate N.
type iterateJSON struct {
	N int       `json:"n"`
	X []float64 `json:"x"`
}

// runMap writes the orbit of a map: iterates 0..--steps.
func (f *solveFlags) runMap(ctx context.Context, cl *call, sys *plumb.System) error {
	if err := refuseFlags(cl, sys, "plumb solve iterates it --steps times (the time and integrator flags are for flows)", flowOnlySolve...); err != nil {
		return err
	}
	if f.steps < 1 || f.steps > maxSamples {
		return usagef("--steps %d: must be 1 to %d", f.steps, maxSamples)
	}
	m, err := sys.Map()
	if err != nil {
		return fmt.Errorf("preparing the map %s failed: %w", sys.Name, err)
	}
	return cl.runJob(ctx, job{
		what:    "the orbit of " + sys.Name,
		refusal: "the map refused the settings",
		run: func(ctx context.Context, _ func(float64)) (*outcome, error) {
			return f.orbit(ctx, sys, m)
		},
	})
}

// orbit iterates m from the start of sys --steps times, stopping early on
// a canceled ctx or a state that is not finite.
func (f *solveFlags) orbit(ctx context.Context, sys *plumb.System, m *maps.Map) (*outcome, error) {
	n := m.Dim()
	orbit, runErr := maps.Orbit(ctx, m, sys.Start(), f.steps)
	status := "completed"
	var nf *maps.NonFiniteError
	switch {
	case errors.As(runErr, &nf):
		runErr, status = fmt.Errorf("iterate %d: %s = %v is not finite: %w", nf.Iterate, sys.States[nf.Component], nf.Value, integrate.ErrNonFinite), "failed"
	case runErr != nil && ctx.Err() != nil:
		runErr, status = fmt.Errorf("canceled after iterate %d: %w", len(orbit)/n-1, ctx.Err()), "canceled"
	case runErr != nil:
		return nil, fmt.Errorf("iterating %s failed: %w", sys.Name, runErr)
	}
	end := len(orbit)/n - 1
	out := mapSolveJSON{
		header: newHeader("solve"), System: describe(sys),
		Settings: mapSolveSettingsJSON{Steps: f.steps}, Units: mapSolveUnits,
		Status: status, End: end, Final: append([]float64(nil), orbit[end*n:]...),
		Orbit: make([]iterateJSON, end+1),
	}
	if runErr != nil {
		out.Error = errText(runErr.Error())
	}
	for i := range out.Orbit {
		out.Orbit[i] = iterateJSON{N: i, X: orbit[i*n : (i+1)*n]}
	}
	res := &outcome{
		json:  func() any { return out },
		table: func(w io.Writer) error { return orbitTable(w, sys, out) },
		csv:   func(w io.Writer) error { return orbitCSV(w, sys, out) },
		chart: func() *lineChart { return orbitChart(sys, out, f.axisList) },
		done:  count(end, "iterate"),
		tail:  f.orbitRows(out),
	}
	if runErr != nil {
		res.err = fmt.Errorf("iterating %s %s (iterates 0..%d written): %w", sys.Name, statusVerb(status), end, runErr)
	}
	return res, nil
}

func orbitCSV(dst io.Writer, sys *plumb.System, out mapSolveJSON) error {
	w := csv.NewWriter(dst)
	rec := append([]string{"n"}, sys.States...)
	if err := w.Write(rec); err != nil {
		return err
	}
	for _, it := range out.Orbit {
		rec = append(rec[:0], strconv.Itoa(it.N))
		for _, v := range it.X {
			rec = append(rec, formatFloat(v))
		}
		if err := w.Write(rec); err != nil {
			return err
		}
	}
	w.Flush()
	return w.Error()
}

func orbitTable(w io.Writer, sys *plumb.System, out mapSolveJSON) error {
	tw := newTable(w)
	fmt.Fprintf(tw, "n\t%s\n", strings.Join(sys.States, "\t"))
	for _, it := range out.Orbit {
		fmt.Fprint(tw, it.N)
		for _, v := range it.X {
			fmt.Fprint(tw, "\t", tableFloat(v))
		}
		fmt.Fprintln(tw)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(w)
	tw = newTable(w)
	fmt.Fprintf(tw, "system\t%s\n", describe(sys).heading())
	fmt.Fprintf(tw, "status\t%s at iterate %d\n", out.Status, out.End)
	return tw.Flush()
}

// orbitChart draws an orbit as dots: the first two components against each
// other, or for a one-component map the return map x_(n+1) against x_n.
func orbitChart(sys *plumb.System, out mapSolveJSON, axes []string) *lineChart {
	c := &lineChart{Scatter: true}
	var s series
	if len(sys.States) >= 2 {
		ix, iy := 0, 1
		if len(axes) == 2 {
			ix, iy = stateIndex(sys, axes[0]), stateIndex(sys, axes[1])
		}
		c.Title = fmt.Sprintf("%s: orbit of %d iterates", sys.Title, out.End)
		c.XLabel, c.YLabel = sys.States[ix], sys.States[iy]
		for _, it := range out.Orbit {
			s.X = append(s.X, it.X[ix])
			s.Y = append(s.Y, it.X[iy])
		}
	} else {
		c.Title = fmt.Sprintf("%s: return map of %d iterates", sys.Title, out.End)
		c.XLabel, c.YLabel = sys.States[0]+"_n", sys.States[0]+"_(n+1)"
		for i := 0; i+1 < len(out.Orbit); i++ {
			s.X = append(s.X, out.Orbit[i].X[0])
			s.Y = append(s.Y, out.Orbit[i+1].X[0])
		}
	}
	c.Series = []series{s}
	return c
}

// flowOnlySpectrum are plumb spectrum's flags that only a flow takes.
var flowOnlySpectrum = []string{"t0", "t1", "transient", "rtol", "atol", "method", "step"}

// mapSpectrumJSON is the --format json result of plumb spectrum on a map.
type mapSpectrumJSON struct {
	header
	System   systemJSON              `json:"system"`
	Settings mapSpectrumSettingsJSON `json:"settings"`
	Units    spectrumUnitsMapJSON    `json:"units"`
	// spectrumResult holds the status, the exponents and the derived
	// measures as for a flow, per iterate; LyapunovTime in iterates.
	spectrumResult
	// Run describes the averaging: first averaged iterate, iterates
	// averaged, blocks.
	Run     mapSpectrumRunJSON `json:"run"`
	Stats   lyap.Stats         `json:"stats"`
	History []lyap.Point       `json:"history"`
}

// mapSpectrumSettingsJSON echoes the settings of a map's spectrum.
type mapSpectrumSettingsJSON struct {
	Exponents  int `json:"exponents"`
	Iterations int `json:"iterations"`
	Discard    int `json:"discard"`
	Blocks     int `json:"blocks"`
}

type spectrumUnitsMapJSON struct {
	Exponents    string `json:"exponents"`
	KaplanYorke  string `json:"kaplan_yorke"`
	Iterates     string `json:"iterates"`
	CheckResidue string `json:"checks"`
}

var mapSpectrumUnits = spectrumUnitsMapJSON{
	Exponents:    "per iterate, natural log (exponents, std_err, entropy, history)",
	KaplanYorke:  "dimensionless (a dimension)",
	Iterates:     "iterates (iterations, discard, lyapunov_time, run.start, run.iterations, history[].t)",
	CheckResidue: "per iterate, natural log",
}

type mapSpectrumRunJSON struct {
	Jacobian     string  `json:"jacobian"`
	Start        int     `json:"start"`
	Iterations   int     `json:"iterations"`
	Blocks       int     `json:"blocks"`
	BlockLength  float64 `json:"block_length"`
	MeanInterval float64 `json:"mean_interval"`
}

// runMap estimates a map's exponents with lyap.MapExponents.
func (f *spectrumFlags) runMap(ctx context.Context, cl *call, sys *plumb.System) error {
	if err := refuseFlags(cl, sys, "plumb spectrum averages --iterations iterates after --discard (the time and integrator flags are for flows)", flowOnlySpectrum...); err != nil {
		return err
	}
	n := len(sys.States)
	k := f.k
	if !cl.sh.given["exponents"] {
		k = n
	}
	if k < 1 || k > n {
		return usagef("--exponents %d: model %s has %d states, so K must be 1 to %d", f.k, sys.Name, n, n)
	}
	if f.iterations < 2*lyap.DefaultBlocks {
		return usagef("--iterations %d: must be at least %d (two per averaging block)", f.iterations, 2*lyap.DefaultBlocks)
	}
	if f.discard < 1 {
		return usagef("--discard %d: must be > 0 (an unaligned start biases the estimate)", f.discard)
	}
	s := &lyap.Settings{Iterations: f.iterations, Discard: f.discard}
	if err := s.Validate(); err != nil {
		return settingUsage(err, spectrumSettingFlags)
	}
	m, err := sys.Map()
	if err != nil {
		return fmt.Errorf("preparing the map %s failed: %w", sys.Name, err)
	}
	return cl.runJob(ctx, job{
		what:    "the spectrum of " + sys.Name,
		refusal: "the estimator refused the settings",
		run: func(ctx context.Context, _ func(float64)) (*outcome, error) {
			sp, err := lyap.MapExponents(ctx, m, sys.Start(), k, s)
			if sp == nil {
				return nil, err
			}
			return f.mapResult(sys, k, sp, err), nil
		},
	})
}

// mapResult is a map's spectrum sp of k exponents ready to write; runErr
// is the error of the run, if any.
func (f *spectrumFlags) mapResult(sys *plumb.System, k int, sp *lyap.Spectrum, runErr error) *outcome {
	out := mapSpectrumJSON{
		header: newHeader("spectrum"), System: describe(sys),
		Settings:       mapSpectrumSettingsJSON{Exponents: k, Iterations: f.iterations, Discard: f.discard, Blocks: lyap.DefaultBlocks},
		Units:          mapSpectrumUnits,
		spectrumResult: newSpectrumResult(sp, runErr),
		Run: mapSpectrumRunJSON{Jacobian: sp.Jacobian, Start: int(sp.Start), Iterations: int(sp.Duration),
			Blocks: sp.Blocks, BlockLength: sp.BlockLength, MeanInterval: sp.MeanInterval},
		Stats: sp.Stats, History: sp.History,
	}
	if out.History == nil {
		out.History = []lyap.Point{}
	}
	res := &outcome{
		json:  func() any { return out },
		table: func(w io.Writer) error { return mapSpectrumTable(w, out) },
		csv:   func(w io.Writer) error { return spectrumCSV(w, out.Exponents, out.History) },
		chart: func() *lineChart {
			c := spectrumChart(sys, out.Exponents, out.History)
			c.XLabel, c.YLabel = "iterate", "running estimate - final estimate (per iterate)"
			return c
		},
		done: count(k, "exponent") + ", " + count(sp.Stats.Steps, "iterate") + ", " + count(sp.Stats.QR, "re-orthonormalisation"),
	}
	if out.Status != "completed" {
		res.err = fmt.Errorf("the spectrum of %s %s (%s of %d completed, the estimate so far written): %w", sys.Name, statusVerb(out.Status), count(sp.Blocks, "averaging block"), lyap.DefaultBlocks, runErr)
	}
	return res
}

func mapSpectrumTable(w io.Writer, out mapSpectrumJSON) error {
	tw, err := spectrumHead(w, out.System, out.spectrumResult, mapRates)
	if err != nil {
		return err
	}
	r := out.Run
	fmt.Fprintf(tw, "run\taveraged iterates %d .. %d in %d blocks; %s Jacobian\n", r.Start, r.Start+r.Iterations, r.Blocks, r.Jacobian)
	fmt.Fprintf(tw, "work\t%d iterates, %d Jacobians, %d re-orthonormalisations\n", out.Stats.Steps, out.Stats.Jacobians, out.Stats.QR)
	fmt.Fprintf(tw, "status\t%s\n", out.Status)
	return tw.Flush()
}

// mapRungKinds are the kinds of rung a map audit takes (maps.DefaultRungs).
var mapRungKinds = []integrate.RungKind{integrate.KindPrecision, integrate.KindRestart}

// runMap audits a map with System.Trust: --horizon is a number of iterates.
func (f *trustFlags) runMap(ctx context.Context, cl *call, sys *plumb.System, dist plumb.Distance) error {
	if err := refuseFlags(cl, sys, "plumb trust iterates it exactly (the integrator flags are for flows)", flowOnlyTrust...); err != nil {
		return err
	}
	horizon, tol := f.horizon, f.tol
	if !cl.sh.given["horizon"] {
		horizon = mapTrustHorizon
	}
	if !cl.sh.given["tol"] {
		tol = mapTrustTol
	}
	if horizon != math.Trunc(horizon) || horizon < 1 || horizon > maps.MaxSteps {
		return usagef("--horizon %s: %s is a map, so the horizon counts iterates: a whole number from 1 to %d", formatFloat(horizon), sys.Name, maps.MaxSteps)
	}
	steps := int(horizon)
	// The flow's default --rungs names tolerance and method rungs, which a
	// map has none of: left out unless named on the command line.
	var list []string
	for _, name := range strings.Split(f.rungs, ",") {
		if name = strings.TrimSpace(name); name == "tol" || name == "method" {
			if cl.sh.given["rungs"] {
				return usagef("--rungs %s: %s is a map, iterated exactly: there is no tolerance or method to vary (choose from %s)", f.rungs, sys.Name, mapRungKinds[0].String()+", "+mapRungKinds[1].String())
			}
			continue
		}
		list = append(list, name)
	}
	kinds, want, err := pickRungs(cl, strings.Join(list, ","), mapRungKinds, "orbit")
	if err != nil {
		return err
	}
	rungs := maps.Select(maps.DefaultRungs(steps), kinds...)
	restartAt := 0
	if len(maps.Select(rungs, integrate.KindRestart)) > 0 {
		restartAt = int(integrate.RestartFraction * horizon)
		if cl.sh.given["restart-at"] {
			if f.restartAt != math.Trunc(f.restartAt) || !(f.restartAt >= 1 && f.restartAt < horizon) {
				return usagef("--restart-at %s: for a map, a whole iterate strictly inside the horizon, 1 to %d", formatFloat(f.restartAt), steps-1)
			}
			restartAt = int(f.restartAt)
		}
		places := integrate.Places(f.restartPlaces)
		if err := places.Validate(); err != nil {
			return usagef("--restart-places %d: %v", f.restartPlaces, err)
		}
		rungs = maps.WithRestart(rungs, restartAt, places)
	}
	if len(rungs) == 0 {
		return usagef("--horizon %d: too short for a restart rung; give --rungs precision or a longer horizon", steps)
	}
	echo := trustSettingsJSON{Horizon: float64(steps), Tol: tol, Relative: f.relative, Rungs: want, RestartAt: float64(restartAt), Prove: f.prove}
	echo.Observe, echo.Scales = echoDistance(sys, dist)
	if slices.Contains(kinds, integrate.KindRestart) {
		echo.RestartPlaces = f.restartPlaces
	}
	settings := &plumb.TrustSettings{Tol: tol, Relative: f.relative, MapRungs: rungs, Distance: dist, Shadow: f.shadow, Prove: f.prove}
	return cl.runJob(ctx, f.systemJob(sys, float64(steps), settings, "orbit", func(rep *plumb.Report, runErr error) any {
		e := echo
		e.Exact = rep.Exact != nil // the double-double orbit
		return newTrustJSON(sys, e, mapTrustUnits, rep, runErr)
	}))
}
