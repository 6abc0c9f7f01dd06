package plumb

import (
	"context"
	"os"
	"testing"

	"github.com/plumbdyn/plumb/internal/dd"
)

// BenchmarkTrustMap audits 200 iterates of the Hénon map with the exponent
// given, so that the cost is the reference orbit and the rungs.
func BenchmarkTrustMap(b *testing.B) {
	sys, _ := Model("henon")
	s := &MapTrustSettings{Tol: 0.1, Lambda: henonLambda1}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := TrustMap(context.Background(), sys, 200, s); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkMapNext compares a built-in's Go map with a file's formula map.
func BenchmarkMapNext(b *testing.B) {
	henon, _ := Model("henon")
	f, err := os.Open("examples/systems/fish-stock.json")
	if err != nil {
		b.Fatal(err)
	}
	fish, err := LoadSystem(f)
	f.Close()
	if err != nil {
		b.Fatal(err)
	}
	for _, c := range []struct {
		name string
		sys  *System
	}{{"builtin-henon", henon}, {"file-fish-stock", fish}} {
		b.Run(c.name, func(b *testing.B) {
			m, _ := c.sys.Map()
			x := c.sys.Start()
			b.ReportAllocs()
			for b.Loop() {
				m.Next(x, x)
			}
		})
	}
}

// TestMapRungLoopAllocs: the per-iterate work of the lockstep audit (the
// reference's double-double map, a rung's map, storage rounding, distance,
// the curve and the fit) does not allocate once its storage has grown.
func TestMapRungLoopAllocs(t *testing.T) {
	sys, _ := Model("henon")
	m, _ := sys.Map()
	ev, _ := sys.DoubleDoubleEvaluator()
	a := newMapLockstep(ev, m, DefaultMapRungs(10), sys.Start(), 10, nil, 0.1)
	run := a.runs[2]
	it := 0
	allocs := testing.AllocsPerRun(100, func() {
		_ = ev.Eval(dd.Float{}, a.cur, a.nxt)
		m.Next(run.x, run.y)
		run.store.Vec(run.y, run.y)
		d := refDist(run.y, a.nxt, nil)
		run.out.Divergence = run.out.Divergence[:0] // no growth: one point reused
		run.fitX, run.fitY = run.fitX[:0], run.fitY[:0]
		run.record(it, d, a)
		it++
	})
	if allocs != 0 {
		t.Errorf("a rung's iterate allocates %v times", allocs)
	}
}
