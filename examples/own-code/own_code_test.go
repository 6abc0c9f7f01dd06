package owncode

import (
	"context"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"sync"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/runio"
)

// The start both programs log, and the Lorenz parameters (Lorenz 1963).
var start = []float64{-5, -6, 22}

const (
	sigma, rho = 10.0, 28.0
	beta       = 8.0 / 3.0
	t1         = 2.0  // early times: before chaos amplifies the differences
	dt         = 0.01 // output interval
)

func lorenz(_ float64, y, dy []float64) {
	dy[0] = sigma * (y[1] - y[0])
	dy[1] = y[0]*(rho-y[2]) - y[1]
	dy[2] = y[0]*y[1] - beta*y[2]
}

// program is one way to launch a user's code with plumb's placeholders.
type program struct {
	name string
	cmd  func(args ...string) *exec.Cmd
}

func programs(t *testing.T) []program {
	var ps []program
	if cc, err := exec.LookPath("cc"); err != nil {
		t.Logf("cc not found: the C program is not tested (%v)", err)
	} else {
		bin := filepath.Join(t.TempDir(), "convection")
		out, err := exec.Command(cc, "-O2", "-std=c99", "-o", bin, "convection.c", "-lm").CombinedOutput()
		require.NoError(t, err, "compiling convection.c: %s", out)
		ps = append(ps, program{"C", func(a ...string) *exec.Cmd { return exec.Command(bin, a...) }})
	}
	if py, err := exec.LookPath("python3"); err != nil {
		t.Logf("python3 not found: the Python program is not tested (%v)", err)
	} else {
		ps = append(ps, program{"Python", func(a ...string) *exec.Cmd {
			return exec.Command(py, append([]string{"convection.py"}, a...)...)
		}})
	}
	if len(ps) == 0 {
		t.Skip("neither cc nor python3 is installed: nothing to run")
	}
	return ps
}

// launch runs each setting of each program at once (the runs are
// independent) and reads the outputs with runio.
func launch(t *testing.T, ps []program, settings map[string][]string) map[string]*runio.Run {
	dir := t.TempDir()
	runs := map[string]*runio.Run{}
	var mu sync.Mutex
	var wg sync.WaitGroup
	for _, p := range ps {
		for key, args := range settings {
			wg.Add(1)
			go func() {
				defer wg.Done()
				out := filepath.Join(dir, p.name+"-"+key+".csv")
				all := append([]string{"--out", out, "--t1", strconv.FormatFloat(t1, 'g', -1, 64),
					"--dt", strconv.FormatFloat(dt, 'g', -1, 64)}, args...)
				msg, err := p.cmd(all...).CombinedOutput()
				var r *runio.Run
				if err == nil {
					r, err = runio.Open(out, runio.Options{})
				}
				mu.Lock()
				defer mu.Unlock()
				if !assert.NoError(t, err, "%s %v: %s", p.name, all, msg) {
					return
				}
				runs[p.name+"/"+key] = r
			}()
		}
	}
	wg.Wait()
	require.False(t, t.Failed())
	return runs
}

// reference is plumb's own solution, Dormand–Prince 5(4) at rtol 1e-12,
// whose error at t <= 2 is far below the students' tolerances.
func reference(t *testing.T, y0 []float64) *integrate.Solution {
	p := integrate.Problem{F: lorenz, T0: 0, Y0: y0}
	sol, err := integrate.Solve(context.Background(), p, t1, integrate.DormandPrince54,
		&integrate.Settings{RelTol: 1e-12, AbsTol: 1e-12})
	require.NoError(t, err)
	return sol
}

// maxRelErr is the largest difference from the reference over the run,
// relative to the largest magnitude of the state (|z| ~ 20 here).
func maxRelErr(r *runio.Run, ref *integrate.Solution) float64 {
	worst, size := 0.0, 0.0
	want := make([]float64, 3)
	for i, tt := range r.T {
		ref.At(tt, want)
		for j, v := range r.Row(i) {
			worst = math.Max(worst, math.Abs(v-want[j]))
			size = math.Max(size, math.Abs(want[j]))
		}
	}
	return worst / size
}

func TestOwnCode(t *testing.T) {
	ps := programs(t)
	t.Run("usage", func(t *testing.T) { checkUsage(t, ps) })
	runs := launch(t, ps, map[string][]string{
		"loose":   {"--rtol", "1e-6", "--atol", "1e-9"},
		"tight":   {"--rtol", "1e-9", "--atol", "1e-12"},
		"nudged":  {"--rtol", "1e-9", "--atol", "1e-12", "--perturb", "1e-8"},
		"float32": {"--rtol", "1e-9", "--atol", "1e-12", "--float32"},
	})
	ref := reference(t, start)
	// Tolerance proportionality (Hairer, Nørsett & Wanner 1993, Sect. II.4):
	// a controller that keeps each step's estimated error below rtol·|y|
	// gives a global error of order rtol times the growth of errors over
	// the run. Up to t = 2 that growth is modest (the largest Lyapunov
	// exponent of this flow is 0.9056, Sprott 2003, App. A; e^(0.9056·2) ≈ 6,
	// and transient stretching adds to it), and the pair advances with its
	// third-order solution, whose error lies below the second-order
	// estimate. We allow a factor of 100 over rtol: a loop that ignored
	// --rtol, or a wrong tableau (a first-order error), fails it.
	const growth = 100.0
	for _, p := range ps {
		t.Run("agrees early/"+p.name, func(t *testing.T) {
			loose, tight := runs[p.name+"/loose"], runs[p.name+"/tight"]
			require.Equal(t, []string{"x", "y", "z"}, loose.Names)
			require.Len(t, loose.T, int(t1/dt)+1, "one row per output time, both ends included")
			eLoose, eTight := maxRelErr(loose, ref), maxRelErr(tight, ref)
			t.Logf("%s: largest error relative to |state| up to t=%v: %.3g at rtol 1e-6, %.3g at rtol 1e-9", p.name, t1, eLoose, eTight)
			assert.LessOrEqualf(t, eLoose, growth*1e-6, "rtol 1e-6 run against DormandPrince54 at rtol 1e-12")
			assert.LessOrEqualf(t, eTight, growth*1e-9, "rtol 1e-9 run against DormandPrince54 at rtol 1e-12")
			// The tolerance is honoured: 1000 times tighter must give a
			// clearly smaller error (a third-order pair: about 1000 times
			// smaller; we ask for 30).
			assert.Lessf(t, 30*eTight, eLoose, "error does not follow --rtol")

			// --perturb 1e-8 multiplies the start by (1 + 1e-8) exactly: the
			// same two IEEE roundings in C, Python and Go (eps is a variable
			// so that Go does not fold the constant exactly).
			eps := 1e-8
			nudged := runs[p.name+"/nudged"]
			for j, v := range nudged.Row(0) {
				assert.Equalf(t, start[j]*(1+eps), v, "nudged start, column %d (exact identity)", j)
				assert.Equalf(t, start[j], tight.Row(0)[j], "unnudged start, column %d (exact identity)", j)
			}
			// The nudged run follows the reference from the nudged start.
			assert.LessOrEqual(t, maxRelErr(nudged, reference(t, nudged.Row(0))), growth*1e-9)

			// --float32 stores every value in single precision (exact
			// identity: float64(float32(v)) == v) and so departs from the
			// double run by about the float32 rounding (2^-24 ≈ 6e-8 relative),
			// grown like any other error; 100 times that is allowed.
			f32 := runs[p.name+"/float32"]
			for _, v := range f32.Y {
				require.Equal(t, v, float64(float32(v)), "stored in single precision")
			}
			e32 := maxRelErr(f32, ref)
			t.Logf("%s: float32 storage: largest error relative to |state| %.3g", p.name, e32)
			assert.Greater(t, e32, eTight, "single precision must show above the rtol 1e-9 error")
			assert.LessOrEqual(t, e32, growth*0x1p-24)
		})
	}
}

// checkUsage: the programs refuse bad usage with exit status 2 and a
// message naming the flag, as plumb expects of a program it launches.
func checkUsage(t *testing.T, ps []program) {
	for _, p := range ps {
		out := filepath.Join(t.TempDir(), "x.csv")
		cmd := p.cmd("--rtol", "abc", "--atol", "1e-9", "--out", out)
		msg, err := cmd.CombinedOutput()
		var ee *exec.ExitError
		require.ErrorAs(t, err, &ee, p.name)
		assert.Equal(t, 2, ee.ExitCode(), "%s: %s", p.name, msg)
		assert.Contains(t, string(msg), "--rtol", p.name)
		_, statErr := os.Stat(out)
		assert.True(t, os.IsNotExist(statErr), "%s: no output file on bad usage", p.name)
	}
}
