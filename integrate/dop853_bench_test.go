package integrate_test

import (
	"context"
	"fmt"
	"testing"

	"github.com/plumbdyn/plumb/integrate"
)

// methodsLorenz is the Lorenz system with sigma = 10, rho = 28,
// beta = 8/3 (in double), y0 = (1, 1, 1) (E. N. Lorenz, Deterministic
// nonperiodic flow, J. Atmos. Sci. 20 (1963) 130–141).
func methodsLorenz() integrate.Problem {
	const sigma, rho, beta = 10.0, 28.0, 8.0 / 3.0
	return integrate.Problem{
		F: func(_ float64, y, d []float64) {
			d[0] = float64(sigma * (y[1] - y[0]))
			d[1] = float64(y[0]*(rho-y[2])) - y[1]
			d[2] = float64(y[0]*y[1]) - float64(beta*y[2])
		},
		Y0: []float64{1, 1, 1},
	}
}

// BenchmarkLorenzDP853 integrates the Lorenz system over [0, 100] with
// DormandPrince853 (steps not kept, so no dense output is formed), and,
// for the ratio in the same run, with DormandPrince54.
func BenchmarkLorenzDP853(b *testing.B) {
	for _, bc := range []struct {
		name string
		m    integrate.Method
		tol  float64
	}{
		{"DP853/tol=1e-10", integrate.DormandPrince853, 1e-10},
		{"DP853/tol=1e-12", integrate.DormandPrince853, 1e-12},
		{"DP54/tol=1e-10", integrate.DormandPrince54, 1e-10},
		{"DP54/tol=1e-12", integrate.DormandPrince54, 1e-12},
	} {
		b.Run(bc.name, func(b *testing.B) {
			p := methodsLorenz()
			s := &integrate.Settings{RelTol: bc.tol, AbsTol: bc.tol, DropSteps: true}
			var st integrate.Stats
			b.ReportAllocs()
			for b.Loop() {
				sol, err := integrate.Solve(context.Background(), p, 100, bc.m, s)
				if err != nil {
					b.Fatal(err)
				}
				st = sol.Stats
			}
			attempts := float64(st.Accepted + st.Rejected)
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/attempts, "ns/step")
			b.ReportMetric(float64(st.Evaluations), "evals")
			b.ReportMetric(float64(st.Accepted), "accepted")
			b.ReportMetric(float64(st.Rejected), "rejected")
		})
	}
}

// BenchmarkLorenzDP853Stepper is the same run through a Stepper, with and
// without asking for the continuous extension at every step (three extra
// evaluations per step for DP853).
func BenchmarkLorenzDP853Stepper(b *testing.B) {
	for _, dense := range []bool{false, true} {
		b.Run(fmt.Sprintf("tol=1e-10/dense=%v", dense), func(b *testing.B) {
			p := methodsLorenz()
			s := &integrate.Settings{RelTol: 1e-10, AbsTol: 1e-10}
			var st integrate.Stats
			buf := make([]float64, 3)
			b.ReportAllocs()
			for b.Loop() {
				stp, err := integrate.NewStepper(p, 100, integrate.DormandPrince853, s)
				if err != nil {
					b.Fatal(err)
				}
				for stp.Next(context.Background()) {
					if dense {
						stp.Dense(stp.T()-0.5*stp.H(), buf)
					}
				}
				st = stp.Stats()
			}
			attempts := float64(st.Accepted + st.Rejected)
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/attempts, "ns/step")
			b.ReportMetric(float64(st.Evaluations), "evals")
		})
	}
}

// BenchmarkLorenzSmallMethods times the 3(2) pair and the fixed-step
// methods on the same problem over [0, 10].
func BenchmarkLorenzSmallMethods(b *testing.B) {
	for _, bc := range []struct {
		name string
		m    integrate.Method
		s    *integrate.Settings
	}{
		{"BS32/tol=1e-8", integrate.BogackiShampine32, &integrate.Settings{RelTol: 1e-8, AbsTol: 1e-8, DropSteps: true}},
		{"RK4/h=1e-3", integrate.RK4(1e-3), &integrate.Settings{DropSteps: true}},
		{"Euler/h=1e-4", integrate.Euler(1e-4), &integrate.Settings{DropSteps: true}},
	} {
		b.Run(bc.name, func(b *testing.B) {
			p := methodsLorenz()
			var st integrate.Stats
			b.ReportAllocs()
			for b.Loop() {
				sol, err := integrate.Solve(context.Background(), p, 10, bc.m, bc.s)
				if err != nil {
					b.Fatal(err)
				}
				st = sol.Stats
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(st.Accepted+st.Rejected), "ns/step")
			b.ReportMetric(float64(st.Evaluations), "evals")
		})
	}
}
