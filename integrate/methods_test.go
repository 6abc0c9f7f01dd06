package integrate_test

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"strconv"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
)

// lorenzRef reads the Lorenz reference states of testdata/lorenz_ref.json:
// an explicit Taylor-series integration in mpmath 1.2.1 at 80 digits (order
// 94), checked against a 60-digit run (difference 9.6e-59 at t=10, 9.3e-56
// at t=20), made by testdata/make_ref.py, with beta the double 8.0/3.0.
func lorenzRef(t *testing.T) map[string][]float64 {
	t.Helper()
	raw, err := os.ReadFile("testdata/lorenz_ref.json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Lorenz struct {
			BetaDouble struct {
				Values map[string][]string `json:"values"`
			} `json:"beta_double"`
		} `json:"lorenz"`
	}
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatal(err)
	}
	out := map[string][]float64{}
	for k, v := range doc.Lorenz.BetaDouble.Values {
		for _, s := range v {
			x, err := strconv.ParseFloat(s, 64)
			if err != nil {
				t.Fatal(err)
			}
			out[k] = append(out[k], x)
		}
	}
	return out
}

func maxAbsDiff(a, b []float64) float64 {
	var m float64
	for i := range a {
		m = max(m, math.Abs(a[i]-b[i]))
	}
	return m
}

// TestLorenzDP853Reference compares DormandPrince853 on the Lorenz system
// with the 80-digit reference at t = 10 and t = 20. The bounds are ten
// times what SciPy 1.10.1's DOP853 reached at the same tolerances on this
// machine (peer run of 2026-12-02: err@10 = 5.08e-9 / 3.05e-11 and
// err@20 = 1.63e-5 / 9.87e-8 at tol 1e-10 / 1e-12, max abs over
// components), the same algorithm in another implementation; the flow
// amplifies errors about 3000-fold from t = 10 to t = 20.
func TestLorenzDP853Reference(t *testing.T) {
	ref := lorenzRef(t)
	for _, tc := range []struct {
		tol      float64
		t1       string
		boundErr float64
	}{
		{1e-10, "10", 10 * 5.08e-9},
		{1e-10, "20", 10 * 1.63e-5},
		{1e-12, "10", 10 * 3.05e-11},
		{1e-12, "20", 10 * 9.87e-8},
	} {
		t1, _ := strconv.ParseFloat(tc.t1, 64)
		sol, err := integrate.Solve(context.Background(), methodsLorenz(), t1, integrate.DormandPrince853,
			&integrate.Settings{RelTol: tc.tol, AbsTol: tc.tol, DropSteps: true})
		if err != nil {
			t.Fatal(err)
		}
		e := maxAbsDiff(sol.Final, ref[tc.t1])
		t.Logf("tol %g: err@%s = %.3g (%d accepted, %d rejected, %d evaluations)", tc.tol, tc.t1, e,
			sol.Stats.Accepted, sol.Stats.Rejected, sol.Stats.Evaluations)
		if e > tc.boundErr {
			t.Errorf("tol %g: error at t=%s is %.3g, want <= %.3g", tc.tol, tc.t1, e, tc.boundErr)
		}
		// Without kept steps, samples or crossings no dense output is
		// formed: 2 evaluations to start, 11 per attempt, 1 per accepted step.
		st := sol.Stats
		if want := 2 + 11*(st.Accepted+st.Rejected) + st.Accepted; st.Evaluations != want {
			t.Errorf("tol %g: %d evaluations, want %d", tc.tol, st.Evaluations, want)
		}
	}
}

// TestAllocsNext asserts that a step of every method, and its dense output,
// allocate nothing after set-up.
func TestAllocsNext(t *testing.T) {
	for _, m := range []integrate.Method{
		integrate.DormandPrince54, integrate.DormandPrince853, integrate.BogackiShampine32,
		integrate.RK4(1e-3), integrate.Euler(1e-4),
	} {
		st, err := integrate.NewStepper(methodsLorenz(), 1e6, m, &integrate.Settings{RelTol: 1e-10, AbsTol: 1e-10})
		if err != nil {
			t.Fatal(err)
		}
		ctx := context.Background()
		buf := make([]float64, 3)
		if a := testing.AllocsPerRun(100, func() { st.Next(ctx) }); a != 0 {
			t.Errorf("%s: Stepper.Next allocates %v times per call, want 0", m.Name(), a)
		}
		if a := testing.AllocsPerRun(100, func() {
			st.Next(ctx)
			st.Dense(st.T()-0.5*st.H(), buf)
		}); a != 0 {
			t.Errorf("%s: Stepper.Next + Dense allocate %v times per call, want 0", m.Name(), a)
		}
		if err := st.Err(); err != nil {
			t.Errorf("%s: %v", m.Name(), err)
		}
	}
}

// TestArenstorfDP853Reference integrates one period of the Arenstorf orbit
// (μ = 0.012277471, y0 = (0.994, 0, 0, −2.00158510637908252240537862224),
// T = 17.0652165601579625588917206249; Hairer, Nørsett & Wanner 1993,
// introduction to Ch. II) and compares with the 80-digit reference of
// testdata/arenstorf_ref.json (mpmath Taylor series, testdata/make_ref.py,
// from the same double-rounded inputs). The bounds are ten times what
// SciPy 1.10.1's DOP853 reached (peer run of 2026-12-02: 1.28e-6 at tol
// 1e-10, 1.45e-9 at 1e-12, max abs over components).
func TestArenstorfDP853Reference(t *testing.T) {
	raw, err := os.ReadFile("testdata/arenstorf_ref.json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Arenstorf struct {
			Double struct {
				Values []string `json:"values_at_T"`
			} `json:"double_inputs"`
		} `json:"arenstorf"`
	}
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatal(err)
	}
	var ref []float64
	for _, s := range doc.Arenstorf.Double.Values {
		x, err := strconv.ParseFloat(s, 64)
		if err != nil {
			t.Fatal(err)
		}
		ref = append(ref, x)
	}
	mu := 0.012277471
	mu1 := 1 - mu // fl(1 − fl(μ)), as in the reference
	p := integrate.Problem{
		F: func(_ float64, y, d []float64) {
			a := float64((y[0]+mu)*(y[0]+mu)) + float64(y[1]*y[1])
			b := float64((y[0]-mu1)*(y[0]-mu1)) + float64(y[1]*y[1])
			d1, d2 := float64(a*math.Sqrt(a)), float64(b*math.Sqrt(b))
			d[0], d[1] = y[2], y[3]
			d[2] = y[0] + float64(2*y[3]) - float64(mu1*(y[0]+mu))/d1 - float64(mu*(y[0]-mu1))/d2
			d[3] = y[1] - float64(2*y[2]) - float64(mu1*y[1])/d1 - float64(mu*y[1])/d2
		},
		Y0: []float64{0.994, 0, 0, -2.00158510637908252240537862224},
	}
	const T = 17.0652165601579625588917206249
	for _, tc := range []struct{ tol, bound float64 }{{1e-10, 10 * 1.28e-6}, {1e-12, 10 * 1.45e-9}} {
		sol, err := integrate.Solve(context.Background(), p, T, integrate.DormandPrince853,
			&integrate.Settings{RelTol: tc.tol, AbsTol: tc.tol, DropSteps: true})
		if err != nil {
			t.Fatal(err)
		}
		e := maxAbsDiff(sol.Final, ref)
		t.Logf("tol %g: err@T = %.3g (%d accepted, %d rejected)", tc.tol, e, sol.Stats.Accepted, sol.Stats.Rejected)
		if e > tc.bound {
			t.Errorf("tol %g: error at T is %.3g, want <= %.3g", tc.tol, e, tc.bound)
		}
	}
}
