package main

import (
	"fmt"
	"image"
	"image/color"
	"image/draw"
	"image/gif"
	"io"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	vgdraw "gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"

	"github.com/plumbdyn/plumb"
)

// Bounds of --animate: at most animFrames frames, each at most
// animMaxW×animMaxH pixels, so a GIF stays a few megabytes.
const (
	animFrames = 120
	animDelay  = 6 // hundredths of a second per frame
	animMaxW   = 800
	animMaxH   = 500
	animDot    = 3 // dot radius in pixels
)

// animPalette is the GIF's palette: 64 greys for the background (axes,
// text, the control's path) and the chart palette for the members.
func animPalette() color.Palette {
	var p color.Palette
	for i := 0; i < 64; i++ {
		v := uint8(i * 255 / 63)
		p = append(p, color.RGBA{v, v, v, 0xff})
	}
	for _, c := range palette {
		p = append(p, c)
	}
	return p
}

// saveAnimation writes a GIF of the members moving across components ix,
// iy, over the control's path drawn lightly.
func saveAnimation(name string, size plotSize, sys *plumb.System, rep *plumb.EnsembleReport, ix, iy int) error {
	run := rep.Run
	if run == nil || len(run.Samples) == 0 {
		return errNothingToDraw
	}
	d := describe(sys)
	w, h := animMaxW, animMaxH
	if size != (plotSize{}) {
		w, h = min(size.w, animMaxW), min(size.h, animMaxH)
	}
	p := plot.New()
	p.Title.Text = fmt.Sprintf("%s: %d members released %s apart", sys.Title, rep.Members, fmtSig(rep.Delta))
	p.X.Label.Text = withUnit(d.States[ix].Name, d.States[ix].Unit)
	p.Y.Label.Text = withUnit(d.States[iy].Name, d.States[iy].Unit)
	n := run.Dim
	ref := make(plotter.XYs, 0, len(run.Samples))
	for _, smp := range run.Samples {
		ref = append(ref, plotter.XY{X: smp.Y[ix], Y: smp.Y[iy]})
	}
	// Every member's positions set the axes, so no dot leaves the frame.
	var all plotter.XYs
	for _, smp := range run.Samples {
		for k := 0; k < run.Members; k++ {
			all = append(all, plotter.XY{X: smp.Y[k*n+ix], Y: smp.Y[k*n+iy]})
		}
	}
	l, err := plotter.NewLine(ref)
	if err != nil {
		return err
	}
	l.LineStyle.Color, l.LineStyle.Width = referenceGrey, vg.Points(0.6)
	p.Add(plotter.NewGrid(), l)
	p.X.Min, p.X.Max, p.Y.Min, p.Y.Max = plotter.XYRange(all)
	const dpi = 96
	cv := vgimg.NewWith(vgimg.UseWH(vg.Length(w)*vg.Inch/dpi, vg.Length(h)*vg.Inch/dpi), vgimg.UseDPI(dpi))
	dc := vgdraw.New(cv)
	p.Draw(dc)
	da := p.DataCanvas(dc)
	trX, trY := p.Transforms(&da)
	bg := cv.Image()
	pal := animPalette()
	bounds := bg.Bounds()
	px := func(x, y float64) (int, int) {
		return int(float64(trX(x)) * dpi / 72), bounds.Dy() - int(float64(trY(y))*dpi/72)
	}
	frames := min(animFrames, len(run.Samples))
	anim := &gif.GIF{}
	base := image.NewPaletted(bounds, pal)
	draw.Draw(base, bounds, bg, bounds.Min, draw.Src)
	for f := 0; f < frames; f++ {
		j := f * (len(run.Samples) - 1) / max(1, frames-1)
		img := image.NewPaletted(bounds, pal)
		copy(img.Pix, base.Pix)
		for k := run.Members - 1; k >= 0; k-- { // the control drawn last, on top
			y := run.Samples[j].Y[k*n : (k+1)*n]
			cx, cy := px(y[ix], y[iy])
			// Members cycle through the palette's colours but its black,
			// which is the control's.
			ci := uint8(64 + (k-1)%(len(palette)-1))
			if k == 0 {
				ci = 0 // black
			}
			for dy := -animDot; dy <= animDot; dy++ {
				for dx := -animDot; dx <= animDot; dx++ {
					if dx*dx+dy*dy <= animDot*animDot && image.Pt(cx+dx, cy+dy).In(bounds) {
						img.SetColorIndex(cx+dx, cy+dy, ci)
					}
				}
			}
		}
		anim.Image = append(anim.Image, img)
		anim.Delay = append(anim.Delay, animDelay)
	}
	return writeFileAtomic(name, func(out io.Writer) error { return gif.EncodeAll(out, anim) })
}
