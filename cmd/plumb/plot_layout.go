package main

import (
	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// plotSize is the size of a --plot picture in pixels: PNG pixels, and in
// SVG CSS pixels (96 to the inch, as in PNG).
type plotSize struct{ w, h int }

// defaultPlotSize is the picture size without --plot-size: 10 by 6.25
// inches at 96 pixels per inch, large enough for a ladder's ten curves and
// their legend.
var defaultPlotSize = plotSize{960, 600}

// Bounds of --plot-size: below the minimum the axes and the legend leave
// no room for data; above the maximum a PNG takes hundreds of megabytes.
const (
	minPlotPixels = 240
	maxPlotPixels = 8000
)

func (s *plotSize) String() string {
	if s == nil || *s == (plotSize{}) {
		return fmt.Sprintf("%dx%d", defaultPlotSize.w, defaultPlotSize.h)
	}
	return fmt.Sprintf("%dx%d", s.w, s.h)
}

// Set parses WxH, e.g. 1200x800.
func (s *plotSize) Set(v string) error {
	ws, hs, ok := strings.Cut(strings.ToLower(strings.TrimSpace(v)), "x")
	w, werr := strconv.Atoi(ws)
	h, herr := strconv.Atoi(hs)
	if !ok || werr != nil || herr != nil {
		return fmt.Errorf("want WIDTHxHEIGHT in pixels, e.g. 1200x800")
	}
	if w < minPlotPixels || h < minPlotPixels || w > maxPlotPixels || h > maxPlotPixels {
		return fmt.Errorf("%dx%d: each side must be %d to %d pixels", w, h, minPlotPixels, maxPlotPixels)
	}
	*s = plotSize{w, h}
	return nil
}

// lengths is the size in the drawing's units (points).
func (s plotSize) lengths() (w, h vg.Length) {
	px := vg.Inch / 96
	return vg.Length(s.w) * px, vg.Length(s.h) * px
}

// fontSlack is how much wider than measured text is given room: an SVG
// viewer without the Liberation fonts substitutes one, often wider (DejaVu
// Serif sets a line about 15% wider than Liberation Serif, measured on
// this chart's legends; 25% leaves a margin).
const fontSlack = 1.25

// legendPad is the space around the legend and between it and the data.
var legendPad = vg.Points(4)

// layout draws p into dc with its title wrapped to the width, and the
// legend where it covers no data: in the corner of the data area that no
// drawn point or line crosses, or else beside the data (or below it, when
// the legend is wide).
func layout(p *plot.Plot, entries []legendEntry, drawn []drawnSeries, logY bool, dc draw.Canvas) {
	// Room at the top and the right for text that a substituted font
	// widens past the edge (the title, the last tick label).
	dc = draw.Crop(dc, 0, -vg.Points(8), 0, -vg.Points(3))
	size := dc.Size()
	k := textScale(size)
	p.Title.TextStyle.Font.Size = vg.Points(12 * k)
	p.X.Label.TextStyle.Font.Size = vg.Points(11 * k)
	p.Y.Label.TextStyle.Font.Size = vg.Points(11 * k)
	p.X.Tick.Label.Font.Size = vg.Points(9.5 * k)
	p.Y.Tick.Label.Font.Size = vg.Points(9.5 * k)
	if dt, ok := p.Y.Tick.Marker.(decadeTicks); ok && p.Y.Min > 0 && p.Y.Max > p.Y.Min {
		// Label every decade only while the labels have room.
		decades := math.Log10(p.Y.Max / p.Y.Min)
		room := float64(size.Y*0.7) / (1.6 * float64(p.Y.Tick.Label.Font.Size))
		dt.every = max(1, int(math.Ceil(decades/room)))
		p.Y.Tick.Marker = dt
	}
	p.Title.Text = wrapText(p.Title.TextStyle, p.Title.Text, size.X*0.95)
	p.Y.Label.Text = wrapText(p.Y.Label.TextStyle, p.Y.Label.Text, size.Y*0.6)
	p.X.Label.Text = wrapText(p.X.Label.TextStyle, p.X.Label.Text, size.X*0.8)
	if logY && p.Y.Label.Text != "" {
		// gonum/plot centres the y label at the arithmetic mean of the
		// axis range, which on a log axis lies near the top, and pads the
		// data area down to fit it there: draw it here instead, in a strip
		// on the left, centred on the data.
		label, sty := p.Y.Label.Text, p.Y.Label.TextStyle
		p.Y.Label.Text = ""
		sty.Rotation = math.Pi / 2
		sty.XAlign, sty.YAlign = text.XCenter, text.YTop
		strip := p.Y.Label.TextStyle.Height(label) + p.Y.Label.Padding
		full := dc
		defer func() {
			da := p.DataCanvas(draw.Crop(full, strip, 0, 0, 0))
			full.FillText(sty, vg.Point{X: full.Min.X, Y: (da.Min.Y + da.Max.Y) / 2}, label)
		}()
		dc = draw.Crop(dc, strip, 0, 0, 0)
		size = dc.Size()
	}
	if len(entries) == 0 {
		p.Draw(dc)
		return
	}
	fontSize := vg.Points(9 * k)
	if len(entries) > 6 {
		fontSize = vg.Points(8 * k)
	}
	leg := func(es []legendEntry) *plot.Legend {
		l := plot.NewLegend()
		l.TextStyle.Font.Size = fontSize
		l.Top, l.Left = true, true // thumbnails left: text that runs long runs away from them
		for _, e := range es {
			l.Add(e.name, e.thumb)
		}
		return &l
	}
	all := leg(entries)
	lw, lh := legendSize(all, entries)

	da := p.DataCanvas(dc)
	if r, ok := emptyCorner(p, da, drawn, lw, lh); ok {
		p.Draw(dc)
		drawLegend(dc, all, r)
		return
	}
	// No corner is free: beside the data if the legend is narrow enough,
	// else below it in as many columns as fit.
	if lw+2*legendPad <= size.X*0.3 {
		p.Draw(draw.Crop(dc, 0, -(lw + 2*legendPad), 0, 0))
		da = p.DataCanvas(draw.Crop(dc, 0, -(lw + 2*legendPad), 0, 0))
		x := dc.Max.X - lw - legendPad
		drawLegend(dc, all, vg.Rectangle{Min: vg.Point{X: x, Y: da.Max.Y - lh}, Max: vg.Point{X: x + lw, Y: da.Max.Y}})
		return
	}
	cols := max(1, int((size.X-legendPad)/(lw+legendPad)))
	cols = min(cols, len(entries))
	if cols == 1 && len(entries) > 3 {
		// One long column would take most of the height: two columns,
		// the names cut short to fit (the CSV and JSON have them whole).
		cols = 2
		room := (size.X-legendPad)/2 - all.ThumbnailWidth - 2*legendPad
		short := make([]legendEntry, len(entries))
		for i, e := range entries {
			short[i] = legendEntry{shorten(all.TextStyle, e.name, room), e.thumb}
		}
		entries = short
	}
	rows := (len(entries) + cols - 1) / cols
	_, rowH := legendSize(leg(entries[:1]), entries[:1])
	height := vg.Length(rows)*rowH + 2*legendPad
	p.Draw(draw.Crop(dc, 0, 0, height, 0))
	colW := (size.X - legendPad) / vg.Length(cols)
	for k := 0; k < cols; k++ {
		lo, hi := k*rows, min((k+1)*rows, len(entries))
		if lo >= hi {
			break
		}
		x := dc.Min.X + legendPad + vg.Length(k)*colW
		top := dc.Min.Y + height - legendPad
		l := leg(entries[lo:hi])
		_, h := legendSize(l, entries[lo:hi])
		drawLegendPlain(dc, l, vg.Rectangle{Min: vg.Point{X: x, Y: top - h}, Max: vg.Point{X: x + colW - legendPad, Y: top}})
	}
}

// textScale is the factor the text sizes take for a picture of size: 1
// at the default size, smaller for smaller pictures (down to 0.75, where
// an 8 point legend is 6 points, the least that stays legible), larger for
// larger ones (up to 1.6).
func textScale(size vg.Point) float64 {
	w, h := defaultPlotSize.lengths()
	k := math.Min(float64(size.X/w), float64(size.Y/h))
	return math.Max(0.75, math.Min(1.6, math.Sqrt(k)))
}

// legendSize is the room a legend of entries takes: its measured width,
// the text part widened by fontSlack, and its height.
func legendSize(l *plot.Legend, entries []legendEntry) (w, h vg.Length) {
	var text vg.Length
	for _, e := range entries {
		text = max(text, l.TextStyle.Width(" "+e.name))
	}
	h = l.Rectangle(draw.Canvas{}).Size().Y + l.TextStyle.FontExtents().Descent
	return l.ThumbnailWidth + text*fontSlack + legendPad, h + legendPad
}

// drawLegend draws l into r on a white background with a thin frame.
func drawLegend(dc draw.Canvas, l *plot.Legend, r vg.Rectangle) {
	dc.SetColor(color.NRGBA{0xff, 0xff, 0xff, 0xe6})
	dc.Fill(r.Path())
	dc.SetLineStyle(draw.LineStyle{Color: color.Gray{0xb0}, Width: vg.Points(0.5)})
	dc.Stroke(r.Path())
	drawLegendPlain(dc, l, r)
}

// drawLegendPlain draws l into r, entries from the top left.
func drawLegendPlain(dc draw.Canvas, l *plot.Legend, r vg.Rectangle) {
	inner := vg.Rectangle{Min: vg.Point{X: r.Min.X + legendPad/2, Y: r.Min.Y}, Max: vg.Point{X: r.Max.X, Y: r.Max.Y - legendPad/2}}
	l.Draw(draw.Canvas{Canvas: dc.Canvas, Rectangle: inner})
}

// emptyCorner returns the corner of the data area da, w by h and inset by
// legendPad, that no drawn point or line passes through, trying the top
// right, top left, bottom right and bottom left in turn; ok is false when
// every corner is crossed or the legend does not fit.
func emptyCorner(p *plot.Plot, da draw.Canvas, drawn []drawnSeries, w, h vg.Length) (r vg.Rectangle, ok bool) {
	size := da.Size()
	if w+2*legendPad > size.X*0.6 || h+2*legendPad > size.Y*0.75 {
		return r, false
	}
	trX, trY := p.Transforms(&da)
	lo, hi := da.Min, da.Max
	corners := []vg.Rectangle{
		{Min: vg.Point{X: hi.X - legendPad - w, Y: hi.Y - legendPad - h}, Max: vg.Point{X: hi.X - legendPad, Y: hi.Y - legendPad}},
		{Min: vg.Point{X: lo.X + legendPad, Y: hi.Y - legendPad - h}, Max: vg.Point{X: lo.X + legendPad + w, Y: hi.Y - legendPad}},
		{Min: vg.Point{X: hi.X - legendPad - w, Y: lo.Y + legendPad}, Max: vg.Point{X: hi.X - legendPad, Y: lo.Y + legendPad + h}},
		{Min: vg.Point{X: lo.X + legendPad, Y: lo.Y + legendPad}, Max: vg.Point{X: lo.X + legendPad + w, Y: lo.Y + legendPad + h}},
	}
	for _, c := range corners {
		// A margin around the box: a line just outside it would touch
		// the frame.
		grown := vg.Rectangle{Min: vg.Point{X: c.Min.X - legendPad, Y: c.Min.Y - legendPad}, Max: vg.Point{X: c.Max.X + legendPad, Y: c.Max.Y + legendPad}}
		if !crosses(drawn, trX, trY, grown) {
			return c, true
		}
	}
	return r, false
}

// crosses reports whether a drawn point, or a point of a drawn line
// sampled every half point, lies in r.
func crosses(drawn []drawnSeries, trX, trY func(float64) vg.Length, r vg.Rectangle) bool {
	in := func(x, y vg.Length) bool { return x >= r.Min.X && x <= r.Max.X && y >= r.Min.Y && y <= r.Max.Y }
	for _, d := range drawn {
		var px, py vg.Length
		for i, pt := range d.xy {
			x, y := trX(pt.X), trY(pt.Y)
			if in(x, y) {
				return true
			}
			if d.line && i > 0 {
				n := int(math.Ceil(float64(max(abs(x-px), abs(y-py)) / vg.Points(0.5))))
				n = min(n, 10000)
				for k := 1; k < n; k++ {
					f := vg.Length(float64(k) / float64(n))
					if in(px+f*(x-px), py+f*(y-py)) {
						return true
					}
				}
			}
			px, py = x, y
		}
	}
	return false
}

func abs(v vg.Length) vg.Length {
	if v < 0 {
		return -v
	}
	return v
}

// wrapText breaks s into lines at spaces so that each, widened by
// fontSlack, fits width; a word that alone is too wide is cut short with
// "…". At most three lines are kept, the last one cut short if need be.
func wrapText(sty text.Style, s string, width vg.Length) string {
	fits := func(t string) bool { return sty.Width(t)*fontSlack <= width }
	if s == "" || fits(s) {
		return s
	}
	var lines []string
	line := ""
	for _, w := range strings.Fields(s) {
		switch {
		case line == "":
			line = w
		case fits(line + " " + w):
			line += " " + w
		default:
			lines = append(lines, line)
			line = w
		}
	}
	lines = append(lines, line)
	for i, l := range lines {
		lines[i] = shorten(sty, l, width)
	}
	const maxLines = 3
	if len(lines) > maxLines {
		lines = append(lines[:maxLines-1], shorten(sty, strings.Join(lines[maxLines-1:], " "), width))
	}
	return strings.Join(lines, "\n")
}

// shorten returns s, or s cut short with "…" so that, widened by
// fontSlack, it fits width.
func shorten(sty text.Style, s string, width vg.Length) string {
	fits := func(t string) bool { return sty.Width(t)*fontSlack <= width }
	if fits(s) {
		return s
	}
	r := []rune(s)
	for len(r) > 1 && !fits(string(r)+"…") {
		r = r[:len(r)-1]
	}
	return strings.TrimRight(string(r), " ") + "…"
}

// markPlotter draws a mark: a dashed vertical line over the data area and
// its label at the top, beside the line on the side with more room.
type markPlotter struct{ m mark }

// Plot implements plot.Plotter.
func (mp markPlotter) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	x := trX(mp.m.X)
	if x < c.Min.X || x > c.Max.X {
		return
	}
	c.SetLineStyle(draw.LineStyle{Color: color.Gray{0x40}, Width: vg.Points(1), Dashes: []vg.Length{vg.Points(4), vg.Points(3)}})
	var path vg.Path
	path.Move(vg.Point{X: x, Y: c.Min.Y})
	path.Line(vg.Point{X: x, Y: c.Max.Y})
	c.Stroke(path)
	if mp.m.Label == "" {
		return
	}
	sty := text.Style{Color: color.Gray{0x20}, Font: p.X.Tick.Label.Font, Handler: p.X.Tick.Label.Handler}
	sty.Font.Size = p.X.Tick.Label.Font.Size
	sty.YAlign = text.YTop
	pad := vg.Points(3)
	w := sty.Width(mp.m.Label)
	pt := vg.Point{X: x + pad, Y: c.Max.Y - pad}
	box := vg.Rectangle{Min: vg.Point{X: x + pad/2, Y: pt.Y - sty.Height(mp.m.Label) - pad/2}, Max: vg.Point{X: x + pad*1.5 + w*fontSlack, Y: c.Max.Y - pad/2}}
	if x+pad+w*fontSlack > c.Max.X && x-c.Min.X > c.Max.X-x {
		sty.XAlign = text.XRight
		pt.X = x - pad
		box.Min.X, box.Max.X = x-pad*1.5-w*fontSlack, x-pad/2
	}
	// On a white ground: curves pass behind the label.
	c.SetColor(color.White)
	c.Fill(box.Path())
	c.FillText(sty, pt, mp.m.Label)
}

// svgFontStack writes an SVG with its one font name widened to a stack:
// the Liberation font the text was measured with, the metric-compatible
// fonts most systems have, then the generic family, so that a viewer
// without Liberation keeps the widths close (and the layout's fontSlack
// covers the rest).
type svgFontStack struct{ w io.WriterTo }

// svgFonts maps the family gonum/plot names to the stack written instead.
var svgFonts = []struct{ from, to string }{
	{"font-family:Liberation Serif;", "font-family:'Liberation Serif','Times New Roman',Times,'Nimbus Roman',serif;"},
	{"font-family:Liberation Sans;", "font-family:'Liberation Sans',Arial,Helvetica,'Nimbus Sans',sans-serif;"},
	{"font-family:Liberation Mono;", "font-family:'Liberation Mono','Courier New',Courier,'Nimbus Mono PS',monospace;"},
}

// WriteTo implements io.WriterTo.
func (s svgFontStack) WriteTo(w io.Writer) (int64, error) {
	var b bytes.Buffer
	if _, err := s.w.WriteTo(&b); err != nil {
		return 0, err
	}
	out := b.Bytes()
	for _, f := range svgFonts {
		out = bytes.ReplaceAll(out, []byte(f.from), []byte(f.to))
	}
	n, err := w.Write(out)
	return int64(n), err
}
