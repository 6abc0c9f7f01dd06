// Package expr reads formulas in ordinary infix notation, differentiates
// them symbolically and compiles them to evaluators in float64,
// double-double (internal/dd) and math/big.Float arithmetic.
//
// A Graph holds expressions over a fixed list of variables (for a system:
// t, the states, the parameters) as a directed acyclic graph with shared
// subexpressions. Parse reads a formula (grammar at Graph.Parse's source,
// summarized here):
//
//	operators + - * / ^ (right-associative), unary minus (-x^2 = -(x^2)), parentheses,
//	numbers such as 2, 0.5, .5, 1e-3, 6.02E+23, the constant pi, variables,
//	sin cos tan exp log sqrt abs tanh sinh cosh atan sign step,
//	atan2(y, x) pow(x, y) min(x, y) max(x, y).
//
// Errors are *ParseError values with the byte offset, line and column and a
// caret line under the spot, wrapping ErrSyntax, ErrUnknown or ErrArity.
//
// Diff differentiates with the rules of calculus through simplifying
// constructors (constant folding, x+0, x*1, x*0, x-x, double negation), so
// a Jacobian shares the nodes of its field. abs, min and max have defined
// derivatives at their kinks (see Graph.Diff). Format prints an expression
// so that Parse reads it back to the same node.
//
// Functions not analytic everywhere (Program.Kinks, KinkKind): abs where
// its argument is 0, min and max where their arguments tie (corners: a
// branch on each side), sign and step where their argument is 0 (jumps),
// atan2 where its first argument is 0 and the second negative (its 2π
// cut), sqrt and non-integer powers where the argument is 0 (branch
// points). A Taylor series of the field is that of the branch at its
// expansion point; the double-double and big.Float Taylor evaluators
// expose each kink's switching function (Switch) and take a forced branch
// (SetSide), so that an integrator can end its step on the kink and
// restart on the other side.
//
// Compile turns a list of expressions into a Program: a flat instruction tape
// over a register file, each shared node computed once. Evaluators made from
// a Program:
//
//	Float64  float64; products rounded before sums (no fused multiply-add),
//	         integer powers by repeated squaring: bit-identical on amd64
//	         and arm64; Run does not allocate. Programs of up to 256
//	         registers run on a byte-indexed tape where chains of up to
//	         three + - * operations take one dispatch (same bits).
//	DD       double-double, about 32 digits; Run does not allocate.
//	Big      math/big.Float at any precision, with the elementary functions
//	         of this package (BigExp, BigLog, BigSin, ...).
//	Taylor   truncated Taylor series by the recurrences of Taylor-mode
//	         differentiation; ODE gives the Taylor coefficients of the
//	         solution of y' = f(t, y) and Step a fixed-step Taylor method.
//
// Float64 runs a program in one of four tiers. All give the same bits
// (TestFusedBits, TestFieldFuncBits, TestInlineKinds, TestInlinePre and
// FuzzFieldFunc check them against the plain tape) and differ only in
// speed. Each is kept because it serves programs no faster tier takes, or
// because it shortens whole solves by more than the spread between rounds:
//
//	tape     the plain instruction tape (Float64.run). Runs any program;
//	         the only tier for programs of more than 256 registers.
//	fused    the byte-indexed tape (runFast) of programs of up to 256
//	         registers, chains of up to three + - * in one dispatch. Run
//	         and Field use it (Jacobians, maps, Hamiltonian parts); so does
//	         FieldFunc for what no output's closure absorbed.
//	closure  FieldFunc's closures (fieldPlan): each output by one closure
//	         specialised to its operations, written straight into dydt.
//	inline   FieldFunc for up to four outputs that all have an inline kind
//	         and a leftover tape of + - * /, squares and negations only: a
//	         switch on each output's kind, unrolled, and no call at all
//	         (inline_gen.go, written by gen_inline.go).
//
// Measured by BenchmarkSolve* (solve_bench_test.go): a system file's
// solve by DormandPrince54 at rtol = atol = 1e-9, its time over that of the
// same system as a hand-written Go field, FieldFunc forced onto each tier;
// the ratio of the fastest of 200 interleaved solves, median of three
// rounds, amd64 on 2 busy shared cores (spread between rounds under 0.045,
// mostly under 0.015, but up to 0.28 for the tape; "-": the tier does not
// take the system):
//
//	                       tape  fused  closure  inline
//	Lorenz, t in [0, 100]  2.31  1.92   1.31     1.18
//	Rössler, [0, 500]      2.27  1.94   1.47     1.23
//	driven pendulum (sin,  1.48  1.42   1.32     -
//	  cos), [0, 1000]
//	Lorenz-96, 40 sites,   1.57  0.83   0.82     -
//	  [0, 20]
//
// The inline tier is the only one within 1.3 times the Go field on the
// small polynomial systems; the closures buy 0.1 on the pendulum and 0.01
// (just beyond the spread) on the 40-site ring, whose Go field computes its
// ring indices by remainders.
//
// The constants of a program are float64 values in every evaluator, so all
// three compute the same model and differ only in the rounding of their
// arithmetic — what a precision audit needs.
//
// Simplification treats formulas as real functions: x*0 = 0 and x-x = 0
// even where x would be infinite or NaN in floating point.
//
// References:
//
//	A. V. Aho, M. S. Lam, R. Sethi, J. D. Ullman, Compilers: Principles,
//	  Techniques, and Tools, 2nd ed., Addison-Wesley 2006 (recursive-descent
//	  parsing, value numbering for common subexpressions, §6.1).
//	A. Griewank, A. Walther, Evaluating Derivatives, 2nd ed., SIAM 2008
//	  (derivative rules and expression graphs).
package expr
