package lyap

import (
	"context"
	"math"
	"testing"
)

// The stepping and re-orthonormalisation loops must not allocate after
// set-up (DESIGN.md policies). Each case runs the engine's step, which takes
// one accepted step (or iteration) and re-orthonormalises when due; with
// Interval or IntervalSteps tiny, every step re-orthonormalises, so block
// ends and history records are exercised as well.
func TestLoopsDoNotAllocate(t *testing.T) {
	ctx := context.Background()
	lorenz := modelProblem(t, "lorenz")
	for _, c := range []struct {
		name string
		step func() bool
	}{
		{"flow adaptive", func() func() bool {
			r, err := newFlowRun(lorenz, 3, &Settings{Duration: 1e4, Transient: 1, Blocks: 1e4})
			if err != nil {
				t.Fatal(err)
			}
			return func() bool { return r.step(ctx) }
		}()},
		{"flow fused", func() func() bool {
			r, err := newFlowRun(lorenz, 3, &Settings{Duration: 1e4, Transient: 1, Blocks: 1e4, Tangent3: modelTangent3(t, "lorenz", nil)})
			if err != nil {
				t.Fatal(err)
			}
			return func() bool { return r.step(ctx) }
		}()},
		{"flow every step", func() func() bool {
			r, err := newFlowRun(lorenz, 2, &Settings{Duration: 1e4, Transient: 0.5, Interval: 1e-9, Blocks: 1e4})
			if err != nil {
				t.Fatal(err)
			}
			return func() bool { return r.step(ctx) }
		}()},
		{"two trajectories", func() func() bool {
			r, err := newTwoRun(lorenz, &Settings{Duration: 1e4, Transient: 0.5, Interval: 1e-9, Blocks: 1e4})
			if err != nil {
				t.Fatal(err)
			}
			return func() bool { return r.step(ctx) }
		}()},
		{"map", func() func() bool {
			r, err := newMapRun(henon{1.4, 0.3}, []float64{0.1, 0.1}, 2, &Settings{Iterations: 1e6, Discard: 10, IntervalSteps: 1, Blocks: 1e4})
			if err != nil {
				t.Fatal(err)
			}
			return func() bool { return r.step(ctx) }
		}()},
		{"map two trajectories", func() func() bool {
			r, err := newMapTwoRun(henon{1.4, 0.3}, []float64{0.1, 0.1}, &Settings{Iterations: 1e6, Discard: 10, IntervalSteps: 1, Blocks: 1e4})
			if err != nil {
				t.Fatal(err)
			}
			return func() bool { return r.step(ctx) }
		}()},
		{"map finite-time windows", func() func() bool {
			r, err := newMapRun(henon{1.4, 0.3}, []float64{0.1, 0.1}, 2, &Settings{Iterations: 1e6, Discard: 10, Blocks: 1e4})
			if err != nil {
				t.Fatal(err)
			}
			r.window = 7
			r.windowSum = make([]float64, 2)
			r.onWindow = func(int, int, []float64) bool { return true }
			return func() bool { return r.step(ctx) }
		}()},
	} {
		t.Run(c.name, func(t *testing.T) {
			for range 1000 { // through the transient into averaging
				if !c.step() {
					t.Fatal("run ended during warm-up")
				}
			}
			ok := true
			if a := testing.AllocsPerRun(2000, func() { ok = c.step() && ok }); a != 0 {
				t.Errorf("%v allocations per step, want 0", a)
			}
			if !ok {
				t.Error("run ended while measuring")
			}
		})
	}
}

// TestStepperStateReset guards the in-place reset of the tangent vectors
// (flowRun.reorth): after a re-orthonormalisation the stepper's own state
// holds an orthonormal basis and its derivative is F at that state, so the
// next step starts from them (common practice for restarting one-step
// methods).
func TestStepperStateReset(t *testing.T) {
	p := modelProblem(t, "lorenz")
	r, err := newFlowRun(p, 3, &Settings{Duration: 100, Transient: 1})
	if err != nil {
		t.Fatal(err)
	}
	ctx := context.Background()
	n, k := 3, 3
	want := make([]float64, n+n*k+1)
	for range 2000 {
		qrs := r.qrs
		if !r.step(ctx) {
			t.Fatal(r.err)
		}
		if r.qrs == qrs {
			continue
		}
		y, dy := r.st.Y(), r.st.DYDT()
		v := y[n : n+n*k]
		for a := 0; a < k; a++ {
			for b := 0; b < k; b++ {
				var s float64
				for i := 0; i < n; i++ {
					s += v[i*k+a] * v[i*k+b]
				}
				e := 0.0
				if a == b {
					e = 1
				}
				if math.Abs(s-e) > 1e-13 { // orthonormal to rounding
					t.Fatalf("t=%g: basis not orthonormal: <v%d,v%d> = %g", r.st.T(), a, b, s)
				}
			}
		}
		r.field(r.st.T(), y, want)
		for i := range want {
			if dy[i] != want[i] {
				t.Fatalf("t=%g: derivative component %d is %g, F gives %g", r.st.T(), i, dy[i], want[i])
			}
		}
	}
	if r.qrs < 10 {
		t.Errorf("only %d re-orthonormalisations", r.qrs)
	}
}
