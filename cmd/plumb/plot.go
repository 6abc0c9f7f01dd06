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
	// LegendBottom puts the legend in the lower right corner instead of
	// the upper right (divergence curves leave that corner empty).
	LegendBottom bool
	// Scatter draws every series as unconnected dots (an orbit of a map,
	// where a line between iterates means nothing) instead of a line.
	Scatter bool
	Series  []series
	// Width and Height of the picture; zero means 16 cm by 10 cm.
	Width, Height vg.Length
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

// build makes the gonum plot.
func (c *lineChart) build() (*plot.Plot, error) {
	p := plot.New()
	p.Title.Text = c.Title
	p.X.Label.Text = c.XLabel
	p.Y.Label.Text = c.YLabel
	p.Legend.Top = !c.LegendBottom
	if len(c.Series) > 6 {
		p.Legend.TextStyle.Font.Size = vg.Points(7)
	}
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
				return nil, fmt.Errorf("series %q: %w", s.Name, err)
			}
			sc.GlyphStyle.Color = palette[i%len(palette)]
			sc.GlyphStyle.Radius = vg.Points(0.6)
			sc.GlyphStyle.Shape = draw.CircleGlyph{}
			p.Add(sc)
			if s.Name != "" {
				p.Legend.Add(s.Name, sc)
			}
			drawn++
			continue
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return nil, fmt.Errorf("series %q: %w", s.Name, err)
		}
		l.LineStyle.Color = palette[i%len(palette)]
		l.LineStyle.Width = vg.Points(1)
		if k := i / len(palette); k > 0 {
			l.LineStyle.Dashes = []vg.Length{vg.Points(float64(2 + 2*k)), vg.Points(2)}
		}
		p.Add(l)
		if s.Name != "" {
			p.Legend.Add(s.Name, l)
		}
		drawn++
	}
	if drawn == 0 {
		return nil, errNothingToDraw
	}
	return p, nil
}

// decadeTicks marks a log axis at the powers of ten, labelled "1e-06",
// without the rounding noise ("9.999999999999998e-07") that labels made
// from computed tick values carry.
type decadeTicks struct{}

// Ticks returns plot.LogTicks' ticks with the major ones relabelled.
func (decadeTicks) Ticks(min, max float64) []plot.Tick {
	ticks := plot.LogTicks{Prec: -1}.Ticks(min, max)
	for i, t := range ticks {
		if t.Label == "" || !(t.Value > 0) {
			continue
		}
		ticks[i].Label = strconv.FormatFloat(math.Pow10(int(math.Round(math.Log10(t.Value)))), 'g', -1, 64)
	}
	return ticks
}

// render builds the chart and its picture in format ("svg" or "png").
func (c *lineChart) render(format string) (io.WriterTo, error) {
	p, err := c.build()
	if err != nil {
		return nil, err
	}
	width, height := c.Width, c.Height
	if width == 0 {
		width = 16 * vg.Centimeter
	}
	if height == 0 {
		height = 10 * vg.Centimeter
	}
	return p.WriterTo(width, height, format)
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

// save draws the chart into the file name, whose extension (.svg, .png)
// gives the format. The file is created only once the picture is drawn, so a
// chart that cannot be drawn leaves an existing file alone.
func (c *lineChart) save(name string) (err error) {
	format, err := plotFormat(name)
	if err != nil {
		return err
	}
	wt, err := c.render(format)
	if err != nil {
		return err
	}
	return writeFileAtomic(name, func(w io.Writer) error {
		_, err := wt.WriteTo(w)
		return err
	})
}
