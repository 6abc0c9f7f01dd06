package plumb

import (
	"context"
	"os"
	"testing"
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

// TestMapRungLoopAllocs: the per-iterate work of a rung (map, storage
// rounding, distance) does not allocate.
func TestMapRungLoopAllocs(t *testing.T) {
	sys, _ := Model("henon")
	m, _ := sys.Map()
	ev, _ := sys.DoubleDoubleEvaluator()
	ref, err := ddOrbit(context.Background(), ev, sys.Start(), 10, nil)
	if err != nil {
		t.Fatal(err)
	}
	x, y := sys.Start(), make([]float64, 2)
	r := DefaultMapRungs(10)[2].Storage
	allocs := testing.AllocsPerRun(100, func() {
		m.Next(x, y)
		r.Vec(y, y)
		_ = mapDist(y, ref, 5, nil, nil)
	})
	if allocs != 0 {
		t.Errorf("a rung's iterate allocates %v times", allocs)
	}
}
