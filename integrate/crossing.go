package integrate

import (
	"fmt"
	"math"
)

// Sense selects which zero crossings of a crossing function count.
type Sense int

const (
	// Either counts crossings in both directions.
	Either Sense = iota
	// Rising counts crossings from negative to non-negative.
	Rising
	// Falling counts crossings from positive to non-positive.
	Falling
)

// String returns "either", "rising" or "falling".
func (s Sense) String() string {
	switch s {
	case Rising:
		return "rising"
	case Falling:
		return "falling"
	}
	return "either"
}

// Crossing asks Solve to locate the zeros of G(t, y) along the solution.
//
// Zeros are bracketed on the dense output, sampled at Probes interior points
// of every step so that two sign changes inside one step are not missed, and
// refined by Brent's method on the continuous extension until the bracket in t
// is below 4·eps·max(|t|, |h|). A zero exactly at a step end is reported once;
// a zero at t0 is not reported. A G that returns NaN ends the solve with an
// error wrapping ErrNonFinite (at t0: before any step).
type Crossing struct {
	// Name labels the crossing in reports. Optional.
	Name string
	// G is the function whose zeros are sought. It must not keep y.
	G func(t float64, y []float64) float64
	// Sense selects the direction; the zero value is Either.
	Sense Sense
	// Stop ends the solve at the first counted crossing.
	Stop bool
	// Probes is the number of interior samples per step; zero means 3.
	Probes int
}

// Hit is a located crossing.
type Hit struct {
	Which int       // index into Settings.Crossings
	T     float64   // time of the crossing
	Y     []float64 // state at T (from the dense output)
	Sense Sense     // Rising or Falling
}

// crossState tracks one crossing function along the run.
type crossState struct {
	c    Crossing
	prev float64 // last nonzero sign seen (-1, +1), or 0 just after a zero
	gEnd float64
}

// crossFinder locates crossings on the steps of a Stepper.
type crossFinder struct {
	st    []crossState
	tmp   []float64
	hits  []Hit
	found []Hit // scratch for one step
	err   error // a crossing function returned NaN
	// inG and gT say that a crossing function is running, and at what
	// time, for a recovered panic (see Stepper.recovered).
	inG bool
	gT  float64
}

// g calls crossing function s at (t, y), marking the call.
func (f *crossFinder) g(s *crossState, t float64, y []float64) float64 {
	f.inG, f.gT = true, t
	v := s.c.G(t, y)
	f.inG = false
	return v
}

func newCrossFinder(cs []Crossing, t0 float64, y0 []float64) *crossFinder {
	f := &crossFinder{st: make([]crossState, len(cs)), tmp: make([]float64, len(y0))}
	for i, c := range cs {
		if c.Probes <= 0 {
			c.Probes = 3
		}
		f.st[i].c = c
		g := f.g(&f.st[i], t0, y0)
		if g != g && f.err == nil {
			f.err = fmt.Errorf("integrate: Crossings[%d].G is NaN at t0=%g: %w", i, t0, ErrNonFinite)
		}
		f.st[i] = crossState{c: c, prev: sign(g), gEnd: g}
	}
	return f
}

func sign(x float64) float64 {
	switch {
	case x > 0:
		return 1
	case x < 0:
		return -1
	}
	return 0
}

// scan looks for crossings inside the step [ta, ta+h] whose continuous
// extension is eval(theta, dst). It returns the hits in time order, cut after
// the first stopping one.
func (f *crossFinder) scan(ta, h float64, yEnd []float64, eval func(theta float64, dst []float64)) (hits []Hit, stop bool) {
	f.found = f.found[:0]
	for w := range f.st {
		s := &f.st[w]
		m := s.c.Probes + 1
		gPrev := s.gEnd
		thPrev := 0.0
		for j := 1; j <= m; j++ {
			th := float64(j) / float64(m)
			var g float64
			if j == m {
				g = f.g(s, ta+h, yEnd)
			} else {
				eval(th, f.tmp)
				g = f.g(s, ta+float64(th*h), f.tmp)
			}
			if g != g { // NaN: no sign to compare; the solve ends with an error
				f.err = fmt.Errorf("integrate: Crossings[%d].G is NaN at t=%g: %w", w, ta+float64(th*h), ErrNonFinite)
				return nil, false
			}
			sg := sign(g)
			switch {
			case sg == 0 && s.prev != 0:
				// Exactly on a probe or the step end.
				f.record(w, s.prev < 0, ta, h, th, eval, j == m, yEnd)
				s.prev = 0
			case sg != 0 && s.prev != 0 && sg != s.prev:
				tc := brent(func(x float64) float64 {
					eval(x, f.tmp)
					return f.g(s, ta+float64(x*h), f.tmp)
				}, thPrev, th, gPrev, g, ta, h)
				f.record(w, s.prev < 0, ta, h, tc, eval, false, yEnd)
				s.prev = sg
			case sg != 0:
				s.prev = sg
			}
			gPrev, thPrev = g, th
		}
		s.gEnd = gPrev
	}
	if len(f.found) == 0 {
		return nil, false
	}
	// Order by time, then by function index (insertion sort: few hits).
	for i := 1; i < len(f.found); i++ {
		for j := i; j > 0; j-- {
			a, b := f.found[j-1], f.found[j]
			if (b.T-a.T)*math.Copysign(1, h) < 0 || (b.T == a.T && b.Which < a.Which) {
				f.found[j-1], f.found[j] = b, a
			}
		}
	}
	for i, hit := range f.found {
		if f.st[hit.Which].c.Stop {
			return f.found[:i+1], true
		}
	}
	return f.found, false
}

func (f *crossFinder) record(w int, rising bool, ta, h, theta float64, eval func(float64, []float64), atEnd bool, yEnd []float64) {
	sense := Falling
	if rising {
		sense = Rising
	}
	c := f.st[w].c
	if c.Sense != Either && c.Sense != sense {
		return
	}
	y := make([]float64, len(f.tmp))
	t := ta + float64(theta*h)
	if atEnd {
		copy(y, yEnd)
		t = ta + h
	} else {
		eval(theta, y)
	}
	f.found = append(f.found, Hit{Which: w, T: t, Y: y, Sense: sense})
}

// brent finds a zero of g on [a, b] (theta units) with g(a)·g(b) < 0 by
// Brent's method, to a bracket of 4·eps·max(|ta+θh|, |h|) in t.
//
// References:
//
//	R. P. Brent, Algorithms for Minimization without Derivatives,
//	  Prentice-Hall 1973, ch. 4.
func brent(g func(float64) float64, a, b, fa, fb, ta, h float64) float64 {
	const eps = 0x1p-52
	scale := math.Max(math.Abs(ta), math.Abs(ta+h))
	tolT := 4 * eps * math.Max(scale, math.Abs(h))
	tol := tolT / math.Abs(h) // in theta units
	c, fc := a, fa
	d := b - a
	e := d
	for iter := 0; iter < 200; iter++ {
		if (fb > 0) == (fc > 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol1 := float64(2*eps*math.Abs(b)) + float64(0.5*tol)
		xm := float64(0.5 * (c - b))
		if math.Abs(xm) <= tol1 || fb == 0 {
			return b
		}
		if math.Abs(e) >= tol1 && math.Abs(fa) > math.Abs(fb) {
			s := fb / fa
			var p, q float64
			if a == c {
				p = float64(float64(2*xm) * s)
				q = 1 - s
			} else {
				q0 := fa / fc
				r := fb / fc
				p = float64(s * (float64(float64(float64(2*xm)*q0)*(q0-r)) - float64((b-a)*(r-1))))
				q = float64(float64((q0-1)*(r-1)) * (s - 1))
			}
			if p > 0 {
				q = -q
			}
			p = math.Abs(p)
			if float64(2*p) < math.Min(float64(float64(3*xm)*q)-math.Abs(float64(tol1*q)), math.Abs(float64(e*q))) {
				e = d
				d = p / q
			} else {
				d = xm
				e = d
			}
		} else {
			d = xm
			e = d
		}
		a, fa = b, fb
		if math.Abs(d) > tol1 {
			b += d
		} else {
			b += math.Copysign(tol1, xm)
		}
		fb = g(b)
	}
	return b
}
