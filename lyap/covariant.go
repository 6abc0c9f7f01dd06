package lyap

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/detmath"
)

// CovariantVectors holds covariant Lyapunov vectors along a trajectory: at
// each sample time, k unit vectors v_1..v_k that the tangent dynamics map
// into each other (J v_i(t) is parallel to v_i(t')), v_i stretching at the
// rate of exponent i. Unlike the orthonormal QR basis they are not
// orthogonal; small angles between them signal near-tangencies of stable and
// unstable directions.
type CovariantVectors struct {
	// Dim is the state dimension n, Count the number of vectors k.
	Dim   int `json:"dim"`
	Count int `json:"count"`
	// Units is UnitsFlow or UnitsMap.
	Units string `json:"units"`
	// Times holds the sample times (iterations for maps): the
	// re-orthonormalisation times inside the sampled window.
	Times []float64 `json:"times"`
	// States[s] is the state at sample s.
	States [][]float64 `json:"states"`
	// Vectors[s] is the n×k matrix of sample s, row-major: column j (the
	// entries Vectors[s][i*k+j]) is the unit vector v_j. The sign of each
	// vector is arbitrary.
	Vectors [][]float64 `json:"vectors"`
	// Angles[s] holds the angles in radians, in [0, π/2], between the lines
	// of v_i and v_j for i < j, in the order (0,1), (0,2), …, (0,k−1),
	// (1,2), …
	Angles [][]float64 `json:"angles"`
	// Exponents are the growth rates of the covariant vectors over the
	// sampled window, from the backward iteration, in decreasing order
	// (vector j is the one of Exponents[j]); they estimate the same
	// exponents as the QR method. StdErr are their batch-means standard
	// errors over Settings.Blocks blocks of the window (nil with fewer than
	// two).
	Exponents []float64 `json:"exponents"`
	StdErr    []float64 `json:"std_err"`
	// Stats counts the forward work.
	Stats Stats `json:"stats"`
}

// Vector writes vector j of sample s into dst (grown if short) and returns
// it, or nil if s or j is out of range.
func (c *CovariantVectors) Vector(s, j int, dst []float64) []float64 {
	if s < 0 || s >= len(c.Vectors) || j < 0 || j >= c.Count {
		return nil
	}
	if cap(dst) < c.Dim {
		dst = make([]float64, c.Dim)
	}
	dst = dst[:c.Dim]
	for i := range dst {
		dst[i] = c.Vectors[s][i*c.Count+j]
	}
	return dst
}

// Angle returns the angle between the lines of vectors i and j at sample s,
// or NaN if an index is out of range.
func (c *CovariantVectors) Angle(s, i, j int) float64 {
	k := c.Count
	if s < 0 || s >= len(c.Angles) || i < 0 || j < 0 || i >= k || j >= k {
		return math.NaN()
	}
	if i == j {
		return 0
	}
	if i > j {
		i, j = j, i
	}
	// Pairs before row i: i·k − i(i+1)/2; then j − i − 1 within it.
	return c.Angles[s][i*k-i*(i+1)/2+j-i-1]
}

// LineAngle returns the angle in [0, π/2] between the lines spanned by u and
// w (nonzero, equal length), accurate also for tiny angles:
// 2·atan2(|û − ŵ|, |û + ŵ|) with ŵ signed so that û·ŵ >= 0.
func LineAngle(u, w []float64) float64 {
	var nu, nw, dot float64
	for i := range u {
		nu += float64(u[i] * u[i])
		nw += float64(w[i] * w[i])
		dot += float64(u[i] * w[i])
	}
	nu, nw = math.Sqrt(nu), math.Sqrt(nw)
	sg := 1.0
	if dot < 0 {
		sg = -1
	}
	var dm, dp float64
	for i := range u {
		a, b := u[i]/nu, sg*w[i]/nw
		dm += float64((a - b) * (a - b))
		dp += float64((a + b) * (a + b))
	}
	return 2 * detmath.Atan2(math.Sqrt(dm), math.Sqrt(dp))
}

// ginelliStore keeps the forward QR data: per re-orthonormalisation its time,
// Q (n×k) and R (k×k).
type ginelliStore struct {
	n, k  int
	times []float64
	xs    []float64
	qs    []float64
	rs    []float64
}

func (g *ginelliStore) add(t float64, x, q, r []float64) {
	g.times = append(g.times, t)
	g.xs = append(g.xs, x[:g.n]...)
	g.qs = append(g.qs, q[:g.n*g.k]...)
	g.rs = append(g.rs, r[:g.k*g.k]...)
}

// backward runs the backward iteration of Ginelli et al. over the stored
// data and fills the samples with times in [from, to].
func (g *ginelliStore) backward(c *CovariantVectors, from, to float64, blocks int) {
	n, k := g.n, g.k
	m := len(g.times)
	cm := make([]float64, k*k) // the coefficients C, upper triangular
	for j := 0; j < k; j++ {
		cm[j*k+j] = 1
	}
	x := make([]float64, k*k)
	logs := make([]float64, k)
	var span float64
	type sample struct {
		t    float64
		x, v []float64
	}
	var out []sample
	// Per interval inside the window, backwards: its end and the k logs.
	var ivEnd, ivLogs []float64
	first := from
	for j := m - 1; j >= 1; j-- {
		r := g.rs[j*k*k : (j+1)*k*k]
		// x = R⁻¹ C by back substitution, column by column.
		for col := 0; col < k; col++ {
			for i := k - 1; i >= 0; i-- {
				s := cm[i*k+col]
				for l := i + 1; l < k; l++ {
					s -= float64(r[i*k+l] * x[l*k+col])
				}
				x[i*k+col] = s / r[i*k+i]
			}
		}
		// Normalise the columns; the growth of v over the interval is 1/ν.
		tA, tB := g.times[j-1], g.times[j]
		inWindow := tA >= from && tB <= to
		for col := 0; col < k; col++ {
			var s float64
			for i := 0; i < k; i++ {
				s += float64(x[i*k+col] * x[i*k+col])
			}
			nu := math.Sqrt(s)
			for i := 0; i < k; i++ {
				cm[i*k+col] = x[i*k+col] / nu
			}
			if inWindow {
				logs[col] -= detmath.Log(nu)
				ivLogs = append(ivLogs, -detmath.Log(nu))
			}
		}
		if inWindow {
			span += tB - tA
			ivEnd = append(ivEnd, tB)
			first = tA
		}
		if tA >= from && tA <= to {
			q := g.qs[(j-1)*n*k : j*n*k]
			v := make([]float64, n*k)
			for i := 0; i < n; i++ {
				for col := 0; col < k; col++ {
					var s float64
					for l := 0; l < k; l++ {
						s += float64(q[i*k+l] * cm[l*k+col])
					}
					v[i*k+col] = s
				}
			}
			out = append(out, sample{tA, g.xs[(j-1)*n : j*n : j*n], v})
		}
	}
	c.Exponents = make([]float64, k)
	if span > 0 {
		for i := range logs {
			c.Exponents[i] = logs[i] / span
		}
	}
	// Batch means over the window, in forward order.
	bm := newBatchMeans(k)
	bm.start(first)
	blockLen := span / float64(blocks)
	ib := 1
	for iv := len(ivEnd) - 1; iv >= 0; iv-- {
		bm.add(ivLogs[iv*k : (iv+1)*k])
		if iv == 0 || ivEnd[iv] >= first+float64(float64(ib)*blockLen) {
			bm.close(ivEnd[iv])
			ib++
		}
	}
	if se := make([]float64, k); bm.stderr(se) {
		c.StdErr = se
	}
	// Near zero the growth rates can come out of order, as in Exponents:
	// sort them, each vector (a column of every sample) moving with its
	// rate, before the angles are taken.
	if perm := descending(c.Exponents); !sorted(perm) {
		tmp := permute(c.Exponents, perm, nil)
		tmp = permute(c.StdErr, perm, tmp)
		for _, o := range out {
			tmp = permuteColumns(o.v, n, k, perm, tmp)
		}
	}
	// Samples were found backwards; store them forwards.
	np := k * (k - 1) / 2
	u, w := make([]float64, n), make([]float64, n)
	for s := len(out) - 1; s >= 0; s-- {
		c.Times = append(c.Times, out[s].t)
		c.States = append(c.States, append([]float64(nil), out[s].x...))
		c.Vectors = append(c.Vectors, out[s].v)
		a := make([]float64, 0, np)
		for i := 0; i < k; i++ {
			for j := i + 1; j < k; j++ {
				for l := 0; l < n; l++ {
					u[l], w[l] = out[s].v[l*k+i], out[s].v[l*k+j]
				}
				a = append(a, LineAngle(u, w))
			}
		}
		c.Angles = append(c.Angles, a)
	}
}

// Covariant computes the k leading covariant Lyapunov vectors of the flow p
// by the method of Ginelli et al.: a forward QR run (see Exponents, whose
// settings apply) stores Q and R at every re-orthonormalisation over
// s.Transient (discarded, so that Q converges) + s.Duration (the sampled
// window) + s.Transient (so that the backward iteration converges); then,
// from the end, the upper-triangular coefficients C are iterated backward,
// C ← R⁻¹C with unit columns, and in the window the vectors are Q·C.
//
// Memory grows with the number of re-orthonormalisations: (n+1)·k floats
// each. Errors are those of Exponents; after a failure of the forward run,
// nothing is returned but the error, because the backward iteration needs
// the run's end.
//
// References:
//
//	F. Ginelli, P. Poggi, A. Turchi, H. Chaté, R. Livi, A. Politi,
//	  Characterizing dynamics with covariant Lyapunov vectors, Phys. Rev.
//	  Lett. 99 (2007) 130601.
//	F. Ginelli, H. Chaté, R. Livi, A. Politi, Covariant Lyapunov vectors,
//	  J. Phys. A 46 (2013) 254005.
func Covariant(ctx context.Context, p integrate.Problem, k int, s *Settings) (*CovariantVectors, error) {
	var z Settings
	if s != nil {
		z = *s
	}
	cfg, err := resolve(&z)
	if err != nil {
		return nil, err
	}
	// Extend the run by one transient for the backward iteration.
	z.Duration = cfg.Duration + cfg.Transient
	z.Transient = cfg.Transient
	r, err := newFlowRun(p, k, &z)
	if err != nil {
		return nil, err
	}
	n := len(p.Y0)
	from := p.T0 + cfg.Transient
	to := from + cfg.Duration
	g := &ginelliStore{n: n, k: k}
	r.onQR = func(t float64, q, rm []float64) bool {
		if t >= from {
			g.add(t, r.st.Y()[:n], q, rm)
		}
		return true
	}
	if err := r.run(ctx); err != nil {
		return nil, err
	}
	c := &CovariantVectors{Dim: n, Count: k, Units: UnitsFlow, Stats: r.spectrum().Stats}
	g.backward(c, from, to, cfg.Blocks)
	return c, nil
}

// MapCovariant computes the k leading covariant Lyapunov vectors of the map m
// from x0 by the method of Ginelli et al., as Covariant does for flows, over
// s.Discard (discarded) + s.Iterations (sampled) + s.Discard (for the
// backward iteration) iterations. With s.IntervalSteps = 1 there is a sample
// at every iteration.
//
// References:
//
//	F. Ginelli, P. Poggi, A. Turchi, H. Chaté, R. Livi, A. Politi,
//	  Characterizing dynamics with covariant Lyapunov vectors, Phys. Rev.
//	  Lett. 99 (2007) 130601.
func MapCovariant(ctx context.Context, m Map, x0 []float64, k int, s *Settings) (*CovariantVectors, error) {
	var z Settings
	if s != nil {
		z = *s
	}
	cfg, err := resolve(&z)
	if err != nil {
		return nil, err
	}
	z.Iterations = cfg.Iterations + cfg.Discard
	z.Discard = cfg.Discard
	r, err := newMapRun(m, x0, k, &z)
	if err != nil {
		return nil, err
	}
	from := float64(cfg.Discard)
	to := from + float64(cfg.Iterations)
	g := &ginelliStore{n: r.n, k: k}
	// The first sample needs the Q at the start of the window: record from
	// the start, including the unit basis at iteration 0.
	g.add(0, r.x, r.v, identity(k))
	r.onQR = func(it int, q, rm []float64) bool {
		g.add(float64(it), r.x, q, rm)
		return true
	}
	if ctx == nil {
		ctx = context.Background()
	}
	if err := r.run(ctx); err != nil {
		return nil, fmt.Errorf("lyap: covariant vectors: %w", err)
	}
	c := &CovariantVectors{Dim: r.n, Count: k, Units: UnitsMap, Stats: r.spectrum().Stats}
	g.backward(c, from, to, cfg.Blocks)
	return c, nil
}

func identity(k int) []float64 {
	m := make([]float64, k*k)
	for i := 0; i < k; i++ {
		m[i*k+i] = 1
	}
	return m
}
