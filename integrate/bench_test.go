package integrate

import (
	"context"
	"fmt"
	"testing"

	"github.com/plumbdyn/plumb/internal/models"
)

// lorenzField is the built-in Lorenz flow at its published parameters
// (sigma=10, rho=28, beta=8/3), the field the peers time.
func lorenzField() Func {
	m, err := models.Lookup("lorenz")
	if err != nil {
		panic(err)
	}
	return m.Field(m.Defaults())
}

var benchTols = []float64{1e-10, 1e-12}

// BenchmarkLorenzDP54 times a whole Solve of Lorenz on [0, 100] with
// DormandPrince54 at rtol = atol = tol, keeping no steps (so the figure is
// the integrator, not the storage). ns/step counts attempted steps, as the
// peers harness does.
func BenchmarkLorenzDP54(b *testing.B) {
	f := lorenzField()
	for _, tol := range benchTols {
		b.Run(fmt.Sprintf("tol=%g", tol), func(b *testing.B) {
			p := Problem{F: f, Y0: []float64{1, 1, 1}}
			s := &Settings{RelTol: tol, AbsTol: tol, DropSteps: true}
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
		})
	}
}

// BenchmarkLorenzStepper times the Stepper loop alone (no Solve
// bookkeeping) on Lorenz, [0, 100].
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
				sp, err := NewStepper(p, 100, DormandPrince54, s)
				if err != nil {
					b.Fatal(err)
				}
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
