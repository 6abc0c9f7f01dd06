package lyap

import (
	"context"
	"fmt"
	"math"

	"github.com/plumbdyn/plumb/integrate"
	"github.com/plumbdyn/plumb/internal/detmath"
	"gonum.org/v1/gonum/mat"
)

// Map is a discrete-time system x_{n+1} = f(x_n) with its Jacobian, as the
// tangent-space estimators need it. Next writes f(x) into dst; Jacobian
// writes df/dx at x into dst, a Dim()×Dim() matrix. Neither may keep x or
// dst, and Next must not modify x. A Map that cannot supply a Jacobian says
// so with a method HasJacobian() bool returning false (MapFunc does when
// its J is nil); the tangent-space estimators then return ErrNoJacobian.
type Map interface {
	Dim() int
	Next(x, dst []float64)
	Jacobian(x []float64, dst *mat.Dense)
}

// MapFunc adapts plain functions to a Map.
type MapFunc struct {
	N int                               // dimension
	F func(x, dst []float64)            // the map
	J func(x []float64, dst *mat.Dense) // its Jacobian; nil if unknown
}

// Dim returns m.N.
func (m MapFunc) Dim() int { return m.N }

// Next calls m.F.
func (m MapFunc) Next(x, dst []float64) { m.F(x, dst) }

// Jacobian calls m.J; it must not be called when m.J is nil.
func (m MapFunc) Jacobian(x []float64, dst *mat.Dense) { m.J(x, dst) }

// HasJacobian reports whether m.J is set.
func (m MapFunc) HasJacobian() bool { return m.J != nil }

func hasJacobian(m Map) bool {
	if h, ok := m.(interface{ HasJacobian() bool }); ok {
		return h.HasJacobian()
	}
	return true
}

// MapExponents estimates the k largest Lyapunov exponents of the map m from
// x0 (all of them when k = m.Dim()), per iteration, by the QR method of
// Benettin et al. and Shimada & Nagashima applied to the tangent map
// V_{j+1} = J(x_j) V_j: every re-orthonormalisation interval (adaptive unless
// s.IntervalSteps fixes it) V is replaced by Q of V = QR (a Householder
// QR) and ln R_ii accumulated. s.Discard iterations are discarded first, then
// s.Iterations are averaged, in s.Blocks batch-means blocks for the standard
// errors.
//
// The Spectrum carries CheckLogDet (k = n: the sum of the exponents against
// the mean of ln|det J| along the orbit, det from an LU factorisation) and
// CheckPairing (k = n, s.Hamiltonian: a symplectic map).
//
// Errors before any work (nil Spectrum): a nil m (ErrSystem), len(x0) !=
// m.Dim() (ErrDimension), non-finite x0 (ErrNonFinite), k outside 1..n
// (ErrCount), a map without a Jacobian (ErrNoJacobian), invalid settings
// (ErrSettings). Later failures (a non-finite state, a stretch factor that is
// zero or not finite — e.g. an orbit through a critical point — or a
// canceled ctx, checked every 1024 iterations) return the partial Spectrum
// with the error. A run that completes fewer than two blocks returns its
// estimate with ErrTooShort.
//
// Cost: per iteration one Next, one Jacobian and O(n² + nnz·k), nnz the
// nonzero entries of the Jacobian (O(n³) more for the
// determinant when k = n); per re-orthonormalisation O(nk²). No allocation
// after set-up.
//
// References:
//
//	G. Benettin, L. Galgani, A. Giorgilli, J.-M. Strelcyn, Meccanica 15
//	  (1980) 9–20 and 21–30.
//	I. Shimada, T. Nagashima, Prog. Theor. Phys. 61 (1979) 1605–1616.
func MapExponents(ctx context.Context, m Map, x0 []float64, k int, s *Settings) (*Spectrum, error) {
	r, err := newMapRun(m, x0, k, s)
	if err != nil {
		return nil, err
	}
	err = r.run(ctx)
	sp := r.spectrum()
	return sp, needErrorBars(sp, err)
}

// mapRun is the workspace and state of one tangent-space run of a map.
type mapRun struct {
	m       Map
	calling string // the caller's function running last, for a recovered panic
	cfg     *config
	n, k    int
	det     bool

	x, xn      []float64
	v, vn      []float64
	J          *mat.Dense
	jd         []float64
	lu         []float64
	qr         *qrWork
	bm         *batchMeans
	hist       *history
	logDet     float64 // sum of ln|det J| up to the last re-orthonormalisation
	logDetOpen float64 // since then
	it         int     // iterations done
	total      int
	avgFrom    int
	last       int // iteration of the last re-orthonormalisation
	nextQR     int
	delta      int
	rule       intervalRule

	averaging bool
	blockLen  int
	blockIx   int
	blockEnd  int
	qrAvg     int
	converged bool
	evals     int
	jacs      int
	qrs       int
	done      bool
	err       error

	onQR func(it int, q, r []float64) bool

	window      int // MapFiniteTime: window length in iterations, 0 when unused
	windowIx    int
	windowStart int
	windowEnd   int
	windowSum   []float64
	onWindow    func(start, end int, sums []float64) bool
}

func newMapRun(m Map, x0 []float64, k int, s *Settings) (*mapRun, error) {
	if m == nil {
		return nil, fmt.Errorf("lyap: Map is nil: %w", ErrSystem)
	}
	n := m.Dim()
	if n <= 0 {
		return nil, fmt.Errorf("lyap: Map.Dim() = %d: %w", n, ErrDimension)
	}
	if len(x0) != n {
		return nil, fmt.Errorf("lyap: start has %d components, the map has %d: %w", len(x0), n, ErrDimension)
	}
	for i, v := range x0 {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("lyap: start component %d = %v: %w", i, v, ErrNonFinite)
		}
	}
	if err := checkCount(k, n); err != nil {
		return nil, err
	}
	if !hasJacobian(m) {
		return nil, fmt.Errorf("lyap: the map has no Jacobian: %w", ErrNoJacobian)
	}
	cfg, err := resolve(s)
	if err != nil {
		return nil, err
	}
	r := &mapRun{m: m, cfg: cfg, n: n, k: k, det: k == n}
	buf := make([]float64, 2*n+2*n*k)
	r.x, r.xn, r.v, r.vn = buf[:n:n], buf[n:2*n:2*n], buf[2*n:2*n+n*k:2*n+n*k], buf[2*n+n*k:]
	copy(r.x, x0)
	for j := 0; j < k; j++ {
		r.v[j*k+j] = 1
	}
	r.J = mat.NewDense(n, n, nil)
	r.jd = r.J.RawMatrix().Data
	if r.det {
		r.lu = make([]float64, n*n)
	}
	r.rule.target = cfg.maxGrowthLog
	r.qr = newQR(n, k)
	r.bm = newBatchMeans(k)
	r.hist = newHistory(k, cfg.Blocks)
	r.avgFrom = cfg.Discard
	r.total = cfg.Discard + cfg.Iterations
	r.delta = 1
	if cfg.IntervalSteps > 0 {
		r.delta = cfg.IntervalSteps
	}
	r.nextQR = r.delta
	return r, nil
}

// run iterates to the end. A panic in the map or its Jacobian (one deferred
// recover per run) ends the run with a *integrate.CallbackError naming the
// function, with the iteration as its time.
func (r *mapRun) run(ctx context.Context) (err error) {
	if ctx == nil {
		ctx = context.Background()
	}
	defer func() {
		if v := recover(); v != nil {
			r.err = fmt.Errorf("lyap: %w", integrate.Recovered(r.calling, float64(r.it), v))
			r.done = true
			err = r.err
		}
	}()
	for r.step(ctx) {
	}
	return r.err
}

// step does one iteration and a re-orthonormalisation when due; false when
// the run is over.
func (r *mapRun) step(ctx context.Context) bool {
	if r.done {
		return false
	}
	if err := canceledAt(ctx, r.it); err != nil {
		r.err = err
		r.done = true
		return false
	}
	r.calling = integrate.CallbackMapJacobian
	r.m.Jacobian(r.x, r.J)
	r.jacs++
	mulTangent(r.vn, r.jd, r.v, r.n, r.k)
	if r.det && r.averaging {
		r.logDetOpen += r.logAbsDet()
	}
	r.calling = integrate.CallbackMap
	r.m.Next(r.x, r.xn)
	r.evals++
	r.x, r.xn = r.xn, r.x
	r.v, r.vn = r.vn, r.v
	r.it++
	for i, v := range r.x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			r.err = &GrowthError{T: float64(r.it), Map: true, Vector: -1, Value: v}
			_ = i
			r.done = true
			return false
		}
	}
	last := r.it >= r.total
	if last || r.it >= r.nextQR {
		if !r.reorth(last) {
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

// canceledAt is the error of a canceled ctx at iteration it, looked at
// every 1024 iterations (nil otherwise).
func canceledAt(ctx context.Context, it int) error {
	if it&1023 != 0 {
		return nil
	}
	if err := ctx.Err(); err != nil {
		return fmt.Errorf("lyap: canceled at iteration %d: %w", it, err)
	}
	return nil
}

// logAbsDet is ln|det J| = Σ ln|U_ii| of the LU factorisation of a copy of
// J with partial pivoting (Golub & Van Loan 2013, Alg. 3.4.1), written
// here with a fixed order of operations and explicit rounding of products,
// so that it has the same bits on every architecture (as qrWork). A
// singular J gives -Inf.
func (r *mapRun) logAbsDet() float64 {
	n := r.n
	a := r.lu[:n*n]
	copy(a, r.jd)
	var s float64
	for j := 0; j < n; j++ {
		p := j
		for i := j + 1; i < n; i++ {
			if math.Abs(a[i*n+j]) > math.Abs(a[p*n+j]) {
				p = i
			}
		}
		if p != j {
			for c := j; c < n; c++ {
				a[j*n+c], a[p*n+c] = a[p*n+c], a[j*n+c]
			}
		}
		d := a[j*n+j]
		s += detmath.Log(math.Abs(d))
		if d == 0 {
			return s
		}
		for i := j + 1; i < n; i++ {
			l := a[i*n+j] / d
			for c := j + 1; c < n; c++ {
				a[i*n+c] -= float64(l * a[j*n+c])
			}
		}
	}
	return s
}

func (r *mapRun) reorth(last bool) bool {
	if j, v := r.qr.factor(r.v); j >= 0 {
		r.err = &GrowthError{T: float64(r.it), Map: true, Vector: j, Value: v}
		return false
	}
	r.qrs++
	elapsed := r.it - r.last
	r.last = r.it
	stop := false
	if r.onQR != nil && !r.onQR(r.it, r.v, r.qr.r) {
		stop = true
	}
	t := float64(r.it)
	if r.averaging {
		r.bm.add(r.qr.logR)
		r.qrAvg++
		r.logDet += r.logDetOpen
		r.logDetOpen = 0
		if r.window > 0 {
			for i, v := range r.qr.logR {
				r.windowSum[i] += v
			}
			if last || r.it >= r.windowEnd {
				if !r.onWindow(r.windowStart, r.it, r.windowSum) {
					stop = true
				}
				for i := range r.windowSum {
					r.windowSum[i] = 0
				}
				r.windowStart = r.it
				r.windowIx++
				r.windowEnd = r.avgFrom + (r.windowIx+1)*r.window
			}
		}
		if last || r.it >= r.blockEnd {
			r.bm.close(t)
			r.hist.record(r.bm, t)
			r.blockIx++
			r.blockEnd = r.avgFrom + (r.blockIx+1)*r.blockLen
			if r.blockIx+1 >= r.cfg.Blocks {
				r.blockEnd = r.total
			}
			if r.cfg.Target > 0 && r.bm.blocks >= MinBlocks && r.bm.within(r.cfg.Target) {
				r.converged = true
				stop = true
			}
		}
	} else if r.it >= r.avgFrom {
		r.averaging = true
		r.avgFrom = r.it
		r.bm.start(t)
		r.blockLen = max(1, (r.total-r.it)/r.cfg.Blocks)
		r.blockIx = 0
		r.blockEnd = r.it + r.blockLen
		r.windowStart = r.it
		r.windowEnd = r.it + r.window
	}
	if r.cfg.IntervalSteps > 0 {
		r.delta = r.cfg.IntervalSteps
	} else if elapsed > 0 {
		d := r.rule.next(float64(elapsed), spread(r.qr.logR))
		r.delta = max(1, int(d))
	}
	next := r.last + r.delta
	if !r.averaging && next > r.avgFrom {
		next = r.avgFrom
	}
	if r.averaging && next > r.blockEnd {
		next = r.blockEnd
	}
	if r.averaging && r.window > 0 && next > r.windowEnd {
		next = r.windowEnd
	}
	r.nextQR = next
	if r.cfg.Progress != nil {
		r.cfg.Progress(t, float64(r.total))
	}
	return !stop
}

func (r *mapRun) spectrum() *Spectrum {
	n, k := r.n, r.k
	sp := &Spectrum{Units: UnitsMap, Kind: "map", Dim: n, Jacobian: "exact", Target: r.cfg.Target, BlockLength: float64(r.blockLen)}
	sp.Exponents = make([]float64, k)
	if r.averaging {
		r.bm.estimate(sp.Exponents, float64(r.last), true)
		sp.Start = float64(r.avgFrom)
		sp.Duration = float64(r.last - r.avgFrom)
		sp.Transient = float64(r.avgFrom)
	} else {
		sp.Transient = float64(r.last)
	}
	se := make([]float64, k)
	if r.bm.stderr(se) {
		sp.StdErr = se
	}
	sp.Blocks = r.bm.blocks
	sp.Converged = r.cfg.Target > 0 && r.bm.blocks >= MinBlocks && r.bm.within(r.cfg.Target)
	if r.qrAvg > 0 {
		sp.MeanInterval = sp.Duration / float64(r.qrAvg)
	}
	sp.History = r.hist.points
	sortSpectrum(sp)
	sp.Final = append([]float64(nil), r.x[:n]...)
	sp.Stats = Stats{Steps: r.it, Evaluations: r.evals, Jacobians: r.jacs, QR: r.qrs}
	if sp.Duration > 0 && k == n {
		// Both sums cover the iterations from the start of averaging to
		// the last re-orthonormalisation.
		sum := 0.0
		for _, v := range sp.Exponents {
			sum += v
		}
		// A singular Jacobian on the orbit makes ln|det J| −Inf: no
		// finite residual exists, and the check is left out.
		if res := math.Abs(sum - r.logDet/sp.Duration); !math.IsInf(res, 0) && !math.IsNaN(res) {
			sp.Checks = append(sp.Checks, Check{Name: CheckLogDet, Residual: res})
		}
		if r.cfg.Hamiltonian {
			sp.Checks = append(sp.Checks, pairingCheck(sp))
		}
	}
	return sp
}
