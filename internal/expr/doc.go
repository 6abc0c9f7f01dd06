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
