package lyap

import (
	"context"
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
