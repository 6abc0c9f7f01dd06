package lyap

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"

	"github.com/plumbdyn/plumb/integrate"
	"gonum.org/v1/gonum/diff/fd"
	"gonum.org/v1/gonum/mat"
)

// Exponents estimates the k largest Lyapunov exponents of the flow p (all of
// them when k = len(p.Y0)) by the standard method of Benettin, Galgani,
// Giorgilli & Strelcyn and of Shimada & Nagashima: the trajectory is
// integrated together with k tangent vectors of the variational equations
//
//	x' = F(t, x),  V' = J(t, x) V,   V(T0) = first k columns of the identity,
//
// an augmented system of dimension n(1+k) (plus one component holding the
// integral of tr J when k = n), by s.Method with error control on every
// component. Every re-orthonormalisation interval the tangent vectors are
// replaced by the Q factor of V = QR (a Householder QR, workspaces
// reused), and ln R_ii is accumulated; after the transient, exponent i is the
// accumulated ln R_ii divided by the time averaged. The interval adapts to
// the growth of the tangent vectors unless s.Interval fixes it.
//
// The tangent dynamics use p.Jac when it is given. Otherwise the Jacobian is
// taken by central differences (gonum diff/fd) at every evaluation: that
// costs 2n extra evaluations of F per evaluation of the augmented system,
// allocates three small slices per Jacobian (inside gonum), and adds an error
// of about FDStep²·|F”'| (truncation) plus eps·|F|/FDStep (rounding) to
// every Jacobian entry, about 1e-10 relative with the default step; the
// exponents inherit a bias of the same relative order.
//
// The averaging run is cut into s.Blocks blocks; StdErr is the batch-means
// standard error over them. The Spectrum carries the sanity checks that
// apply: CheckTrace (k = n), CheckZero (k = n and the trajectory is not at a
// fixed point; it assumes an autonomous field), and CheckPairing (k = n, a
// Hamiltonian flow: p.Split set or s.Hamiltonian).
//
// Errors: a nil F (ErrSystem), an empty or non-finite Y0 (ErrDimension,
// ErrNonFinite), k outside 1..n (ErrCount), invalid settings (ErrSettings)
// are reported before any work, with a nil Spectrum. Once stepping began, a
// failure (a stretch factor that is zero or not finite, a failing step, a
// canceled ctx) returns the partial Spectrum, history included, with the
// error. StdErr is nil with fewer than two complete blocks; a run that
// completes that way returns its estimate with ErrTooShort.
//
// Cost: per step, the method's evaluations of the augmented system, each one
// evaluation of F and of the Jacobian plus O(n² + nnz·k), nnz the nonzero
// entries of the Jacobian (mulTangent); per re-orthonormalisation
// O(nk²). After set-up the loop does not allocate (with an exact Jacobian).
//
// References:
//
//	G. Benettin, L. Galgani, A. Giorgilli, J.-M. Strelcyn, Lyapunov
//	  characteristic exponents for smooth dynamical systems and for
//	  Hamiltonian systems; a method for computing all of them, Meccanica 15
//	  (1980) 9–20 (Part 1: theory) and 21–30 (Part 2: numerical application).
//	I. Shimada, T. Nagashima, A numerical approach to ergodic problem of
//	  dissipative dynamical systems, Prog. Theor. Phys. 61 (1979) 1605–1616.
//	K. Geist, U. Parlitz, W. Lauterborn, Comparison of different methods for
//	  computing Lyapunov exponents, Prog. Theor. Phys. 83 (1990) 875–893.
func Exponents(ctx context.Context, p integrate.Problem, k int, s *Settings) (*Spectrum, error) {
	r, err := newFlowRun(p, k, s)
	if err != nil {
		return nil, err
	}
	err = r.run(ctx)
	sp := r.spectrum()
	return sp, needErrorBars(sp, err)
}

// flowRun is the workspace and state of one tangent-space run of a flow.
type flowRun struct {
	p     integrate.Problem
	cfg   *config
	n, k  int
	vol   bool // the augmented state carries the integral of tr J
	volIx int
	exact bool

	J     *mat.Dense
	jd    []float64
	fdT   float64
	fdF   func(y, x []float64)
	fdSet *fd.JacobianSettings
	st    *integrate.Stepper
	qr    *qrWork
	avg   *averager

	t0, t1 float64
	lastQR float64
	nextQR float64
	delta  float64
	rule   intervalRule

	volStart    float64
	volEnd      float64
	maxF, maxX  float64
	evals, jacs int
	qrs         int
	done        bool
	err         error
	window      float64 // FiniteTime: window length, 0 when unused
	windowEnd   float64
	windowStart float64
	windowIx    int
	windowSum   []float64
	onWindow    func(start, end float64, sums []float64) bool
	onQR        func(t float64, q, r []float64) bool
	// calling and callT name the caller's function running last and the
	// time it was called at, for a recovered panic.
	calling callee
	callT   float64
}

// callee names the caller's function a flow run called last: a byte that
// stands for integrate's CallbackField or CallbackJacobian, so that the two
// stores an evaluation makes are single bytes (a string's are two words and
// a write-barrier check, about 7 instructions each).
type callee uint8

const (
	calleeField callee = iota
	calleeJacobian
)

// name is the integrate.CallbackError name of c.
func (c callee) name() string {
	if c == calleeJacobian {
		return integrate.CallbackJacobian
	}
	return integrate.CallbackField
}

func validateProblem(p integrate.Problem) error {
	if p.F == nil {
		return fmt.Errorf("lyap: Problem.F is nil: %w", ErrSystem)
	}
	if len(p.Y0) == 0 {
		return fmt.Errorf("lyap: Problem.Y0 is empty: %w", ErrDimension)
	}
	if math.IsNaN(p.T0) || math.IsInf(p.T0, 0) {
		return fmt.Errorf("lyap: Problem.T0 = %v: %w", p.T0, ErrNonFinite)
	}
	for i, v := range p.Y0 {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("lyap: Problem.Y0[%d] = %v: %w", i, v, ErrNonFinite)
		}
	}
	return nil
}

func newFlowRun(p integrate.Problem, k int, s *Settings) (*flowRun, error) {
	if err := validateProblem(p); err != nil {
		return nil, err
	}
	p = p.Own() // workspaces of its own: p may be shared with other runs
	n := len(p.Y0)
	if err := checkCount(k, n); err != nil {
		return nil, err
	}
	cfg, err := resolve(s)
	if err != nil {
		return nil, err
	}
	if cfg.Duration <= 0 {
		return nil, settingErr("Duration", cfg.Duration, "must be > 0")
	}
	r := &flowRun{p: p, cfg: cfg, n: n, k: k, vol: k == n, exact: p.Jac != nil}
	r.J = mat.NewDense(n, n, nil)
	r.jd = r.J.RawMatrix().Data
	if !r.exact {
		r.fdF = func(y, x []float64) {
			r.evals++
			r.p.F(r.fdT, x, y)
		}
		r.fdSet = &fd.JacobianSettings{Formula: fd.Central, Step: cfg.FDStep}
	}
	m := n + n*k
	r.volIx = m
	if r.vol {
		m++
	}
	y0 := make([]float64, m)
	copy(y0, p.Y0)
	for j := 0; j < k; j++ {
		y0[n+j*k+j] = 1
	}
	r.t0 = p.T0
	r.avg = newAverager(cfg, k, p.T0)
	r.t1 = r.avg.t1
	aug := integrate.Problem{F: r.field, T0: p.T0, Y0: y0}
	tf := cfg.Tangent3
	if n != 3 || k != 3 || !r.exact {
		tf = nil // a fused evaluation serves full 3-D spectra only
	}
	if tf != nil {
		if err := checkTangent3(p, tf); err != nil {
			return nil, err
		}
	}
	if n == 3 && k == 3 && r.exact && fixedSize {
		aug.F = r.field33()
		if tf != nil {
			aug.F = r.tangent33(tf)
		}
	}
	st, err := integrate.NewStepper(aug, r.t1, cfg.Method, &integrate.Settings{RelTol: cfg.RelTol, AbsTol: cfg.AbsTol, MaxSteps: cfg.MaxSteps})
	var ce *integrate.CallbackError
	if errors.As(err, &ce) {
		// The integrator saw the augmented field; name the caller's function.
		ce.Callback, ce.T = r.calling.name(), r.callT
		return nil, fmt.Errorf("lyap: at the start: %w", ce)
	}
	if err != nil {
		if errors.Is(err, integrate.ErrNonFinite) {
			return nil, fmt.Errorf("lyap: at the start: %w: %w", ErrNonFinite, err)
		}
		if errors.Is(err, integrate.ErrSettings) {
			return nil, &withSentinel{err, ErrSettings}
		}
		return nil, fmt.Errorf("lyap: %w", err)
	}
	r.st = st
	r.rule.target = cfg.maxGrowthLog
	r.qr = newQR(n, k)
	r.lastQR = p.T0
	r.nextQR = p.T0 // first re-orthonormalisation after the first step
	if cfg.Interval > 0 {
		r.nextQR = p.T0 + cfg.Interval
	}
	return r, nil
}

// jacobian writes the Jacobian at (t, x) into r.J.
func (r *flowRun) jacobian(t float64, x []float64) {
	r.jacs++
	if r.exact {
		r.calling = calleeJacobian
		r.p.Jac(t, x, r.J)
		return
	}
	r.fdT = t
	fd.Jacobian(r.J, r.fdF, x, r.fdSet)
}

// field is the augmented vector field (x, V, ∫tr J)' = (F, J V, tr J).
func (r *flowRun) field(t float64, y, dy []float64) {
	n, k := r.n, r.k
	x := y[:n]
	r.evals++
	r.calling, r.callT = calleeField, t
	r.p.F(t, x, dy[:n])
	if r.exact {
		// jacobian's exact branch, without the call.
		r.jacs++
		r.calling = calleeJacobian
		r.p.Jac(t, x, r.J)
	} else {
		r.jacobian(t, x)
	}
	jd := r.jd
	if n == 3 && k == 3 {
		// A full 3-D spectrum: mulTangent33 directly, and the trace as
		// the loop below sums it, ((0 + J00) + J11) + J22.
		mulTangent33(dy[3:12], jd, y[3:12])
		var tr float64
		tr += jd[0]
		tr += jd[4]
		tr += jd[8]
		dy[r.volIx] = tr
		return
	}
	v := y[n : n+n*k]
	dv := dy[n : n+n*k]
	mulTangent(dv, jd, v, n, k)
	if r.vol {
		var tr float64
		for i := 0; i < n; i++ {
			tr += jd[i*n+i]
		}
		dy[r.volIx] = tr
	}
}

// mulTangent sets dst = J·V for the n×n matrix J and the n×k matrix V,
// both row-major (V holds the k tangent vectors as columns), through the
// nonzero entries of J only: row i of dst is the sum, l increasing, of
// J_il times row l of V, so each tangent vector costs O(nonzeros of J)
// after an O(n²) look at J, and rows of V are read whole (no strided
// access). No allocation; the products are not fused (float64
// conversions), so the bits are the same on every architecture.
//
// Skipping a zero entry changes no bit of the result while V is finite:
// each sum starts at +0, which a sum of finite terms never turns into -0,
// and s + (±0) = s for every other s. (With an infinite or NaN entry in V
// the full product would give NaN where this one may not; the integrator
// rejects such a state either way.)
func mulTangent(dst, jd, v []float64, n, k int) {
	if n == 3 {
		mulTangent3(dst, jd, v, k)
		return
	}
	for i := 0; i < n; i++ {
		d := dst[i*k : i*k+k : i*k+k]
		for j := range d {
			d[j] = 0
		}
		for l, a := range jd[i*n : i*n+n] {
			if a == 0 {
				continue
			}
			vl := v[l*k : l*k+k : l*k+k]
			vl = vl[:len(d)] // same length: no bounds checks below
			for j, x := range vl {
				d[j] += float64(a * x)
			}
		}
	}
}

// mulTangent3 is mulTangent for n = 3 (most flows of the catalog): each
// entry is ((0 + a0·v0) + a1·v1) + a2·v2 with every term kept, the sum of
// the general loop (where a zero term leaves the sum unchanged), without
// its loop overhead, which dominates at this size.
func mulTangent3(dst, jd, v []float64, k int) {
	jd = jd[:9:9]
	if k == 3 {
		mulTangent33(dst, jd, v)
		return
	}
	v0, v1, v2 := v[:k:k], v[k:2*k:2*k], v[2*k:3*k:3*k]
	for i := 0; i < 3; i++ {
		a0, a1, a2 := jd[3*i], jd[3*i+1], jd[3*i+2]
		d := dst[i*k : i*k+k : i*k+k]
		for j := range d {
			var s float64
			s += float64(a0 * v0[j])
			s += float64(a1 * v1[j])
			s += float64(a2 * v2[j])
			d[j] = s
		}
	}
}

// mulTangent33 is mulTangent3 for k = 3 (a full spectrum of a 3-D flow),
// unrolled: the same sums, term by term and in the same order (the +0 start
// kept, so a -0 product gives +0 as in the loop), without the inner loop's
// overhead, which cost most of the product's instructions at this size.
func mulTangent33(dst, jd, v []float64) {
	jd, v, dst = jd[:9:9], v[:9:9], dst[:9:9]
	v00, v01, v02 := v[0], v[1], v[2]
	v10, v11, v12 := v[3], v[4], v[5]
	v20, v21, v22 := v[6], v[7], v[8]
	for i := 0; i < 9; i += 3 {
		a0, a1, a2 := jd[i], jd[i+1], jd[i+2]
		var s0, s1, s2 float64
		s0 += float64(a0 * v00)
		s1 += float64(a0 * v01)
		s2 += float64(a0 * v02)
		s0 += float64(a1 * v10)
		s1 += float64(a1 * v11)
		s2 += float64(a1 * v12)
		s0 += float64(a2 * v20)
		s1 += float64(a2 * v21)
		s2 += float64(a2 * v22)
		dst[i], dst[i+1], dst[i+2] = s0, s1, s2
	}
}

// run steps to the end. A panic in the caller's vector field or Jacobian
// (one deferred recover per run, none per step) ends the run with a
// *integrate.CallbackError naming the function and the time.
func (r *flowRun) run(ctx context.Context) (err error) {
	if ctx == nil {
		ctx = context.Background()
	}
	defer func() {
		if v := recover(); v != nil {
			r.err = fmt.Errorf("lyap: %w", integrate.Recovered(r.calling.name(), r.callT, v))
			r.done = true
			err = r.err
		}
	}()
	for r.step(ctx) {
	}
	return r.err
}

// step takes one accepted step and re-orthonormalises when due. It returns
// false when the run is over (see r.err).
func (r *flowRun) step(ctx context.Context) bool {
	if r.done {
		return false
	}
	st := r.st
	if !st.Next(ctx) {
		r.done = true
		if err := st.Err(); err != nil {
			r.fail(err)
		}
		return false
	}
	t := st.T()
	last := st.Done()
	if last || t >= r.nextQR {
		if !r.reorth(t, last) {
			r.done = true
			return false
		}
	}
	if last {
		r.done = true
		return false
	}
	return true
}

func (r *flowRun) fail(err error) { r.err = wrapStepErr(err) }

// wrapStepErr wraps an error of the integrator, adding ErrNonFinite to a
// non-finite state (overflowing tangent vectors show up that way).
func wrapStepErr(err error) error {
	if errors.Is(err, integrate.ErrNonFinite) {
		return fmt.Errorf("lyap: %w: %w", ErrNonFinite, err)
	}
	return fmt.Errorf("lyap: %w", err)
}

// reorth re-orthonormalises the tangent vectors of the stepper's state at t.
//
// It overwrites the tangent part of the stepper's current state with Q in
// place and hands the state back with Stepper.SetState, which evaluates the
// field afresh so the next step starts from a consistent pair. The
// trajectory components are not touched.
func (r *flowRun) reorth(t float64, last bool) bool {
	n, k := r.n, r.k
	y := r.st.Y()
	dy := r.st.DYDT()
	if j, v := r.qr.factor(y[n : n+n*k]); j >= 0 {
		r.err = &GrowthError{T: t, Vector: j, Value: v}
		return false
	}
	if err := r.st.SetState(y); err != nil {
		r.err = err
		return false
	}
	r.qrs++
	elapsed := t - r.lastQR
	r.lastQR = t
	stop := false
	if r.onQR != nil && !r.onQR(t, y[n:n+n*k], r.qr.r) {
		stop = true
	}
	started, stopAvg := r.avg.observe(t, r.qr.logR, last)
	if stopAvg {
		stop = true
	}
	if r.avg.averaging {
		if r.vol {
			if started {
				r.volStart = y[r.volIx]
			}
			r.volEnd = y[r.volIx]
		}
		r.track(y[:n], dy[:n])
		if r.window > 0 {
			if started {
				r.windowStart = t
				r.windowEnd = t + r.window
			} else {
				for i, v := range r.qr.logR {
					r.windowSum[i] += v
				}
				if last || t >= r.windowEnd {
					if !r.onWindow(r.windowStart, t, r.windowSum) {
						stop = true
					}
					for i := range r.windowSum {
						r.windowSum[i] = 0
					}
					r.windowStart = t
					r.windowIx++
					r.windowEnd = r.avg.avgStart + float64(float64(r.windowIx+1)*r.window)
				}
			}
		}
	}
	if r.cfg.Interval > 0 {
		r.delta = r.cfg.Interval
	} else if elapsed > 0 {
		r.delta = r.rule.next(elapsed, spread(r.qr.logR))
	}
	next := r.avg.limit(r.lastQR + r.delta)
	if r.avg.averaging && r.window > 0 && next > r.windowEnd {
		next = r.windowEnd
	}
	r.nextQR = next
	if r.cfg.Progress != nil {
		r.cfg.Progress(t-r.t0, r.t1-r.t0)
	}
	return !stop
}

// track keeps the largest |F| and |x| seen while averaging, to tell a fixed
// point from a moving trajectory.
func (r *flowRun) track(x, f []float64) {
	var sx, sf float64
	for i := range x {
		sx += float64(x[i] * x[i])
		sf += float64(f[i] * f[i])
	}
	r.maxX = math.Max(r.maxX, math.Sqrt(sx))
	r.maxF = math.Max(r.maxF, math.Sqrt(sf))
}

// fixedPointTol: a trajectory whose |F| never exceeds this fraction of
// (1 + |x|) during averaging is taken as sitting at a fixed point (common
// practice: far above rounding, far below any moving trajectory).
const fixedPointTol = 1e-8

func (r *flowRun) spectrum() *Spectrum {
	n, k := r.n, r.k
	sp := &Spectrum{Units: UnitsFlow, Kind: "flow", Dim: n, Method: r.cfg.Method.Name(), Jacobian: "exact"}
	if !r.exact {
		sp.Jacobian = "finite-difference"
	}
	r.avg.fill(sp, k, r.lastQR)
	sortSpectrum(sp)
	sp.Final = append([]float64(nil), r.st.Y()[:n]...)
	ist := r.st.Stats()
	sp.Stats = Stats{Steps: ist.Accepted, Rejected: ist.Rejected, Evaluations: r.evals, Jacobians: r.jacs, QR: r.qrs,
		Stiff: ist.Stiff, StiffAt: ist.StiffAt}
	if sp.Duration > 0 && k == n {
		sum := 0.0
		for _, v := range sp.Exponents {
			sum += v
		}
		sp.Checks = append(sp.Checks, Check{Name: CheckTrace, Residual: math.Abs(sum - (r.volEnd-r.volStart)/sp.Duration)})
		if r.maxF > fixedPointTol*(1+r.maxX) {
			sp.Checks = append(sp.Checks, zeroCheck(sp))
		}
		if r.cfg.Hamiltonian || r.p.Split != nil {
			sp.Checks = append(sp.Checks, pairingCheck(sp))
		}
	}
	return sp
}

// zeroCheck is CheckZero: the exponent nearest zero and its standard error.
func zeroCheck(sp *Spectrum) Check {
	best := 0
	for i, v := range sp.Exponents {
		if math.Abs(v) < math.Abs(sp.Exponents[best]) {
			best = i
		}
	}
	c := Check{Name: CheckZero, Residual: math.Abs(sp.Exponents[best])}
	if sp.StdErr != nil {
		c.StdErr = sp.StdErr[best]
	}
	return c
}

// pairingCheck is CheckPairing: the worst |lambda_i + lambda_(n+1−i)|, the
// exponents sorted in decreasing order (near zero the QR order need not be).
func pairingCheck(sp *Spectrum) Check {
	n := len(sp.Exponents)
	idx := make([]int, n)
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return sp.Exponents[idx[a]] > sp.Exponents[idx[b]] })
	c := Check{Name: CheckPairing}
	for i := 0; i < n/2; i++ {
		a, b := idx[i], idx[n-1-i]
		d := math.Abs(sp.Exponents[a] + sp.Exponents[b])
		if d >= c.Residual {
			c.Residual = d
			if sp.StdErr != nil {
				c.StdErr = math.Sqrt(float64(sp.StdErr[a]*sp.StdErr[a]) + float64(sp.StdErr[b]*sp.StdErr[b]))
			}
		}
	}
	return c
}
