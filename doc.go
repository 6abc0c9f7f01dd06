// Package plumb tells people who simulate nonlinear systems how far ahead a
// computed trajectory can be trusted, and what limits that horizon.
//
//	sys, _ := plumb.Model("lorenz") // or LoadSystem(file)
//	rep, err := sys.Trust(ctx, 50, &plumb.TrustSettings{Tol: 1})
//	// rep.TrustedUntil, rep.LimitedBy, rep.Verdict; rep.Write(os.Stdout)
//
// System.Trust runs the system on a ladder of rungs, each changing one
// numerical choice (tolerance, method, emulated storage, a restart from
// rounded values), compares every run with a reference (a multiprecision
// Taylor run for a flow, the double-double orbit for a map), estimates the
// largest Lyapunov exponent and says up to which time all runs agree within
// Tol, which effect limits that, and whether the horizon is trusted.
// TrustProblem audits a raw integrate.Problem against its tightest run;
// TrustRuns (TrustFiles, TrustProgram) audits runs another program made;
// Ensemble releases members around a start and measures how they part;
// System.Prove (TrustSettings.Prove) encloses the exact solution in proven
// boxes; ScanShard, EnsembleShard and RunProgramShard compute one piece of
// a split run, and ReadShards joins the pieces.
//
//	plumb          System (Model, LoadSystem), Trust, the Report, runs, Ensemble, Distance, shards
//	integrate      ODE solvers with error control, batches, the audit ladder, Taylor references
//	lyap           Lyapunov spectra, finite-time exponents, derived measures
//	maps           discrete maps: iteration and the iterate-by-iterate audit
//	embed          measured series: delay embedding, dimensions, exponents from data
//	enclose        validated enclosures: interval Taylor series, Lohner's wrapping
//	internal/...   formulas (expr), double-double (dd), big.Float sums (bigadd),
//	               elementary functions (detmath), intervals (ival), run files (runio),
//	               the catalog (models)
//	cmd/plumb      the command-line binary, a thin shell over this package
//
// A trust horizon is a numerical statement about a model, not a safety
// certificate for the real system, and a proven enclosure bounds the model's
// equations as written, not the real system; safety-critical use follows the
// field's own codes and licensed review.
package plumb
