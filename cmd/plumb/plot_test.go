package main

import (
	"bytes"
	"errors"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

var (
	pngMagic = []byte("\x89PNG\r\n\x1a\n") // PNG signature (W3C PNG spec, Sect. 5.2)
)

// checkSVG reports whether b looks like a complete SVG document.
func checkSVG(t *testing.T, b []byte) {
	t.Helper()
	s := string(b)
	if !strings.HasPrefix(s, "<?xml") || !strings.Contains(s, "<svg") || !strings.Contains(s, "</svg>") {
		n := min(len(s), 80)
		t.Errorf("not an SVG document (%d bytes): %q...", len(b), s[:n])
	}
}

// checkPNG decodes b as PNG and checks that it has the default size.
func checkPNG(t *testing.T, b []byte) {
	t.Helper()
	checkPNGSize(t, b, defaultPlotSize)
}

// checkPNGSize decodes b as PNG and checks its size in pixels.
func checkPNGSize(t *testing.T, b []byte, want plotSize) {
	t.Helper()
	if !bytes.HasPrefix(b, pngMagic) {
		t.Fatalf("no PNG signature (%d bytes)", len(b))
	}
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatalf("PNG does not decode: %v", err)
	}
	// WxH pixels at gonum/plot's 96 dpi are W·3/4 by H·3/4 points, drawn
	// back at 96 dpi (exact: the picture is made at the pixel size asked).
	if r := img.Bounds(); r.Dx() != want.w || r.Dy() != want.h {
		t.Errorf("PNG is %dx%d, want %dx%d", r.Dx(), r.Dy(), want.w, want.h)
	}
}

func TestLineChartFormats(t *testing.T) {
	x := []float64{0, 1, 2, 3, 4}
	c := &lineChart{Title: "decay", XLabel: "t", YLabel: "distance", Series: []series{
		{Name: "a", X: x, Y: []float64{1, 0.5, 0.25, 0.125, 0.0625}},
		{Name: "b", X: x, Y: []float64{2, 1, math.NaN(), 0.25, math.Inf(1)}},
	}}
	var svg, pngb bytes.Buffer
	if err := c.write(&svg, "svg"); err != nil {
		t.Fatal(err)
	}
	checkSVG(t, svg.Bytes())
	if !strings.Contains(svg.String(), "decay") {
		t.Error("the title is not in the SVG")
	}
	if err := c.write(&pngb, "png"); err != nil {
		t.Fatal(err)
	}
	checkPNG(t, pngb.Bytes())
}

func TestLineChartLogY(t *testing.T) {
	c := &lineChart{LogY: true, Series: []series{
		{Name: "growth", X: []float64{0, 1, 2, 3}, Y: []float64{0, 1e-12, 1e-6, -1}},
	}}
	if got := len(c.points(c.Series[0])); got != 2 {
		t.Errorf("log axis keeps %d points, want the 2 positive ones", got)
	}
	var b bytes.Buffer
	if err := c.write(&b, "svg"); err != nil {
		t.Fatal(err)
	}
	checkSVG(t, b.Bytes())
	// Nothing positive at all: a clear error, not a panic in the log scale.
	c.Series[0].Y = []float64{0, -1, math.NaN(), 0}
	if err := c.write(&b, "svg"); !errors.Is(err, errNothingToDraw) {
		t.Errorf("got %v, want errNothingToDraw", err)
	}
}

func TestLineChartManySeries(t *testing.T) {
	c := &lineChart{}
	for i := 0; i < 2*len(palette)+1; i++ { // colours repeat with dashes
		c.Series = append(c.Series, series{Name: string(rune('a' + i)), X: []float64{0, 1}, Y: []float64{float64(i), float64(i + 1)}})
	}
	var b bytes.Buffer
	if err := c.write(&b, "svg"); err != nil {
		t.Fatal(err)
	}
	checkSVG(t, b.Bytes())
}

func TestSavePlotFiles(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"run.svg", "run.PNG"} {
		path := filepath.Join(dir, name)
		r := plumbRun(t, "solve", "--t1", "2", "--format", "csv", "--plot", path, "--quiet")
		if r.code != exitOK {
			t.Fatalf("%s: exit %d, stderr %q", name, r.code, r.stderr)
		}
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		if strings.HasSuffix(name, ".svg") {
			checkSVG(t, b)
		} else {
			checkPNG(t, b)
		}
	}
	// A plot that cannot be written is a failed step: exit 1, named.
	r := plumbRun(t, "solve", "--t1", "1", "--plot", filepath.Join(dir, "missing", "x.svg"), "--quiet")
	if r.code != exitFailed || !strings.Contains(r.stderr, "--plot") {
		t.Errorf("unwritable plot: exit %d, stderr %q", r.code, r.stderr)
	}
	// A chart with no series is an error and creates no file.
	if err := (&lineChart{}).save(filepath.Join(dir, "empty.svg"), plotSize{}); !errors.Is(err, errNothingToDraw) {
		t.Errorf("empty chart: %v", err)
	}
	if _, err := os.Stat(filepath.Join(dir, "empty.svg")); !os.IsNotExist(err) {
		t.Error("an empty chart created a file")
	}
}
