package main

import (
	"context"
	"encoding/csv"
	"flag"
	"fmt"
	"io"
	"strconv"
	"text/tabwriter"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/lyap"
)

var spectrumCmd = &command{
	name:    "spectrum",
	summary: "Lyapunov exponents with standard errors and derived measures",
	doc: `Estimate the --exponents K largest Lyapunov exponents of a flow by
integrating the trajectory with K tangent vectors of its variational
equations and re-orthonormalising them (QR) as they stretch. The run goes
from --t0 to --t1; the first --transient time units are discarded, the
rest is averaged in 32 blocks whose spread gives each exponent's standard
error. The model's exact Jacobian is used where it has one, central
differences otherwise.

Exponents use the natural log per unit time of the model. Derived: the
Kaplan–Yorke dimension, the entropy (the sum of the positive exponents,
which bounds the Kolmogorov–Sinai entropy by Ruelle's inequality) and the
Lyapunov time 1/lambda_max. With fewer exponents than the dimension the
dimension and the entropy may be lower bounds, and are marked so.
Sanity checks follow: the sum of all exponents against the mean trace of
the Jacobian, the exponent of the flow direction against zero, and for a
Hamiltonian the pairing lambda_i = -lambda_(n+1-i).

--format json writes one object (for a map too); JSON keys: plumb_version,
arch, command, system, settings, units, status, error (null unless the
run failed or was canceled), exponents, std_err, kaplan_yorke,
kaplan_yorke_bound, entropy, entropy_bound, lyapunov_time, beyond_noise,
checks, run, stats, history. --format csv writes the convergence history
(t, blocks, then each running estimate); --plot draws each estimate's
distance from its final value as the run goes on.

A map is iterated with its tangent map instead (exact Jacobian): the first
--discard iterates are discarded and the next --iterations averaged, and
the exponents, the derived measures and the sum check (against the mean of
ln|det J|) are per iterate. The time and integrator flags are for flows
only.

On Ctrl-C, or when the integration fails, the estimate so far is still
written; the exit status is then 1.`,
	model:   "lorenz",
	formats: []string{"table", "json", "csv"},
	plots:   true,
	setup:   setupSpectrum,
}

// Defaults of plumb spectrum. The demo's full spectrum over 1000 time
// units takes a fraction of a second and gives lambda_1 to about 0.01.
const (
	spectrumT1        = 1100
	spectrumTransient = 100
)

// spectrumSettingFlags names the flag that sets each lyap.Settings field
// plumb spectrum sets (Duration is --t1 - --t0 - --transient, checked
// before).
var spectrumSettingFlags = map[string]string{"RelTol": "rtol", "AbsTol": "atol", "Transient": "transient", "Iterations": "iterations", "Discard": "discard"}

// spectrumFlags are the flags of plumb spectrum beyond the shared ones.
type spectrumFlags struct {
	k          int
	t0, t1     float64
	transient  float64
	rtol, atol float64
	method     string
	h          float64
	iterations int
	discard    int
}

func setupSpectrum(fs *flag.FlagSet, sh *shared) func(context.Context, *call) error {
	f := &spectrumFlags{}
	fs.IntVar(&f.k, "exponents", 0, "estimate the `K` largest exponents, 1 to the state's dimension (default: all)")
	finiteVar(fs, &f.t0, "t0", 0, "start time `T0`, the time of the start state")
	finiteVar(fs, &f.t1, "t1", spectrumT1, "end time `T1` of the run; the span after the transient is averaged")
	finiteVar(fs, &f.transient, "transient", spectrumTransient, "time `T` integrated and discarded first, so that the tangent vectors align (> 0)")
	finiteVar(fs, &f.rtol, "rtol", lyap.DefaultRelTol, "relative tolerance `RTOL` of the trajectory and its tangent vectors (0 also means the default)")
	finiteVar(fs, &f.atol, "atol", lyap.DefaultAbsTol, "absolute tolerance `ATOL` of the trajectory and its tangent vectors (0 also means the default)")
	fs.StringVar(&f.method, "method", methods[0].name, "integration `METHOD` of the trajectory and its tangent vectors: any of plumb solve's but the splittings (see 'plumb help solve')")
	finiteVar(fs, &f.h, "step", 0, "step size `H` of a fixed-step method (-h is help)")
	fs.IntVar(&f.iterations, "iterations", lyap.DefaultIterations, "average `N` iterates of a map after the discarded ones (maps only)")
	fs.IntVar(&f.discard, "discard", mapDiscard, "discard the first `N` iterates of a map, so that the tangent vectors align (maps only)")
	return func(ctx context.Context, cl *call) error { return f.run(ctx, cl) }
}

// spectrumJSON is the --format json result of plumb spectrum.
type spectrumJSON struct {
	header
	// System is the system, with the parameters as used.
	System systemJSON `json:"system"`
	// Settings echoes the flags that shaped the run, defaults included.
	Settings spectrumSettingsJSON `json:"settings"`
	// Units says in what units the numbers are.
	Units spectrumUnitsJSON `json:"units"`
	// spectrumResult holds the status, the exponents and the derived
	// measures.
	spectrumResult
	// Run describes the averaging run.
	Run spectrumRunJSON `json:"run"`
	// Stats counts the work.
	Stats lyap.Stats `json:"stats"`
	// History is the running estimate after every completed block.
	History []lyap.Point `json:"history"`
}

// spectrumResult is what the --format json results of plumb spectrum on a
// flow and on a map share (their Units say in what units); embedded, its
// fields stand between Error and Run in both documents.
type spectrumResult struct {
	// Status is completed, canceled or failed; Error says why.
	Status string  `json:"status"`
	Error  errText `json:"error"`
	// Exponents are the estimates, largest first (lyap sorts them),
	// StdErr their batch-means standard errors (null with fewer than two
	// completed blocks).
	Exponents []float64 `json:"exponents"`
	StdErr    []float64 `json:"std_err"`
	// KaplanYorke is the Kaplan–Yorke dimension of Exponents;
	// KaplanYorkeBound is "exact", or "lower" when the exponents given do
	// not reach the first negative partial sum (more exponents could
	// raise it).
	KaplanYorke      *float64 `json:"kaplan_yorke"`
	KaplanYorkeBound string   `json:"kaplan_yorke_bound"`
	// Entropy is the sum of the positive exponents; EntropyBound is
	// "exact", or "lower" when the smallest exponent given is positive.
	Entropy      *float64 `json:"entropy"`
	EntropyBound string   `json:"entropy_bound"`
	// LyapunovTime is 1/lambda_max, the largest exponent (the QR order
	// is largest first only up to fluctuations); null unless it is
	// positive.
	LyapunovTime *float64 `json:"lyapunov_time"`
	// BeyondNoise reports that the largest exponent stands clear of zero
	// (lyap.Spectrum.BeyondNoise): more than lyap.NoiseFactor standard
	// errors, and more than lyap.NoiseFactor·ln(D)/D after averaging D
	// time units. Without it a positive estimate is no sign of chaos.
	BeyondNoise bool `json:"beyond_noise"`
	// Checks are the sanity residuals that apply.
	Checks []checkJSON `json:"checks"`
}

// spectrumSettingsJSON echoes the settings of a spectrum run.
type spectrumSettingsJSON struct {
	Exponents  int     `json:"exponents"`
	T0         float64 `json:"t0"`
	T1         float64 `json:"t1"`
	Transient  float64 `json:"transient"`
	RelTol     float64 `json:"rtol"`
	AbsTol     float64 `json:"atol"`
	Method     string  `json:"method"`
	MethodName string  `json:"method_name"`
	Step       float64 `json:"step"`
	Blocks     int     `json:"blocks"`
}

// spectrumUnitsJSON says in what units the numbers of a spectrum are.
type spectrumUnitsJSON struct {
	Exponents    string `json:"exponents"`
	KaplanYorke  string `json:"kaplan_yorke"`
	Time         string `json:"time"`
	RTol         string `json:"rtol"`
	ATol         string `json:"atol"`
	CheckResidue string `json:"checks"`
}

var spectrumUnits = spectrumUnitsJSON{
	Exponents:    "per unit time, natural log (exponents, std_err, entropy, history)",
	KaplanYorke:  "dimensionless (a dimension)",
	Time:         "the model's time unit (t0, t1, transient, lyapunov_time, run.start, run.duration, history[].t)",
	RTol:         "dimensionless",
	ATol:         "state units (tangent vectors: the same, per unit perturbation)",
	CheckResidue: "per unit time, natural log",
}

// checkJSON is one sanity residual.
type checkJSON struct {
	Name     string  `json:"name"`
	Residual float64 `json:"residual"`
	StdErr   float64 `json:"std_err"`
	// Meaning says what is compared.
	Meaning string `json:"meaning"`
}

var checkMeaning = map[string]string{
	lyap.CheckTrace:   "|sum of exponents - mean trace of the Jacobian| (Liouville)",
	lyap.CheckZero:    "|exponent nearest zero|: the flow direction neither grows nor shrinks",
	lyap.CheckPairing: "max |lambda_i + lambda_(n+1-i)|: a Hamiltonian's exponents pair up",
	lyap.CheckLogDet:  "|sum of exponents - mean ln|det J||",
}

// spectrumRunJSON describes the averaging run of a spectrum.
type spectrumRunJSON struct {
	Method   string  `json:"method"`
	Jacobian string  `json:"jacobian"`
	Start    float64 `json:"start"`
	Duration float64 `json:"duration"`
	Blocks   int     `json:"blocks"`
	// BlockLength is the nominal length of a block; MeanInterval the mean
	// time between re-orthonormalisations.
	BlockLength  float64 `json:"block_length"`
	MeanInterval float64 `json:"mean_interval"`
}

func (f *spectrumFlags) run(ctx context.Context, cl *call) error {
	sys, err := cl.sh.loadSystem(cl.sh.model)
	if err != nil {
		return err
	}
	if sys.Kind() == plumb.KindMap {
		return f.runMap(ctx, cl, sys)
	}
	if err := refuseFlags(cl, sys, "--iterations and --discard are for maps (a flow runs from --t0 to --t1 after --transient)", "iterations", "discard"); err != nil {
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
	m, im, err := pickMethod(f.method, f.h, cl.sh.given["step"])
	if err != nil {
		return err
	}
	if m.separable {
		return usagef("--method %s: a splitting cannot carry the tangent vectors (the variational equations are no separable Hamiltonian); use an adaptive pair, rk4 or gauss1-3", m.name)
	}
	if !(f.transient > 0) {
		return usagef("--transient %s: must be > 0 (an unaligned start biases the estimate)", formatFloat(f.transient))
	}
	dur := f.t1 - f.t0 - f.transient
	if !(dur > 0) {
		return usagef("--t1 %s: the run from --t0 %s must outlast --transient %s", formatFloat(f.t1), formatFloat(f.t0), formatFloat(f.transient))
	}
	p := sys.Problem()
	p.T0 = f.t0
	s := &lyap.Settings{Method: im, RelTol: f.rtol, AbsTol: f.atol, Duration: dur, Transient: f.transient, Tangent3: sys.Tangent3()}
	if err := s.Validate(); err != nil {
		return settingUsage(err, spectrumSettingFlags)
	}
	// Echo the tolerances the run uses (0 stands for the SDK's default).
	eff := s.WithDefaults()
	f.rtol, f.atol = eff.RelTol, eff.AbsTol
	return cl.runJob(ctx, job{
		what:    "the spectrum of " + sys.Name,
		refusal: "the estimator refused the settings",
		span:    &[2]float64{0, f.t1 - f.t0},
		reword:  m.reword(sys),
		run: func(ctx context.Context, progress func(float64)) (*outcome, error) {
			if progress != nil {
				s.Progress = func(done, _ float64) { progress(done) }
			}
			sp, err := lyap.Exponents(ctx, p, k, s)
			if sp == nil {
				return nil, err
			}
			out := f.json(sys, m, k, sp, err)
			res := &outcome{
				json:  func() any { return out },
				table: func(w io.Writer) error { return spectrumTable(w, out) },
				csv:   func(w io.Writer) error { return spectrumCSV(w, out.Exponents, out.History) },
				chart: func() *lineChart { return spectrumChart(sys, out.Exponents, out.History) },
				done:  count(k, "exponent") + ", " + count(sp.Stats.Steps, "step") + ", " + count(sp.Stats.QR, "re-orthonormalisation"),
			}
			if sp.Stats.Stiff {
				res.warnings = append(res.warnings, fmt.Sprintf("the run looks stiff from t=%g on: the step size is limited by stability, not accuracy (slow, not wrong)", sp.Stats.StiffAt))
			}
			if out.Status != "completed" {
				res.err = fmt.Errorf("the spectrum of %s %s (%s of %d completed, the estimate so far written): %w", sys.Name, statusVerb(out.Status), count(sp.Blocks, "averaging block"), lyap.DefaultBlocks, err)
			}
			return res, nil
		},
	})
}

// json builds the result; runErr is the error of the run, if any.
func (f *spectrumFlags) json(sys *plumb.System, m method, k int, sp *lyap.Spectrum, runErr error) spectrumJSON {
	out := spectrumJSON{
		header: newHeader("spectrum"),
		System: describe(sys),
		Settings: spectrumSettingsJSON{
			Exponents: k, T0: f.t0, T1: f.t1, Transient: f.transient, RelTol: f.rtol, AbsTol: f.atol,
			Method: m.name, MethodName: sp.Method, Step: f.h, Blocks: lyap.DefaultBlocks,
		},
		Units:          spectrumUnits,
		spectrumResult: newSpectrumResult(sp, runErr),
		Run: spectrumRunJSON{
			Method: sp.Method, Jacobian: sp.Jacobian, Start: sp.Start, Duration: sp.Duration,
			Blocks: sp.Blocks, BlockLength: sp.BlockLength, MeanInterval: sp.MeanInterval,
		},
		Stats:   sp.Stats,
		History: sp.History,
	}
	if out.History == nil {
		out.History = []lyap.Point{}
	}
	if tu := out.System.TimeUnit; tu != "" {
		out.Units.Time = out.System.timeUnit(spectrumUnits.Time)
		out.Units.Exponents = "per " + tu + ", natural log (exponents, std_err, entropy, history)"
	}
	return out
}

// newSpectrumResult reads an estimate sp, flow or map; runErr is the error
// of the run, if any. The judgements (bounds, Lyapunov time, beyond noise)
// are lyap.Spectrum's.
func newSpectrumResult(sp *lyap.Spectrum, runErr error) spectrumResult {
	out := spectrumResult{Exponents: sp.Exponents, StdErr: sp.StdErr, Checks: []checkJSON{}}
	out.Status, out.Error = runStatus(runErr)
	if ky, b, ok := sp.KaplanYorke(); ok {
		out.KaplanYorke, out.KaplanYorkeBound = &ky, string(b)
	}
	if h, b, ok := sp.Entropy(); ok {
		out.Entropy, out.EntropyBound = &h, string(b)
	}
	if lt, ok := sp.LyapunovTime(); ok {
		out.LyapunovTime = &lt
		out.BeyondNoise = sp.BeyondNoise()
	}
	for _, c := range sp.Checks {
		out.Checks = append(out.Checks, checkJSON{Name: c.Name, Residual: c.Residual, StdErr: c.StdErr, Meaning: checkMeaning[c.Name]})
	}
	return out
}

// spectrumTable writes the exponents, the derived measures, the checks and
// the run.
func spectrumTable(w io.Writer, out spectrumJSON) error {
	words := flowRates
	if tu := out.System.TimeUnit; tu != "" {
		words = spectrumUnitWords{rate: "per " + tu, time: " " + tu}
	}
	tw, err := spectrumHead(w, out.System, out.spectrumResult, words)
	if err != nil {
		return err
	}
	r := out.Run
	fmt.Fprintf(tw, "run\taveraged t = %s .. %s in %d blocks; %s, %s Jacobian\n", tableFloat(r.Start), tableFloat(r.Start+r.Duration), r.Blocks, r.Method, r.Jacobian)
	fmt.Fprintf(tw, "work\t%d steps, %d rejected, %d evaluations, %d re-orthonormalisations\n", out.Stats.Steps, out.Stats.Rejected, out.Stats.Evaluations, out.Stats.QR)
	fmt.Fprintf(tw, "status\t%s\n", out.Status)
	return tw.Flush()
}

// spectrumUnitWords are the units a spectrum table writes after a rate and
// after a time.
type spectrumUnitWords struct{ rate, time string }

var (
	flowRates = spectrumUnitWords{rate: "per unit time"}
	mapRates  = spectrumUnitWords{rate: "per iterate", time: " iterates"}
)

// spectrumHead writes the system, the table of exponents and, into the
// table it returns, the derived measures and the checks; the caller adds
// the rows of its run and flushes it.
func spectrumHead(w io.Writer, sys systemJSON, out spectrumResult, u spectrumUnitWords) (*tabwriter.Writer, error) {
	fmt.Fprintf(w, "system: %s\n\n", sys.heading())
	tw := newTable(w)
	fmt.Fprintln(tw, "exponent\tvalue\tstd err")
	for i, v := range out.Exponents {
		se := "-"
		if i < len(out.StdErr) {
			se = strconv.FormatFloat(out.StdErr[i], 'g', 2, 64)
		}
		fmt.Fprintf(tw, "lambda_%d\t%s\t%s\n", i+1, strconv.FormatFloat(v, 'g', 6, 64), se)
	}
	if err := tw.Flush(); err != nil {
		return nil, err
	}
	fmt.Fprintf(w, "(%s, natural log)\n", u.rate)
	fmt.Fprintln(w)
	tw = newTable(w)
	bound := func(b string) string {
		if b == "lower" {
			return " (a lower bound: more exponents could raise it)"
		}
		return ""
	}
	if out.KaplanYorke != nil {
		fmt.Fprintf(tw, "Kaplan–Yorke dimension\t%.5g%s\n", *out.KaplanYorke, bound(out.KaplanYorkeBound))
	}
	if out.Entropy != nil {
		fmt.Fprintf(tw, "entropy (sum of positive exponents)\t%.4g %s%s\n", *out.Entropy, u.rate, bound(out.EntropyBound))
	}
	switch {
	case out.LyapunovTime != nil && out.BeyondNoise:
		fmt.Fprintf(tw, "Lyapunov time 1/lambda_max\t%.4g%s\n", *out.LyapunovTime, u.time)
	case out.LyapunovTime != nil:
		fmt.Fprintf(tw, "Lyapunov time 1/lambda_max\t%.4g%s (no clear sign of chaos: the largest exponent is within %d standard errors or %d ln(D)/D of 0)\n", *out.LyapunovTime, u.time, lyap.NoiseFactor, lyap.NoiseFactor)
	case len(out.Exponents) > 0:
		fmt.Fprintf(tw, "Lyapunov time 1/lambda_max\tnone (no exponent is positive)\n")
	}
	for _, c := range out.Checks {
		se := ""
		if c.StdErr > 0 {
			se = fmt.Sprintf(" ± %.2g", c.StdErr)
		}
		fmt.Fprintf(tw, "check %s\t%.3g%s  %s\n", c.Name, c.Residual, se, c.Meaning)
	}
	return tw, nil
}

// spectrumCSV writes the convergence history: t, blocks, then the running
// estimate of each exponent.
func spectrumCSV(out io.Writer, exponents []float64, history []lyap.Point) error {
	w := csv.NewWriter(out)
	rec := []string{"t", "blocks"}
	for i := range exponents {
		rec = append(rec, "lambda_"+strconv.Itoa(i+1))
	}
	if err := w.Write(rec); err != nil {
		return err
	}
	for _, p := range history {
		rec = append(rec[:0], formatFloat(p.T), strconv.Itoa(p.Blocks))
		for _, v := range p.Exponents {
			rec = append(rec, formatFloat(v))
		}
		if err := w.Write(rec); err != nil {
			return err
		}
	}
	w.Flush()
	return w.Error()
}

// spectrumChart draws the convergence of every exponent: its running
// estimate minus the final one, against the time averaged so far. On one
// axis the raw estimates would differ by more than their fluctuations
// (0.9 against -14.6 for the demo); the differences share a scale and all
// tend to zero.
func spectrumChart(sys *plumb.System, exponents []float64, history []lyap.Point) *lineChart {
	c := &lineChart{
		Title:  sys.Title + ": convergence of the Lyapunov exponents",
		XLabel: "t",
		YLabel: "running estimate - final estimate (per unit time)",
	}
	for i, final := range exponents {
		s := series{Name: fmt.Sprintf("lambda_%d (final %.4g)", i+1, final)}
		for _, p := range history {
			if i < len(p.Exponents) {
				s.X = append(s.X, p.T)
				s.Y = append(s.Y, p.Exponents[i]-final)
			}
		}
		c.Series = append(c.Series, s)
	}
	return c
}
