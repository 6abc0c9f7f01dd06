package integrate

import (
	"context"
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// henonHeilesTangent returns the Hénon–Heiles problem (Hénon & Heiles 1964,
// H = (px²+py²+x²+y²)/2 + x²y − y³/3) extended by the four tangent vectors
// of its variational equation, in the partitioned layout the splittings
// need: Q = (q, δq_1..δq_4), P = (p, δp_1..δp_4). The extended parts are
// DT(P) = (p, δp_j) (∇²T = I) and DV(Q) = (∇V(q), ∇²V(q)δq_j), so a splitting
// applied to it propagates exactly the derivative of its own step map.
func henonHeilesTangent(y0 []float64) Problem {
	const n = 10
	hess := func(q []float64) (a, b, c float64) { return 1 + 2*q[1], 2 * q[0], 1 - 2*q[1] }
	dv := func(q, d []float64) {
		d[0] = q[0] + 2*q[0]*q[1]
		d[1] = q[1] + q[0]*q[0] - q[1]*q[1]
		a, b, c := hess(q)
		for j := 0; j < 4; j++ {
			x, y := q[2+2*j], q[3+2*j]
			d[2+2*j] = a*x + b*y
			d[3+2*j] = b*x + c*y
		}
	}
	Y := make([]float64, 2*n)
	copy(Y[:2], y0[:2])
	copy(Y[n:n+2], y0[2:4])
	for j := 0; j < 4; j++ {
		// direction e_j of (x, y, px, py)
		if j < 2 {
			Y[2+2*j+j] = 1
		} else {
			Y[n+2+2*j+(j-2)] = 1
		}
	}
	return Problem{
		F: func(_ float64, y, d []float64) {
			copy(d[:n], y[n:])
			dv(y[:n], d[n:])
			for i := n; i < 2*n; i++ {
				d[i] = -d[i]
			}
		},
		Y0:    Y,
		Split: &Separable{DT: func(p, d []float64) { copy(d, p) }, DV: dv},
	}
}

// symTangentMatrix reads M (4×4, column j = (δq_j, δp_j)) from the extended state.
func symTangentMatrix(Y []float64) *mat.Dense {
	const n = 10
	m := mat.NewDense(4, 4, nil)
	for j := 0; j < 4; j++ {
		m.Set(0, j, Y[2+2*j])
		m.Set(1, j, Y[3+2*j])
		m.Set(2, j, Y[n+2+2*j])
		m.Set(3, j, Y[n+3+2*j])
	}
	return m
}

// symplecticDefect returns max |MᵀJM − J|, J = [[0, I], [−I, 0]].
func symplecticDefect(m *mat.Dense) float64 {
	j := mat.NewDense(4, 4, []float64{0, 0, 1, 0, 0, 0, 0, 1, -1, 0, 0, 0, 0, -1, 0, 0})
	var t1, t2 mat.Dense
	t1.Mul(m.T(), j)
	t2.Mul(&t1, m)
	t2.Sub(&t2, j)
	return mat.Norm(&t2, math.Inf(1))
}

// TestSymplecticity checks MᵀJM = J for the step map of every method on
// Hénon–Heiles (start of the catalog, E = 1/8), M computed by the method
// itself applied to the tangent vectors (splittings: the extended
// partitioned system above; Gauss–Legendre: the variational system
// y' = f, Y' = J(y)Y, since Runge–Kutta maps commute with linearisation).
// Source: symplecticity of the exact sub-flows (splittings) and the
// condition b_i a_ij + b_j a_ji = b_i b_j (Sanz-Serna 1988) — exact
// identities. Also checks that the tangent M agrees with central differences
// of the plain method.
func TestSymplecticity(t *testing.T) {
	// The defect is a sum of products of entries of M of size up to ~10:
	// rounding gives ~1e-15 per step; 1e-12 (the requirement) holds over one
	// step and over 100 steps.
	const tol = 1e-12
	// Central differences with δ = 1e-5: truncation ~δ²·|Φ'''| ~ 1e-10,
	// rounding ~eps/δ ~ 1e-11; 1e-7 is a safe bound.
	const fdTol = 1e-7
	ctx := context.Background()
	hh := symModelProblem(t, "henon-heiles")
	const h = 0.1
	type entry struct {
		name string
		make func(h float64) Method
		tan  func() Problem
	}
	var list []entry
	for _, m := range symMethods {
		list = append(list, entry{m.name, m.make, func() Problem { return henonHeilesTangent(hh.Y0) }})
	}
	for s := 1; s <= 3; s++ {
		s := s
		list = append(list, entry{"Gauss" + string(rune('0'+s)), func(h float64) Method { return GaussLegendre(s, h) },
			func() Problem { return symVariational(hh) }})
	}
	for _, e := range list {
		t.Run(e.name, func(t *testing.T) {
			for _, steps := range []int{1, 100} {
				tp := e.tan()
				sol, err := Solve(ctx, tp, float64(steps)*h, e.make(h), &Settings{DropSteps: true})
				if err != nil {
					t.Fatal(err)
				}
				var m *mat.Dense
				if len(tp.Y0) == 20 && tp.Split != nil {
					m = symTangentMatrix(sol.Final)
				} else {
					m = mat.NewDense(4, 4, append([]float64(nil), sol.Final[4:]...))
				}
				d := symplecticDefect(m)
				t.Logf("%d steps: |MᵀJM − J| = %.3g, |M| = %.3g", steps, d, mat.Norm(m, math.Inf(1)))
				if d > tol {
					t.Errorf("%d steps: |MᵀJM − J| = %.3g, want <= %g", steps, d, tol)
				}
				if steps != 1 {
					continue
				}
				// Central differences of the plain method.
				const delta = 1e-5
				for j := 0; j < 4; j++ {
					yp := append([]float64(nil), hh.Y0...)
					ym := append([]float64(nil), hh.Y0...)
					yp[j] += delta
					ym[j] -= delta
					pp, pm := hh, hh
					pp.Y0, pm.Y0 = yp, ym
					sp, err1 := Solve(ctx, pp, h, e.make(h), &Settings{DropSteps: true})
					sm, err2 := Solve(ctx, pm, h, e.make(h), &Settings{DropSteps: true})
					if err1 != nil || err2 != nil {
						t.Fatal(err1, err2)
					}
					for i := 0; i < 4; i++ {
						fd := (sp.Final[i] - sm.Final[i]) / (2 * delta)
						if d := math.Abs(fd - m.At(i, j)); d > fdTol {
							t.Errorf("M[%d][%d] = %.12g, central difference %.12g (diff %.2g)", i, j, m.At(i, j), fd, d)
						}
					}
				}
			}
		})
	}
}

// symVariational returns y' = f(y), Y' = J(y)Y for a 4-dimensional problem with
// an exact Jacobian, Y(0) = I, state (y, Y row-major).
func symVariational(p Problem) Problem {
	jm := mat.NewDense(4, 4, nil)
	return Problem{
		F: func(t float64, y, d []float64) {
			p.F(t, y[:4], d[:4])
			p.Jac(t, y[:4], jm)
			for i := 0; i < 4; i++ {
				for k := 0; k < 4; k++ {
					var s float64
					for l := 0; l < 4; l++ {
						s += jm.At(i, l) * y[4+l*4+k]
					}
					d[4+i*4+k] = s
				}
			}
		},
		Y0: append(append([]float64(nil), p.Y0...), 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1),
	}
}

// TestReversibility: N steps of h, then N of −h, recover the start to
// rounding for every symmetric method (exact identity Φ_{−h} ∘ Φ_h = id for
// symmetric methods; Hairer, Lubich & Wanner 2006, Sect. V.1), on Kepler
// e = 0.6 and Hénon–Heiles, on the scheme directly and through Solve.
func TestReversibility(t *testing.T) {
	const nSteps = 1000
	// Each step adds a few rounding errors of relative size eps to states of
	// size ~2 (Kepler at pericentre: |p| = 2); the errors of N steps forward
	// and back add up to at most ~N·eps·scale·C with C of order the number of
	// sub-steps. 4·N·eps·|y| per sub-flow stage count bounds it.
	ctx := context.Background()
	for _, name := range []string{"kepler", "henon-heiles"} {
		p := symModelProblem(t, name)
		scale := 0.0
		for _, v := range p.Y0 {
			scale = math.Max(scale, math.Abs(v))
		}
		type entry struct {
			name   string
			make   func(h float64) Method
			stages int
		}
		var list []entry
		for _, m := range symMethods {
			sp := m.make(1).(*splitting)
			list = append(list, entry{m.name, m.make, len(sp.coef)})
		}
		for s := 1; s <= 3; s++ {
			s := s
			list = append(list, entry{"Gauss" + string(rune('0'+s)), func(h float64) Method { return GaussLegendre(s, h) }, 4 * s})
		}
		for _, e := range list {
			h := 0.01
			m := e.make(h)
			sc, err := m.newScheme(&p, len(p.Y0))
			if err != nil {
				t.Fatal(err)
			}
			vs := sc.(varStepper)
			y := append([]float64(nil), p.Y0...)
			y1 := make([]float64, len(y))
			for k := 0; k < nSteps; k++ {
				if _, err := vs.stepVar(float64(k)*h, h, y, y1); err != nil {
					t.Fatal(err)
				}
				y, y1 = y1, y
			}
			for k := nSteps; k > 0; k-- {
				if _, err := vs.stepVar(float64(k)*h, -h, y, y1); err != nil {
					t.Fatal(err)
				}
				y, y1 = y1, y
			}
			bound := 4 * float64(nSteps*e.stages) * 0x1p-52 * scale
			got := symMaxDiff(y, p.Y0)
			if got > bound {
				t.Errorf("%s %s: |back − start| = %.3g, want <= %.3g", name, e.name, got, bound)
			}
			// Through Solve: forward to t1 = N·h, then back to 0.
			t1 := float64(nSteps) * h
			fw, err := Solve(ctx, p, t1, m, &Settings{DropSteps: true})
			if err != nil {
				t.Fatal(err)
			}
			q := p
			q.T0, q.Y0 = t1, fw.Final
			bw, err := Solve(ctx, q, 0, m, &Settings{DropSteps: true})
			if err != nil {
				t.Fatal(err)
			}
			gotS := symMaxDiff(bw.Final, p.Y0)
			t.Logf("%s %s: scheme %.3g, Solve %.3g (bound %.3g)", name, e.name, got, gotS, bound)
			if gotS > bound {
				t.Errorf("%s %s via Solve: |back − start| = %.3g, want <= %.3g", name, e.name, gotS, bound)
			}
		}
	}
}

// TestKeplerLongRun: Kepler e = 0.6 over 10⁵ periods (10⁴ with -short). The
// energy error of Verlet and Yoshida4 stays bounded (max over the last tenth
// of the run within a factor 2 of the first tenth), while DormandPrince54 at
// a comparable number of evaluations drifts linearly (the ratio is 10 for
// an error proportional to t; we require > 5). Source: REFERENCES.md
// §5d (Hairer, Lubich & Wanner 2006, Sect. I.2 and IX.8: bounded energy
// error for symplectic methods, linear drift for non-symplectic ones).
func TestKeplerLongRun(t *testing.T) {
	periods := 100000
	if testing.Short() {
		periods = 10000
	}
	ctx := context.Background()
	p := symModelProblem(t, "kepler")
	t1 := 2 * math.Pi * float64(periods)
	// H = |p|²/2 − 1/|q| (with Sqrt rather than the catalog's Hypot: this
	// test evaluates it 10⁸ times).
	energy := func(y []float64) float64 {
		return 0.5*(y[2]*y[2]+y[3]*y[3]) - 1/math.Sqrt(y[0]*y[0]+y[1]*y[1])
	}
	e0 := energy(p.Y0)
	run := func(m Method, s *Settings) (first, last float64, evals int) {
		st, err := NewStepper(p, t1, m, s)
		if err != nil {
			t.Fatal(err)
		}
		for st.Next(ctx) {
			e := math.Abs(energy(st.Y()) - e0)
			switch {
			case st.T() <= t1/10:
				first = math.Max(first, e)
			case st.T() >= 0.9*t1:
				last = math.Max(last, e)
			}
		}
		if err := st.Err(); err != nil {
			t.Fatal(err)
		}
		return first, last, st.Stats().Evaluations
	}
	big := &Settings{MaxSteps: 1 << 30}
	// About 340 evaluations per period each: DOPRI5 at tolerance 1e-7 uses
	// that many (measured), Verlet takes 340 steps of one force evaluation,
	// Yoshida4 113 steps of three.
	vf, vl, ve := run(Verlet(2*math.Pi/340), big)
	yf, yl, ye := run(Yoshida4(2*math.Pi/113), big)
	df, dl, de := run(DormandPrince54, &Settings{RelTol: 1e-7, AbsTol: 1e-7, MaxSteps: 1 << 30})
	t.Logf("Verlet:   first tenth %.3g, last tenth %.3g, ratio %.3g, %d evaluations", vf, vl, vl/vf, ve)
	t.Logf("Yoshida4: first tenth %.3g, last tenth %.3g, ratio %.3g, %d evaluations", yf, yl, yl/yf, ye)
	t.Logf("DOPRI5:   first tenth %.3g, last tenth %.3g, ratio %.3g, %d evaluations", df, dl, dl/df, de)
	// Bounded: the largest error over the last tenth is within a factor 2 of
	// the first tenth's (the oscillation's amplitude is the same; 2 allows
	// for sampling different phases of it).
	const bounded = 2.0
	if vl > bounded*vf {
		t.Errorf("Verlet energy error grew: %.3g -> %.3g", vf, vl)
	}
	if yl > bounded*yf {
		t.Errorf("Yoshida4 energy error grew: %.3g -> %.3g", yf, yl)
	}
	// Linear drift: ratio 10 for exact proportionality to t; 5 leaves room.
	const drift = 5.0
	if dl < drift*df {
		t.Errorf("DormandPrince54 energy error did not drift: %.3g -> %.3g", df, dl)
	}
	// Comparable cost: within a factor 2 of each other.
	for _, ev := range []int{ve, ye} {
		if r := float64(de) / float64(ev); r < 0.5 || r > 2 {
			t.Errorf("evaluation counts not comparable: DOPRI5 %d vs %d", de, ev)
		}
	}
}

// TestEnergyAudit checks the Richardson estimate against the true error on
// Kepler over one period (exact: the start), the measured orders, the
// history, and that the suggested step meets its target.
func TestEnergyAudit(t *testing.T) {
	ctx := context.Background()
	p := symModelProblem(t, "kepler")
	t1 := 2 * math.Pi
	for _, c := range []struct {
		name string
		f    func(h float64) Method
		h    float64
	}{
		{"Verlet", Verlet, t1 / 800},
		{"Yoshida4", Yoshida4, t1 / 800},
		{"Gauss2", func(h float64) Method { return GaussLegendre(2, h) }, t1 / 400},
	} {
		rep, err := EnergyAudit(ctx, p, t1, c.f, c.h, nil)
		if err != nil {
			t.Fatal(err)
		}
		trueErr := symMaxDiff(rep.Final, p.Y0)
		t.Logf("%s: true %.3g, estimate %.3g, observed order %.3f, energy max %.3g rms %.3g, energy order %.3f",
			c.name, trueErr, rep.ErrorNorm, rep.ObservedOrder, rep.MaxError, rep.RMSError, rep.EnergyOrder)
		// Richardson: in the asymptotic regime the estimate is the error to
		// O(h^(p+1)); a factor 1.5 either way allows for the next term.
		if r := rep.ErrorNorm / trueErr; r < 1/1.5 || r > 1.5 {
			t.Errorf("%s: estimate %.3g vs true %.3g (ratio %.3g)", c.name, rep.ErrorNorm, trueErr, r)
		}
		// Source: published orders; ±0.2 as in REFERENCES.md §5d.
		if math.Abs(rep.ObservedOrder-float64(rep.Order)) > symOrderSlack {
			t.Errorf("%s: observed order %.3f, want %d", c.name, rep.ObservedOrder, rep.Order)
		}
		if len(rep.History) != 10 || rep.History[0].T0 != 0 || math.Abs(rep.History[9].T1-t1) > 1e-12 {
			t.Errorf("%s: history %+v", c.name, rep.History)
		}
		var hmax float64
		for i, b := range rep.History {
			hmax = math.Max(hmax, b.Max)
			if b.RMS > b.Max || b.RMS <= 0 {
				t.Errorf("%s: block %d RMS %.3g, Max %.3g", c.name, i, b.RMS, b.Max)
			}
			if i > 0 && b.T0 != rep.History[i-1].T1 {
				t.Errorf("%s: blocks not contiguous at %d", c.name, i)
			}
		}
		if hmax != rep.MaxError {
			t.Errorf("%s: max over blocks %.3g != MaxError %.3g", c.name, hmax, rep.MaxError)
		}
		// The suggested step for a tenth of the measured error must give
		// that error within a factor 1.5 (the h^p law, common practice).
		target := rep.MaxError / 10
		h2 := rep.SuggestStep(target)
		n := math.Ceil(t1 / h2)
		rep2, err := EnergyAudit(ctx, p, t1, c.f, t1/n, nil)
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("%s: suggested h %.4g for %.3g, got %.3g", c.name, t1/n, target, rep2.MaxError)
		if r := rep2.MaxError / target; r > 1.5 || r < 1/3.0 {
			t.Errorf("%s: at the suggested step the energy error is %.3g, target %.3g", c.name, rep2.MaxError, target)
		}
	}
	if rep, _ := EnergyAudit(ctx, p, t1, Verlet, 0.01, nil); rep.SuggestStep(0) != 0 || rep.SuggestStep(math.NaN()) != 0 {
		t.Error("SuggestStep(<=0) != 0")
	}
	// Bad input.
	if _, err := EnergyAudit(ctx, p, t1, Verlet, -1, nil); !errors.Is(err, ErrSettings) {
		t.Errorf("h = -1: %v", err)
	}
	if _, err := EnergyAudit(ctx, p, t1, func(float64) Method { return DormandPrince54 }, 0.1, nil); !errors.Is(err, ErrMethod) {
		t.Errorf("adaptive method: %v", err)
	}
	q := p
	q.Split = nil
	if _, err := EnergyAudit(ctx, q, t1, Verlet, 0.1, nil); !errors.Is(err, ErrMethod) {
		t.Errorf("no energy: %v", err)
	}
	if _, err := EnergyAudit(ctx, p, t1, Verlet, 0.1, &EnergySettings{Blocks: -1}); !errors.Is(err, ErrSettings) {
		t.Errorf("Blocks = -1: %v", err)
	}
	// A non-converging implicit step surfaces as ErrNoConvergence.
	sq := Problem{F: func(_ float64, y, d []float64) { d[0] = y[0] * y[0] }, Y0: []float64{1}}
	_, err := EnergyAudit(ctx, sq, 2, func(h float64) Method { return GaussLegendre(1, h) }, 2,
		&EnergySettings{Energy: func(y []float64) float64 { return y[0] }})
	if !errors.Is(err, ErrNoConvergence) {
		t.Errorf("non-converging Gauss: %v, want ErrNoConvergence", err)
	}
}

// symKeplerEcc returns Kepler with eccentricity e (Hairer, Lubich & Wanner 2006,
// Ch. I: q0 = (1−e, 0), p0 = (0, sqrt((1+e)/(1−e))), H = −1/2, period 2π).
func symKeplerEcc(t testing.TB, e float64) Problem {
	p := symModelProblem(t, "kepler")
	p.Y0 = []float64{1 - e, 0, 0, math.Sqrt((1 + e) / (1 - e))}
	return p
}

// TestSolveReversible: Kepler with e = 0.9 over 200 periods. With the
// time-reversible adaptive steps (s = r^(3/2)) Verlet's energy error stays
// bounded (no drift) and is far smaller than with fixed steps at the same
// number of force evaluations; the global error after one period is O(eps²).
// Source: Hairer & Söderlind 2005 (the Kepler experiments there),
// Hairer, Lubich & Wanner 2006 Sect. VIII.3; H = −1/2 exact.
func TestSolveReversible(t *testing.T) {
	ctx := context.Background()
	p := symKeplerEcc(t, 0.9)
	periods := 200.0
	t1 := 2 * math.Pi * periods
	sol, err := SolveReversible(ctx, p, t1, Verlet, 0.02, DistanceScale(1.5), nil)
	if err != nil {
		t.Fatal(err)
	}
	var first, last float64
	for i, tt := range sol.T {
		y := sol.Y[i*4 : i*4+4]
		e := math.Abs(p.Split.H(y[:2], y[2:]) + 0.5)
		if tt <= t1/10 {
			first = math.Max(first, e)
		} else if tt >= 0.9*t1 {
			last = math.Max(last, e)
		}
	}
	steps := sol.Stats.Accepted
	fixed, err := EnergyAudit(ctx, p, t1, Verlet, t1/float64(steps), nil)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("adaptive: %d steps, energy error first tenth %.3g, last tenth %.3g; fixed steps: max %.3g (drift ratio %.3g)",
		steps, first, last, fixed.MaxError, fixed.DriftRatio)
	// Bounded: factor 2, as in TestKeplerLongRun.
	if last > 2*first {
		t.Errorf("adaptive energy error grew: %.3g -> %.3g", first, last)
	}
	// Far better than fixed steps at equal cost: a factor 10 at least
	// (the pericentre passage at r = 0.1 is where fixed steps lose).
	if 10*math.Max(first, last) > fixed.MaxError {
		t.Errorf("adaptive %.3g not well below fixed %.3g", math.Max(first, last), fixed.MaxError)
	}
	// Order in eps: one period, exact return to the start.
	var hs, es []float64
	for _, eps := range []float64{0.02, 0.01, 0.005, 0.0025} {
		s, err := SolveReversible(ctx, p, 2*math.Pi, Verlet, eps, DistanceScale(1.5), &Settings{DropSteps: true})
		if err != nil {
			t.Fatal(err)
		}
		hs = append(hs, eps)
		es = append(es, symMaxDiff(s.Final, p.Y0))
	}
	got := symFitSlope(hs, es)
	t.Logf("errors %.3g, order in eps %.3f", es, got)
	if math.Abs(got-2) > symOrderSlack {
		t.Errorf("order in eps %.3f, want 2", got)
	}
	// Gauss–Legendre 2 as the symmetric base method, 20 periods.
	sg, err := SolveReversible(ctx, p, 20*2*math.Pi, func(h float64) Method { return GaussLegendre(2, h) }, 0.05, DistanceScale(1.5), nil)
	if err != nil {
		t.Fatal(err)
	}
	var gFirst, gLast float64
	for i, tt := range sg.T {
		y := sg.Y[i*4 : i*4+4]
		e := math.Abs(p.Split.H(y[:2], y[2:]) + 0.5)
		if tt <= 2*2*math.Pi {
			gFirst = math.Max(gFirst, e)
		} else if tt >= 18*2*math.Pi {
			gLast = math.Max(gLast, e)
		}
	}
	t.Logf("Gauss 2 adaptive: %d steps, energy error first tenth %.3g, last tenth %.3g", sg.Stats.Accepted, gFirst, gLast)
	if gLast > 2*gFirst {
		t.Errorf("Gauss 2 adaptive energy error grew: %.3g -> %.3g", gFirst, gLast)
	}
	// Dense output at a step end equals the step.
	if y := sol.At(sol.T[5], nil); symMaxDiff(y, sol.Y[20:24]) != 0 {
		t.Errorf("At(T[5]) = %v, want %v", y, sol.Y[20:24])
	}
	// Bad input.
	if _, err := SolveReversible(ctx, p, t1, Verlet, 0, DistanceScale(1.5), nil); !errors.Is(err, ErrSettings) {
		t.Errorf("eps = 0: %v", err)
	}
	if _, err := SolveReversible(ctx, p, t1, Verlet, 0.01, StepScale{}, nil); !errors.Is(err, ErrSettings) {
		t.Errorf("empty scale: %v", err)
	}
	if _, err := SolveReversible(ctx, p, t1, func(float64) Method { return DormandPrince54 }, 0.01, DistanceScale(1.5), nil); !errors.Is(err, ErrMethod) {
		t.Errorf("DOPRI5: %v", err)
	}
	if _, err := SolveReversible(ctx, p, t1, Verlet, 0.01, DistanceScale(1.5), &Settings{Every: 1}); !errors.Is(err, ErrSettings) {
		t.Errorf("Every: %v", err)
	}
	if s, err := SolveReversible(ctx, p, t1, Verlet, 0.01, DistanceScale(1.5), &Settings{MaxSteps: 10}); !errors.Is(err, ErrStepBudget) || s == nil || s.Status != Failed {
		t.Errorf("MaxSteps: %v", err)
	}
}
