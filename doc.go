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
//	plumb (this package)  Model and System: built-in systems as integrate.Problem values
//	integrate             error-controlled and fixed-step integrators, dense output, crossings
//	internal/models       the catalog of published flows with their sources
//
// # Caution
//
// A trust horizon is a numerical statement about a model, not a safety
// certificate for the real system. Safety-critical use follows the field's
// own codes and licensed review.
package plumb
