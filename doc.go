// Package plumb tells people who simulate nonlinear systems how far ahead a
// computed trajectory can be trusted, and what limits that horizon.
//
// In a chaotic system a small difference (a rounded number, a looser
// tolerance, a restart from printed values) grows exponentially, so a
// trajectory is only trustworthy up to some time. plumb measures that time
// with error-controlled integrators, tangent-space Lyapunov spectra and audits
// of step size, method and floating-point precision.
//
// # Map of the SDK
//
//	plumb (this package)  Trust, the audit behind "plumb trust"; TrustMap, its map analogue
//	                      (iterates against a double-double orbit); Model, LoadSystem and
//	                      System: built-in and formula-defined systems with exact Jacobians
//	integrate             error-controlled, fixed-step and symplectic integrators, dense
//	                      output, crossings, precision emulation, the audit ladder
//	lyap                  tangent-space Lyapunov spectra with standard errors, finite-time
//	                      exponents, covariant vectors, Kaplan–Yorke dimension, horizons
//	internal/expr         formulas: parser, symbolic derivatives, float64, double-double,
//	                      big.Float and Taylor-series evaluators
//	internal/dd           double-double arithmetic
//	internal/models       the catalog of published flows and maps with their sources
//	cmd/plumb             the command-line binary
//
// # The main job
//
// Trust runs a problem on a ladder of variations (tolerances, methods,
// emulated precisions, a restart from rounded values), compares each run with
// the tightest one, estimates the largest Lyapunov exponent, and says up to
// which time the trajectory agrees within the user's tolerance, which effect
// limits it, and whether the requested horizon is trusted:
//
//	sys, _ := plumb.Model("lorenz")
//	rep, err := plumb.Trust(ctx, sys.Problem(), 50, &plumb.TrustSettings{Tol: 1})
//	// rep.TrustedUntil, rep.LimitedBy, rep.Verdict; rep.Write(os.Stdout)
//
// TrustSystem does the same for a System with formulas (every built-in has
// them) and compares every float64 run with a Taylor-series reference
// computed in double-double or big.Float at the precision the horizon needs
// (Reference), so the tightest float64 run is audited too, not taken as the
// truth. The reference restarts its series at every kink of the formulas
// (a zero of abs's argument, a tie of min or max, a change of sign or step;
// ExactReference.KinkRestarts); at a kink it cannot pass (a branch point of
// sqrt, atan2's cut, a field that slides along a jump) the report sets it
// aside and says why (ExactReference.SetAside), and the runs are compared
// with the float64 reference run.
//
// The runs are compared by the Euclidean distance over every state
// component unless TrustSettings.Distance (MapTrustSettings.Distance) names
// the components that matter and divides each by a scale of its own units;
// the tolerance, the spread and the predictions are then in that distance,
// which the report names. System.SetStartValue moves one component of the
// start by name.
//
// # Caution
//
// A trust horizon is a numerical statement about a model, not a safety
// certificate for the real system. Safety-critical use follows the field's
// own codes and licensed review.
package plumb
