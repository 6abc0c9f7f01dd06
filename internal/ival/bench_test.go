package ival_test

import (
	"testing"

	"github.com/plumbdyn/plumb/internal/ival"
)

var sink ival.Interval

// BenchmarkArith measures the basic operations on narrow intervals.
func BenchmarkArith(b *testing.B) {
	x, y := ival.New(1.25, 1.2500001), ival.New(-0.3, 0.7)
	b.ReportAllocs()
	for b.Loop() {
		sink = ival.Add(ival.Mul(x, y), ival.Div(x, ival.Sqr(x)))
	}
}

// BenchmarkElementary measures each function on a narrow interval (two
// kernel evaluations at 128 bits each).
func BenchmarkElementary(b *testing.B) {
	x := ival.New(0.75, 0.7500001)
	for _, f := range []struct {
		name string
		f    func(ival.Interval) ival.Interval
	}{
		{"Exp", ival.Exp}, {"Log", ival.Log}, {"Sin", ival.Sin}, {"Cos", ival.Cos},
		{"Tan", ival.Tan}, {"Atan", ival.Atan}, {"Sinh", ival.Sinh}, {"Cosh", ival.Cosh},
		{"Tanh", ival.Tanh}, {"SinHuge", func(ival.Interval) ival.Interval { return ival.Sin(ival.Point(1e300)) }},
	} {
		b.Run(f.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				sink = f.f(x)
			}
		})
	}
}
