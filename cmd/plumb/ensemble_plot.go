package main

import (
	"fmt"
	"image/color"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/internal/detmath"
)

// plot draws the chosen --view of the ensemble into name.
func (f *ensembleFlags) plot(name string, size plotSize, sys *plumb.System, rep *plumb.EnsembleReport) error {
	d := describe(sys)
	axisName := func(i int) string { return withUnit(d.States[i].Name, d.States[i].Unit) }
	axes := make([]int, 0, 2)
	for _, a := range f.axisList {
		axes = append(axes, stateIndex(sys, a))
	}
	run := rep.Run
	switch f.view {
	case "spread":
		return spreadChart(rep, d.TimeUnit).save(name, size)
	case "projection":
		if len(axes) == 0 {
			axes = []int{0, 1}
		}
		at := f.atList
		if at == nil {
			at = []float64{f.t1 / 4, f.t1 / 2, 3 * f.t1 / 4, f.t1}
		}
		return saveProjection(name, size, rep, axes[0], axes[1], at,
			fmt.Sprintf("%s: %d members %s apart, marked at %d times over the control's path", sys.Title, rep.Members, fmtSig(rep.Delta), len(at)),
			axisName(axes[0]), axisName(axes[1]))
	}
	if len(axes) == 0 {
		axes = []int{0}
	}
	c := &lineChart{
		Title:  fmt.Sprintf("%s: %d members released %s apart", sys.Title, rep.Members, fmtSig(rep.Delta)),
		XLabel: withUnit("t", d.TimeUnit),
		YLabel: axisName(axes[0]),
	}
	n := run.Dim
	for k := 0; k < run.Members; k++ {
		s := series{X: rep.Times, Y: make([]float64, len(run.Samples))}
		for j, smp := range run.Samples {
			s.Y[j] = smp.Y[k*n+axes[0]]
		}
		switch k {
		case 0:
			s.Name = "control"
		case 1:
			s.Name = fmt.Sprintf("members 1-%d", rep.Members)
		}
		c.Series = append(c.Series, s)
	}
	if tp := firstParting(rep); tp != nil {
		c.Marks = append(c.Marks, mark{X: *tp, Label: "first member parts"})
	}
	return c.save(name, size)
}

// firstParting returns the earliest parting time, or nil.
func firstParting(rep *plumb.EnsembleReport) *float64 {
	var first *float64
	for _, p := range rep.PartingTimes {
		if p != nil && (first == nil || *p < *first) {
			first = p
		}
	}
	return first
}

// spreadChart is the spread and the largest pair on a log axis, with
// delta·exp(lambda·t) from the small-scale exponent (up to the saturation
// level) and the tolerance.
func spreadChart(rep *plumb.EnsembleReport, tu string) *lineChart {
	c := &lineChart{
		Title:  fmt.Sprintf("%s: how %d members part", rep.System, rep.Members),
		XLabel: withUnit("t", tu),
		YLabel: "distance (" + rep.Distance.String() + ")",
		LogY:   true,
		Series: []series{
			{Name: "spread about the mean", X: rep.Times, Y: rep.MeanSpread},
			{Name: "largest pair", X: rep.Times, Y: rep.LargestPair},
		},
	}
	if rep.SmallScale != nil && len(rep.Times) > 0 {
		l := *rep.SmallScale
		pred := series{Name: fmt.Sprintf("delta·exp(%.3g t)", l)}
		top := rep.Saturation
		if !(top > 0) {
			top = math.Inf(1)
		}
		for _, t := range rep.Times {
			v := rep.Delta * detmath.Exp(l*(t-rep.T0))
			if v > top {
				break
			}
			pred.X, pred.Y = append(pred.X, t), append(pred.Y, v)
		}
		c.Series = append(c.Series, pred)
	}
	if len(rep.Times) > 0 {
		c.Series = append(c.Series, series{Name: "tol " + fmtSig(rep.Tol),
			X: []float64{rep.Times[0], rep.Times[len(rep.Times)-1]}, Y: []float64{rep.Tol, rep.Tol}})
	}
	if tp := firstParting(rep); tp != nil {
		c.Marks = append(c.Marks, mark{X: *tp, Label: "first member parts"})
	}
	return c
}

// referenceGrey is the control's path in the projection: light, so that
// the members' marks stand out.
var referenceGrey = color.RGBA{0xb8, 0xb8, 0xb8, 0xff}

// saveProjection draws components ix, iy of the control's samples as a
// light line and every member's position at the times at (the nearest
// report time) as dots, one colour per time.
func saveProjection(name string, size plotSize, rep *plumb.EnsembleReport, ix, iy int, at []float64, title, xl, yl string) error {
	format, err := plotFormat(name)
	if err != nil {
		return err
	}
	run := rep.Run
	n := run.Dim
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text, p.Y.Label.Text = xl, yl
	p.Add(plotter.NewGrid())
	ref := make(plotter.XYs, 0, len(run.Samples))
	for _, smp := range run.Samples {
		ref = append(ref, plotter.XY{X: smp.Y[ix], Y: smp.Y[iy]})
	}
	if len(ref) == 0 {
		return errNothingToDraw
	}
	l, err := plotter.NewLine(ref)
	if err != nil {
		return err
	}
	l.LineStyle.Color, l.LineStyle.Width = referenceGrey, vg.Points(0.6)
	p.Add(l)
	entries := []legendEntry{{"control's path", l}}
	drawn := []drawnSeries{{xy: ref, line: true}}
	for i, t := range at {
		j := nearestTime(rep.Times, t)
		xy := make(plotter.XYs, 0, run.Members)
		for k := 0; k < run.Members; k++ {
			y := run.Samples[j].Y[k*n : (k+1)*n]
			xy = append(xy, plotter.XY{X: y[ix], Y: y[iy]})
		}
		sc, err := plotter.NewScatter(xy)
		if err != nil {
			return err
		}
		sc.GlyphStyle.Color = palette[i%len(palette)]
		sc.GlyphStyle.Radius = vg.Points(2.2)
		sc.GlyphStyle.Shape = draw.CircleGlyph{}
		p.Add(sc)
		entries = append(entries, legendEntry{"t=" + fmtSig(rep.Times[j]), sc})
		drawn = append(drawn, drawnSeries{xy: xy})
	}
	if size == (plotSize{}) {
		size = defaultPlotSize
	}
	width, height := size.lengths()
	cw, err := draw.NewFormattedCanvas(width, height, format)
	if err != nil {
		return err
	}
	layout(p, entries, drawn, false, draw.New(cw))
	return savePicture(name, picture(cw, format))
}

// nearestTime returns the index of the report time nearest t.
func nearestTime(ts []float64, t float64) int {
	best := 0
	for j, v := range ts {
		if math.Abs(v-t) < math.Abs(ts[best]-t) {
			best = j
		}
	}
	return best
}
