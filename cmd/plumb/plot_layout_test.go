package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
)

// TestPlotSizeFlag: --plot-size sets the PNG's size in pixels; bad sizes
// and a size without a picture are usage errors naming the flag.
func TestPlotSizeFlag(t *testing.T) {
	dir := t.TempDir()
	for _, size := range []plotSize{{480, 300}, {1280, 800}} {
		path := filepath.Join(dir, "run.png")
		r := plumbRun(t, "solve", "--t1", "2", "--plot", path, "--plot-size", size.String(), "--quiet", "--format", "csv")
		require.Equalf(t, exitOK, r.code, "stderr %q", r.stderr)
		b, err := os.ReadFile(path)
		require.NoError(t, err)
		checkPNGSize(t, b, size)
	}
	for _, bad := range []string{"800", "800x", "x600", "0x600", "100x100", "9000x600", "8e2x600", "axb"} {
		r := plumbRun(t, "solve", "--plot", filepath.Join(dir, "x.png"), "--plot-size", bad)
		if r.code != exitUsage || !strings.Contains(r.stderr, "--plot-size") {
			t.Errorf("--plot-size %s: exit %d, stderr %q", bad, r.code, r.stderr)
		}
	}
	r := plumbRun(t, "solve", "--plot-size", "800x600")
	if r.code != exitUsage || !strings.Contains(r.stderr, "--plot-size") || !strings.Contains(r.stderr, "--plot") {
		t.Errorf("--plot-size without --plot: exit %d, stderr %q", r.code, r.stderr)
	}
}

// cornerChart is a chart whose data fill every corner but the one named
// ("" for none): a dense grid of points with that quarter left out.
func cornerChart(free string) *lineChart {
	var s series
	for i := 0; i <= 40; i++ {
		for j := 0; j <= 40; j++ {
			x, y := float64(i)/40, float64(j)/40
			left, bottom := x < 0.5, y < 0.5
			name := map[[2]bool]string{{false, false}: "top right", {true, false}: "top left", {false, true}: "bottom right", {true, true}: "bottom left"}[[2]bool{left, bottom}]
			if name == free {
				continue
			}
			s.X, s.Y = append(s.X, x), append(s.Y, y)
		}
	}
	s.Name = "grid"
	return &lineChart{Scatter: true, Series: []series{s, {Name: "another entry", X: []float64{0.5}, Y: []float64{0.5}}}}
}

// TestLegendFindsEmptyCorner: the legend goes to the corner no data
// crosses, and to none when every corner holds data.
func TestLegendFindsEmptyCorner(t *testing.T) {
	for _, free := range []string{"top right", "top left", "bottom right", "bottom left", ""} {
		t.Run(free, func(t *testing.T) {
			c := cornerChart(free)
			p, entries, drawn, err := c.build()
			require.NoError(t, err)
			w, h := defaultPlotSize.lengths()
			dc := draw.New(vgimg.New(w, h))
			l := plot.NewLegend()
			for _, e := range entries {
				l.Add(e.name, e.thumb)
			}
			lw, lh := legendSize(&l, entries)
			da := p.DataCanvas(dc)
			r, ok := emptyCorner(p, da, drawn, lw, lh)
			if free == "" {
				assert.False(t, ok, "every corner holds data, yet the legend went to %v", r)
				return
			}
			require.True(t, ok, "the %s corner is empty but was not found", free)
			mid := vg.Point{X: (da.Min.X + da.Max.X) / 2, Y: (da.Min.Y + da.Max.Y) / 2}
			got := map[[2]bool]string{{false, false}: "top right", {true, false}: "top left", {false, true}: "bottom right", {true, true}: "bottom left"}[[2]bool{r.Max.X < mid.X, r.Max.Y < mid.Y}]
			assert.Equal(t, free, got)
		})
	}
}

// TestTrustChartMarksHorizon: the trust picture marks the time up to which
// the run is trusted, with its value, and nothing when the whole horizon is.
func TestTrustChartMarksHorizon(t *testing.T) {
	out, _, _ := decodeTrust(t, "--horizon", "25")
	c := trustChart(out.Report)
	require.Len(t, c.Marks, 1)
	assert.Equal(t, out.Report.TrustedUntil, c.Marks[0].X)
	assert.Contains(t, c.Marks[0].Label, "trusted until t = ")
	whole, _, _ := decodeTrust(t, "--horizon", "2")
	assert.Empty(t, trustChart(whole.Report).Marks, "a horizon trusted to its end needs no mark")
}

// TestWrapText: a long title is wrapped into lines that each fit the
// width with the font slack, a word too long for a line is cut with "…",
// and short text is left alone.
func TestWrapText(t *testing.T) {
	sty := plot.New().Title.TextStyle
	width := vg.Points(200)
	fits := func(s string) bool { return sty.Width(s)*fontSlack <= width }
	assert.Equal(t, "short", wrapText(sty, "short", width))
	long := strings.Repeat("convergence of the Lyapunov exponents ", 3)
	got := wrapText(sty, long, width)
	lines := strings.Split(got, "\n")
	assert.Greater(t, len(lines), 1)
	assert.LessOrEqual(t, len(lines), 3)
	for _, l := range lines {
		assert.Truef(t, fits(l), "line %q is wider than %v", l, width)
	}
	word := wrapText(sty, strings.Repeat("x", 200), width)
	assert.True(t, strings.HasSuffix(word, "…") && fits(word), "an overlong word: %q", word)
}

// TestSVGFontStack: the SVG names a font stack ending in a generic family,
// never the single measured font alone.
func TestSVGFontStack(t *testing.T) {
	c := &lineChart{Title: "decay", Series: []series{{Name: "a", X: []float64{0, 1}, Y: []float64{1, 2}}}}
	var b bytes.Buffer
	require.NoError(t, c.write(&b, "svg"))
	checkSVG(t, b.Bytes())
	s := b.String()
	assert.NotContains(t, s, "font-family:Liberation Serif;")
	assert.Contains(t, s, "font-family:'Liberation Serif','Times New Roman',Times,'Nimbus Roman',serif;")
}

// TestDecadeTicks: ticks stay inside the axis (one beyond it would still
// take room for its label), and with every = 3 only every third decade is
// labelled.
func TestDecadeTicks(t *testing.T) {
	lo, hi := 3e-13, 52.0
	labels := func(d decadeTicks) []string {
		var out []string
		for _, tk := range d.Ticks(lo, hi) {
			assert.Truef(t, tk.Value >= lo*(1-1e-9) && tk.Value <= hi*(1+1e-9), "tick %v outside [%v, %v]", tk.Value, lo, hi)
			if tk.Label != "" {
				out = append(out, tk.Label)
			}
		}
		return out
	}
	all := labels(decadeTicks{})
	// 1e-12 .. 10: 14 decades (exact).
	assert.Len(t, all, 14)
	assert.Equal(t, []string{"1e-12", "1e-09", "1e-06", "0.001", "1"}, labels(decadeTicks{every: 3}))
}

// FuzzPlotSize: --plot-size never panics, accepts only sizes within the
// bounds, and what it accepts prints back as the same size.
func FuzzPlotSize(f *testing.F) {
	for _, s := range []string{"960x600", "480X300", " 1280x800 ", "240x240", "8000x8000", "0x0", "x", "1e3x600", "-5x600", "600x600x2", "９６０x600"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		var p plotSize
		if err := p.Set(s); err != nil {
			if err.Error() == "" {
				t.Fatal("empty error")
			}
			return
		}
		if p.w < minPlotPixels || p.w > maxPlotPixels || p.h < minPlotPixels || p.h > maxPlotPixels {
			t.Fatalf("%q accepted as %dx%d, outside the bounds", s, p.w, p.h)
		}
		var back plotSize
		if err := back.Set(p.String()); err != nil || back != p {
			t.Fatalf("%q -> %v -> %q -> %v (%v)", s, p, p.String(), back, err)
		}
	})
}
