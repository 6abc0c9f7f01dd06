package main

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/plumbdyn/plumb/embed"
)

// seriesPanelSize is the picture's size without --plot-size: three rows of
// two panels, each about the size of a small chart.
var seriesPanelSize = plotSize{1200, 1350}

// seriesCharts returns the panels a person checks by eye: the mutual
// information with the chosen lag, the false-neighbour fraction with
// Cao's E1 and E2, the correlation sums with the fitted region, the
// divergence curves with their fitted lines, and the forecast error with
// both horizons.
func seriesCharts(r *embed.Report) []*lineChart {
	var charts []*lineChart
	dt := r.Dt
	if mi := r.MutualInfo; mi != nil {
		c := &lineChart{Title: "Mutual information: the lag", XLabel: "lag (time units)", YLabel: "mutual information (nats)"}
		c.Series = append(c.Series, series{Name: "mutual information", X: lagTimes(len(mi.Info), dt), Y: mi.Info})
		if ac := r.Autocorrelation; ac != nil {
			c.Series = append(c.Series, series{Name: "autocorrelation", X: lagTimes(len(ac.R), dt), Y: ac.R})
		}
		c.Marks = append(c.Marks, mark{X: float64(r.Lag) * dt, Label: fmt.Sprintf("lag %d", r.Lag)})
		charts = append(charts, c)
	}
	if r.FNN != nil || r.Cao != nil {
		c := &lineChart{Title: "False neighbours and Cao's test: the dimension", XLabel: "embedding dimension", YLabel: "fraction; E1, E2"}
		if r.FNN != nil {
			c.Series = append(c.Series, series{Name: "false-neighbour fraction", X: dims(len(r.FNN.Fraction)), Y: r.FNN.Fraction})
		}
		if r.Cao != nil {
			c.Series = append(c.Series, series{Name: "Cao E1", X: dims(len(r.Cao.E1)), Y: r.Cao.E1},
				series{Name: "Cao E2", X: dims(len(r.Cao.E2)), Y: r.Cao.E2})
		}
		c.Marks = append(c.Marks, mark{X: float64(r.Dim), Label: fmt.Sprintf("dimension %d", r.Dim)})
		charts = append(charts, c)
	}
	if d := r.CorrDim; d != nil {
		c := &lineChart{Title: fmt.Sprintf("Correlation sums, dimension %d: D2", d.Dim), XLabel: "log10 radius", YLabel: "correlation sum", LogY: true}
		lr := make([]float64, len(d.Radii))
		for i, v := range d.Radii {
			lr[i] = math.Log10(v)
		}
		c.Series = append(c.Series, series{Name: "C(r)", X: lr, Y: d.Sum})
		if d.Found {
			var fx, fy []float64
			for k := d.Fit.First; k <= d.Fit.Last; k++ {
				fx = append(fx, lr[k])
				fy = append(fy, math.Exp(d.Fit.Intercept+d.Fit.Slope*math.Log(d.Radii[k])))
			}
			c.Series = append(c.Series, series{Name: fmt.Sprintf("fit, D2 = %.3g ± %.2g", d.D2, d.D2Err), X: fx, Y: fy})
		}
		charts = append(charts, c)
	}
	if r.Rosenstein != nil || r.Kantz != nil {
		c := &lineChart{Title: "Divergence of neighbours: the largest exponent", XLabel: "time since closest approach", YLabel: "mean log distance"}
		// Show the rise and some of the plateau: three times the longest
		// fitted region, at least 20 steps.
		show := 20
		for _, d := range []*embed.Divergence{r.Rosenstein, r.Kantz} {
			if d != nil && d.Found {
				show = max(show, 3*d.Fit.Last)
			}
		}
		for _, d := range []*embed.Divergence{r.Rosenstein, r.Kantz} {
			if d == nil {
				continue
			}
			n := min(show+1, len(d.Time))
			c.Series = append(c.Series, series{Name: d.Method, X: d.Time[:n], Y: d.LogDist[:n]})
			if d.Found {
				fx := []float64{d.Time[d.Fit.First], d.Time[d.Fit.Last]}
				fy := []float64{d.Fit.Intercept + d.Fit.Slope*fx[0], d.Fit.Intercept + d.Fit.Slope*fx[1]}
				c.Series = append(c.Series, series{Name: fmt.Sprintf("%s fit, lambda = %.3g ± %.2g", d.Method, d.Lambda, d.LambdaErr), X: fx, Y: fy})
			}
		}
		charts = append(charts, c)
	}
	if f := r.Forecast; f != nil {
		c := &lineChart{Title: "Nearest-neighbour forecasts: the horizon", XLabel: "lead time", YLabel: "error / standard deviation"}
		// Show three times the horizon, at least 20 leads.
		n := min(len(f.Lead), max(3*f.HorizonSteps, 20)+1)
		if !math.IsNaN(r.ExponentHorizon) && r.Dt > 0 {
			n = min(len(f.Lead), max(n, int(1.5*r.ExponentHorizon/r.Dt)+1))
		}
		c.Series = append(c.Series, series{Name: "forecast error", X: f.Lead[:n], Y: f.Error[:n]},
			series{Name: fmt.Sprintf("%g of the spread", f.Fraction), X: []float64{f.Lead[0], f.Lead[n-1]}, Y: []float64{f.Fraction, f.Fraction}})
		c.Marks = append(c.Marks, mark{X: f.Horizon, Label: "data"})
		if !math.IsNaN(r.ExponentHorizon) && r.ExponentHorizon <= f.Lead[n-1] {
			c.Marks = append(c.Marks, mark{X: r.ExponentHorizon, Label: "exponent"})
		}
		charts = append(charts, c)
	}
	return charts
}

func lagTimes(n int, dt float64) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = float64(i) * dt
	}
	return out
}

func dims(n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = float64(i + 1)
	}
	return out
}

// saveSeriesPanels draws the panels, two to a row, into one picture of
// the given size (zero: seriesPanelSize), written whole.
func saveSeriesPanels(name string, size plotSize, r *embed.Report) error {
	if size == (plotSize{}) {
		size = seriesPanelSize
	}
	format, err := plotFormat(name)
	if err != nil {
		return err
	}
	charts := seriesCharts(r)
	if len(charts) == 0 {
		return errNothingToDraw
	}
	rows := (len(charts) + 1) / 2
	width, height := size.lengths()
	cw, err := draw.NewFormattedCanvas(width, height, format)
	if err != nil {
		return err
	}
	tiles := draw.Tiles{Rows: rows, Cols: 2, PadX: vg.Points(6), PadY: vg.Points(6), PadTop: vg.Points(4), PadBottom: vg.Points(4), PadLeft: vg.Points(4), PadRight: vg.Points(4)}
	dc := draw.New(cw)
	for i, c := range charts {
		p, entries, drawn, err := c.build()
		if err != nil {
			continue // a panel with nothing finite to draw stays empty
		}
		layout(p, entries, drawn, c.LogY, tiles.At(dc, i%2, i/2))
	}
	return savePicture(name, picture(cw, format))
}
