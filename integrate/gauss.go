package integrate

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// ErrNoConvergence reports that the stage equations of an implicit method
// could not be solved: neither the fixed-point iteration nor the Newton
// iteration converged within its budget. The step is not taken.
var ErrNoConvergence = errors.New("stage equations did not converge")

// GaussLegendre returns the s-stage Gauss–Legendre collocation method with
// fixed step h, for s = 1 (the implicit midpoint rule), 2 or 3. It has order
// 2s, is symmetric, and is symplectic for every Hamiltonian system (separable
// or not): it preserves all quadratic invariants. It uses Problem.F only
// (Problem.Split is ignored).
//
// The stage equations
//
//	Z_i = h Σ_j a_ij F(t + c_j h, y + Z_j),  i = 1 … s
//
// are solved by fixed-point iteration, iterated until the increments stop
// decreasing at rounding level (Hairer, Lubich & Wanner 2006, Sect. VIII.6),
// which keeps the method symplectic to rounding. If the iteration diverges
// or stalls above rounding level, a simplified Newton iteration with the
// matrix I − h A⊗J takes over, J from Problem.Jac when present, otherwise
// from forward differences of F (n extra evaluations). If Newton fails too,
// the step fails with ErrNoConvergence: never a wrong answer. (Through Solve
// and Stepper such a failure currently ends the solve with a FieldError
// for the non-finite state the failed step leaves; EnergyAudit and
// SolveReversible report ErrNoConvergence itself.)
//
// Cost per step: s evaluations per fixed-point iteration, s more for the
// update and one at the step end; the starting guess extrapolates the
// previous step's collocation polynomial (on Hénon–Heiles with h = 0.01,
// s = 3 takes about 16 evaluations per step). Newton adds O((sn)³) work and,
// without Problem.Jac, n evaluations. An invalid s gives ErrMethod when the
// solve starts.
// Dense output: cubic Hermite (order 3).
//
// References:
//
//	J. C. Butcher, Implicit Runge–Kutta processes, Math. Comp. 18 (1964)
//	  50–64.
//	J. M. Sanz-Serna, Runge–Kutta schemes for Hamiltonian systems, BIT 28
//	  (1988) 877–883.
//	E. Hairer, C. Lubich, G. Wanner, Geometric Numerical Integration, 2nd
//	  ed., Springer 2006, Sect. II.1.3 and VIII.6.
func GaussLegendre(s int, h float64) Method {
	return &gaussMethod{s: s, h: h}
}

type gaussMethod struct {
	s int
	h float64
}

func (m *gaussMethod) Name() string {
	return fmt.Sprintf("Gauss–Legendre %d-stage", m.s)
}
func (m *gaussMethod) Order() int                { return 2 * m.s }
func (m *gaussMethod) errOrder() int             { return 0 }
func (m *gaussMethod) fixedStep() float64        { return m.h }
func (m *gaussMethod) controller() Controller    { return Controller{} }
func (m *gaussMethod) withStep(h float64) Method { return &gaussMethod{s: m.s, h: h} }

// gaussTableau returns the Butcher tableau (A row-major, b, c) of the
// s-stage Gauss method (Butcher 1964; Hairer, Nørsett & Wanner 1993,
// Sect. II.7).
func gaussTableau(s int) (a, b, c []float64) {
	switch s {
	case 1:
		return []float64{0.5}, []float64{1}, []float64{0.5}
	case 2:
		r := math.Sqrt(3) / 6
		return []float64{0.25, 0.25 - r, 0.25 + r, 0.25}, []float64{0.5, 0.5}, []float64{0.5 - r, 0.5 + r}
	case 3:
		r := math.Sqrt(15)
		return []float64{
				5.0 / 36, 2.0/9 - r/15, 5.0/36 - r/30,
				5.0/36 + r/24, 2.0 / 9, 5.0/36 - r/24,
				5.0/36 + r/30, 2.0/9 + r/15, 5.0 / 36,
			}, []float64{5.0 / 18, 4.0 / 9, 5.0 / 18},
			[]float64{0.5 - r/10, 0.5, 0.5 + r/10}
	}
	return nil, nil, nil
}

func (m *gaussMethod) newScheme(p *Problem, n int) (scheme, error) {
	if m.s < 1 || m.s > 3 {
		return nil, fmt.Errorf("integrate: GaussLegendre stages = %d: want 1, 2 or 3: %w", m.s, ErrMethod)
	}
	if !(m.h > 0) || math.IsInf(m.h, 0) {
		return nil, fmt.Errorf("integrate: %s: step size h = %v: must be finite and > 0: %w", m.Name(), m.h, ErrSettings)
	}
	return newGaussWork(m.s, p, n), nil
}

// Iteration budgets and thresholds of the stage solver.
const (
	// gaussMaxFixed bounds the fixed-point iterations (at h·L = 0.5 the
	// contraction gains about 0.3 digits each, so 60 reach rounding).
	gaussMaxFixed = 60
	// gaussMaxNewton bounds the simplified-Newton iterations.
	gaussMaxNewton = 30
	// gaussRound is the relative increment regarded as rounding level: a few
	// units in the last place of the stage values (common practice).
	gaussRound = 8 * 0x1p-52
	// gaussStall is the relative increment below which a non-decreasing
	// increment means that rounding has been reached rather than divergence.
	gaussStall = 1e-10
)

type gaussWork struct {
	f      Func
	jac    func(t float64, y []float64, dst *mat.Dense)
	n, s   int
	a      []float64 // s×s
	b, c   []float64
	z, fz  []float64 // stage increments and stage derivatives, s·n each
	znew   []float64
	ys     []float64 // stage argument, n
	jm     *mat.Dense
	jraw   []float64 // n×n Jacobian, row-major
	fd0    []float64 // forward-difference scratch
	fpred  []float64 // F(t, y) for the predictor of stepVar
	lu     []float64 // (sn)×(sn) Newton matrix, factored in place
	piv    []int
	rhs    []float64
	failed error // the cause of the last failed attempt, nil after success
	// The previous step, for the starting guess (see predict).
	extrap         []float64 // s×s extrapolation weights
	prevZ          []float64 // stages of the previous step, s·n
	prevY1, prevDy []float64 // its end state and increment, n each
	prevH          float64
	havePrev       bool
	symHermite
	jacRunning bool // jac is running (see inJacobian)
}

func newGaussWork(s int, p *Problem, n int) *gaussWork {
	a, b, c := gaussTableau(s)
	sn := s * n
	w := &gaussWork{f: p.F, jac: p.Jac, n: n, s: s, a: a, b: b, c: c}
	buf := make([]float64, 4*sn+3*n+n*n+sn*sn)
	w.z, w.fz, w.znew, w.rhs = buf[:sn:sn], buf[sn:2*sn:2*sn], buf[2*sn:3*sn:3*sn], buf[3*sn:4*sn:4*sn]
	off := 4 * sn
	w.ys, w.fd0, w.fpred = buf[off:off+n:off+n], buf[off+n:off+2*n:off+2*n], buf[off+2*n:off+3*n:off+3*n]
	off += 3 * n
	w.jraw = buf[off : off+n*n : off+n*n]
	off += n * n
	w.lu = buf[off : off+sn*sn : off+sn*sn]
	w.piv = make([]int, sn)
	w.extrap = gaussExtrapolation(c)
	prev := make([]float64, sn+2*n)
	w.prevZ, w.prevY1, w.prevDy = prev[:sn:sn], prev[sn:sn+n:sn+n], prev[sn+n:sn+2*n:sn+2*n]
	if w.jac != nil {
		w.jm = mat.NewDense(n, n, nil)
	}
	return w
}

func (*gaussWork) fsal() bool { return false }

func (*gaussWork) stiffness(float64, []float64, []float64) (float64, float64, bool) {
	return 0, 0, false
}

// stepErr returns the cause of the last failed step (nil after a success).
func (w *gaussWork) stepErr() error { return w.failed }

// inJacobian reports whether Problem.Jac is running, for a recovered panic.
func (w *gaussWork) inJacobian() bool { return w.jacRunning }

// attempt implements scheme. On failure it fills y1 with NaN so that the
// stepper stops, and keeps the cause for stepErr.
func (w *gaussWork) attempt(t, h float64, y, f0, y1, _, _, _ []float64) (float64, int) {
	ev, err := w.solve(t, h, y, f0, y1)
	w.failed = err
	if err != nil {
		for i := range y1[:w.n] {
			y1[i] = math.NaN()
		}
	}
	return 0, ev
}

// evalStages computes fz_i = F(t + c_i h, y + z_i) for all stages.
func (w *gaussWork) evalStages(t, h float64, y []float64) {
	n := w.n
	for i := 0; i < w.s; i++ {
		zi := w.z[i*n : (i+1)*n]
		for l := range w.ys {
			w.ys[l] = y[l] + zi[l]
		}
		w.f(t+float64(w.c[i]*h), w.ys, w.fz[i*n:(i+1)*n])
	}
}

// increment writes znew_i = h Σ_j a_ij fz_j and returns the largest change
// |znew − z| relative to |y| + |z| (componentwise), NaN if non-finite.
func (w *gaussWork) increment(h float64, y []float64) float64 {
	n, s := w.n, w.s
	var delta float64
	for i := 0; i < s; i++ {
		zn := w.znew[i*n : (i+1)*n]
		for l := range zn {
			var acc float64
			for j := 0; j < s; j++ {
				acc += float64(w.a[i*s+j] * w.fz[j*n+l])
			}
			zn[l] = float64(h * acc)
		}
		zo := w.z[i*n : (i+1)*n]
		for l := range zn {
			d := math.Abs(zn[l] - zo[l])
			sc := math.Abs(y[l]) + math.Abs(zn[l])
			if sc == 0 {
				sc = 1
			}
			r := d / sc
			if !(r <= delta) { // NaN propagates
				delta = r
			}
		}
	}
	return delta
}

// solve finds the stages and writes the new state into y1. It returns the
// evaluations of F made and nil, or ErrNoConvergence (wrapped).
func (w *gaussWork) solve(t, h float64, y, f0, y1 []float64) (int, error) {
	n, s := w.n, w.s
	evals := 0
	w.predict(h, y, f0)
	prev := math.Inf(1)
	converged := false
	for k := 0; k < gaussMaxFixed; k++ {
		w.evalStages(t, h, y)
		evals += s
		d := w.increment(h, y)
		if math.IsNaN(d) || math.IsInf(d, 0) {
			break
		}
		copy(w.z, w.znew)
		if d <= gaussRound || (d >= prev && d <= gaussStall) {
			converged = true
			break
		}
		if d >= prev && k > 2 {
			break // diverging above rounding level
		}
		prev = d
	}
	if !converged {
		ev, err := w.newton(t, h, y, f0)
		evals += ev
		if err != nil {
			return evals, err
		}
	}
	// The last evalStages was at (nearly) the converged z: one more so
	// that the update uses F at the final stages exactly.
	w.evalStages(t, h, y)
	evals += s
	for l := 0; l < n; l++ {
		var acc float64
		for i := 0; i < s; i++ {
			acc += float64(w.b[i] * w.fz[i*n+l])
		}
		y1[l] = y[l] + float64(h*acc)
	}
	if firstNonFinite(y1[:n]) >= 0 {
		w.havePrev = false
		return evals, fmt.Errorf("implicit stages: non-finite stage values: %w", ErrNoConvergence)
	}
	// Keep the stages for the next step's starting guess.
	copy(w.prevZ, w.z)
	copy(w.prevY1, y1[:n])
	for l := 0; l < n; l++ {
		w.prevDy[l] = y1[l] - y[l]
	}
	w.prevH = h
	w.havePrev = true
	return evals, nil
}

// predict writes the starting guess of the stages. After a step of the
// same size (to 1e-6 relative: the fixed-step grid's steps differ by
// rounding) ending at y, it extrapolates the previous collocation
// polynomial u (Hairer, Lubich & Wanner 2006, Sect. VIII.6.1):
//
//	Z_i = u(t_n + (1 + c_i)h) − y_{n+1} = Σ_j E_ij Z_j^old − (y_{n+1} − y_n)
//
// with E_ij = L_j(1 + c_i), L_j the Lagrange basis on the nodes
// {0, c_1, …, c_s}. Otherwise it takes the Euler guess Z_i = c_i h f0.
func (w *gaussWork) predict(h float64, y, f0 []float64) {
	n, s := w.n, w.s
	if w.havePrev && math.Abs(h-w.prevH) <= 1e-6*math.Abs(h) {
		same := true
		for l := 0; l < n; l++ {
			if y[l] != w.prevY1[l] {
				same = false
				break
			}
		}
		if same {
			for i := 0; i < s; i++ {
				for l := 0; l < n; l++ {
					var acc float64
					for j := 0; j < s; j++ {
						acc += float64(w.extrap[i*s+j] * w.prevZ[j*n+l])
					}
					w.z[i*n+l] = acc - w.prevDy[l]
				}
			}
			return
		}
	}
	for i := 0; i < s; i++ {
		ch := float64(w.c[i] * h)
		for l := 0; l < n; l++ {
			w.z[i*n+l] = float64(ch * f0[l])
		}
	}
}

// gaussExtrapolation returns E_ij = L_j(1 + c_i) for the Lagrange basis L_j
// on the nodes {0, c_1, …, c_s} belonging to c_j.
func gaussExtrapolation(c []float64) []float64 {
	s := len(c)
	e := make([]float64, s*s)
	for i := 0; i < s; i++ {
		x := 1 + c[i]
		for j := 0; j < s; j++ {
			l := (x - 0) / (c[j] - 0)
			for k := 0; k < s; k++ {
				if k != j {
					l *= (x - c[k]) / (c[j] - c[k])
				}
			}
			e[i*s+j] = l
		}
	}
	return e
}

// newton solves the stage equations by simplified Newton iteration with the
// Jacobian at (t, y). It restarts from the Euler predictor.
func (w *gaussWork) newton(t, h float64, y, f0 []float64) (int, error) {
	n, s := w.n, w.s
	sn := s * n
	evals := 0
	// Jacobian.
	if w.jac != nil {
		w.jacRunning = true
		w.jac(t, y, w.jm)
		w.jacRunning = false
		raw := w.jm.RawMatrix()
		for i := 0; i < n; i++ {
			copy(w.jraw[i*n:(i+1)*n], raw.Data[i*raw.Stride:i*raw.Stride+n])
		}
	} else {
		copy(w.ys, y)
		for j := 0; j < n; j++ {
			d := float64(math.Sqrt(0x1p-52) * math.Max(math.Abs(y[j]), 1))
			w.ys[j] = y[j] + d
			d = w.ys[j] - y[j] // exactly representable step
			w.f(t, w.ys, w.fd0)
			evals++
			for i := 0; i < n; i++ {
				w.jraw[i*n+j] = (w.fd0[i] - f0[i]) / d
			}
			w.ys[j] = y[j]
		}
	}
	if firstNonFinite(w.jraw) >= 0 {
		return evals, fmt.Errorf("implicit stages: non-finite Jacobian: %w", ErrNoConvergence)
	}
	// M = I − h A⊗J, (sn)×(sn).
	for i := 0; i < s; i++ {
		for j := 0; j < s; j++ {
			ha := float64(h * w.a[i*s+j])
			for r := 0; r < n; r++ {
				row := (i*n + r) * sn
				for q := 0; q < n; q++ {
					v := -float64(ha * w.jraw[r*n+q])
					if i == j && r == q {
						v += 1
					}
					w.lu[row+j*n+q] = v
				}
			}
		}
	}
	if !glLUFactor(w.lu, w.piv, sn) {
		return evals, fmt.Errorf("implicit stages: singular Newton matrix: %w", ErrNoConvergence)
	}
	for i := 0; i < s; i++ {
		ch := float64(w.c[i] * h)
		for l := 0; l < n; l++ {
			w.z[i*n+l] = float64(ch * f0[l])
		}
	}
	prev := math.Inf(1)
	for k := 0; k < gaussMaxNewton; k++ {
		w.evalStages(t, h, y)
		evals += s
		w.increment(h, y) // znew = h (A⊗I) F(z)
		// residual G = z − znew; solve M Δ = −G.
		for i := range w.rhs {
			w.rhs[i] = w.znew[i] - w.z[i]
		}
		if firstNonFinite(w.rhs) >= 0 {
			break
		}
		glLUSolve(w.lu, w.piv, sn, w.rhs)
		var d float64
		for i := 0; i < s; i++ {
			for l := 0; l < n; l++ {
				idx := i*n + l
				w.z[idx] += w.rhs[idx]
				sc := math.Abs(y[l]) + math.Abs(w.z[idx])
				if sc == 0 {
					sc = 1
				}
				if r := math.Abs(w.rhs[idx]) / sc; !(r <= d) {
					d = r
				}
			}
		}
		if math.IsNaN(d) || math.IsInf(d, 0) {
			break
		}
		if d <= gaussRound || (d >= prev && d <= gaussStall) {
			return evals, nil
		}
		prev = d
	}
	return evals, fmt.Errorf("implicit stages: fixed-point and Newton iterations failed: %w", ErrNoConvergence)
}

// glLUFactor factors the m×m row-major matrix a in place by Gaussian
// elimination with partial pivoting (Golub & Van Loan 2013, Alg. 3.4.1). It
// returns false if a pivot is zero or non-finite. It does not allocate.
func glLUFactor(a []float64, piv []int, m int) bool {
	for k := 0; k < m; k++ {
		p := k
		best := math.Abs(a[k*m+k])
		for i := k + 1; i < m; i++ {
			if v := math.Abs(a[i*m+k]); v > best {
				best, p = v, i
			}
		}
		piv[k] = p
		if best == 0 || math.IsNaN(best) || math.IsInf(best, 0) {
			return false
		}
		if p != k {
			for j := 0; j < m; j++ {
				a[k*m+j], a[p*m+j] = a[p*m+j], a[k*m+j]
			}
		}
		inv := 1 / a[k*m+k]
		for i := k + 1; i < m; i++ {
			l := float64(a[i*m+k] * inv)
			a[i*m+k] = l
			if l == 0 {
				continue
			}
			for j := k + 1; j < m; j++ {
				a[i*m+j] -= float64(l * a[k*m+j])
			}
		}
	}
	return true
}

// glLUSolve solves a·x = b in place (b becomes x) with the factors of glLUFactor.
func glLUSolve(a []float64, piv []int, m int, b []float64) {
	for k := 0; k < m; k++ {
		if p := piv[k]; p != k {
			b[k], b[p] = b[p], b[k]
		}
	}
	for i := 1; i < m; i++ {
		var acc float64
		for j := 0; j < i; j++ {
			acc += float64(a[i*m+j] * b[j])
		}
		b[i] -= acc
	}
	for i := m - 1; i >= 0; i-- {
		var acc float64
		for j := i + 1; j < m; j++ {
			acc += float64(a[i*m+j] * b[j])
		}
		b[i] = (b[i] - acc) / a[i*m+i]
	}
}
