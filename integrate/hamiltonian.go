package integrate

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// HamiltonianProblem describes a Hamiltonian system in canonical coordinates
// q (positions) and p (momenta), each of length N, by its gradients:
//
//	dq/dt = ∂H/∂p,  dp/dt = −∂H/∂q
//
// Its Problem method lays the state out as y = (q, p) and fills
// Problem.Split when H = T(p) + V(q) is separable, so that the symplectic
// splittings (Verlet, Yoshida4, ...) apply; a non-separable H (given by Grad)
// suits GaussLegendre.
//
// Separable form: set DV (required) and either DT or Mass (or neither, for
// unit masses, T = |p|²/2). Kinetic and Potential, when set, give the energy
// for reports; with Mass (or unit masses) Kinetic is known and may be left
// nil. HessV, with Mass or unit masses, gives the exact Jacobian.
//
// General form: set Grad (and H for energy reports), leave DV nil.
type HamiltonianProblem struct {
	T0     float64   // initial time
	Q0, P0 []float64 // initial positions and momenta, equal lengths N > 0

	// DT writes ∂T/∂p at p into dst. Nil means M⁻¹p with the diagonal
	// masses Mass, or UnitMass when Mass is nil too (the splittings then
	// run in their Runge–Kutta–Nyström form).
	DT func(p, dst []float64)
	// Mass holds positive diagonal masses (length N) for T = Σ p_i²/(2 m_i),
	// used when DT is nil.
	Mass []float64
	// Kinetic returns T(p). Optional; known when DT is nil.
	Kinetic func(p []float64) float64
	// DV writes ∂V/∂q at q into dst (separable form).
	DV func(q, dst []float64)
	// Potential returns V(q). Optional; without it no energy is reported.
	Potential func(q []float64) float64
	// HessV writes ∂²V/∂q² at q into dst (N×N). Optional; with DT nil it
	// gives Problem.Jac.
	HessV func(q []float64, dst *mat.Dense)

	// Grad writes ∂H/∂q into dHdq and ∂H/∂p into dHdp (general form, used
	// when DV is nil).
	Grad func(q, p, dHdq, dHdp []float64)
	// H returns the Hamiltonian (general form). Optional.
	H func(q, p []float64) float64
}

// Problem returns the initial value problem y' = F(t, y), y = (q, p), with
// Split set for the separable form and Jac set when HessV is given with
// quadratic kinetic energy. Invalid fields give an error wrapping
// ErrDimension or ErrSettings; the returned functions do not allocate
// (Jac allocates a small matrix view per call).
func (hp HamiltonianProblem) Problem() (Problem, error) {
	n := len(hp.Q0)
	if n == 0 || len(hp.P0) != n {
		return Problem{}, fmt.Errorf("integrate: HamiltonianProblem: len(Q0) = %d, len(P0) = %d: want equal and > 0: %w", len(hp.Q0), len(hp.P0), ErrDimension)
	}
	y0 := make([]float64, 2*n)
	copy(y0, hp.Q0)
	copy(y0[n:], hp.P0)
	if hp.DV == nil {
		if hp.Grad == nil {
			return Problem{}, fmt.Errorf("integrate: HamiltonianProblem needs DV (separable H) or Grad (general H): %w", ErrSettings)
		}
		grad := hp.Grad
		f := func(_ float64, y, dy []float64) {
			grad(y[:n:n], y[n:2*n:2*n], dy[n:2*n:2*n], dy[:n:n])
			for i := n; i < 2*n; i++ {
				dy[i] = -dy[i]
			}
		}
		p := Problem{F: f, T0: hp.T0, Y0: y0}
		return p, nil
	}
	var invMass []float64
	if hp.DT == nil && hp.Mass != nil {
		if len(hp.Mass) != n {
			return Problem{}, fmt.Errorf("integrate: HamiltonianProblem: len(Mass) = %d, want %d: %w", len(hp.Mass), n, ErrDimension)
		}
		invMass = make([]float64, n)
		for i, m := range hp.Mass {
			if !(m > 0) || math.IsInf(m, 0) {
				return Problem{}, fmt.Errorf("integrate: HamiltonianProblem: Mass[%d] = %v: must be finite and > 0: %w", i, m, ErrSettings)
			}
			invMass[i] = 1 / m
		}
	}
	dt := hp.DT
	kin := hp.Kinetic
	if dt == nil {
		if invMass == nil {
			dt = UnitMass
			if kin == nil {
				kin = func(p []float64) float64 {
					var s float64
					for _, v := range p {
						s += float64(v * v)
					}
					return 0.5 * s
				}
			}
		} else {
			dt = func(p, dst []float64) {
				for i := range dst {
					dst[i] = float64(p[i] * invMass[i])
				}
			}
			if kin == nil {
				kin = func(p []float64) float64 {
					var s float64
					for i, v := range p {
						s += float64(float64(v*v) * invMass[i])
					}
					return 0.5 * s
				}
			}
		}
	}
	dv := hp.DV
	f := func(_ float64, y, dy []float64) {
		dt(y[n:2*n:2*n], dy[:n:n])
		dv(y[:n:n], dy[n:2*n:2*n])
		for i := n; i < 2*n; i++ {
			dy[i] = -dy[i]
		}
	}
	sp := &Separable{DT: dt, DV: dv}
	if kin != nil && hp.Potential != nil {
		pot := hp.Potential
		sp.H = func(q, p []float64) float64 { return kin(p) + pot(q) }
	}
	p := Problem{F: f, T0: hp.T0, Y0: y0, Split: sp}
	if hp.HessV != nil && hp.DT == nil {
		hess := hp.HessV
		p.Jac = func(_ float64, y []float64, dst *mat.Dense) {
			dst.Zero()
			for i := 0; i < n; i++ {
				v := 1.0
				if invMass != nil {
					v = invMass[i]
				}
				dst.Set(i, n+i, v)
			}
			lower := dst.Slice(n, 2*n, 0, n).(*mat.Dense)
			hess(y[:n:n], lower)
			lower.Scale(-1, lower)
		}
	}
	return p, nil
}

// Energy returns the Hamiltonian as a function of the state y = (q, p), for
// EnergySettings.Energy, or nil when it is not known (general form without
// H; separable form without Potential, or without Kinetic when DT is set).
func (hp HamiltonianProblem) Energy() func(y []float64) float64 {
	n := len(hp.Q0)
	if hp.DV == nil {
		if hp.H == nil {
			return nil
		}
		h := hp.H
		return func(y []float64) float64 { return h(y[:n:n], y[n:2*n:2*n]) }
	}
	p, err := hp.Problem()
	if err != nil || p.Split.H == nil {
		return nil
	}
	h := p.Split.H
	return func(y []float64) float64 { return h(y[:n:n], y[n:2*n:2*n]) }
}
