package integrate

// Method is an integration method. Use the package-level values
// (DormandPrince54, DormandPrince853, BogackiShampine32) and the fixed-step
// constructors (RK4, Euler). A nil Method means DormandPrince54.
//
// A Method declares what it needs; Solve and NewStepper check the problem
// against it before any step and return ErrMethod when it does not fit.
type Method interface {
	// Name is the method's published name, for reports.
	Name() string
	// Order is the order of the propagated solution.
	Order() int

	// errOrder is the lower order q of an embedded pair (the error estimate
	// is O(h^(q+1))); 0 for fixed-step methods.
	errOrder() int
	// fixedStep is the step size of a fixed-step method, 0 for adaptive ones.
	fixedStep() float64
	// controller returns the method's default step-size controller.
	controller() Controller
	// newScheme checks p and returns the workspace for a problem of
	// dimension n. It is called once per solve.
	newScheme(p *Problem, n int) (scheme, error)
}

// scheme is the per-solve workspace of a method. The stepper owns the state
// vectors; a scheme owns its stage vectors. No method of a scheme allocates.
type scheme interface {
	// attempt computes a trial step of size h from (t, y), given f0 =
	// F(t, y). It writes the candidate state into y1 and returns the scaled
	// error norm (accept when <= 1; NaN if non-finite) and the number of
	// evaluations of F made. If fsal() is true it also leaves F(t+h, y1) in
	// f1; otherwise the stepper evaluates it after acceptance.
	attempt(t, h float64, y, f0, y1, f1, rtol, atol []float64) (err float64, evals int)
	// fsal reports whether attempt leaves F(t+h, y1) in f1.
	fsal() bool
	// stiffness returns the estimate of |h·λ| of the last accepted attempt
	// (Hairer & Wanner 1996, Sect. IV.2) and the threshold above which the
	// step is limited by stability; ok is false when the method has no test.
	stiffness(h float64, y1, f1 []float64) (hl, limit float64, ok bool)
	// denseSize is the number of length-n vectors the continuous extension
	// of one step needs.
	denseSize() int
	// dense prepares the continuous extension of the accepted step from
	// (t, y, f0) to (t+h, y1, f1) into coef (len denseSize()*n). It returns
	// the extra evaluations of F made.
	dense(t, h float64, y, f0, y1, f1, coef []float64) (evals int)
	// interp evaluates the continuous extension at t + theta·h, theta in
	// [0, 1], into dst (len n), from coef as written by dense.
	interp(coef []float64, theta float64, dst []float64)
}
