package runio

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/interp"
)

// Grid chooses the common times of Resample. The zero value takes the
// first run's own times inside the common span, so that the first run
// (usually the reference) is never interpolated.
type Grid struct {
	// Times, when not nil, are the common times: strictly increasing and
	// inside the common span.
	Times []float64
	// Step, when positive and Times is nil, makes the grid T0 + i·Step
	// (times by multiplication, not a running sum) up to T1, with T1 last.
	Step float64
}

// Common holds several runs on one grid of times.
type Common struct {
	// T0 and T1 bound the compared span: the intersection of the runs'
	// spans. Nothing outside it is ever estimated.
	T0, T1 float64
	// T is the common grid, inside [T0, T1].
	T []float64
	// Names are the compared columns.
	Names []string
	// Periods and Scales are the columns' angle periods (0: not an angle)
	// and scales, as the runs carry them.
	Periods, Scales []float64
	// Y[r] holds run r on the grid, flat and row-major like Run.Y. Angle
	// columns are unwrapped (continuous across the period) wherever a run
	// had to be interpolated; compare them modulo the period.
	Y [][]float64
	// Interpolated[r] reports whether run r needed interpolation (its
	// times differ from the grid); false means its values are copied
	// exactly.
	Interpolated []bool
}

// Resample puts runs on one grid of times, for comparison. The columns
// compared are columns (nil: the first run's state columns), looked up by
// name in every run. The span is the intersection of the runs' spans: no
// value is ever extrapolated.
//
// A run whose times contain the grid as a contiguous stretch is copied
// exactly. Otherwise each column is interpolated with a piecewise cubic
// Hermite interpolant (gonum's interp.PiecewiseCubic) whose slopes are
// those of the parabola through each point and its two neighbours
// (Bessel's slopes). Why this one: it is local (one bad point moves only
// the two intervals beside it, where a global spline would spread it over
// the run), it needs no linear system (gonum's global splines solve one
// over the whole run), it reproduces quadratics exactly, and its error
// falls as h³ for smooth data (the tests measure this). The interpolation
// error is
// an added divergence: keep the output intervals short against the
// motion, or better, write every run at the same times.
//
// Errors wrap ErrColumn (a column missing from a run, or periods that
// disagree) or ErrSpan (disjoint spans, fewer than two rows, grid times
// outside the span), and name the run (its Source and position) and the
// column.
//
// References: de Boor, C. (1978). A Practical Guide to Splines, Springer,
// ch. IV (piecewise cubic Hermite interpolation, Bessel end conditions).
func Resample(runs []*Run, columns []string, g Grid) (*Common, error) {
	if len(runs) == 0 {
		return nil, &Error{File: "runs", Err: ErrSpan, Detail: "no runs"}
	}
	where := func(i int) string { return fmt.Sprintf("run %d (%s)", i+1, runs[i].Source) }
	if columns == nil {
		columns = runs[0].Names
	}
	c := &Common{Names: columns, Periods: make([]float64, len(columns)), Scales: make([]float64, len(columns)),
		Y: make([][]float64, len(runs)), Interpolated: make([]bool, len(runs))}
	idx := make([][]int, len(runs))
	for i, r := range runs {
		if len(r.T) < 2 {
			return nil, &Error{File: where(i), Err: ErrSpan, Detail: fmt.Sprintf("%d rows, at least 2 are needed", len(r.T))}
		}
		if len(r.Y) != len(r.T)*len(r.Names) {
			return nil, &Error{File: where(i), Err: ErrRagged, Detail: fmt.Sprintf("%d values for %d rows of %d columns", len(r.Y), len(r.T), len(r.Names))}
		}
		for k := 1; k < len(r.T); k++ {
			if !(r.T[k] > r.T[k-1]) {
				return nil, &Error{File: where(i), Row: k + 1, Err: ErrTimeOrder, Detail: fmt.Sprintf("%v after %v", r.T[k], r.T[k-1])}
			}
		}
		idx[i] = make([]int, len(columns))
		for j, name := range columns {
			k := r.Index(name)
			if k < 0 {
				return nil, &Error{File: where(i), Field: name, Err: ErrColumn, Detail: "column missing from this run"}
			}
			idx[i][j] = k
			if p := periodOf(r, k); p > 0 {
				if c.Periods[j] > 0 && c.Periods[j] != p {
					return nil, &Error{File: where(i), Field: name, Err: ErrColumn, Detail: fmt.Sprintf("period %v, an earlier run says %v", p, c.Periods[j])}
				}
				c.Periods[j] = p
			}
			if c.Scales[j] == 0 && k < len(r.Scales) {
				c.Scales[j] = r.Scales[k]
			}
		}
		lo, hi := r.T[0], r.T[len(r.T)-1]
		if i == 0 || lo > c.T0 {
			c.T0 = lo
		}
		if i == 0 || hi < c.T1 {
			c.T1 = hi
		}
		if !(c.T0 < c.T1) {
			return nil, &Error{File: where(i), Err: ErrSpan,
				Detail: fmt.Sprintf("span [%v, %v] does not overlap the span [%v, %v] common to the runs before it", lo, hi, c.T0, c.T1)}
		}
	}
	for j := range c.Scales {
		if c.Scales[j] == 0 {
			c.Scales[j] = 1
		}
	}
	var err error
	if c.T, err = c.grid(runs[0], g); err != nil {
		return nil, err
	}
	d := len(columns)
	var ys []float64
	var fit interp.PiecewiseCubic
	for i, r := range runs {
		out := make([]float64, len(c.T)*d)
		c.Y[i] = out
		if at := contains(r.T, c.T); at >= 0 {
			for k := range c.T {
				row := r.Y[(at+k)*len(r.Names):]
				for j, col := range idx[i] {
					out[k*d+j] = row[col]
				}
			}
			continue
		}
		c.Interpolated[i] = true
		// Fit on the rows covering the span, with up to two rows of margin.
		a := max(0, lowerIndex(r.T, c.T0)-2)
		b := min(len(r.T), lowerIndex(r.T, c.T1)+3)
		xs := r.T[a:b]
		ys = grow(ys[:0], len(xs), 0)
		dy := make([]float64, len(xs))
		for j, col := range idx[i] {
			for k := range xs {
				ys[k] = r.Y[(a+k)*len(r.Names)+col]
			}
			if p := c.Periods[j]; p > 0 {
				unwrap(ys, p)
			}
			besselSlopes(xs, ys, dy)
			fit.FitWithDerivatives(xs, ys, dy)
			for k, t := range c.T {
				out[k*d+j] = fit.Predict(t)
			}
		}
	}
	return c, nil
}

func periodOf(r *Run, k int) float64 {
	if k < len(r.Periods) {
		return r.Periods[k]
	}
	return 0
}

// grid makes the common times.
func (c *Common) grid(first *Run, g Grid) ([]float64, error) {
	switch {
	case g.Times != nil:
		for k, t := range g.Times {
			if !(t >= c.T0 && t <= c.T1) {
				return nil, &Error{File: "grid", Row: k + 1, Err: ErrSpan, Detail: fmt.Sprintf("time %v outside the common span [%v, %v]", t, c.T0, c.T1)}
			}
			if k > 0 && !(t > g.Times[k-1]) {
				return nil, &Error{File: "grid", Row: k + 1, Err: ErrTimeOrder, Detail: fmt.Sprintf("%v after %v", t, g.Times[k-1])}
			}
		}
		return append([]float64(nil), g.Times...), nil
	case g.Step > 0 && !math.IsInf(g.Step, 0):
		n := int((c.T1 - c.T0) / g.Step)
		ts := make([]float64, 0, n+2)
		for i := 0; ; i++ {
			t := c.T0 + float64(float64(i)*g.Step)
			if t >= c.T1 {
				break
			}
			ts = append(ts, t)
		}
		return append(ts, c.T1), nil
	case g.Step != 0:
		return nil, &Error{File: "grid", Err: ErrOptions, Detail: fmt.Sprintf("step %v must be finite and > 0", g.Step)}
	}
	a := lowerIndex(first.T, c.T0)
	b := lowerIndex(first.T, c.T1)
	if b < len(first.T) && first.T[b] == c.T1 {
		b++
	}
	return append([]float64(nil), first.T[a:b]...), nil
}

// lowerIndex returns the first index with ts[i] >= t.
func lowerIndex(ts []float64, t float64) int {
	lo, hi := 0, len(ts)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if ts[m] < t {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
}

// contains returns where grid starts inside ts as a contiguous stretch of
// equal times, or -1.
func contains(ts, grid []float64) int {
	at := lowerIndex(ts, grid[0])
	if at+len(grid) > len(ts) {
		return -1
	}
	for k, t := range grid {
		if ts[at+k] != t {
			return -1
		}
	}
	return at
}

// unwrap removes jumps of more than half a period between neighbours by
// adding whole periods.
func unwrap(ys []float64, p float64) {
	off := 0.0
	for k := 1; k < len(ys); k++ {
		v := ys[k] + off
		if jump := math.Round((v - ys[k-1]) / p); jump != 0 {
			off -= float64(jump * p)
			v = ys[k] + off
		}
		ys[k] = v
	}
}

// besselSlopes sets dy to the slope at each point of the parabola through
// it and its two neighbours (at the ends: through the first or last three
// points); with two points, the chord's slope.
//
// References: de Boor, C. (1978). A Practical Guide to Splines, ch. IV.
func besselSlopes(xs, ys, dy []float64) {
	n := len(xs)
	if n == 2 {
		s := (ys[1] - ys[0]) / (xs[1] - xs[0])
		dy[0], dy[1] = s, s
		return
	}
	hPrev := xs[1] - xs[0]
	sPrev := (ys[1] - ys[0]) / hPrev
	for i := 1; i < n-1; i++ {
		h := xs[i+1] - xs[i]
		s := (ys[i+1] - ys[i]) / h
		dy[i] = (float64(h*sPrev) + float64(hPrev*s)) / (hPrev + h)
		if i == 1 {
			dy[0] = sPrev + float64((sPrev-s)*hPrev)/(hPrev+h)
		}
		if i == n-2 {
			dy[n-1] = s + float64((s-sPrev)*h)/(hPrev+h)
		}
		hPrev, sPrev = h, s
	}
}
