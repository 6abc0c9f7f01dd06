// Command bench times plumb's integrators on the problems and tolerances of
// a side-by-side harness of general-purpose ODE libraries (plain C, GSL,
// Boost.Odeint), the way those programs time themselves, and prints the same
// columns, so that one script can run all of them interleaved and set the
// figures side by side. It is not part of the plumb binary.
//
// Usage:
//
//	bench run [SECONDS]                  one JSON line per method, problem and tolerance
//	bench table SAMPLES.jsonl REF.json   a Markdown table of time-to-error ratios
//
// run: Lorenz (sigma = 10, rho = 28, beta = 8/3, y0 = (1,1,1)) on [0, 100]
// with the states at t = 10 and 20 from separate untimed solves, and the
// Arenstorf orbit over one period; rtol = atol in {1e-6, 1e-8, 1e-10,
// 1e-12}; DormandPrince54 and DormandPrince853, each keeping its steps
// (Solve's default) and with DropSteps. Then Lorenz-96 and 1000 Lorenz
// trajectories (see run_more.go). A sample is the mean wall time of K
// back-to-back solves in CPU time of the process (the GC's threads
// included), K chosen so that a sample lasts about SECONDS (default 0.1),
// after one counted solve; the process first warms up for 0.3 s. (run.sh
// builds the peers to time themselves in CPU time too: on a shared machine
// wall time measures the other programs' load.)
//
// table: see table.go.
package main

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strconv"
	"syscall"
	"time"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/models"
)

func main() {
	if len(os.Args) < 2 {
		usage()
	}
	switch os.Args[1] {
	case "run":
		target := 0.1
		if len(os.Args) > 2 {
			v, err := strconv.ParseFloat(os.Args[2], 64)
			if err != nil || !(v > 0) || math.IsInf(v, 0) {
				fmt.Fprintf(os.Stderr, "bench: SECONDS %q: want a positive number\n", os.Args[2])
				os.Exit(2)
			}
			target = v
		}
		if err := runAll(os.Stdout, target); err != nil {
			fmt.Fprintln(os.Stderr, "bench:", err)
			os.Exit(1)
		}
	case "table":
		if len(os.Args) != 4 {
			usage()
		}
		if err := writeTable(os.Stdout, os.Args[2], os.Args[3]); err != nil {
			fmt.Fprintln(os.Stderr, "bench:", err)
			os.Exit(1)
		}
	default:
		usage()
	}
}

func usage() {
	fmt.Fprintln(os.Stderr, "usage: bench run [SECONDS] | bench table SAMPLES.jsonl REF.json")
	os.Exit(2)
}

// problem is one test problem of the harness.
type problem struct {
	name string
	f    integrate.Func
	y0   []float64
	tEnd float64
	mids []float64 // times of the extra untimed solves
}

// variant is one integrator configuration.
type variant struct {
	name string
	m    integrate.Method
	drop bool
}

var tols = []float64{1e-6, 1e-8, 1e-10, 1e-12}

var variants = []variant{
	{"dp54", integrate.DormandPrince54, false},
	{"dp54-drop", integrate.DormandPrince54, true},
	{"dp853", integrate.DormandPrince853, false},
	{"dp853-drop", integrate.DormandPrince853, true},
}

func problems() ([]problem, error) {
	lz, err := models.Lookup("lorenz")
	if err != nil {
		return nil, err
	}
	ar, err := models.Lookup("arenstorf")
	if err != nil {
		return nil, err
	}
	return []problem{
		{name: "lorenz", f: lz.Field(lz.Defaults()), y0: []float64{1, 1, 1}, tEnd: 100, mids: []float64{10, 20}},
		// One period of the Arenstorf orbit (Hairer, Nørsett & Wanner 1993,
		// Sect. II.0), the period and y0 to 30 digits.
		{name: "arenstorf", f: ar.Field(ar.Defaults()), y0: []float64{0.994, 0, 0, -2.00158510637908252240537862224},
			tEnd: 17.0652165601579625588917206249},
	}, nil
}

// cpuSeconds is the CPU time of the whole process so far.
func cpuSeconds() float64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return math.NaN()
	}
	return float64(ru.Utime.Nano()+ru.Stime.Nano()) * 1e-9
}

// sample is one JSON line, with the harness's field names.
type sample struct {
	Peer    string               `json:"peer"`
	Method  string               `json:"method"`
	Problem string               `json:"problem"`
	Tol     float64              `json:"tol"`
	Acc     int                  `json:"acc"`
	Rej     int                  `json:"rej"`
	Nfev    int                  `json:"nfev"`
	Sec     float64              `json:"sec"`
	Inner   int                  `json:"inner"`
	TEnd    float64              `json:"t_end"`
	YEnd    []float64            `json:"y_end"`
	Mids    map[string][]float64 `json:"mids,omitempty"`
	Extra   map[string]float64   `json:"extra,omitempty"`
}

func runAll(w *os.File, target float64) error {
	ps, err := problems()
	if err != nil {
		return err
	}
	ctx := context.Background()
	// Warm-up, not reported: the first solves of a fresh process run
	// slower (its heap is still growing).
	for t0 := time.Now(); time.Since(t0) < 300*time.Millisecond; {
		if _, err := integrate.Solve(ctx, integrate.Problem{F: ps[0].f, Y0: ps[0].y0}, ps[0].tEnd, nil, nil); err != nil {
			return err
		}
	}
	enc := json.NewEncoder(w)
	for _, p := range ps {
		for _, tol := range tols {
			for _, v := range variants {
				pr := integrate.Problem{F: p.f, Y0: p.y0}
				s := &integrate.Settings{RelTol: tol, AbsTol: tol, DropSteps: v.drop}
				t0 := time.Now()
				sol, err := integrate.Solve(ctx, pr, p.tEnd, v.m, s)
				single := time.Since(t0).Seconds()
				if err != nil {
					return fmt.Errorf("%s %s tol %g: %w", p.name, v.name, tol, err)
				}
				smp := sample{Peer: "plumb", Method: v.name, Problem: p.name, Tol: tol, Acc: sol.Stats.Accepted,
					Rej: sol.Stats.Rejected, Nfev: sol.Stats.Evaluations, TEnd: p.tEnd, YEnd: sol.Final}
				for _, tm := range p.mids {
					mid, err := integrate.Solve(ctx, pr, tm, v.m, s)
					if err != nil {
						return fmt.Errorf("%s %s tol %g to t = %g: %w", p.name, v.name, tol, tm, err)
					}
					if smp.Mids == nil {
						smp.Mids = map[string][]float64{}
					}
					smp.Mids[strconv.FormatFloat(tm, 'g', -1, 64)] = mid.Final
				}
				k := max(1, int(math.Ceil(target/math.Max(single, 1e-7))))
				c0 := cpuSeconds()
				for range k {
					again, err := integrate.Solve(ctx, pr, p.tEnd, v.m, s)
					if err != nil || again.Final[0] != sol.Final[0] {
						return fmt.Errorf("%s %s tol %g: a repeated solve differs (%v)", p.name, v.name, tol, err)
					}
				}
				smp.Sec = (cpuSeconds() - c0) / float64(k)
				smp.Inner = k
				if err := enc.Encode(smp); err != nil {
					return err
				}
			}
		}
	}
	return runMore(w, target)
}
