package main

import (
	"errors"
	"fmt"
	"image/color"
	"io"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// series is one named curve of a chart: Y against X.
type series struct {
	Name string
	X, Y []float64
}

// lineChart is a line plot of several named series, drawn by gonum/plot.
// Every command that draws reuses it: trajectories against time, divergence
// curves on a log axis, convergence histories.
type lineChart struct {
	Title, XLabel, YLabel string
	// LogY draws the y axis on a log scale; points with y <= 0 cannot be
	// drawn there and are left out.
	LogY bool
	// Scatter draws every series as unconnected dots (an orbit of a map,
	// where a line between iterates means nothing) instead of a line.
	Scatter bool
	Series  []series
	// Marks are vertical lines with a label, such as the time up to which
	// a run is trusted.
	Marks []mark
	// Size is the picture's size; zero means defaultPlotSize.
	Size plotSize
}

// mark is a labelled vertical line at X.
type mark struct {
	X     float64
	Label string
}

// errNothingToDraw reports a chart without a single drawable point.
var errNothingToDraw = errors.New("no finite points to draw")

// palette is the order in which series get their colours: eight hues that
// stay apart for common forms of colour blindness (Okabe & Ito 2008,
// "Color Universal Design"), then repeating with dashes.
var palette = []color.RGBA{
	{0x00, 0x72, 0xB2, 0xff}, // blue
	{0xD5, 0x5E, 0x00, 0xff}, // vermillion
	{0x00, 0x9E, 0x73, 0xff}, // bluish green
	{0xCC, 0x79, 0xA7, 0xff}, // reddish purple
	{0xE6, 0x9F, 0x00, 0xff}, // orange
	{0x56, 0xB4, 0xE9, 0xff}, // sky blue
	{0xF0, 0xE4, 0x42, 0xff}, // yellow
	{0x00, 0x00, 0x00, 0xff}, // black
}

// points returns the drawable points of s: finite, and positive y on a log axis.
func (c *lineChart) points(s series) plotter.XYs {
	n := min(len(s.X), len(s.Y))
	xy := make(plotter.XYs, 0, n)
	for i := 0; i < n; i++ {
		x, y := s.X[i], s.Y[i]
		if math.IsNaN(x) || math.IsInf(x, 0) || math.IsNaN(y) || math.IsInf(y, 0) {
			continue
		}
		if c.LogY && y <= 0 {
			continue
		}
		xy = append(xy, plotter.XY{X: x, Y: y})
	}
	return xy
}

// legendEntry is one line of a chart's legend.
type legendEntry struct {
	name  string
	thumb plot.Thumbnailer
}

// drawnSeries is what a series put on the chart: its points and whether
// they are joined by lines (for the legend's search for empty space).
type drawnSeries struct {
	xy   plotter.XYs
	line bool
}

// build makes the gonum plot without its legend, and returns the legend's
// entries and the points drawn, for layout to place the legend.
func (c *lineChart) build() (*plot.Plot, []legendEntry, []drawnSeries, error) {
	p := plot.New()
	p.Title.Text = c.Title
	p.X.Label.Text = c.XLabel
	p.Y.Label.Text = c.YLabel
	var entries []legendEntry
	var drawnPts []drawnSeries
	if c.LogY {
		p.Y.Scale = plot.LogScale{}
		p.Y.Tick.Marker = decadeTicks{}
	}
	p.Add(plotter.NewGrid())
	drawn := 0
	for i, s := range c.Series {
		xy := c.points(s)
		if len(xy) == 0 {
			continue
		}
		if c.Scatter {
			sc, err := plotter.NewScatter(xy)
			if err != nil {
				return nil, nil, nil, fmt.Errorf("series %q: %w", s.Name, err)
			}
			sc.GlyphStyle.Color = palette[i%len(palette)]
			sc.GlyphStyle.Radius = vg.Points(0.6)
			sc.GlyphStyle.Shape = draw.CircleGlyph{}
			p.Add(sc)
			if s.Name != "" {
				entries = append(entries, legendEntry{s.Name, sc})
			}
			drawnPts = append(drawnPts, drawnSeries{xy: xy})
			drawn++
			continue
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return nil, nil, nil, fmt.Errorf("series %q: %w", s.Name, err)
		}
		l.LineStyle.Color = palette[i%len(palette)]
		l.LineStyle.Width = vg.Points(1)
		if k := i / len(palette); k > 0 {
			l.LineStyle.Dashes = []vg.Length{vg.Points(float64(2 + 2*k)), vg.Points(2)}
		}
		p.Add(l)
		if s.Name != "" {
			entries = append(entries, legendEntry{s.Name, l})
		}
		drawnPts = append(drawnPts, drawnSeries{xy: xy, line: true})
		drawn++
	}
	if drawn == 0 {
		return nil, nil, nil, errNothingToDraw
	}
	for _, m := range c.Marks {
		if math.IsNaN(m.X) || math.IsInf(m.X, 0) {
			continue
		}
		p.Add(markPlotter{m})
		// Its line, from the bottom to the top of the data, takes space
		// the legend must not cover.
		drawnPts = append(drawnPts, drawnSeries{xy: plotter.XYs{{X: m.X, Y: p.Y.Min}, {X: m.X, Y: p.Y.Max}}, line: true})
	}
	return p, entries, drawnPts, nil
}

// decadeTicks marks a log axis at the powers of ten, labelled "1e-06",
// without the rounding noise ("9.999999999999998e-07") that labels made
// from computed tick values carry. With every > 1 only the decades whose
// exponent is a multiple of every are labelled (the others stay as ticks),
// so that labels on a short axis do not overlap.
type decadeTicks struct{ every int }

// Ticks returns plot.LogTicks' ticks with the major ones relabelled.
func (d decadeTicks) Ticks(min, max float64) []plot.Tick {
	var out []plot.Tick
	for _, t := range (plot.LogTicks{Prec: -1}).Ticks(min, max) {
		// A tick beyond the axis is not drawn, but its label would still
		// make room for itself above or below the data.
		if t.Value < min*(1-1e-9) || t.Value > max*(1+1e-9) {
			continue
		}
		if t.Label != "" && t.Value > 0 {
			e := int(math.Round(math.Log10(t.Value)))
			t.Label = strconv.FormatFloat(math.Pow10(e), 'g', -1, 64)
			if d.every > 1 && e%d.every != 0 {
				t.Label = ""
			}
		}
		out = append(out, t)
	}
	return out
}

// render builds the chart and its picture in format ("svg" or "png").
func (c *lineChart) render(format string) (io.WriterTo, error) {
	p, entries, drawn, err := c.build()
	if err != nil {
		return nil, err
	}
	size := c.Size
	if size == (plotSize{}) {
		size = defaultPlotSize
	}
	width, height := size.lengths()
	cw, err := draw.NewFormattedCanvas(width, height, format)
	if err != nil {
		return nil, err
	}
	layout(p, entries, drawn, c.LogY, draw.New(cw))
	return picture(cw, format), nil
}

// picture is the drawn canvas cw ready to write in format: an SVG with the
// font stack (svgFontStack), a PNG as it is.
func picture(cw io.WriterTo, format string) io.WriterTo {
	if format == "svg" {
		return svgFontStack{cw}
	}
	return cw
}

// savePicture writes the picture wt into the file name, whole (a failure
// leaves an existing file alone).
func savePicture(name string, wt io.WriterTo) error {
	return writeFileAtomic(name, func(w io.Writer) error {
		_, err := wt.WriteTo(w)
		return err
	})
}

// write draws the chart in format ("svg" or "png") to w.
func (c *lineChart) write(w io.Writer, format string) error {
	wt, err := c.render(format)
	if err != nil {
		return err
	}
	_, err = wt.WriteTo(w)
	return err
}

// save draws the chart at size (zero: the default) into the file name,
// whose extension (.svg, .png) gives the format. The file is created only
// once the picture is drawn, so a chart that cannot be drawn leaves an
// existing file alone.
func (c *lineChart) save(name string, size plotSize) (err error) {
	c.Size = size
	format, err := plotFormat(name)
	if err != nil {
		return err
	}
	wt, err := c.render(format)
	if err != nil {
		return err
	}
	return savePicture(name, wt)
}
