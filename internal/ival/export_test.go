package ival

// Both evaluation paths of the elementary functions, exposed to the
// external tests so that each is checked on its own (the public functions
// take the fast path whenever it is narrow enough, which would leave the
// 128-bit kernels untested in the main ranges).

// Kernel128 evaluates the 128-bit kernels at a point (arguments inside
// each kernel's range: |v| < 1000 for exp-based ones, |v| < 40 for tanh,
// v > 0 for log).
var Kernel128 = map[string]func(float64) Interval{
	"Exp":  func(v float64) Interval { return expK(bigOf(v), kprec).toInterval() },
	"Log":  func(v float64) Interval { return logK(bigOf(v), kprec).toInterval() },
	"Sin":  func(v float64) Interval { s, _ := sinCosK(bigOf(v), kprec); return s.toInterval() },
	"Cos":  func(v float64) Interval { _, c := sinCosK(bigOf(v), kprec); return c.toInterval() },
	"Atan": func(v float64) Interval { return atanK(bigOf(v), kprec).toInterval() },
	"Sinh": func(v float64) Interval { return sinhK(bigOf(v), kprec).toInterval() },
	"Cosh": func(v float64) Interval { return coshK(bigOf(v), kprec).toInterval() },
	"Tanh": func(v float64) Interval { return tanhK(bigOf(v), kprec).toInterval() },
}

// Fast evaluates the float64 fast paths at a point; ok is false outside
// their ranges.
var Fast = map[string]func(float64) (Interval, bool){
	"Exp":  expFast,
	"Log":  logFast,
	"Atan": atanFast,
	"Tanh": func(v float64) (Interval, bool) {
		if v > -1 && v < 1 {
			return tanhSmallFast(v), true
		}
		return Interval{}, false
	},
	"Sin": func(v float64) (Interval, bool) { s, _, ok := sinCosFast(v); return s, ok },
	"Cos": func(v float64) (Interval, bool) { _, c, ok := sinCosFast(v); return c, ok },
	"Sinh": func(v float64) (Interval, bool) {
		if v > -1 && v < 1 {
			return sinhFastSeries(v), true
		}
		return Interval{}, false
	},
}
