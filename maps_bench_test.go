package plumb

import (
	"context"
	"os"
	"testing"
)

// BenchmarkSystemTrustMap audits 200 iterates of the Hénon map with the exponent
// given, so that the cost is the reference orbit and the rungs.
func BenchmarkSystemTrustMap(b *testing.B) {
	sys, _ := Model("henon")
	s := &TrustSettings{Tol: 0.1, Lambda: henonLambda1}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := sys.Trust(context.Background(), 200, s); err != nil {
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
