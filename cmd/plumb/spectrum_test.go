package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Lorenz spectrum at sigma=10, rho=28, beta=8/3: 0.9056, 0, -14.5723 and
// D_KY = 2.06215 (J. C. Sprott, Common Chaotic Systems, 1998/2004;
// REFERENCES.md Sect. 1a). The sum is -(sigma+1+beta) = -41/3 exactly
// (Liouville's formula: the Jacobian's trace is constant).
var lorenzSpectrum = []float64{0.9056, 0, -14.5723}

const (
	lorenzKY  = 2.06215
	lorenzSum = -41.0 / 3
	// spectrumSlack is added to 3 standard errors: the averaging time
	// (1000) leaves a bias of order 1/T beside the statistical error
	// (common practice).
	spectrumSlack = 0.01
	// sumTol bounds |sum - (-41/3)|: the sum is the mean trace, an identity
	// broken only by the integration error at rtol 1e-9 (the run's own
	// trace check is 3e-8; common practice to allow 30 times more).
	sumTol = 1e-6
)

// decodeSpectrum runs plumb spectrum --format json and decodes the result.
func decodeSpectrum(t *testing.T, args ...string) (spectrumJSON, map[string]json.RawMessage, result) {
	t.Helper()
	r := plumbRun(t, append(append([]string{"spectrum"}, args...), "--format", "json", "--quiet")...)
	var out spectrumJSON
	var raw map[string]json.RawMessage
	if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
		t.Fatalf("stdout is not one JSON object: %v\n%.400s", err, r.stdout)
	}
	if err := json.Unmarshal([]byte(r.stdout), &raw); err != nil {
		t.Fatal(err)
	}
	return out, raw, r
}

// TestSpectrumGolden: the default run (the demo's full spectrum) is
// deterministic, so its table is a golden file.
func TestSpectrumGolden(t *testing.T) {
	r := plumbRun(t, "spectrum")
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	golden(t, "spectrum_lorenz.txt", r.stdout)
	golden(t, "spectrum_lorenz.stderr", r.stderr)
}

// TestSpectrumLorenz checks the demo's spectrum and derived measures
// against Sprott's values and the exact sum.
func TestSpectrumLorenz(t *testing.T) {
	out, raw, r := decodeSpectrum(t)
	if r.code != exitOK || r.stderr != "" {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	if len(out.Exponents) != 3 || len(out.StdErr) != 3 {
		t.Fatalf("%d exponents, %d standard errors; want all 3", len(out.Exponents), len(out.StdErr))
	}
	var s float64
	for i, want := range lorenzSpectrum {
		got, se := out.Exponents[i], out.StdErr[i]
		s += got
		if math.Abs(got-want) > 3*se+spectrumSlack {
			t.Errorf("lambda_%d = %.5g ± %.2g, want %v (Sprott) within 3 standard errors + %v", i+1, got, se, want, spectrumSlack)
		}
	}
	if math.Abs(s-lorenzSum) > sumTol {
		t.Errorf("sum of exponents %.10g, want -41/3 (exact) within %g", s, sumTol)
	}
	// D_KY = 2 + lambda_1/|lambda_3| carries lambda_1's error divided by
	// |lambda_3| (error propagation).
	kyTol := (3*out.StdErr[0]+spectrumSlack)/14.57 + 3*out.StdErr[2]*0.9056/(14.57*14.57)
	if out.KaplanYorke == nil || out.KaplanYorkeBound != "exact" || math.Abs(*out.KaplanYorke-lorenzKY) > kyTol {
		t.Errorf("Kaplan–Yorke %v (%s), want %v (Sprott) within %.3g", out.KaplanYorke, out.KaplanYorkeBound, lorenzKY, kyTol)
	}
	// Entropy is the positive part of the spectrum (Pesin): lambda_1, plus
	// lambda_2 when its estimate is above zero.
	wantH := math.Max(out.Exponents[0], 0) + math.Max(out.Exponents[1], 0) + math.Max(out.Exponents[2], 0)
	if out.Entropy == nil || *out.Entropy != wantH || out.EntropyBound != "exact" {
		t.Errorf("entropy %v (%s), want %v (sum of the positive exponents)", out.Entropy, out.EntropyBound, wantH)
	}
	if out.LyapunovTime == nil || *out.LyapunovTime != 1/out.Exponents[0] || !out.BeyondNoise {
		t.Errorf("Lyapunov time %v (beyond noise %v), want 1/lambda_1 = %v", out.LyapunovTime, out.BeyondNoise, 1/out.Exponents[0])
	}
	for _, k := range []string{"plumb_version", "arch", "command", "system", "settings", "units", "status", "exponents", "std_err",
		"kaplan_yorke", "kaplan_yorke_bound", "entropy", "entropy_bound", "lyapunov_time", "beyond_noise", "checks", "run", "stats", "history"} {
		if _, ok := raw[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
	if !strings.HasPrefix(out.Units.Exponents, "per unit time, natural log") || out.Command != "spectrum" || out.Arch != "golden-arch" {
		t.Errorf("units %q, command %q, arch %q", out.Units.Exponents, out.Command, out.Arch)
	}
	st := out.Settings
	if st.Exponents != 3 || st.T1 != spectrumT1 || st.Transient != spectrumTransient || st.Method != "dp54" || st.Blocks != 32 {
		t.Errorf("settings echoed as %+v", st)
	}
	if len(out.History) != out.Run.Blocks || out.Run.Blocks != 32 || out.Run.Jacobian != "exact" {
		t.Errorf("%d history points, %d blocks, jacobian %q", len(out.History), out.Run.Blocks, out.Run.Jacobian)
	}
	names := map[string]bool{}
	for _, c := range out.Checks {
		names[c.Name] = c.Meaning != ""
	}
	if !names["trace_sum"] || !names["zero_exponent"] {
		t.Errorf("checks %+v, want trace_sum and zero_exponent with their meaning", out.Checks)
	}
}

// TestSpectrumPartial: with fewer exponents than the dimension, measures
// that more exponents could change are marked as lower bounds.
func TestSpectrumPartial(t *testing.T) {
	out, _, r := decodeSpectrum(t, "--exponents", "1", "--t1", "300")
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	// One positive exponent: D_KY of (lambda_1) alone is 1 (its only
	// partial sum is >= 0) and the entropy is lambda_1 (definition).
	if len(out.Exponents) != 1 || *out.KaplanYorke != 1 || out.KaplanYorkeBound != "lower" || *out.Entropy != out.Exponents[0] || out.EntropyBound != "lower" {
		t.Errorf("exponents %v: Kaplan–Yorke %v (%s), entropy %v (%s); want 1 and lambda_1, both lower bounds",
			out.Exponents, *out.KaplanYorke, out.KaplanYorkeBound, *out.Entropy, out.EntropyBound)
	}
	// Two of three, reaching the negative one is not needed: the sum is
	// still positive, so the dimension is at least 2.
	out, _, _ = decodeSpectrum(t, "--exponents", "2", "--t1", "300")
	if *out.KaplanYorke != 2 || out.KaplanYorkeBound != "lower" {
		t.Errorf("K=2: Kaplan–Yorke %v (%s), want 2, a lower bound", *out.KaplanYorke, out.KaplanYorkeBound)
	}
}

// TestSpectrumRegularOrbit: the Kepler orbit is regular, so its largest
// finite-time exponent is no sign of chaos and is not reported as one.
func TestSpectrumRegularOrbit(t *testing.T) {
	out, _, r := decodeSpectrum(t, "--model", "kepler", "--t1", "600")
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	if out.BeyondNoise {
		t.Errorf("exponents %v ± %v: a regular orbit reported as chaotic", out.Exponents, out.StdErr)
	}
	pairing := false
	for _, c := range out.Checks {
		pairing = pairing || c.Name == "pairing"
	}
	if !pairing {
		t.Error("a Hamiltonian model's spectrum lacks the pairing check")
	}
}

// TestSpectrumMethods: a fixed-step method with --step drives the estimate,
// and the result stays near Sprott's lambda_1.
func TestSpectrumMethods(t *testing.T) {
	out, _, r := decodeSpectrum(t, "--method", "rk4", "--step", "0.005", "--t1", "600")
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	if out.Settings.MethodName != "RK4" || math.Abs(out.Exponents[0]-lorenzSpectrum[0]) > 3*out.StdErr[0]+spectrumSlack {
		t.Errorf("method %q, lambda_1 = %v ± %v; want RK4 near %v (Sprott)", out.Settings.MethodName, out.Exponents[0], out.StdErr[0], lorenzSpectrum[0])
	}
}

// TestSpectrumCSVAndPlot: the CSV is the convergence history of the JSON,
// and --plot draws one curve per exponent.
func TestSpectrumCSVAndPlot(t *testing.T) {
	args := []string{"spectrum", "--t1", "300", "--quiet"}
	r := plumbRun(t, append(args, "--format", "csv")...)
	if r.code != exitOK {
		t.Fatalf("exit %d, stderr %q", r.code, r.stderr)
	}
	rows, err := csv.NewReader(strings.NewReader(r.stdout)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	out, _, _ := decodeSpectrum(t, "--t1", "300")
	if strings.Join(rows[0], ",") != "t,blocks,lambda_1,lambda_2,lambda_3" || len(rows) != len(out.History)+1 {
		t.Fatalf("CSV header %v with %d rows, want %d history points", rows[0], len(rows)-1, len(out.History))
	}
	last := rows[len(rows)-1]
	for i, v := range out.History[len(out.History)-1].Exponents {
		if last[2+i] != formatFloat(v) {
			t.Errorf("last row lambda_%d %q, want %s", i+1, last[2+i], formatFloat(v))
		}
	}
	dir := t.TempDir()
	for _, name := range []string{"spec.svg", "spec.png"} {
		path := filepath.Join(dir, name)
		if r := plumbRun(t, append(args, "--plot", path)...); r.code != exitOK {
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
}

// TestSpectrumBadInput: usage errors exit 2 naming the flag.
func TestSpectrumBadInput(t *testing.T) {
	tests := []struct {
		name string
		args []string
		flag string
	}{
		{"zero exponents", []string{"--exponents", "0"}, "--exponents"},
		{"negative exponents", []string{"--exponents", "-2"}, "--exponents"},
		{"more than dim", []string{"--exponents", "4"}, "--exponents"},
		{"not an int", []string{"--exponents", "two"}, "--exponents"},
		{"transient zero", []string{"--transient", "0"}, "--transient"},
		{"t1 before transient ends", []string{"--t1", "50"}, "--t1"},
		{"rtol negative", []string{"--rtol", "-1e-9"}, "--rtol"},
		{"atol negative", []string{"--atol", "-1"}, "--atol"},
		{"unknown method", []string{"--method", "rk9"}, "--method"},
		{"fixed without step", []string{"--method", "rk4"}, "--step"},
		{"splitting", []string{"--model", "kepler", "--method", "verlet", "--step", "0.01"}, "--method"},
		{"unknown model", []string{"--model", "loop"}, "--model"},
		{"format", []string{"--format", "xml"}, "--format"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			r := plumbRun(t, append([]string{"spectrum"}, tt.args...)...)
			if r.code != exitUsage || r.stdout != "" || !strings.Contains(r.stderr, tt.flag) || !strings.HasPrefix(r.stderr, "plumb spectrum: ") {
				t.Errorf("exit %d, stdout %q, stderr %q; want 2, nothing, a message naming %s", r.code, r.stdout, r.stderr, tt.flag)
			}
		})
	}
}

// TestSpectrumCanceled: a canceled run exits 1 and still writes the
// estimate so far.
func TestSpectrumCanceled(t *testing.T) {
	r := plumbRunCtx(t, &stepCtx{Context: context.Background(), n: 60000}, "spectrum", "--format", "json", "--quiet")
	if r.code != exitFailed || !strings.Contains(r.stderr, "canceled") {
		t.Fatalf("exit %d, stderr %q; want 1 saying canceled", r.code, r.stderr)
	}
	var out spectrumJSON
	if err := json.Unmarshal([]byte(r.stdout), &out); err != nil {
		t.Fatalf("a canceled run wrote no JSON: %v", err)
	}
	if out.Status != "canceled" || len(out.Exponents) != 3 || len(out.History) == 0 || len(out.History) >= 32 {
		t.Errorf("status %q, %d exponents, %d history points; want canceled part way", out.Status, len(out.Exponents), len(out.History))
	}
}

// TestSpectrumProgress: a bar on a terminal's stderr, stdout unchanged.
func TestSpectrumProgress(t *testing.T) {
	args := []string{"spectrum", "--t1", "200", "--format", "csv"}
	plain := plumbRun(t, args...)
	saved := isTerminal
	defer func() { isTerminal = saved }()
	isTerminal = func(io.Writer) bool { return true }
	bar := plumbRun(t, args...)
	if bar.stdout != plain.stdout || !strings.Contains(bar.stderr, "plumb spectrum [") || !strings.Contains(bar.stderr, "100%") {
		t.Errorf("stdout changed: %v; stderr %q", bar.stdout != plain.stdout, bar.stderr)
	}
}

// TestSpectrumStiffWarning: Van der Pol with mu = 1000 is stiff (problem
// VDPOL of the Mazzia & Magherini IVP Test Set, 2008); the spectrum run
// says so on stderr and in its JSON stats, as solve does. The default demo
// says nothing of the kind.
func TestSpectrumStiffWarning(t *testing.T) {
	r := plumbRun(t, "spectrum", "--model", "vanderpol", "--set", "mu=1000", "--exponents", "1", "--t1", "30", "--transient", "5")
	if r.code != exitOK || !strings.Contains(r.stderr, "warning: the run looks stiff from t=") {
		t.Errorf("exit %d, stderr %q; want a stiffness warning", r.code, r.stderr)
	}
	_, raw, _ := decodeSpectrum(t, "--model", "vanderpol", "--set", "mu=1000", "--exponents", "1", "--t1", "30", "--transient", "5")
	var st struct {
		Stiff   bool    `json:"stiff"`
		StiffAt float64 `json:"stiff_at"`
	}
	if err := json.Unmarshal(raw["stats"], &st); err != nil || !st.Stiff || st.StiffAt <= 0 {
		t.Errorf("stats %s: want stiff true with its time (%v)", raw["stats"], err)
	}
	if r := plumbRun(t, "spectrum", "--t1", "200"); strings.Contains(r.stderr, "stiff") {
		t.Errorf("the demo's stderr mentions stiffness: %q", r.stderr)
	}
}
