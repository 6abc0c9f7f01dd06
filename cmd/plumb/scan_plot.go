package main

import (
	"fmt"
	"image"
	"image/color"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/maps"
)

// diagramInk is the opacity one point adds to its pixel: a lone point of a
// cycle stays visible, and a pixel a chaotic band visits five times is
// nearly black (1 - 0.5^5 = 0.97).
const diagramInk = 0.5

// saveOrbitDiagram draws the orbit diagram of rows (every value at every
// parameter, alpha-blended into a raster, parameter on x) above the
// exponent against the parameter, on the same parameter axis, into the
// file name.
func saveOrbitDiagram(name string, size plotSize, sys *plumb.System, out scanJSON, rows []maps.ScanRow) error {
	if size == (plotSize{}) {
		size = defaultPlotSize
	}
	format, err := plotFormat(name)
	if err != nil {
		return err
	}
	if len(rows) == 0 {
		return errNothingToDraw
	}
	ax := out.Settings.Across[0]
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, r := range rows {
		for _, v := range r.Values {
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
	}
	if !(lo <= hi) {
		return errNothingToDraw
	}
	if hi == lo {
		lo, hi = lo-0.5, hi+0.5
	}
	pmin, pmax := rows[0].Params[0], rows[len(rows)-1].Params[0]
	if pmax == pmin {
		pmin, pmax = pmin-0.5, pmax+0.5
	}
	// The raster: one column per parameter point up to the picture's width,
	// rows at the picture's height.
	w := min(len(rows), 2*size.w)
	h := size.h
	counts := make([]int32, w*h)
	for _, r := range rows {
		c := int(float64(r.Params[0]-pmin) / (pmax - pmin) * float64(w-1))
		for _, v := range r.Values {
			y := int((hi - v) / (hi - lo) * float64(h-1))
			counts[y*w+c]++
		}
	}
	img := image.NewNRGBA(image.Rect(0, 0, w, h))
	for i, n := range counts {
		a := 1 - math.Pow(1-diagramInk, float64(n))
		img.Pix[4*i+3] = uint8(math.Round(255 * a)) // black at opacity a
	}
	halfX := (pmax - pmin) / float64(2*max(w-1, 1))
	top := plot.New()
	top.Title.Text = fmt.Sprintf("%s: orbit diagram (%d kept iterates after %d)", sys.Title, out.Settings.Keep, out.Settings.Discard)
	top.Y.Label.Text = out.Settings.Component
	top.X.Label.Text = ax.Name
	top.Add(plotter.NewImage(img, pmin-halfX, lo, pmax+halfX, hi))
	top.X.Min, top.X.Max = pmin-halfX, pmax+halfX

	bottom := plot.New()
	bottom.X.Label.Text = ax.Name
	bottom.Y.Label.Text = "exponent λ"
	var pts plotter.XYs
	for _, r := range rows {
		if !math.IsNaN(r.Exponent) && !math.IsInf(r.Exponent, 0) {
			pts = append(pts, plotter.XY{X: r.Params[0], Y: r.Exponent})
		}
	}
	zero, err := plotter.NewLine(plotter.XYs{{X: pmin - halfX, Y: 0}, {X: pmax + halfX, Y: 0}})
	if err != nil {
		return err
	}
	zero.Color = color.Gray{Y: 150}
	zero.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
	bottom.Add(zero)
	if len(pts) > 0 {
		line, err := plotter.NewLine(pts)
		if err != nil {
			return err
		}
		line.Color = palette[0]
		bottom.Add(line)
	}
	bottom.X.Min, bottom.X.Max = pmin-halfX, pmax+halfX

	width, height := size.lengths()
	cw, err := draw.NewFormattedCanvas(width, height, format)
	if err != nil {
		return err
	}
	dc := draw.Crop(draw.New(cw), 0, -vg.Points(12), 0, 0) // room for the last tick label
	// The diagram takes the upper 62 %, the exponent the rest.
	split := vg.Length(0.38) * height
	upper := draw.Crop(dc, 0, 0, split, -vg.Points(4)) // room above the title
	lower := draw.Crop(dc, 0, 0, 0, split-height)
	plots := [][]*plot.Plot{{top}, {bottom}}
	canvases := [][]draw.Canvas{{upper}, {lower}}
	alignX(plots, canvases)
	var wt io.WriterTo = cw
	if format == "svg" {
		wt = svgFontStack{cw}
	}
	return writeFileAtomic(name, func(w io.Writer) error {
		_, err := wt.WriteTo(w)
		return err
	})
}

// alignX draws plots stacked in one column on their canvases with the data
// areas' left and right edges aligned, so that both share the parameter
// axis.
func alignX(plots [][]*plot.Plot, cs [][]draw.Canvas) {
	left, right := vg.Length(0), vg.Length(0)
	for i := range plots {
		da := plots[i][0].DataCanvas(cs[i][0])
		left = max(left, da.Min.X-cs[i][0].Min.X)
		right = max(right, cs[i][0].Max.X-da.Max.X)
	}
	for i := range plots {
		c := cs[i][0]
		da := plots[i][0].DataCanvas(c)
		dl := left - (da.Min.X - c.Min.X)
		dr := right - (c.Max.X - da.Max.X)
		plots[i][0].Draw(draw.Crop(c, dl, -dr, 0, 0))
	}
}
