// Command fish-stock follows an invented fishery: a stock counted once a
// year whose recruitment follows the Ricker map, x -> x·exp(r(1 - x)), with
// a growth rate r = 3.3 (in units of the carrying capacity), of which a
// fraction h of each year's recruits is caught:
//
//	x_(n+1) = (1 - h)·x_n·exp(r(1 - x_n)),  catch_n = h·x_n·exp(r(1 - x_n)).
//
// Heavy fishing keeps the stock and the catch at one steady value. Which
// harvest rate is the lowest at which the yearly catch still settles? Below
// it, which cycles come before the catch turns chaotic, and where inside
// the chaos are there windows of order again?
//
// The answers are statements about this model, not advice for a real
// fishery.
package main

import (
	"context"
	"fmt"
	"io"
	"log"
	"math"
	"os"
	"strings"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/maps"
)

// stockFile is the fishery as a system file of kind map.
const stockFile = `{
  "name": "harvested-stock",
  "description": "a fish stock with Ricker recruitment, a fraction h of the recruits caught each year",
  "kind": "map",
  "parameters": [{"name": "r", "value": 3.3}, {"name": "h", "value": 0.3}],
  "variables": [{"name": "stock", "start": 0.5, "next": "(1 - h)*stock*exp(r*(1 - stock))"}]
}`

// Scan of the harvest rate.
const (
	hLow, hHigh = 0.0, 0.9
	hSteps      = 901
)

func main() {
	if _, err := run(os.Stdout); err != nil {
		log.Fatal(err)
	}
}

// window is a stretch of harvest rates with a finite period inside chaos.
type window struct {
	From, To float64
	Period   int
}

// outcome is what the study found.
type outcome struct {
	// Settle is the harvest rate below which the steady catch gives way to
	// a 2-cycle (the fixed point's multiplier passes -1).
	Settle float64
	// Onsets[p] is the largest scanned harvest rate with period p, for the
	// cascade 2, 4, 8 below Settle.
	Onsets map[int]float64
	// ChaosBelow is the largest scanned harvest rate with no period and a
	// positive exponent.
	ChaosBelow float64
	// Windows are the stretches of order inside the chaos.
	Windows []window
	// Window3 is the harvest rate above which the period-3 window's cycles
	// do not exist.
	Window3 float64
}

// run does the study, writes its story to w and returns it.
func run(w io.Writer) (outcome, error) {
	ctx := context.Background()
	sys, err := plumb.LoadSystem(strings.NewReader(stockFile))
	if err != nil {
		return outcome{}, err
	}
	fam, err := sys.Family("h")
	if err != nil {
		return outcome{}, err
	}
	out := outcome{Onsets: map[int]float64{}}

	// 1. Where the steady catch stops settling: the stock's positive fixed
	// point loses its stability when its multiplier passes -1. Bisect on
	// the multiplier that plumb's cycle search reports.
	mult := func(h float64) (float64, error) {
		m, err := fam([]float64{h})
		if err != nil {
			return 0, err
		}
		cs, err := maps.Cycles(ctx, m, 1, &maps.CycleSettings{Low: []float64{1e-9}, High: []float64{3}})
		if err != nil {
			return 0, err
		}
		for _, c := range cs {
			if c.Points[0][0] > 1e-6 {
				return c.Multiplier, nil
			}
		}
		return 0, fmt.Errorf("no positive steady stock at h = %v", h)
	}
	lo, hi := 0.1, 0.9 // at 0.1 the fixed point repels (multiplier < -1), at 0.9 it attracts
	for range 60 {
		mid := (lo + hi) / 2
		m, err := mult(mid)
		if err != nil {
			return out, err
		}
		if m < -1 {
			lo = mid
		} else {
			hi = mid
		}
	}
	out.Settle = (lo + hi) / 2
	fmt.Fprintf(w, "the yearly catch settles for harvest rates above h = %.6f\n", out.Settle)

	// 2. The orbit diagram across h: cycles, chaos and windows.
	hs := make([]float64, hSteps)
	for i := range hs {
		hs[i] = hLow + (hHigh-hLow)*float64(i)/float64(hSteps-1)
	}
	var rows []maps.ScanRow
	err = maps.Scan(ctx, fam, [][]float64{hs}, sys.Start(), &maps.ScanSettings{Discard: 3000, Keep: 1000}, func(r maps.ScanRow) error {
		rows = append(rows, r)
		return nil
	})
	if err != nil {
		return out, err
	}
	for _, r := range rows {
		h := r.Params[0]
		if r.Period == 2 || r.Period == 4 || r.Period == 8 {
			if h < out.Settle && h > out.Onsets[r.Period] && h > out.ChaosBelow {
				out.Onsets[r.Period] = h
			}
		}
	}
	for _, r := range rows {
		if r.Period == 0 && r.Exponent > 0 && r.Params[0] < out.Settle {
			out.ChaosBelow = r.Params[0]
		}
	}
	for _, p := range []int{2, 4, 8} {
		if h, ok := out.Onsets[p]; ok {
			fmt.Fprintf(w, "  a %d-year cycle of the catch at h = %.3f\n", p, h)
		}
	}
	fmt.Fprintf(w, "the catch is chaotic (positive exponent, no period) at h = %.3f and below, except in windows:\n", out.ChaosBelow)
	// Windows: runs of finite periods with chaos on both sides; a window
	// opens with one period and doubles inside, so it is named by the
	// least period in it.
	for i := 1; i < len(rows); i++ {
		if rows[i].Params[0] > out.ChaosBelow || rows[i].Period == 0 || rows[i-1].Period != 0 {
			continue
		}
		j, least := i, rows[i].Period
		for j+1 < len(rows) && rows[j+1].Period != 0 {
			j++
			least = min(least, rows[j].Period)
		}
		if j+1 < len(rows) && rows[j+1].Params[0] <= out.ChaosBelow {
			out.Windows = append(out.Windows, window{From: rows[i].Params[0], To: rows[j].Params[0], Period: least})
			fmt.Fprintf(w, "  h in [%.3f, %.3f]: a %d-year cycle\n", rows[i].Params[0], rows[j].Params[0], least)
		}
		i = j
	}

	// 3. The widest window, of period 3, closes as h grows where its
	// cycles are born as h falls: the tangent bifurcation, found exactly
	// with maps.Onset run on -h (Onset looks for cycles appearing as its
	// parameter grows).
	negated := func(p []float64) (*maps.Map, error) { return fam([]float64{-p[0]}) }
	at, _, err := maps.Onset(ctx, negated, 3, -0.5, -0.01, 98, &maps.CycleSettings{Low: []float64{0}, High: []float64{4}})
	if err != nil {
		return out, err
	}
	out.Window3 = -at
	fmt.Fprintf(w, "the 3-year window ends at h = %.10f (its cycles are born there, by a tangent bifurcation)\n", out.Window3)
	if math.IsNaN(out.Settle) {
		return out, fmt.Errorf("no settling point found")
	}
	fmt.Fprintln(w, "(a statement about the model, not advice for a real fishery)")
	return out, nil
}
