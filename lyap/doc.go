// Package lyap measures how fast nearby trajectories separate: tangent-space
// Lyapunov spectra of flows and maps with their standard errors, the
// two-trajectory estimate of the largest exponent, finite-time exponents,
// covariant Lyapunov vectors, and the measures derived from a spectrum
// (Kaplan–Yorke dimension, entropy, Lyapunov time, predictability horizon).
//
// # Notation
//
//	n        the state dimension; k the number of exponents requested (1..n)
//	lambda   a Lyapunov exponent, natural log per unit time (flows, Units
//	         "1/time") or per iteration (maps, Units "1/iteration")
//	J        the Jacobian dF/dx of a flow or df/dx of a map
//	V        the n×k matrix of tangent vectors, V = QR its QR factorisation
//
// # Entry points
//
//	Exponents, MapExponents   the k largest exponents by the QR method
//	Largest, MapLargest       the largest exponent from two nearby
//	                          trajectories, without a Jacobian
//	FiniteTime, MapFiniteTime finite-time exponents over windows of length tau
//	Covariant, MapCovariant   covariant Lyapunov vectors and their angles
//	KaplanYorke, Entropy, LyapunovTime, Horizon   measures derived from exponents
//	Spectrum.KaplanYorke, .Entropy, .LyapunovTime, .BeyondNoise
//	                          the same read from an estimate: whether a
//	                          partial spectrum gives only a lower bound
//	                          (Bound), and whether lambda_max stands clear
//	                          of its noise (NoiseFactor)
//	ShadowMap, ShadowFlow     a true orbit near a computed one: how close,
//	                          for how long, and where it stops (Shadow)
//
// Flows are integrate.Problem values (the Jacobian Problem.Jac is used when
// given, central differences otherwise); maps satisfy the small Map interface
// defined here. Every entry point takes a context first and a *Settings
// last, nil meaning the documented defaults. A full spectrum of a 3-D flow
// may take a fused evaluation of the field and the tangent product
// (Tangent3, in Settings.Tangent3): the same bits at lower cost.
//
// # Methods
//
// Exponents (flows) and MapExponents (maps) follow Benettin, Galgani,
// Giorgilli & Strelcyn (1980) and Shimada & Nagashima (1979): k tangent
// vectors are carried along the trajectory and re-orthonormalised by a
// Householder QR factorisation (written here, bit-identical on every
// architecture) every re-orthonormalisation interval; the exponents are
// the time averages of ln R_ii. For a flow the
// trajectory and its tangent vectors form one augmented system of dimension
// n(1+k), integrated by any method of package integrate with error control.
// The interval adapts to the growth of the tangent vectors, keeping stretch
// ratios far from 1/eps (Settings.MaxGrowth), unless the caller fixes it.
// Covariant vectors follow Ginelli et al. (2007): the forward QR run is
// stored, and upper-triangular coefficients are iterated backward.
//
// ShadowMap refines a float64 orbit in double-double after Hammel, Yorke &
// Grebogi (1987, 1988) and Grebogi, Hammel, Yorke & Sauer (1990), the
// correction split along stable (forward) and unstable (backward)
// directions; ShadowFlow closes the gaps of a run cut at joints by multiple
// shooting with time rescaling (Coomes, Koçak & Palmer 1995), each pass the
// minimum-norm least-squares correction (after Wang 2014). Both stop at a
// near-tangency or a failing refinement and say where (Glitch), and refuse
// a jump (JumpError) rather than certify it.
//
// # Uncertainty
//
// No estimate comes without its error bar: the averaging run is cut into
// blocks and StdErr is the batch-means standard error over them. The
// Spectrum keeps the running estimate after every block (History), the
// transient discarded, a Converged verdict against the caller's Target, and
// sanity residuals (Checks) that vanish in exact arithmetic: the sum of the
// exponents against the mean trace of the Jacobian (flows) or mean ln|det J|
// (maps), the exponent of the flow direction against zero, and the pairing
// lambda_i + lambda_(n+1−i) of Hamiltonian systems against zero.
//
// # Errors
//
// Sentinels usable with errors.Is: ErrSettings, ErrCount, ErrDimension,
// ErrNoJacobian, ErrNonFinite, ErrSystem, ErrTooShort; an invalid field of
// Settings is an *integrate.SettingError naming lyap's Settings (see
// Settings.Validate); GrowthError says where a tangent
// growth stopped being finite. Once work began, errors come with the partial
// result. A panic in the caller's vector field, Jacobian (a write outside its
// matrix, say), map or map Jacobian during Exponents, FiniteTime,
// Covariant, Largest, MapExponents or MapLargest is recovered, once per run, into an
// *integrate.CallbackError (wrapping integrate.ErrCallback) that names the
// function and the time (the iteration for maps).
//
// # Allocation
//
// After set-up the stepping and re-orthonormalisation loops do not allocate
// (the finite-difference Jacobian of a flow without Problem.Jac is the
// exception: gonum's diff/fd allocates three small slices per Jacobian).
//
// # Caution
//
// An exponent and the horizon derived from it are statements about a model
// and its numerical solution, not a safety certificate for a real system.
// Safety-critical use follows the field's own codes and licensed review.
//
// References:
//
//	G. Benettin, L. Galgani, A. Giorgilli, J.-M. Strelcyn, Lyapunov
//	  characteristic exponents for smooth dynamical systems and for
//	  Hamiltonian systems; a method for computing all of them, Meccanica 15
//	  (1980) 9–20 and 21–30.
//	I. Shimada, T. Nagashima, A numerical approach to ergodic problem of
//	  dissipative dynamical systems, Prog. Theor. Phys. 61 (1979) 1605–1616.
//	F. Ginelli, P. Poggi, A. Turchi, H. Chaté, R. Livi, A. Politi,
//	  Characterizing dynamics with covariant Lyapunov vectors, Phys. Rev.
//	  Lett. 99 (2007) 130601.
//	B. Schmeiser, Batch size effects in the analysis of simulation output,
//	  Operations Research 30 (1982) 556–568.
package lyap
