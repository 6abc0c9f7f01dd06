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
// # Methods
//
// Exponents (flows) and MapExponents (maps) follow Benettin, Galgani,
// Giorgilli & Strelcyn (1980) and Shimada & Nagashima (1979): k tangent
// vectors are carried along the trajectory and re-orthonormalised by a
// Householder QR factorisation (gonum's LAPACK) every re-orthonormalisation
// interval; the exponents are the time averages of ln R_ii. For a flow the
// trajectory and its tangent vectors form one augmented system of dimension
// n(1+k), integrated by any method of package integrate with error control.
//
// # Uncertainty
//
// No estimate comes without its error bar: the averaging run is cut into
// blocks and StdErr is the batch-means standard error over them. The
// Spectrum keeps the running estimate after every block (History), the
// transient discarded, a Converged verdict against the caller's Target, and
// sanity residuals (Checks) that vanish in exact arithmetic.
//
// # Errors
//
// Sentinels usable with errors.Is: ErrSettings, ErrCount, ErrDimension,
// ErrNoJacobian, ErrNonFinite, ErrSystem; GrowthError says where a tangent
// growth stopped being finite. Once work began, errors come with the partial
// result.
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
package lyap
