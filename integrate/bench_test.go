package integrate

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strconv"
	"testing"

	"github.com/plumbdyn/plumb/internal/models"
)

// lorenzField is the built-in Lorenz flow at its published parameters
// (sigma=10, rho=28, beta=8/3).
func lorenzField() Func {
	m, err := models.Lookup("lorenz")
	if err != nil {
		panic(err)
	}
	return m.Field(m.Defaults())
}

// benchTols are rtol = atol values; 1e-10 and 1e-12 are the headline
// figures, 1e-6 and 1e-8 complete the work-precision curve.
var benchTols = []float64{1e-6, 1e-8, 1e-10, 1e-12}

// lorenzAt20 is the mpmath reference at t = 20 (testdata/lorenz.json).
func lorenzAt20(b *testing.B) []float64 {
	raw, err := os.ReadFile("testdata/lorenz.json")
	if err != nil {
		b.Fatal(err)
	}
	var ref refLorenz
	if err := json.Unmarshal(raw, &ref); err != nil {
		b.Fatal(err)
	}
	v := make([]float64, 3)
	for i, s := range ref.Lorenz.BetaDouble.Values["20"] {
		if v[i], err = strconv.ParseFloat(s, 64); err != nil {
			b.Fatal(err)
		}
	}
	return v
}

// BenchmarkLorenzDP54 times Solve on Lorenz, y0 = (1,1,1), t in [0, 100],
// with DormandPrince54 at rtol = atol = tol, keeping no steps ("drop": the
// integrator alone) or keeping them ("keep": with dense output storage).
// Metrics: ns/step per attempted step (the unit the C and C++ peers report),
// evaluations per solve, and err@20, the max-norm error at t = 20 of a
// separate untimed solve against the mpmath reference, so one run shows
// work and precision together.
func BenchmarkLorenzDP54(b *testing.B) {
	f := lorenzField()
	want := lorenzAt20(b)
	for _, tol := range benchTols {
		for _, keep := range []bool{false, true} {
			name := fmt.Sprintf("tol=%g/drop", tol)
			if keep {
				name = fmt.Sprintf("tol=%g/keep", tol)
			}
			b.Run(name, func(b *testing.B) {
				p := Problem{F: f, Y0: []float64{1, 1, 1}}
				s := &Settings{RelTol: tol, AbsTol: tol, DropSteps: !keep}
				sol20, err := Solve(context.Background(), p, 20, DormandPrince54, s)
				if err != nil {
					b.Fatal(err)
				}
				var e20 float64
				for i := range want {
					e20 = math.Max(e20, math.Abs(sol20.Final[i]-want[i]))
				}
				b.ReportAllocs()
				var st Stats
				for b.Loop() {
					sol, err := Solve(context.Background(), p, 100, DormandPrince54, s)
					if err != nil {
						b.Fatal(err)
					}
					st = sol.Stats
				}
				steps := float64(st.Accepted + st.Rejected)
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/steps, "ns/step")
				b.ReportMetric(float64(st.Evaluations), "evals/op")
				b.ReportMetric(float64(st.Accepted), "accepted/op")
				b.ReportMetric(float64(st.Rejected), "rejected/op")
				b.ReportMetric(e20, "err@20")
			})
		}
	}
}

// BenchmarkLorenzStepper times the Stepper loop alone (no Solve
// bookkeeping) on Lorenz, [0, 100]; the Stepper is made outside the timed
// region, so allocs/op is the loop's.
func BenchmarkLorenzStepper(b *testing.B) {
	f := lorenzField()
	for _, tol := range benchTols {
		b.Run(fmt.Sprintf("tol=%g", tol), func(b *testing.B) {
			p := Problem{F: f, Y0: []float64{1, 1, 1}}
			s := &Settings{RelTol: tol, AbsTol: tol}
			ctx := context.Background()
			b.ReportAllocs()
			var st Stats
			for b.Loop() {
				b.StopTimer()
				sp, err := NewStepper(p, 100, DormandPrince54, s)
				if err != nil {
					b.Fatal(err)
				}
				b.StartTimer()
				for sp.Next(ctx) {
				}
				if sp.Err() != nil {
					b.Fatal(sp.Err())
				}
				st = sp.Stats()
			}
			steps := float64(st.Accepted + st.Rejected)
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/steps, "ns/step")
			b.ReportMetric(float64(st.Evaluations), "evals/op")
		})
	}
}
