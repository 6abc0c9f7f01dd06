package lyap

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
)

// Windows holds finite-time Lyapunov exponents: the stretch rates of the k
// tangent directions over consecutive windows of length Tau along one
// trajectory, and their distribution. Window w nominally spans
// [Start+w·Tau, Start+(w+1)·Tau] after the transient; it begins and ends at
// the first accepted steps at or after those times, so Length may differ
// from Tau by up to one step. A last window shorter than Tau/2 is dropped.
type Windows struct {
	// Tau is the nominal window length; Units as in Spectrum.
	Tau   float64 `json:"tau"`
	Units string  `json:"units"`
	// Start and Length give each window's start time and exact length.
	Start  []float64 `json:"start"`
	Length []float64 `json:"length"`
	// Exponents[w][i] is exponent i over window w.
	Exponents [][]float64 `json:"exponents"`
	// Mean, StdDev, Min and Max summarise the distribution of each exponent
	// over the windows (StdDev with the n−1 divisor; 0 for one window).
	Mean   []float64 `json:"mean"`
	StdDev []float64 `json:"std_dev"`
	Min    []float64 `json:"min"`
	Max    []float64 `json:"max"`
	// Stats counts the work.
	Stats Stats `json:"stats"`
}

// FiniteTime computes finite-time Lyapunov exponents of the flow p over
// windows of length tau: after s.Transient, the averaging run of length
// s.Duration is cut into windows, and in each the accumulated ln R_ii of the
// QR method (see Exponents, whose settings apply) divided by the window's
// length gives the k finite-time exponents. The tangent basis is carried on
// from window to window (it is not reset), so each window measures the
// stretching of the already aligned directions. Their spread shows how far
// a single forecast may stray from the mean rate: the growth of an error over
// a time tau is exp(lambda(tau)·tau), not exp(lambda·tau).
//
// Errors: those of Exponents; tau must be finite, > 0 and at most the
// duration (ErrSettings). On a failure after work began the windows
// completed so far are returned with the error.
//
// References:
//
//	H. D. I. Abarbanel, R. Brown, M. B. Kennel, Variation of Lyapunov
//	  exponents on a strange attractor, J. Nonlinear Sci. 1 (1991) 175–199.
//	G. Boffetta, M. Cencini, M. Falcioni, A. Vulpiani, Predictability: a way
//	  to characterize complexity, Phys. Rep. 356 (2002) 367–474, Sect. 3.
func FiniteTime(ctx context.Context, p integrate.Problem, k int, tau float64, s *Settings) (*Windows, error) {
	r, err := newFlowRun(p, k, s)
	if err != nil {
		return nil, err
	}
	if !(tau > 0) || math.IsInf(tau, 0) || tau > r.cfg.Duration {
		return nil, fmt.Errorf("lyap: window length tau = %v: must be finite, > 0 and at most the duration %g: %w", tau, r.cfg.Duration, ErrSettings)
	}
	w := &Windows{Tau: tau, Units: UnitsFlow}
	nw := int(r.cfg.Duration/tau) + 1
	flat := make([]float64, 0, nw*k)
	w.Exponents = make([][]float64, 0, nw)
	w.Start = make([]float64, 0, nw)
	w.Length = make([]float64, 0, nw)
	r.window = tau
	r.windowSum = make([]float64, k)
	r.onWindow = func(start, end float64, sums []float64) bool {
		l := end - start
		if l < tau/2 || len(w.Exponents) == cap(w.Exponents) || len(flat)+k > cap(flat) {
			return true
		}
		off := len(flat)
		flat = flat[:off+k]
		row := flat[off : off+k : off+k]
		for i, v := range sums {
			row[i] = v / l
		}
		w.Exponents = append(w.Exponents, row)
		w.Start = append(w.Start, start)
		w.Length = append(w.Length, l)
		return true
	}
	err = r.run(ctx)
	w.summarise(k)
	sp := r.spectrum()
	w.Stats = sp.Stats
	return w, err
}

func (w *Windows) summarise(k int) {
	w.Mean, w.StdDev, w.Min, w.Max = make([]float64, k), make([]float64, k), make([]float64, k), make([]float64, k)
	m := float64(len(w.Exponents))
	if m == 0 {
		return
	}
	for i := 0; i < k; i++ {
		var mean, m2 float64
		lo, hi := math.Inf(1), math.Inf(-1)
		for c, row := range w.Exponents {
			v := row[i]
			d := v - mean
			mean += d / float64(c+1)
			m2 += float64(d * (v - mean))
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		w.Mean[i], w.Min[i], w.Max[i] = mean, lo, hi
		if m > 1 {
			w.StdDev[i] = math.Sqrt(m2 / (m - 1))
		}
	}
}

// MapFiniteTime computes finite-time Lyapunov exponents of the map m from x0
// over windows of tau iterations, as FiniteTime does for flows: after
// s.Discard iterations, the s.Iterations averaged ones are cut into windows
// that start and end exactly on multiples of tau, and in each the
// accumulated ln R_ii divided by tau gives the k exponents per iteration.
//
// Errors: those of MapExponents; tau must be in 1..s.Iterations
// (ErrSettings). On a failure after work began the windows completed so far
// are returned with the error.
//
// References:
//
//	H. D. I. Abarbanel, R. Brown, M. B. Kennel, Variation of Lyapunov
//	  exponents on a strange attractor, J. Nonlinear Sci. 1 (1991) 175–199.
func MapFiniteTime(ctx context.Context, m Map, x0 []float64, k, tau int, s *Settings) (*Windows, error) {
	r, err := newMapRun(m, x0, k, s)
	if err != nil {
		return nil, err
	}
	if tau < 1 || tau > r.cfg.Iterations {
		return nil, fmt.Errorf("lyap: window length tau = %d: must be in 1..%d (the iterations averaged): %w", tau, r.cfg.Iterations, ErrSettings)
	}
	w := &Windows{Tau: float64(tau), Units: UnitsMap}
	nw := r.cfg.Iterations/tau + 1
	flat := make([]float64, 0, nw*k)
	w.Exponents = make([][]float64, 0, nw)
	w.Start = make([]float64, 0, nw)
	w.Length = make([]float64, 0, nw)
	r.window = tau
	r.windowSum = make([]float64, k)
	r.onWindow = func(start, end int, sums []float64) bool {
		l := float64(end - start)
		if 2*(end-start) < tau || len(w.Exponents) == cap(w.Exponents) || len(flat)+k > cap(flat) {
			return true
		}
		off := len(flat)
		flat = flat[:off+k]
		row := flat[off : off+k : off+k]
		for i, v := range sums {
			row[i] = v / l
		}
		w.Exponents = append(w.Exponents, row)
		w.Start = append(w.Start, float64(start))
		w.Length = append(w.Length, l)
		return true
	}
	if ctx == nil {
		ctx = context.Background()
	}
	err = r.run(ctx)
	w.summarise(k)
	w.Stats = r.spectrum().Stats
	return w, err
}
