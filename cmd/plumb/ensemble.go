package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"
	"os"
	"sort"
	"strings"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
)

var ensembleCmd = &command{
	name:    "ensemble",
	summary: "release members a tiny distance apart and watch them part",
	doc: `Release --members copies of a system a distance --delta from its start
(--spread ball: in random directions from --seed over the --along
components; --spread line: k·delta along one component), run them in
lockstep with the control (the start itself) from 0 to --t1, and report
how they part: the spread about their mean, the largest distance between
two, the fraction still within --tol of the control, and each member's
parting time (when it first reaches --tol). --releases pairs started along
the control's orbit, --release-every apart, give the saturation level
(the mean distance between unrelated states) and the finite-size Lyapunov
exponent lambda(delta) at scales delta·ratio^n up to the attractor's size
(Aurell et al. 1997): for small scales it is the largest Lyapunov
exponent; near saturation it falls, and the predictability time at --tol
is the pairs' mean time to grow from --delta to --tol. --tol 0 takes a
tenth of the saturation level. Distances follow --observe and --scale;
--delta is in that distance. Results do not depend on --workers.

--format json writes one object; JSON keys: plumb_version, arch, command,
system, settings, units, status, error (null unless the run failed or was
canceled), ensemble (when the run began; the report: times, spread,
largest_pair, within, parting_times, saturation, extent, scales,
small_scale_lambda, predictability_time and the settings used). --format
csv writes the curves (t, spread, largest_pair, within; --rows scales: the
finite-size exponents); --format jsonl writes one line per member (member 0
is the control): its start, parting time and states at the report times.

--plot FILE draws --view members (one component, --axes X, of every member
against time), spread (spread and largest pair on a log axis with the
growth delta·exp(lambda·t) that the small-scale exponent predicts, and
--tol) or projection (two components, --axes X,Y: the control's path drawn
lightly and the members marked at the --at times). --animate FILE.gif
writes the members moving across two components (--axes X,Y), the
control in black, at most 120 frames of at most 800x500 pixels.

--format npy writes the CSV's rows as a NumPy float64 array (NaN where
CSV is empty). --lockstep N integrates the members in groups of N, each
with one step size beside its own copy of the control (default: one
group); --shard I/N computes the I-th of N contiguous blocks of the work
(the releases, the groups) as a shard file that 'plumb merge' joins.

This is a statement about the numerical model, not the real system;
safety-critical use follows the field's codes and licensed review.`,
	model:   "lorenz",
	formats: []string{"table", "json", "csv", "jsonl", "npy"},
	plots:   true,
	setup:   setupEnsemble,
}

// ensembleFlags are the flags of plumb ensemble beyond the shared ones.
type ensembleFlags struct {
	t1, delta, tol, dt  float64
	rtol, atol          float64
	ratio, releaseEvery float64
	members, releases   int
	workers, maxSteps   int
	seed                uint64
	spread, along, rows string
	membersFile         string
	view, axes, at      string
	animate             string
	lockstep            int
	shard               string
	dist                distanceFlags
	alongList, axisList []string
	atList              []float64
	spreadKind          plumb.Spread
	settings            plumb.EnsembleSettings
}

// Defaults of plumb ensemble, echoed in every result.
const (
	ensembleT1      = 30   // a few dozen Lyapunov times of the convection demo
	ensembleMembers = 16   // enough to see a fan, few enough to tell apart
	ensembleDelta   = 1e-6 // a rounding in the sixth decimal
	ensembleRtol    = 1e-10
	ensembleAtol    = 1e-10
	ensembleRelease = 32 // pairs for the finite-size exponent
	// ensembleTableRows is how many report times the table prints.
	ensembleTableRows = 11
)

func setupEnsemble(fs *flag.FlagSet, sh *shared) func(context.Context, *call) error {
	f := &ensembleFlags{}
	finiteVar(fs, &f.t1, "t1", ensembleT1, "end time `T1` (the members start at 0)")
	fs.IntVar(&f.members, "members", ensembleMembers, "`N` perturbed members beside the control")
	finiteVar(fs, &f.delta, "delta", ensembleDelta, "distance `DELTA` of the members from the start, and the smallest scale of lambda(delta)")
	fs.StringVar(&f.spread, "spread", "ball", "`KIND` of placement: ball (random directions at distance delta) or line (k·delta along one component)")
	fs.StringVar(&f.membersFile, "members-file", "", "read the members' starts from `FILE` instead: a CSV header of the state names, then one member per line (--delta then defaults to their largest distance from the start)")
	fs.StringVar(&f.along, "along", "", "comma-separated state `NAMES` perturbed (default: the observed ones; line: the first)")
	fs.Uint64Var(&f.seed, "seed", 1, "`SEED` of the random directions")
	finiteVar(fs, &f.tol, "tol", 0, "distance `TOL` at which a member has parted from the control; 0: a tenth of the saturation level")
	finiteVar(fs, &f.dt, "dt", 0, "spacing `DT` of the report times; 0: t1/1000")
	finiteVar(fs, &f.rtol, "rtol", ensembleRtol, "relative tolerance `RTOL` of the local error test")
	finiteVar(fs, &f.atol, "atol", ensembleAtol, "absolute tolerance `ATOL` of the local error test, in state units")
	fs.IntVar(&f.maxSteps, "max-steps", integrate.DefaultMaxSteps, "at most `N` attempted steps per run")
	fs.IntVar(&f.releases, "releases", ensembleRelease, "`N` pairs released along the control's orbit for lambda(delta) and the saturation level; 0: none (give --tol)")
	finiteVar(fs, &f.releaseEvery, "release-every", 0, "time `T` between releases along the orbit; 0: t1/4")
	finiteVar(fs, &f.ratio, "ratio", math.Sqrt2, "growth factor `R` between the scales of lambda(delta)")
	fs.IntVar(&f.workers, "workers", 0, "`N` goroutines sharing the members; 0: one per CPU (results do not depend on it)")
	fs.StringVar(&f.rows, "rows", "curves", "`ROWS` that --format csv and npy write: curves or scales")
	fs.StringVar(&f.view, "view", "members", "`VIEW` that --plot draws: members, spread or projection")
	fs.StringVar(&f.axes, "axes", "", "state `NAMES` of the picture's axes: one for --view members, two (X,Y) for projection (default: the first one or two)")
	fs.StringVar(&f.at, "at", "", "comma-separated `TIMES` at which --view projection marks the members (default: t1/4, t1/2, 3t1/4, t1)")
	fs.StringVar(&f.animate, "animate", "", "write an animated GIF `FILE` of the members moving across two components (--axes X,Y, default the first two)")
	fs.IntVar(&f.lockstep, "lockstep", 0, "integrate the members in groups of `N`, each with its own step size and copy of the control (0: all in one group); the units --shard splits")
	addShardFlag(fs, &f.shard)
	addDistanceFlags(fs, &f.dist)
	return func(ctx context.Context, cl *call) error { return f.run(ctx, cl) }
}

// ensembleJSON is the --format json result of plumb ensemble.
type ensembleJSON struct {
	header
	System   systemJSON           `json:"system"`
	Settings ensembleSettingsJSON `json:"settings"`
	Units    ensembleUnitsJSON    `json:"units"`
	// Status is completed, canceled or failed.
	Status string  `json:"status"`
	Error  errText `json:"error"`
	// Ensemble is the report (omitted when the run was refused before it
	// began).
	Ensemble *plumb.EnsembleReport `json:"ensemble,omitempty"`
}

// ensembleSettingsJSON echoes the flags that shaped the run, defaults
// included.
type ensembleSettingsJSON struct {
	T1           float64     `json:"t1"`
	Members      int         `json:"members"`
	Delta        float64     `json:"delta"`
	Spread       string      `json:"spread"`
	Along        []string    `json:"along"`
	Seed         uint64      `json:"seed"`
	Tol          float64     `json:"tol"`
	Dt           float64     `json:"dt"`
	RelTol       float64     `json:"rtol"`
	AbsTol       float64     `json:"atol"`
	MaxSteps     int         `json:"max_steps"`
	Releases     int         `json:"releases"`
	ReleaseEvery float64     `json:"release_every"`
	Ratio        float64     `json:"ratio"`
	Lockstep     int         `json:"lockstep"`
	Observe      []string    `json:"observe"`
	Scales       []scaleJSON `json:"scales"`
}

// ensembleUnitsJSON says in what units the numbers are.
type ensembleUnitsJSON struct {
	Time     string `json:"time"`
	Distance string `json:"distance"`
	Lambda   string `json:"lambda"`
}

func (f *ensembleFlags) run(ctx context.Context, cl *call) error {
	if err := choice("spread", f.spread, "ball", "line"); err != nil {
		return err
	}
	if err := choice("rows", f.rows, "curves", "scales"); err != nil {
		return err
	}
	if err := choice("view", f.view, "members", "spread", "projection"); err != nil {
		return err
	}
	if cl.sh.given["rows"] && cl.sh.format != "csv" && cl.sh.format != "npy" {
		return usagef("--rows %s: only --format csv and npy choose their rows", f.rows)
	}
	for _, v := range []string{"view", "at"} {
		if cl.sh.given[v] && cl.sh.plot == "" {
			return usagef("--%s: give --plot FILE too; it shapes that picture", v)
		}
	}
	if cl.sh.given["axes"] && cl.sh.plot == "" && f.animate == "" {
		return usagef("--axes: give --plot FILE or --animate FILE too; it names that picture's axes")
	}
	if f.animate != "" && !strings.HasSuffix(strings.ToLower(f.animate), ".gif") {
		return usagef("--animate %s: the animation is a GIF; name the file FILE.gif", f.animate)
	}
	sys, err := cl.sh.loadSystem(cl.sh.model)
	if err != nil {
		return err
	}
	if sys.Kind() == plumb.KindMap {
		src := "--model " + sys.Name
		if cl.sh.file != "" {
			src = "--file " + cl.sh.file
		}
		return usagef("%s: %s is a map; plumb ensemble integrates flows (iterate maps with plumb solve --steps)", src, sys.Name)
	}
	if err := f.check(cl, sys); err != nil {
		return err
	}
	dist, err := f.dist.distance(cl, sys)
	if err != nil {
		return err
	}
	s := f.settings
	s.Distance = dist
	sh, err := cl.resolveShard(f.shard)
	if err != nil {
		return err
	}
	if !sh.Whole() {
		return f.runShard(ctx, cl, sh, sys, &s)
	}
	return cl.runJob(ctx, job{
		what:    "the ensemble of " + sys.Name,
		refusal: "the ensemble's settings were refused",
		run: func(ctx context.Context, _ func(float64)) (*outcome, error) {
			rep, err := f.ensemble(ctx, cl, sys, &s)
			if rep == nil {
				return nil, err
			}
			return f.withNPY(cl, f.outcome(cl, sys, dist, rep, err), rep), nil
		},
	})
}

// outcome is the ensemble rep of sys, which ended with runErr, ready to
// write: the result in every format, the --plot view and the --animate
// file (both only when the members ran).
func (f *ensembleFlags) outcome(cl *call, sys *plumb.System, dist plumb.Distance, rep *plumb.EnsembleReport, runErr error) *outcome {
	steps := 0
	if rep.Run != nil {
		steps = rep.Run.Stats.Accepted
	}
	res := &outcome{
		json:  func() any { return f.json(sys, dist, rep, runErr) },
		table: func(w io.Writer) error { return f.table(w, sys, rep) },
		csv:   func(w io.Writer) error { return f.csv(w, rep) },
		jsonl: func(w io.Writer) error { return f.jsonl(w, rep) },
		done:  count(rep.Members, "member") + ", " + count(rep.Releases, "release") + ", " + count(steps, "step"),
	}
	if runErr != nil {
		res.err = fmt.Errorf("the ensemble of %s %s: %w", sys.Name, statusVerb(rep.Status), runErr)
	}
	if rep.Run == nil {
		return res
	}
	res.draw = func(name string, size plotSize) error { return f.plot(name, size, sys, rep) }
	if f.animate != "" {
		ix, iy := 0, 1
		if len(f.axisList) == 2 {
			ix, iy = stateIndex(sys, f.axisList[0]), stateIndex(sys, f.axisList[1])
		}
		res.files = append(res.files, extraFile{flag: "animate", name: f.animate, write: func() error {
			return saveAnimation(f.animate, cl.sh.plotSize, sys, rep, ix, iy)
		}})
	}
	return res
}

// check validates the flags against sys and fills f.settings.
func (f *ensembleFlags) check(cl *call, sys *plumb.System) error {
	switch {
	case !(f.t1 > 0):
		return usagef("--t1 %s: must be > 0 (the members start at 0)", formatFloat(f.t1))
	case f.members < 1 || f.members > 100000:
		return usagef("--members %d: must be in [1, 100000]", f.members)
	case !(f.delta > 0):
		return usagef("--delta %s: must be > 0", formatFloat(f.delta))
	case f.tol < 0:
		return usagef("--tol %s: must be >= 0", formatFloat(f.tol))
	case f.dt < 0 || f.dt > f.t1:
		return usagef("--dt %s: must be in [0, --t1]", formatFloat(f.dt))
	case f.dt > 0 && f.t1/f.dt > 1e6:
		return usagef("--dt %s: would report %.3g times (at most 1e6)", formatFloat(f.dt), f.t1/f.dt)
	case !(f.rtol > 0) || f.rtol < 1e-15:
		return usagef("--rtol %s: must be in [1e-15, ...)", formatFloat(f.rtol))
	case !(f.atol > 0):
		return usagef("--atol %s: must be > 0", formatFloat(f.atol))
	case f.maxSteps <= 0:
		return usagef("--max-steps %d: must be > 0", f.maxSteps)
	case f.releases < 0 || f.releases > 10000:
		return usagef("--releases %d: must be in [0, 10000]", f.releases)
	case f.releases == 0 && f.tol == 0:
		return usagef("--releases 0: give --tol too (without releases there is no saturation level to take a tenth of)")
	case f.releaseEvery < 0:
		return usagef("--release-every %s: must be >= 0", formatFloat(f.releaseEvery))
	case !(f.ratio > 1) || f.ratio > 100:
		return usagef("--ratio %s: must be in (1, 100]", formatFloat(f.ratio))
	case f.workers < 0:
		return usagef("--workers %d: must be >= 0", f.workers)
	case f.lockstep < 0:
		return usagef("--lockstep %d: must be >= 0", f.lockstep)
	}
	var err error
	if f.alongList, err = nameList("along", f.along, sys); err != nil {
		return err
	}
	if f.axisList, err = nameList("axes", f.axes, sys); err != nil {
		return err
	}
	f.spreadKind, _ = plumb.ParseSpread(f.spread)
	if f.spreadKind == plumb.SpreadLine && len(f.alongList) > 1 {
		return usagef("--along %s: --spread line moves one component", f.along)
	}
	want := map[string]int{"members": 1, "spread": 0, "projection": 2}[f.view]
	if cl.sh.plot == "" {
		want = 2 // the axes of --animate
	}
	switch {
	case cl.sh.given["axes"] && want == 0:
		return usagef("--axes %s: --view spread has no state axes", f.axes)
	case len(f.axisList) > 0 && len(f.axisList) != want:
		return usagef("--axes %s: --view %s takes %d name(s)", f.axes, f.view, want)
	case f.view == "projection" && len(f.axisList) == 0 && len(sys.States) < 2:
		return usagef("--view projection: %s has one state component; draw --view members", sys.Name)
	case f.animate != "" && len(sys.States) < 2:
		return usagef("--animate %s: %s has one state component; there is no plane to move across", f.animate, sys.Name)
	}
	if cl.sh.given["at"] {
		for _, s := range strings.Split(f.at, ",") {
			v, err := parseFinite(strings.TrimSpace(s))
			if err != nil {
				return usagef("--at %s: %q: %v", f.at, s, err)
			}
			if v < 0 || v > f.t1 {
				return usagef("--at %s: %s lies outside [0, --t1 %s]", f.at, formatFloat(v), formatFloat(f.t1))
			}
			f.atList = append(f.atList, v)
		}
	}
	releases := f.releases
	if releases == 0 {
		releases = -1
	}
	f.settings = plumb.EnsembleSettings{Members: f.members, Delta: f.delta, Spread: f.spreadKind, Along: f.alongList,
		Seed: f.seed, Tol: f.tol, Every: f.dt, RelTol: f.rtol, AbsTol: f.atol, MaxSteps: f.maxSteps,
		Ratio: f.ratio, Releases: releases, ReleaseEvery: f.releaseEvery, Workers: f.workers, Lockstep: f.lockstep}
	if f.membersFile != "" {
		return f.readMembers(cl, sys)
	}
	return nil
}

// readMembers reads --members-file into the settings' Starts.
func (f *ensembleFlags) readMembers(cl *call, sys *plumb.System) error {
	for _, name := range []string{"members", "spread", "seed"} {
		if cl.sh.given[name] {
			return usagef("--%s: the members come from --members-file %s", name, f.membersFile)
		}
	}
	file, err := os.Open(f.membersFile)
	if err != nil {
		return usagef("--members-file %s: %v", f.membersFile, err)
	}
	defer file.Close()
	starts, err := plumb.ReadMembers(file, sys.States)
	if err != nil {
		return usagef("--members-file %s: %v", f.membersFile, strings.TrimPrefix(err.Error(), "plumb: "))
	}
	f.settings.Starts = starts
	f.members = len(starts)
	if !cl.sh.given["delta"] {
		f.settings.Delta = 0
	}
	return nil
}

// nameList splits a comma-separated list of state names, each checked
// against sys; "" gives nil.
func nameList(flagName, list string, sys *plumb.System) ([]string, error) {
	if list == "" {
		return nil, nil
	}
	var out []string
	for _, name := range strings.Split(list, ",") {
		name = strings.TrimSpace(name)
		if stateIndex(sys, name) < 0 {
			return nil, usagef("--%s %s: %s has no state %q (states: %s)", flagName, list, sys.Name, name, strings.Join(sys.States, ", "))
		}
		for _, o := range out {
			if o == name {
				return nil, usagef("--%s %s: %q named twice", flagName, list, name)
			}
		}
		out = append(out, name)
	}
	return out, nil
}

func (f *ensembleFlags) json(sys *plumb.System, dist plumb.Distance, rep *plumb.EnsembleReport, runErr error) ensembleJSON {
	obs, scales := echoDistance(sys, dist)
	out := ensembleJSON{
		header: newHeader("ensemble"),
		System: describe(sys),
		Settings: ensembleSettingsJSON{T1: f.t1, Members: f.members, Delta: f.delta, Spread: f.spread,
			Along: rep.Along, Seed: f.seed, Tol: rep.Tol, Dt: f.settingsDt(), RelTol: f.rtol, AbsTol: f.atol,
			MaxSteps: f.maxSteps, Releases: f.releases, ReleaseEvery: rep.ReleaseEvery, Ratio: f.ratio,
			Lockstep: f.lockstep, Observe: obs, Scales: scales},
		Units: ensembleUnitsJSON{
			Time:     describe(sys).timeUnit("the model's time unit (t1, dt, times, parting_times, predictability_time)"),
			Distance: rep.Distance.String() + " (delta, tol, spread, largest_pair, saturation, extent, scales[].delta)",
			Lambda:   "per unit of time (scales[].lambda, small_scale_lambda)",
		},
		Status:   rep.Status,
		Ensemble: rep,
	}
	if runErr != nil {
		out.Error = errText(runErr.Error())
	}
	return out
}

// settingsDt is the spacing of the report times as used.
func (f *ensembleFlags) settingsDt() float64 {
	if f.dt == 0 {
		return f.t1 / 1000
	}
	return f.dt
}

func (f *ensembleFlags) csv(dst io.Writer, rep *plumb.EnsembleReport) error {
	w := csv.NewWriter(dst)
	if f.rows == "scales" {
		if err := w.Write([]string{"delta", "lambda", "std_err", "pairs", "unfinished", "mean_time"}); err != nil {
			return err
		}
		for _, s := range rep.Scales {
			if err := w.Write([]string{formatFloat(s.Delta), optFloat(s.Lambda), optFloat(s.StdErr),
				fmt.Sprint(s.Pairs), fmt.Sprint(s.Unfinished), formatFloat(s.MeanTime)}); err != nil {
				return err
			}
		}
	} else {
		if err := w.Write([]string{"t", "spread", "largest_pair", "within"}); err != nil {
			return err
		}
		for i, t := range rep.Times {
			lp := ""
			if i < len(rep.LargestPair) {
				lp = formatFloat(rep.LargestPair[i])
			}
			if err := w.Write([]string{formatFloat(t), formatFloat(rep.MeanSpread[i]), lp, formatFloat(rep.Within[i])}); err != nil {
				return err
			}
		}
	}
	w.Flush()
	return w.Error()
}

// optFloat is the shortest decimal of *v, or "" for nil.
func optFloat(v *float64) string {
	if v == nil {
		return ""
	}
	return formatFloat(*v)
}

// memberLine is one line of --format jsonl.
type memberLine struct {
	Member      int         `json:"member"`
	Control     bool        `json:"control"`
	Start       []float64   `json:"start"`
	PartingTime *float64    `json:"parting_time"`
	T           []float64   `json:"t"`
	Y           [][]float64 `json:"y"`
}

func (f *ensembleFlags) jsonl(w io.Writer, rep *plumb.EnsembleReport) error {
	run := rep.Run
	if run == nil {
		return nil
	}
	enc := json.NewEncoder(w)
	for k := 0; k < run.Members; k++ {
		line := memberLine{Member: k, Control: k == 0, T: rep.Times, Y: make([][]float64, len(run.Samples))}
		if len(run.Samples) > 0 {
			line.Start = run.Member(0, k)
		}
		if k > 0 && k-1 < len(rep.PartingTimes) {
			line.PartingTime = rep.PartingTimes[k-1]
		}
		for j := range run.Samples {
			line.Y[j] = run.Member(j, k)
		}
		if err := enc.Encode(line); err != nil {
			return err
		}
	}
	return nil
}

func (f *ensembleFlags) table(w io.Writer, sys *plumb.System, rep *plumb.EnsembleReport) error {
	d := describe(sys)
	tu := d.TimeUnit
	tw := newTable(w)
	fmt.Fprintf(tw, "%s\tspread\tlargest pair\twithin tol\n", withUnit("t", tu))
	n := len(rep.Times)
	for r := 0; r < ensembleTableRows && n > 0; r++ {
		j := r * (n - 1) / (ensembleTableRows - 1)
		if r > 0 && j == (r-1)*(n-1)/(ensembleTableRows-1) {
			continue
		}
		lp := "-"
		if j < len(rep.LargestPair) {
			lp = fmtSig(rep.LargestPair[j])
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%.0f%%\n", tableFloat(rep.Times[j]), fmtSig(rep.MeanSpread[j]), lp, 100*rep.Within[j])
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	if len(rep.Scales) > 0 {
		fmt.Fprintf(w, "\nfinite-size Lyapunov exponent (%d pairs released %s apart along the orbit)\n", rep.Releases, fmtSig(rep.ReleaseEvery))
		tw = newTable(w)
		fmt.Fprintln(tw, "delta\tlambda\tstd err\tpairs\tunfinished")
		for _, s := range rep.Scales {
			l, e := "-", "-"
			if s.Lambda != nil {
				l, e = fmt.Sprintf("%.4f", *s.Lambda), fmt.Sprintf("%.4f", *s.StdErr)
			}
			fmt.Fprintf(tw, "%s\t%s\t%s\t%d\t%d\n", fmtSig(s.Delta), l, e, s.Pairs, s.Unfinished)
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	fmt.Fprintln(w)
	tw = newTable(w)
	fmt.Fprintf(tw, "system\t%s\n", d.heading())
	if rep.Spread == "given" {
		fmt.Fprintf(tw, "members\t%d from %s, at most %s from the start\n", rep.Members, f.membersFile, fmtSig(rep.Delta))
	} else {
		fmt.Fprintf(tw, "members\t%d around the start, %s spread, delta %s along %s, seed %d\n", rep.Members, rep.Spread, fmtSig(rep.Delta), strings.Join(rep.Along, ", "), rep.Seed)
	}
	fmt.Fprintf(tw, "distance\t%s\n", rep.Distance.String())
	fmt.Fprintf(tw, "method\t%s, rtol %s, atol %s%s\n", rep.Method, formatFloat(rep.RelTol), formatFloat(rep.AbsTol), lockstepNote(rep))
	fmt.Fprintf(tw, "tol\t%s\n", fmtSig(rep.Tol))
	fmt.Fprintf(tw, "parted\t%s\n", partingSummary(rep, tu))
	if rep.Releases > 0 {
		fmt.Fprintf(tw, "saturation\t%s (mean distance between release points; largest %s)\n", fmtSig(rep.Saturation), fmtSig(rep.Extent))
		if rep.SmallScale != nil {
			fmt.Fprintf(tw, "small scales\tlambda = %.4f ± %.4f per %s (delta %s to %s)\n", *rep.SmallScale, *rep.SmallScaleStdErr, unitOr(tu), fmtSig(rep.Delta), fmtSig(rep.SmallScaleTo))
		}
		if rep.Predictability != nil {
			fmt.Fprintf(tw, "predictability\t%s ± %s %s from delta to tol (%d of %d pairs)\n", fmtSig(*rep.Predictability), fmtSig(*rep.PredictabilityStdErr), unitOr(tu), rep.PredictabilityPairs, rep.Releases)
		} else {
			fmt.Fprintf(tw, "predictability\tnot measured: %d of %d pairs grew from delta to tol within the span\n", rep.PredictabilityPairs, rep.Releases)
		}
	}
	fmt.Fprintf(tw, "status\t%s\n", rep.Status)
	if err := tw.Flush(); err != nil {
		return err
	}
	_, err := fmt.Fprintf(w, "\nThis is %s.\n", rep.Caution)
	return err
}

// fmtSig prints 4 significant digits.
func fmtSig(v float64) string { return fmt.Sprintf("%.4g", v) }

// unitOr is the time unit, or "time unit".
func unitOr(u string) string {
	if u == "" {
		return "time unit"
	}
	return u
}

// partingSummary is "12 of 16 members, first at 20.1, median 22.3, last at 25".
func partingSummary(rep *plumb.EnsembleReport, tu string) string {
	var ts []float64
	for _, p := range rep.PartingTimes {
		if p != nil {
			ts = append(ts, *p)
		}
	}
	if len(ts) == 0 {
		return fmt.Sprintf("none of %d members within the span", len(rep.PartingTimes))
	}
	sort.Float64s(ts)
	med := ts[len(ts)/2]
	if len(ts)%2 == 0 {
		med = (ts[len(ts)/2-1] + ts[len(ts)/2]) / 2
	}
	return fmt.Sprintf("%d of %d members: first at t=%s, median %s, last %s %s", len(ts), len(rep.PartingTimes),
		fmtSig(ts[0]), fmtSig(med), fmtSig(ts[len(ts)-1]), unitOr(tu))
}
