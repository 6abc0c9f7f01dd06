package embed

import (
	"fmt"
	"math"
)

// MinLen is the fewest values any analysis accepts. Each method asks for
// more where it needs it (the 0-1 test, for instance, wants about a
// thousand) and says so in its ErrTooShort error.
const MinLen = 16

// Series is a scalar signal sampled at equal intervals: a thermocouple, a
// gauge, a sensor channel. Values is kept, not copied: the caller must not
// change it while an analysis runs.
type Series struct {
	// Values are the measurements in time order.
	Values []float64
	// Dt is the sampling interval in the signal's time unit (1 for a map
	// or for counts per step).
	Dt float64
}

// NewSeries checks values and dt and returns the series. It refuses a
// series shorter than MinLen (ErrTooShort), a NaN or infinite value
// (ErrNonFinite, with its index), a series whose values are all equal
// (ErrConstant) and a dt that is not finite and positive (ErrSettings).
func NewSeries(values []float64, dt float64) (*Series, error) {
	if !(dt > 0) || math.IsInf(dt, 1) {
		return nil, settingf("sampling interval dt = %g (want finite and > 0)", dt)
	}
	if len(values) < MinLen {
		return nil, shortf("%d values (want at least %d)", len(values), MinLen)
	}
	lo, hi := values[0], values[0]
	for i, v := range values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, &InputError{Index: i, Err: ErrNonFinite, Detail: fmt.Sprint(v)}
		}
		lo = min(lo, v)
		hi = max(hi, v)
	}
	if lo == hi {
		return nil, &InputError{Index: -1, Err: ErrConstant, Detail: fmt.Sprintf("all %d values equal %g", len(values), lo)}
	}
	return &Series{Values: values, Dt: dt}, nil
}

// UniformTolerance is the largest relative departure of one time step from
// the mean step that FromTimes accepts: printed times carry rounding, so a
// few parts in a million is allowed, a missing sample (a step twice as
// long) is not.
const UniformTolerance = 1e-6

// FromTimes checks that times are strictly increasing and equally spaced
// (each step within UniformTolerance of the first step, relative) and returns
// the series with that mean step as Dt. A gap or a repeated time is an
// ErrNonUniform error naming the index where it occurs.
func FromTimes(times, values []float64) (*Series, error) {
	if len(times) != len(values) {
		return nil, settingf("%d times for %d values", len(times), len(values))
	}
	if len(times) < 2 {
		return nil, shortf("%d values (want at least %d)", len(values), MinLen)
	}
	for i, t := range times {
		if math.IsNaN(t) || math.IsInf(t, 0) {
			return nil, &InputError{Index: i, Err: ErrNonFinite, Detail: fmt.Sprintf("time %v", t)}
		}
	}
	n := len(times)
	dt := (times[n-1] - times[0]) / float64(n-1)
	if !(dt > 0) {
		return nil, &InputError{Index: n - 1, Err: ErrNonUniform, Detail: "times do not increase"}
	}
	first := times[1] - times[0]
	for i := 1; i < n; i++ {
		step := times[i] - times[i-1]
		if math.Abs(step-first) > UniformTolerance*first {
			return nil, &InputError{Index: i, Err: ErrNonUniform,
				Detail: fmt.Sprintf("step %g from time %g to %g, first step %g", step, times[i-1], times[i], first)}
		}
	}
	return NewSeries(values, dt)
}

// Len returns the number of values.
func (s *Series) Len() int { return len(s.Values) }

// moments returns the mean and the standard deviation (divisor n) of x,
// summed in index order.
func moments(x []float64) (mean, sd float64) {
	var sum float64
	for _, v := range x {
		sum += v
	}
	mean = sum / float64(len(x))
	var ss float64
	for _, v := range x {
		d := v - mean
		ss += float64(d * d)
	}
	return mean, math.Sqrt(ss / float64(len(x)))
}

// extent returns the smallest and largest value of x.
func extent(x []float64) (lo, hi float64) {
	lo, hi = x[0], x[0]
	for _, v := range x {
		lo = min(lo, v)
		hi = max(hi, v)
	}
	return lo, hi
}
