package main

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"slices"
	"sort"
	"strconv"
	"strings"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// The table: for every method on Lorenz, per tolerance, the harness's
// columns with the fastest round's time and the error at t = 10 and 20
// against the reference; then, for every plumb method and every peer
// method of the same order, the time each needs to reach a given error at
// t = 20 (log time interpolated linearly in log error between the two
// tolerances that bracket it) and their ratio.

// key names one method of one program.
type key struct{ peer, method string }

func (k key) String() string { return k.peer + " " + k.method }

// point is the median of one method at one tolerance.
type point struct {
	tol                 float64
	acc, rej, nfev      int
	sec, spread         float64 // fastest CPU seconds over rounds, (median-fastest)/fastest
	rounds              int
	err10, err20, nsStp float64
}

// orders groups the methods compared with each other: the 5(4) pairs and
// the 8th-order ones.
var orders = map[key]int{
	{"plumb", "dp54"}: 5, {"plumb", "dp54-drop"}: 5, {"c_dp5", "dp5-I"}: 5,
	{"boost", "dopri5"}: 5, {"gsl", "rkck"}: 5, {"gsl", "rkf45"}: 5,
	{"scipy", "RK45"}: 5, {"plumb", "dp54-drop-loop"}: 5, {"plumb", "dp54-batch"}: 5, {"boost", "dopri5-loop"}: 5,
	{"plumb", "dp853"}: 8, {"plumb", "dp853-drop"}: 8, {"boost", "rkf78"}: 8, {"gsl", "rk8pd"}: 8,
	{"scipy", "DOP853"}: 8,
}

// targets are the errors at t = 20 the Lorenz ratios are read at;
// arenstorfTargets the errors at the end of the Arenstorf period.
var (
	targets          = []float64{1e-3, 1e-5}
	arenstorfTargets = []float64{1e-3, 1e-6}
)

// arenstorfStart is the Arenstorf orbit's initial state, which it returns
// to after one period: the error of a solve is its distance from it then.
var arenstorfStart = []float64{0.994, 0, 0, -2.00158510637908252240537862224}

// runs holds the samples of one problem: every method's rounds per tolerance.
type runs map[key]map[float64]*rounds

// rounds is the rounds of one method at one tolerance.
type rounds struct {
	secs []float64
	s    sample
}

// readSamples reads a samples file into runs per problem.
func readSamples(path string) (map[string]runs, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	out := map[string]runs{}
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 1<<20), 1<<20)
	line := 0
	for sc.Scan() {
		line++
		var s sample
		if err := json.Unmarshal(sc.Bytes(), &s); err != nil {
			return nil, fmt.Errorf("%s line %d: %w", path, line, err)
		}
		if !(s.Sec > 0) {
			continue
		}
		k := key{s.Peer, s.Method}
		if out[s.Problem] == nil {
			out[s.Problem] = runs{}
		}
		if out[s.Problem][k] == nil {
			out[s.Problem][k] = map[float64]*rounds{}
		}
		a := out[s.Problem][k][s.Tol]
		if a == nil {
			a = &rounds{s: s}
			out[s.Problem][k][s.Tol] = a
		}
		a.secs = append(a.secs, s.Sec)
	}
	return out, sc.Err()
}

// curves turns runs into points sorted by falling tolerance, with the
// errors errs gives for a sample, and the methods in table order.
func (r runs) curves(errs func(sample) (e1, e2 float64)) (map[key][]point, []key) {
	curves := map[key][]point{}
	var keys []key
	for k, byTol := range r {
		keys = append(keys, k)
		for tol, a := range byTol {
			slices.Sort(a.secs)
			med, fast := a.secs[len(a.secs)/2], a.secs[0]
			p := point{tol: tol, acc: a.s.Acc, rej: a.s.Rej, nfev: a.s.Nfev, sec: fast, rounds: len(a.secs),
				spread: (med - fast) / fast}
			p.err10, p.err20 = errs(a.s)
			p.nsStp = fast * 1e9 / float64(a.s.Acc+a.s.Rej)
			curves[k] = append(curves[k], p)
		}
		sort.Slice(curves[k], func(i, j int) bool { return curves[k][i].tol > curves[k][j].tol })
	}
	sort.Slice(keys, func(i, j int) bool {
		if orders[keys[i]] != orders[keys[j]] {
			return orders[keys[i]] < orders[keys[j]]
		}
		return keys[i].String() < keys[j].String()
	})
	return curves, keys
}

func writeTable(w io.Writer, samplesPath, refPath string) error {
	ref, err := readRef(refPath)
	if err != nil {
		return err
	}
	all, err := readSamples(samplesPath)
	if err != nil {
		return err
	}
	curves, keys := all["lorenz"].curves(func(s sample) (float64, float64) {
		return maxErr(s.Mids["10"], ref["10"]), maxErr(s.Mids["20"], ref["20"])
	})

	fmt.Fprintln(w, "Lorenz on [0, 100]; time: the fastest round, in CPU time per solve; spread: how much slower the median round was.")
	fmt.Fprintln(w)
	fmt.Fprintln(w, "| method | tol | accepted | rejected | evaluations | CPU time (ms) | spread | ns/step | err@10 | err@20 |")
	fmt.Fprintln(w, "| --- | --- | ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |")
	for _, k := range keys {
		for _, p := range curves[k] {
			fmt.Fprintf(w, "| %s | %.0e | %d | %d | %d | %.3f | %.0f%% | %.0f | %.1e | %.1e |\n", k, p.tol, p.acc, p.rej, p.nfev,
				p.sec*1e3, 100*p.spread, p.nsStp, p.err10, p.err20)
		}
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "CPU time to reach an error at t = 20 (interpolated across tolerances), plumb against each peer of the same order; ratio > 1: plumb is slower.")
	fmt.Fprintln(w)
	ratioTable(w, curves, keys, targets)
	return writeMore(w, all)
}

// ratioTable prints, for every plumb method and every peer method of the
// same order, the ratio of their times to reach each error in es (the
// errors in point.err20).
func ratioTable(w io.Writer, curves map[key][]point, keys []key, es []float64) {
	head := "| plumb | peer |"
	rule := "| --- | --- |"
	for _, e := range es {
		head += fmt.Sprintf(" plumb / peer at %.0e |", e)
		rule += " ---: |"
	}
	fmt.Fprintln(w, head)
	fmt.Fprintln(w, rule)
	for _, pk := range keys {
		if pk.peer != "plumb" {
			continue
		}
		for _, qk := range keys {
			if qk.peer == "plumb" || orders[qk] != orders[pk] {
				continue
			}
			row := fmt.Sprintf("| %s | %s |", pk.method, qk)
			for _, e := range es {
				a, b := timeAt(curves[pk], e), timeAt(curves[qk], e)
				if math.IsNaN(a) || math.IsNaN(b) {
					row += " out of range |"
					continue
				}
				row += " " + fmtRatio(a/b) + " |"
			}
			fmt.Fprintln(w, row)
		}
	}
}

// fmtRatio prints a ratio with two decimals, or with two significant
// digits when it is below 0.1 (where two decimals would print 0.00).
func fmtRatio(r float64) string {
	if r < 0.1 {
		return fmt.Sprintf("%.2g", r)
	}
	return fmt.Sprintf("%.2f", r)
}

// timeAt interpolates log time linearly in log err@20 between the two
// adjacent tolerances whose errors bracket e; NaN when none do.
func timeAt(c []point, e float64) float64 {
	for i := 0; i+1 < len(c); i++ {
		e0, e1 := c[i].err20, c[i+1].err20
		if !(e0 > 0 && e1 > 0) || (e-e0)*(e-e1) > 0 {
			continue
		}
		if e0 == e1 {
			return math.Min(c[i].sec, c[i+1].sec)
		}
		u := (detmath.Log(e) - detmath.Log(e0)) / (detmath.Log(e1) - detmath.Log(e0))
		return detmath.Exp(detmath.Log(c[i].sec) + u*(detmath.Log(c[i+1].sec)-detmath.Log(c[i].sec)))
	}
	return math.NaN()
}

func maxErr(y, ref []float64) float64 {
	if len(y) != len(ref) || len(y) == 0 {
		return math.NaN()
	}
	var m float64
	for i := range y {
		m = math.Max(m, math.Abs(y[i]-ref[i]))
	}
	return m
}

// readRef reads the Lorenz reference states at t = 10 and 20 (the
// beta_double values of integrate/testdata/lorenz.json, decimal strings).
func readRef(path string) (map[string][]float64, error) {
	raw, err := os.ReadFile(path)
	if err != nil {
		return nil, err
	}
	var doc struct {
		Lorenz struct {
			BetaDouble struct {
				Values map[string][]string `json:"values"`
			} `json:"beta_double"`
		} `json:"lorenz"`
	}
	if err := json.Unmarshal(raw, &doc); err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	out := map[string][]float64{}
	for _, t := range []string{"10", "20"} {
		vs := doc.Lorenz.BetaDouble.Values[t]
		if len(vs) != 3 {
			return nil, fmt.Errorf("%s: lorenz.beta_double.values[%q] has %d values, want 3", path, t, len(vs))
		}
		for i, s := range vs {
			v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
			if err != nil {
				return nil, fmt.Errorf("%s: lorenz.beta_double.values[%q][%d]: %w", path, t, i, err)
			}
			out[t] = append(out[t], v)
		}
	}
	return out, nil
}
