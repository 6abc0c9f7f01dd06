package expr_test

import (
	"context"
	"fmt"
	"math"
	"os"
	"slices"
	"strings"
	"testing"
	"time"

	"github.com/plumbdyn/plumb"
	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/detmath"
	"github.com/plumbdyn/plumb/internal/expr"
	"github.com/plumbdyn/plumb/internal/models"
)

// The end-to-end benchmarks time whole solves (integrate.Solve with
// DormandPrince54, steps dropped) of a system file, parsed once outside the
// timer, against the same system as a hand-written Go field (the built-in
// catalog's, or for the driven pendulum one written here), with FieldFunc
// forced onto each float64 evaluation tier in turn: go (the Go field), tape
// (the plain tape), fused (the fused tape), closure (the closures, never the
// inline switch) and auto (FieldFunc's own choice). A field's own cost
// ratio says little about what a user waits for: the stepper's arithmetic,
// the error norm and the set-up of a run (Problem.Own makes fresh
// evaluators) are paid by every variant alike.
//
// Every iteration of the benchmark loop solves once with each variant, in an
// order rotated by one each iteration, so the noise of a shared machine
// falls on all of them alike (ns/op is the time of the whole iteration).
// The reported figures: <variant>-ns/solve, the median time of a solve;
// <variant>/go, the median of the per-iteration ratios of that variant's
// time to the Go field's; <variant>/go-fastest, the ratio of the fastest
// solves (a solve is only ever slowed by the others' load, so on a busy
// machine this is often the steadier figure); <variant>-allocs/solve, the
// allocations of one solve (set-up and result; the steps allocate none). Run
// with a fixed count of iterations, e.g.
//
//	go test -run '^$' -bench Solve -benchtime 200x -count 3 ./internal/expr

// solveVariant is one way of evaluating the field of a solve.
type solveVariant struct {
	name string
	prob func() integrate.Problem // made outside the timer
}

// formulaVariant returns the system's Problem with FieldFunc forced onto
// tier k for the whole solve (Solve makes its evaluators in Problem.Own).
func formulaVariant(name string, sys *plumb.System, k expr.FieldTierForBench) solveVariant {
	return solveVariant{name: name, prob: func() integrate.Problem {
		expr.ForceTier(k)
		return sys.Problem()
	}}
}

// loadSystemText parses a system file once, outside any timer.
func loadSystemText(tb testing.TB, text string) *plumb.System {
	tb.Helper()
	sys, err := plumb.LoadSystem(strings.NewReader(text))
	if err != nil {
		tb.Fatal(err)
	}
	return sys
}

// catalogFile writes a system file of the catalog's flow name with the
// catalog's formulas, parameters and start.
func catalogFile(tb testing.TB, name string) string {
	tb.Helper()
	m, err := models.Lookup(name)
	if err != nil {
		tb.Fatal(err)
	}
	rates := models.Formulas[name]
	var b strings.Builder
	fmt.Fprintf(&b, `{"name": %q, "kind": "flow", "parameters": [`, name)
	for i, p := range m.Params {
		if i > 0 {
			b.WriteString(", ")
		}
		fmt.Fprintf(&b, `{"name": %q, "value": %v}`, p.Name, p.Value)
	}
	b.WriteString(`], "variables": [`)
	for i, s := range m.States {
		if i > 0 {
			b.WriteString(",\n")
		}
		fmt.Fprintf(&b, `{"name": %q, "start": %v, "rate": %q}`, s, m.Y0[i], rates[i])
	}
	b.WriteString("]}")
	return b.String()
}

// benchSolves runs the variants round-robin and reports medians. Every
// variant must end on the same bits as the first (the Go field), with the
// same number of evaluations: the tiers compute the same numbers, and the
// chosen systems' formulas round as their Go fields do, so the variants do
// the same work and only the evaluation differs.
func benchSolves(b *testing.B, t1 float64, tol float64, vs []solveVariant) {
	defer expr.ForceTier(expr.TierAuto)
	set := &integrate.Settings{RelTol: tol, AbsTol: tol, DropSteps: true}
	ctx := context.Background()
	probs := make([]integrate.Problem, len(vs))
	var want []float64
	var wantEvals int
	for i, v := range vs {
		probs[i] = v.prob()
		sol, err := integrate.Solve(ctx, probs[i], t1, integrate.DormandPrince54, set)
		if err != nil {
			b.Fatalf("%s: %v", v.name, err)
		}
		if i == 0 {
			want, wantEvals = sol.Final, sol.Stats.Evaluations
			continue
		}
		for j := range want {
			if math.Float64bits(sol.Final[j]) != math.Float64bits(want[j]) {
				b.Fatalf("%s: final state differs from %s's in component %d: %v, want %v",
					v.name, vs[0].name, j, sol.Final[j], want[j])
			}
		}
		if sol.Stats.Evaluations != wantEvals {
			b.Fatalf("%s: %d evaluations, %s made %d", v.name, sol.Stats.Evaluations, vs[0].name, wantEvals)
		}
	}
	times := make([][]float64, len(vs))
	iter := 0
	b.ResetTimer()
	for b.Loop() {
		for k := range vs {
			i := (k + iter) % len(vs)
			if vs[i].name != "go" {
				// The tier is read when Solve makes its evaluators.
				vs[i].prob()
			}
			t0 := time.Now()
			if _, err := integrate.Solve(ctx, probs[i], t1, integrate.DormandPrince54, set); err != nil {
				b.Fatal(err)
			}
			times[i] = append(times[i], float64(time.Since(t0).Nanoseconds()))
		}
		iter++
	}
	b.StopTimer()
	for i, v := range vs {
		if i > 0 {
			r := make([]float64, len(times[i]))
			for j := range r {
				r[j] = times[i][j] / times[0][j]
			}
			b.ReportMetric(median(r), v.name+"/go")
			b.ReportMetric(slices.Min(times[i])/slices.Min(times[0]), v.name+"/go-fastest")
		}
		b.ReportMetric(median(times[i]), v.name+"-ns/solve")
		if v.name != "go" {
			v.prob() // forces the variant's tier for the runs below
		}
		allocs := testing.AllocsPerRun(3, func() {
			integrate.Solve(ctx, probs[i], t1, integrate.DormandPrince54, set)
		})
		b.ReportMetric(allocs, v.name+"-allocs/solve")
	}
	b.ReportMetric(float64(wantEvals), "evals/solve")
}

// median returns the median of xs (xs is reordered).
func median(xs []float64) float64 {
	if len(xs) == 0 {
		return math.NaN()
	}
	slices.Sort(xs)
	n := len(xs)
	if n%2 == 1 {
		return xs[n/2]
	}
	return (xs[n/2-1] + xs[n/2]) / 2
}

// tierVariants returns the catalog's Go field of goName and the system
// forced onto each tier.
func tierVariants(b *testing.B, goName string, sys *plumb.System) []solveVariant {
	m, err := models.Lookup(goName)
	if err != nil {
		b.Fatal(err)
	}
	return goTierVariants(m.Field(m.Defaults()), sys)
}

// goTierVariants returns the Go field f and the system forced onto each
// tier.
func goTierVariants(f integrate.Func, sys *plumb.System) []solveVariant {
	goProb := integrate.Problem{F: f, Y0: sys.Problem().Y0}
	return []solveVariant{
		{name: "go", prob: func() integrate.Problem { return goProb }},
		formulaVariant("tape", sys, expr.TierTape),
		formulaVariant("fused", sys, expr.TierFused),
		formulaVariant("closure", sys, expr.TierClosure),
		formulaVariant("auto", sys, expr.TierAuto),
	}
}

// BenchmarkSolveLabLoop solves examples/systems/lab-loop.json (the Lorenz
// rates at sigma = 10, rho = 28, beta = 8/3, started at (1, 1, 1)) on
// t in [0, 100] at rtol = atol = 1e-9, against the catalog's Lorenz field.
func BenchmarkSolveLabLoop(b *testing.B) {
	raw, err := os.ReadFile("../../examples/systems/lab-loop.json")
	if err != nil {
		b.Fatal(err)
	}
	sys := loadSystemText(b, string(raw))
	benchSolves(b, 100, 1e-9, tierVariants(b, "lorenz", sys))
}

// BenchmarkSolveRossler solves the catalog's Rössler flow as a system file
// on t in [0, 500] at rtol = atol = 1e-9, against the catalog's Go field.
func BenchmarkSolveRossler(b *testing.B) {
	sys := loadSystemText(b, catalogFile(b, "rossler"))
	benchSolves(b, 500, 1e-9, tierVariants(b, "rossler", sys))
}

// BenchmarkSolveRing solves the catalog's 40-site Lorenz-96 ring as a
// system file on t in [0, 20] at rtol = atol = 1e-9, against the catalog's
// Go field.
func BenchmarkSolveRing(b *testing.B) {
	sys := loadSystemText(b, catalogFile(b, "lorenz96"))
	benchSolves(b, 20, 1e-9, tierVariants(b, "lorenz96", sys))
}

// pendulumFile is a damped pendulum driven by a periodic torque, in the
// scaled form d²x/dt² + c·dx/dt + sin x = A·cos(w·t) with c = 0.5, A = 1.5,
// w = 2/3, a chaotic setting (G. L. Baker, J. P. Gollub, Chaotic Dynamics:
// An Introduction, Cambridge University Press 1990, ch. 3; from memory).
// Its rates call sin and cos, so FieldFunc cannot take the inline
// closures and uses the closure form.
const pendulumFile = `{"name": "driven-pendulum", "kind": "flow",
 "parameters": [{"name": "c", "value": 0.5}, {"name": "A", "value": 1.5}, {"name": "w", "value": 0.6666666666666666}],
 "variables": [{"name": "x", "start": 0.2, "rate": "v"},
               {"name": "v", "start": 0, "rate": "-c*v - sin(x) + A*cos(w*t)"}]}`

// pendulumGo is pendulumFile's field written by hand, with the operations
// of the formulas in the same order (products rounded before sums, sin and
// cos from detmath as in the compiled program), so that both solves take
// the same steps.
func pendulumGo(c, a, w float64) integrate.Func {
	return func(t float64, y, d []float64) {
		x, v := y[0], y[1]
		d[0] = v
		d[1] = float64(-c*v) - detmath.Sin(x) + float64(a*detmath.Cos(float64(w*t)))
	}
}

// BenchmarkSolvePendulum solves pendulumFile on t in [0, 1000] at
// rtol = atol = 1e-9, against the same field written in Go.
func BenchmarkSolvePendulum(b *testing.B) {
	sys := loadSystemText(b, pendulumFile)
	benchSolves(b, 1000, 1e-9, goTierVariants(pendulumGo(0.5, 1.5, 0.6666666666666666), sys))
}
