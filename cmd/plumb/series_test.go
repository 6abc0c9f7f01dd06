package main

import (
	"bytes"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// seriesFile is a Hénon series (a = 1.4, b = 0.3; Hénon 1976) of 2000
// values after 1000 dropped, written by henonCSV; TestSeriesTestdata keeps
// the file equal to what henonCSV writes (-update rewrites it).
const seriesFile = "testdata/series_henon.csv"

func henonCSV() string {
	var b strings.Builder
	b.WriteString("n,x\n")
	x, y := 0.1, 0.1
	for i := 0; i < 3000; i++ {
		x, y = float64(1+y)-float64(1.4*x*x), 0.3*x
		if i >= 1000 {
			b.WriteString(strconv.Itoa(i-1000) + "," + strconv.FormatFloat(x, 'g', -1, 64) + "\n")
		}
	}
	return b.String()
}

func TestSeriesTestdata(t *testing.T) {
	golden(t, filepath.Base(seriesFile), henonCSV())
}

func TestSeriesHenon(t *testing.T) {
	res := plumbRun(t, "series", seriesFile, "--column", "x")
	if res.code != exitOK {
		t.Fatalf("exit %d: %s", res.code, res.stderr)
	}
	golden(t, "series_henon.txt", res.stdout)
	golden(t, "series_henon.stderr", res.stderr)
	// stdin gives the same report, but for the source's name
	in, err := os.ReadFile(seriesFile)
	if err != nil {
		t.Fatal(err)
	}
	res2 := plumbRunStdin(t, string(in), "series", "-", "--column", "x")
	if res2.code != exitOK {
		t.Fatalf("stdin: exit %d: %s", res2.code, res2.stderr)
	}
	if got, want := res2.stdout, strings.Replace(res.stdout, seriesFile, "stdin", 1); got != want {
		t.Errorf("stdin report differs from the file's:\n%s", firstDiff(got, want))
	}
}

func TestSeriesJSON(t *testing.T) {
	res := plumbRun(t, "series", seriesFile, "--column", "x", "--format", "json", "--surrogates", "9")
	if res.code != exitOK {
		t.Fatalf("exit %d: %s", res.code, res.stderr)
	}
	var got struct {
		Embedding struct {
			Lag, Dim int
		}
		CorrelationDimension struct {
			D2      float64 `json:"d2"`
			D2Error float64 `json:"d2_error"`
		} `json:"correlation_dimension"`
		Exponent struct {
			Rosenstein struct {
				Lambda float64
			}
		}
		SurrogateTest struct {
			Count    int
			Rejected bool
		} `json:"surrogate_test"`
		Error *string
	}
	if err := json.Unmarshal([]byte(res.stdout), &got); err != nil {
		t.Fatalf("stdout is not JSON: %v", err)
	}
	// Hénon: dimension 2 (Kennel et al. 1992), D2 = 1.220 ± 0.036 (Sprott),
	// lambda = 0.41922 ± 5 % (Sprott; REFERENCES.md §3a).
	if got.Embedding.Lag != 1 || got.Embedding.Dim != 2 {
		t.Errorf("embedding lag %d dim %d, want 1 and 2", got.Embedding.Lag, got.Embedding.Dim)
	}
	if d := got.CorrelationDimension; d.D2 < 1.220-0.036-2*d.D2Error || d.D2 > 1.220+0.036+2*d.D2Error {
		t.Errorf("d2 = %g ± %g, want 1.220 ± 0.036 (Sprott)", d.D2, d.D2Error)
	}
	if l := got.Exponent.Rosenstein.Lambda; l < 0.41922*0.95 || l > 0.41922*1.05 {
		t.Errorf("lambda = %g, want 0.41922 ± 5 %% (Sprott)", l)
	}
	// alpha = 1/(count+1): the series must forecast better than all 9.
	if got.SurrogateTest.Count != 9 || !got.SurrogateTest.Rejected {
		t.Errorf("surrogate test: %d surrogates, rejected %v; want 9, rejected (Schreiber & Schmitz 1996)", got.SurrogateTest.Count, got.SurrogateTest.Rejected)
	}
	if got.Error != nil {
		t.Errorf("error = %q on success", *got.Error)
	}
}

func TestSeriesBadInput(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	text := write("text.csv", "t,x\n0,1\n1,2\n2,oops\n")
	gap := write("gap.csv", "t,x\n0,1\n1,\n2,3\n")
	nan := write("nan.csv", "t,x\n0,1\n1,NaN\n")
	constant := write("const.csv", "x\n"+strings.Repeat("2.5\n", 40))
	short := write("short.csv", "x\n1\n2\n3\n")
	for _, c := range []struct {
		name string
		args []string
		says string
	}{
		{"no file", []string{"series"}, "want a FILE"},
		{"missing file", []string{"series", filepath.Join(dir, "nope.csv")}, "nope.csv"},
		{"text cell", []string{"series", text, "--column", "x"}, "line 4, column 2: syntax error: \"oops\""},
		{"gap", []string{"series", gap, "--column", "x"}, "line 3, column 2: syntax error: empty cell"},
		{"nan", []string{"series", nan, "--column", "x"}, "line 3, column 2: non-finite value"},
		{"constant", []string{"series", constant}, "constant series"},
		{"too short", []string{"series", short}, "3 values (want at least 16)"},
		{"unknown column", []string{"series", seriesFile, "--column", "y"}, `no such column: column "y"`},
		{"lag x dim beyond", []string{"series", seriesFile, "--lag", "700", "--dim", "4"}, "--lag 700, --dim 4: embedding beyond the series"},
		{"a system", []string{"series", seriesFile, "--model", "lorenz"}, "--model: plumb series analyses a measured series"},
		{"two files", []string{"series", seriesFile, seriesFile}, "unexpected argument"},
		{"bad fraction", []string{"series", seriesFile, "--fraction", "3"}, "--fraction 3"},
		{"dt and time", []string{"series", seriesFile, "--time", "n", "--dt", "2"}, "--dt 2 and --time n"},
		{"bad format after file", []string{"series", seriesFile, "--format", "csv"}, "--format csv"},
	} {
		t.Run(c.name, func(t *testing.T) {
			res := plumbRun(t, c.args...)
			if res.code != exitUsage {
				t.Fatalf("exit %d, want %d; stderr %q", res.code, exitUsage, res.stderr)
			}
			if !strings.Contains(res.stderr, c.says) {
				t.Errorf("stderr %q does not say %q", res.stderr, c.says)
			}
			if res.stdout != "" {
				t.Errorf("stdout %q on bad input", res.stdout)
			}
		})
	}
}

func TestSeriesPlot(t *testing.T) {
	out := filepath.Join(t.TempDir(), "panels.svg")
	res := plumbRun(t, "series", seriesFile, "--column", "x", "--surrogates", "0", "--plot", out, "--quiet")
	if res.code != exitOK {
		t.Fatalf("exit %d: %s", res.code, res.stderr)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	for _, title := range []string{"Mutual information", "False neighbours", "Correlation sums", "Divergence of neighbours", "Nearest-neighbour forecasts"} {
		if !bytes.Contains(b, []byte(title)) {
			t.Errorf("the picture has no panel %q", title)
		}
	}
}

// npyOf writes rows as a 2-D little-endian float64 .npy array, version
// 1.0 (magic, version, header length, a Python dict literal padded with
// spaces to a multiple of 64 bytes and ending in a newline, then the data).
func npyOf(rows [][]float64) []byte {
	dict := "{'descr': '<f8', 'fortran_order': False, 'shape': (" + strconv.Itoa(len(rows)) + ", " + strconv.Itoa(len(rows[0])) + "), }"
	pad := 64 - (10+len(dict)+1)%64
	dict += strings.Repeat(" ", pad%64) + "\n"
	var b bytes.Buffer
	b.WriteString("\x93NUMPY\x01\x00")
	b.WriteByte(byte(len(dict)))
	b.WriteByte(byte(len(dict) >> 8))
	b.WriteString(dict)
	for _, r := range rows {
		for _, v := range r {
			bits := math.Float64bits(v)
			for k := 0; k < 8; k++ {
				b.WriteByte(byte(bits >> (8 * k)))
			}
		}
	}
	return b.Bytes()
}

// TestSeriesNPY: the same Hénon values as a .npy array give the same
// report as the CSV file, but for the source's name.
func TestSeriesNPY(t *testing.T) {
	var rows [][]float64
	for i, line := range strings.Split(strings.TrimSpace(henonCSV()), "\n")[1:] {
		_, v, _ := strings.Cut(line, ",")
		x, err := strconv.ParseFloat(v, 64)
		if err != nil {
			t.Fatal(err)
		}
		rows = append(rows, []float64{float64(i), x})
	}
	dir := t.TempDir()
	path := filepath.Join(dir, "henon.npy")
	if err := os.WriteFile(path, npyOf(rows), 0o644); err != nil {
		t.Fatal(err)
	}
	res := plumbRun(t, "series", path, "--column", "2", "--surrogates", "3", "--quiet")
	if res.code != exitOK {
		t.Fatalf("exit %d: %s", res.code, res.stderr)
	}
	csv := plumbRun(t, "series", seriesFile, "--column", "x", "--surrogates", "3", "--quiet")
	if got, want := res.stdout, strings.Replace(csv.stdout, seriesFile, path, 1); got != want {
		t.Errorf(".npy report differs from the CSV's:\n%s", firstDiff(got, want))
	}
	rows[7][1] = math.NaN()
	bad := filepath.Join(dir, "nan.npy")
	if err := os.WriteFile(bad, npyOf(rows), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		args []string
		says string
	}{
		{[]string{"series", path, "--column", "x"}, "--column x: a .npy file's columns are numbered from 1"},
		{[]string{"series", path, "--dt", "2"}, "--dt 2: a .npy file's time column sets the interval"},
		{[]string{"series", bad, "--column", "2"}, "row 8: column 2"}, // runio counts rows from 1
	} {
		res := plumbRun(t, c.args...)
		if res.code != exitUsage || !strings.Contains(res.stderr, c.says) {
			t.Errorf("%v: exit %d, stderr %q; want %d and %q", c.args, res.code, res.stderr, exitUsage, c.says)
		}
	}
}
