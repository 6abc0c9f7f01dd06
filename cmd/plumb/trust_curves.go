package main

// The outputs of plumb trust other than the table and JSON: the divergence
// curves as CSV and as a chart, the same for a flow, a map and recorded
// runs.

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
)

// trustCSV writes the divergence curves: t (n, the iterate, for a map),
// then one column per rung (empty where a rung has no value: before a
// restart, after a failure). Past maps.CurvePoints iterates a map's row
// covers rep.Stride iterates from n and holds the largest divergence over
// them.
func trustCSV(w io.Writer, rep *plumb.Report) error {
	var curves []curveCSV
	if len(rep.Reference.Divergence) > 0 {
		// Compared with an exact reference, the tightest run has a curve.
		curves = append(curves, curveCSV{name: rep.Reference.ID, start: rep.Reference.Start, values: rep.Reference.Divergence})
	}
	for _, r := range rep.Rungs {
		curves = append(curves, curveCSV{name: r.ID, start: r.Start, values: r.Divergence})
	}
	axis, label := "t", func(i int) string { return formatFloat(rep.Times[i]) }
	if isMapReport(rep) {
		axis, label = "n", func(i int) string { return strconv.Itoa(int(rep.Times[i])) }
	}
	return writeCurvesCSV(w, axis, len(rep.Times), label, curves)
}

// isMapReport reports whether rep is the audit of a map (its times are
// iterates; only a map's report counts Steps).
func isMapReport(rep *plumb.Report) bool { return rep.Steps > 0 }

// curveCSV is one column of writeCurvesCSV: values[k] stands in row
// start+k.
type curveCSV struct {
	name   string
	start  int
	values []float64
}

// writeCurvesCSV writes a column named axis with label(i) in rows i =
// 0..rows-1, then one column per curve, empty where the curve has no
// value.
func writeCurvesCSV(w io.Writer, axis string, rows int, label func(i int) string, curves []curveCSV) error {
	cw := csv.NewWriter(w)
	rec := []string{axis}
	for _, c := range curves {
		rec = append(rec, c.name)
	}
	if err := cw.Write(rec); err != nil {
		return err
	}
	for i := range rows {
		rec = append(rec[:0], label(i))
		for _, c := range curves {
			cell := ""
			if k := i - c.start; k >= 0 && k < len(c.values) {
				cell = formatFloat(c.values[k])
			}
			rec = append(rec, cell)
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// predictionPoints is the number of points drawn on the prediction curve.
const predictionPoints = 200

// trustChart draws the divergence curves on a log axis, the tolerance as a
// horizontal line, and the Lyapunov prediction delta0·exp(lambda·(t −
// t_start)) of the rung with the earliest predicted horizon; for a map, t
// is the iterate n.
func trustChart(rep *plumb.Report) *lineChart {
	c := &lineChart{
		Title:  "divergence from the reference run",
		XLabel: "t",
		YLabel: "distance from the reference",
		LogY:   true,
	}
	v, until := "t", fmt.Sprintf("trusted until t = %.4g", rep.TrustedUntil)
	if isMapReport(rep) {
		c.Title, c.XLabel = "divergence from the double-double orbit", "iterate n"
		v, until = "n", fmt.Sprintf("trusted until iterate %d", int(rep.TrustedUntil))
	}
	t1 := rep.T0 + rep.Horizon
	top := rep.TolAbs
	rungs := rep.Rungs
	if len(rep.Reference.Divergence) > 0 {
		// Compared with an exact reference, the tightest run has a curve.
		tightest := rep.Reference
		tightest.Name = "tightest: " + tightest.Name
		rungs = append([]plumb.RungReport{tightest}, rungs...)
	}
	for _, r := range rungs {
		n := min(len(r.Divergence), max(len(rep.Times)-r.Start, 0))
		s := series{Name: r.Name, X: slices.Clone(rep.Times[r.Start : r.Start+n]), Y: r.Divergence[:n]}
		if r.Effect == integrate.KindRestart && n > 0 {
			// A map's grid point may fall before the restart when
			// a point stands for several iterates.
			s.X[0] = math.Max(s.X[0], r.RestartAt)
		}
		c.Series = append(c.Series, s)
		for _, d := range r.Divergence[:n] {
			top = math.Max(top, d)
		}
	}
	if p := rep.Proof; p != nil && len(p.Times) > 0 {
		// --prove: the enclosure's width, in state units.
		c.Series = append(c.Series, series{Name: "proven enclosure width", X: slices.Clone(p.Times), Y: slices.Clone(p.Widths)})
	}
	c.Series = append(c.Series, toleranceSeries(rep.TolAbs, rep.T0, t1))
	if rep.Verdict != plumb.Incomplete && rep.LimitedBy != "" {
		c.Marks = append(c.Marks, mark{X: rep.TrustedUntil, Label: until})
	}
	if rep.Exponent == nil || !(rep.Exponent.Value > 0) || rep.PredictedHorizon <= 0 {
		return c
	}
	lambda := rep.Exponent.Value
	for _, r := range rep.Rungs {
		if r.Predicted != rep.PredictedHorizon || !(r.Delta0 > 0) {
			continue
		}
		from := rep.T0
		if r.Effect == integrate.KindRestart {
			from = r.RestartAt
		}
		if s, ok := predictionSeries(v, r.ID, lambda, r.Delta0, from, t1, top); ok {
			c.Series = append(c.Series, s)
		}
		break
	}
	return c
}

// toleranceSeries is the tolerance tol drawn from x = from to x = to.
func toleranceSeries(tol, from, to float64) series {
	return series{Name: fmt.Sprintf("tolerance %.3g", tol), X: []float64{from, to}, Y: []float64{tol, tol}}
}

// predictionSeries is the Lyapunov prediction delta0·e^(lambda·(v - from))
// of rung, in the variable v, on predictionPoints+1 points from v = from up
// to end or to where it passes top (the drawn range); ok is false when
// that leaves nothing to draw.
func predictionSeries(v, rung string, lambda, delta0, from, end, top float64) (s series, ok bool) {
	to := math.Min(end, from+math.Log(top/delta0)/lambda)
	if !(to > from) {
		return s, false
	}
	s.Name = fmt.Sprintf("prediction delta0·e^(%.3g %s), %s", lambda, v, rung)
	for i := 0; i <= predictionPoints; i++ {
		x := from + (to-from)*float64(i)/predictionPoints
		s.X = append(s.X, x)
		s.Y = append(s.Y, delta0*math.Exp(lambda*(x-from)))
	}
	return s, true
}
