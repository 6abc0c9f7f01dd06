package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/maps"
)

var scanCmd = &command{
	name:    "scan",
	summary: "orbit diagram and exponent of a map across one or two parameters",
	doc: `Iterate a map at every value of a parameter (--across r=2.8:4:600) or
on a grid of two (--across twice; the second varies fastest), each time from
the start, discarding --discard iterates and keeping --keep. Each row holds
the distinct values of --component among the kept iterates (the points of
an orbit diagram, merged within --tol), the period they repeat with (0: none
up to --max-period: chaos, a longer cycle, or one still settling next to a
bifurcation), and the largest Lyapunov exponent per iterate over the kept
iterates (negative on a stable cycle, positive in chaos, near 0 at a
bifurcation). Parameters run in parallel (--workers); the rows are the same
bit for bit whatever their number.

The table has one line per parameter point; CSV one line per point of the
diagram (the parameters, the value, the period, the exponent); --format
json one object; JSON keys: plumb_version, arch, command, system, settings,
units, status, error, rows. --format jsonl streams one JSON object per line
as rows are done, for scans too big to hold: first the header (the keys of
json but rows), then one row per line, then {status, error}. A row's
exponent is null where it is not finite (superstable is then true: the
orbit hits the critical point exactly). --format npy writes the CSV's
columns as a NumPy float64 array, one row per point of the diagram (the
exponent NaN where it is unknown, -Inf where superstable).

--shard I/N computes only the I-th of N contiguous blocks of the
parameter points and writes a shard file instead; 'plumb merge' joins the
N files into exactly the output of the whole scan, in its --format, and
draws its --plot. --shard auto takes the block from a Slurm array job or a
Kubernetes indexed Job (see --shard below).

--plot FILE.png draws the orbit diagram, every point alpha-blended, with
the exponent beneath it on the same parameter axis (one axis only).`,
	model:   "logistic",
	formats: []string{"table", "csv", "json", "jsonl", "npy"},
	plots:   true,
	setup:   setupScan,
}

// scanFlags are the flags of plumb scan beyond the shared ones.
type scanFlags struct {
	across    axisList
	discard   int
	keep      int
	maxPeriod int
	tol       float64
	component string
	workers   int
	shard     string
}

// Defaults of plumb scan.
const (
	scanDiscard = 1000
	scanKeep    = 1000
	// maxScanPoints bounds the values of --keep times the parameter
	// points a scan may hold for table, CSV, JSON and --plot (jsonl
	// streams and is bounded per row only).
	maxScanPoints = 200_000_000
)

func setupScan(fs *flag.FlagSet, sh *shared) func(context.Context, *call) error {
	f := &scanFlags{}
	fs.Var(&f.across, "across", "vary a parameter, given as `NAME=FROM:TO:N` (N equally spaced values, both ends included); once or twice")
	fs.IntVar(&f.discard, "discard", scanDiscard, "iterate and drop `N` iterates at each parameter first")
	fs.IntVar(&f.keep, "keep", scanKeep, "keep `N` iterates after them")
	fs.IntVar(&f.maxPeriod, "max-period", 0, "look for periods up to `P`, at most --keep/2 (0: 64 or --keep/2, the smaller)")
	finiteVar(fs, &f.tol, "tol", maps.DefaultPeriodTol, "iterates within `TOL` (relative to 1+|x|) are the same point")
	fs.StringVar(&f.component, "component", "", "state component `NAME` recorded (default: the first)")
	fs.IntVar(&f.workers, "workers", 0, "parameter points computed at once, `N` goroutines (0: one per core)")
	addShardFlag(fs, &f.shard)
	return func(ctx context.Context, cl *call) error { return f.run(ctx, cl) }
}

// scanSettingFlags names the flag that sets each maps.ScanSettings field.
var scanSettingFlags = map[string]string{"Discard": "discard", "Keep": "keep", "MaxPeriod": "max-period", "Tol": "tol", "Workers": "workers", "Component": "component"}

// scanJSON is the --format json result of plumb scan (and, without rows,
// the first line of jsonl).
type scanJSON struct {
	header
	System   systemJSON       `json:"system"`
	Settings scanSettingsJSON `json:"settings"`
	Units    scanUnitsJSON    `json:"units"`
	Status   string           `json:"status,omitempty"`
	Error    *errText         `json:"error,omitempty"`
	Rows     []scanRowJSON    `json:"rows,omitempty"`
}

type scanSettingsJSON struct {
	Across    []scanAxisJSON `json:"across"`
	Discard   int            `json:"discard"`
	Keep      int            `json:"keep"`
	MaxPeriod int            `json:"max_period"`
	Tol       float64        `json:"tol"`
	Component string         `json:"component"`
	Start     []float64      `json:"start"`
}

type scanAxisJSON struct {
	Name  string  `json:"name"`
	From  float64 `json:"from"`
	To    float64 `json:"to"`
	Count int     `json:"count"`
}

type scanUnitsJSON struct {
	Params   string `json:"params"`
	Values   string `json:"values"`
	Period   string `json:"period"`
	Exponent string `json:"exponent"`
}

var scanUnits = scanUnitsJSON{
	Params:   "the parameters' own units, in the order of settings.across (rows[].params)",
	Values:   "the recorded component's unit (rows[].values)",
	Period:   "iterates; 0 when none was found (rows[].period)",
	Exponent: "per iterate, natural log (rows[].exponent)",
}

// scanRowJSON is one parameter point.
type scanRowJSON struct {
	Params      []float64 `json:"params"`
	Period      int       `json:"period"`
	Exponent    *float64  `json:"exponent"`
	Superstable bool      `json:"superstable,omitempty"`
	Escaped     bool      `json:"escaped,omitempty"`
	Values      []float64 `json:"values"`
}

func rowJSON(r maps.ScanRow) scanRowJSON {
	out := scanRowJSON{Params: r.Params, Period: r.Period, Escaped: r.Escaped, Values: r.Values}
	if out.Values == nil {
		out.Values = []float64{}
	}
	if !math.IsNaN(r.Exponent) && !math.IsInf(r.Exponent, 0) {
		e := r.Exponent
		out.Exponent = &e
	}
	out.Superstable = math.IsInf(r.Exponent, -1)
	return out
}

// run checks the flags and scans.
func (f *scanFlags) run(ctx context.Context, cl *call) error {
	sys, err := cl.sh.loadSystem(cl.sh.model)
	if err != nil {
		return err
	}
	if sys.Kind() != plumb.KindMap {
		return usagef("--model %s: plumb scan iterates maps; %s is a %s (see 'plumb models' for the maps)", sys.Name, sys.Name, sys.Kind())
	}
	if len(f.across) == 0 || len(f.across) > 2 {
		return usagef("--across: give one parameter to vary (an orbit diagram) or two (a grid), not %d", len(f.across))
	}
	names := make([]string, len(f.across))
	axes := make([][]float64, len(f.across))
	points := 1
	for i, a := range f.across {
		names[i], axes[i] = a.name, a.values()
		points *= a.n
	}
	fam, err := sys.Family(names...)
	if err != nil {
		return usagef("--across: %v", err)
	}
	comp := 0
	if f.component != "" {
		comp = -1
		for i, s := range sys.States {
			if s == f.component {
				comp = i
			}
		}
		if comp < 0 {
			return usagef("--component %s: %s has the states %s", f.component, sys.Name, strings.Join(sys.States, ", "))
		}
	}
	if cl.sh.plot != "" && len(axes) != 1 {
		return usagef("--plot %s: an orbit diagram has one parameter axis; this scan has %d", cl.sh.plot, len(axes))
	}
	if cl.sh.format != "jsonl" || cl.sh.plot != "" {
		if f.keep > 0 && points > maxScanPoints/f.keep {
			return usagef("--keep %d with %d parameter points holds more than %d values; use --format jsonl (without --plot) to stream them", f.keep, points, maxScanPoints)
		}
	}
	set := maps.ScanSettings{Discard: f.discard, Keep: f.keep, MaxPeriod: f.maxPeriod, Tol: f.tol, Component: comp, Workers: f.workers}
	if f.discard == 0 {
		set.Discard = -1 // no transient, not the default
	}
	for _, c := range []struct {
		name string
		v    int
	}{{"discard", f.discard}, {"keep", f.keep}, {"max-period", f.maxPeriod}, {"workers", f.workers}} {
		if c.v < 0 {
			return usagef("--%s %d: must be >= 0", c.name, c.v)
		}
	}
	if err := set.WithDefaults().Validate(len(sys.States)); err != nil {
		return settingUsage(err, scanSettingFlags)
	}
	out := scanJSON{header: newHeader("scan"), System: describe(sys), Units: scanUnits,
		Settings: scanSettingsJSON{Discard: f.discard, Keep: f.keep, MaxPeriod: f.maxPeriod, Tol: f.tol, Component: sys.States[comp], Start: sys.Start()}}
	for _, a := range f.across {
		out.Settings.Across = append(out.Settings.Across, scanAxisJSON{Name: a.name, From: a.from, To: a.to, Count: a.n})
	}
	sh, err := cl.resolveShard(f.shard)
	if err != nil {
		return err
	}
	if err := checkNPYOut(cl); err != nil {
		return err
	}
	if !sh.Whole() {
		return f.runShard(ctx, cl, sh, sys, fam, axes, set)
	}
	span := [2]float64{0, float64(points)}
	return cl.runJob(ctx, job{
		what:    "the scan of " + sys.Name,
		refusal: "the scan refused the settings",
		span:    &span,
		run: func(ctx context.Context, progress func(float64)) (*outcome, error) {
			return f.scan(ctx, cl, sys, fam, axes, set, out, progress)
		},
	})
}

// scan runs maps.Scan, streaming jsonl rows to stdout or collecting them.
func (f *scanFlags) scan(ctx context.Context, cl *call, sys *plumb.System, fam maps.Family, axes [][]float64, set maps.ScanSettings,
	out scanJSON, progress func(float64)) (*outcome, error) {
	stream := cl.sh.format == "jsonl"
	keep := !stream || cl.sh.plot != ""
	var enc *json.Encoder
	if stream {
		enc = json.NewEncoder(cl.stdout)
		enc.SetEscapeHTML(false)
		if err := enc.Encode(out); err != nil {
			return nil, err
		}
	}
	var rows []maps.ScanRow
	done, escaped, artefacts := 0, 0, 0
	runErr := scanRows(ctx, cl, fam, axes, sys.Start(), &set, func(r maps.ScanRow) error {
		done++
		if r.Escaped {
			escaped++
		}
		if r.ArtefactCycle() {
			artefacts++
		}
		if progress != nil {
			progress(float64(done))
		}
		if stream {
			if err := enc.Encode(rowJSON(r)); err != nil {
				return fmt.Errorf("writing row %d: %w", r.Index, err)
			}
		}
		if keep {
			rows = append(rows, r)
		}
		return nil
	})
	if runErr != nil && done == 0 && ctx.Err() == nil {
		return nil, runErr
	}
	status, msg := runStatus(runErr)
	res := &outcome{done: count(done, "parameter point")}
	if runErr != nil {
		res.err = fmt.Errorf("the scan of %s %s after %d points (those are written): %w", sys.Name, statusVerb(status), done, runErr)
	}
	if escaped > 0 {
		res.warnings = append(res.warnings, fmt.Sprintf("%d parameter points sent the orbit out of the finite numbers (escaped: no values)", escaped))
	}
	if artefacts > 0 {
		res.warnings = append(res.warnings, fmt.Sprintf("%d parameter points show a period with a positive exponent: the float64 orbit landed exactly on an unstable cycle (a rounding artefact, not an attracting cycle)", artefacts))
	}
	if stream {
		res.marked = true
		res.table = func(w io.Writer) error {
			// The rows are on stdout already; the last line closes them.
			return enc.Encode(struct {
				Status string  `json:"status"`
				Error  errText `json:"error"`
			}{status, msg})
		}
	} else {
		out.Status, out.Error = status, &msg
		res.json = func() any {
			o := out
			o.Rows = make([]scanRowJSON, len(rows))
			for i, r := range rows {
				o.Rows[i] = rowJSON(r)
			}
			return o
		}
		res.table = func(w io.Writer) error { return scanTable(w, sys, out, rows) }
		res.csv = func(w io.Writer) error { return scanCSV(w, out, rows) }
		if cl.sh.format == "npy" {
			// The array goes out through the default writer, the table's.
			res.table = func(w io.Writer) error { return scanNPY(w, out, rows) }
		}
	}
	if cl.sh.plot != "" {
		res.draw = func(name string, size plotSize) error { return saveOrbitDiagram(name, size, sys, out, rows) }
	}
	return res, nil
}

// scanTable writes one line per parameter point.
func scanTable(w io.Writer, sys *plumb.System, out scanJSON, rows []maps.ScanRow) error {
	tw := newTable(w)
	for _, a := range out.Settings.Across {
		fmt.Fprintf(tw, "%s\t", a.Name)
	}
	fmt.Fprintf(tw, "period\texponent\tpoints\t%s\n", out.Settings.Component)
	for _, r := range rows {
		for _, p := range r.Params {
			fmt.Fprintf(tw, "%s\t", tableFloat(p))
		}
		period := strconv.Itoa(r.Period)
		if r.Period == 0 {
			period = "-"
		}
		exp := tableFloat(r.Exponent)
		switch {
		case r.Escaped:
			exp = "escaped"
		case math.IsInf(r.Exponent, -1):
			exp = "superstable"
		}
		vals := make([]string, 0, 4)
		for i, v := range r.Values {
			if i == 4 {
				vals = append(vals, "...")
				break
			}
			vals = append(vals, strconv.FormatFloat(v, 'g', 6, 64))
		}
		fmt.Fprintf(tw, "%s\t%s\t%d\t%s\n", period, exp, len(r.Values), strings.Join(vals, " "))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	fmt.Fprintln(w)
	tw = newTable(w)
	fmt.Fprintf(tw, "system\t%s (%s)\n", sys.Name, sys.Title)
	for _, a := range out.Settings.Across {
		fmt.Fprintf(tw, "across\t%s from %s to %s, %s\n", a.Name, tableFloat(a.From), tableFloat(a.To), count(a.Count, "value"))
	}
	fmt.Fprintf(tw, "status\t%s, %d parameter points\n", out.Status, len(rows))
	return tw.Flush()
}

// scanCSV writes one line per point of the diagram.
func scanCSV(dst io.Writer, out scanJSON, rows []maps.ScanRow) error {
	w := csv.NewWriter(dst)
	var rec []string
	for _, a := range out.Settings.Across {
		rec = append(rec, a.Name)
	}
	rec = append(rec, out.Settings.Component, "period", "exponent")
	if err := w.Write(rec); err != nil {
		return err
	}
	for _, r := range rows {
		exp := formatFloat(r.Exponent)
		if math.IsNaN(r.Exponent) {
			exp = ""
		}
		for _, v := range r.Values {
			rec = rec[:0]
			for _, p := range r.Params {
				rec = append(rec, formatFloat(p))
			}
			rec = append(rec, formatFloat(v), strconv.Itoa(r.Period), exp)
			if err := w.Write(rec); err != nil {
				return err
			}
		}
	}
	w.Flush()
	return w.Error()
}
