package expr

import (
	"math"

	"github.com/plumbdyn/plumb/internal/detmath"
)

// eval1 applies a one-operand function in float64.
func eval1(op Op, x float64) float64 {
	switch op {
	case OpNeg:
		return -x
	case OpSin:
		return detmath.Sin(x)
	case OpCos:
		return detmath.Cos(x)
	case OpTan:
		return detmath.Tan(x)
	case OpExp:
		return detmath.Exp(x)
	case OpLog:
		return detmath.Log(x)
	case OpSqrt:
		return math.Sqrt(x)
	case OpAbs:
		return math.Abs(x)
	case OpTanh:
		return detmath.Tanh(x)
	case OpSinh:
		return detmath.Sinh(x)
	case OpCosh:
		return detmath.Cosh(x)
	case OpAtan:
		return detmath.Atan(x)
	case OpSign:
		return sign(x)
	case OpStep:
		return step(x)
	}
	panic("expr: eval1 of " + op.String())
}

// eval2 applies a two-operand operation in float64.
func eval2(op Op, x, y float64) float64 {
	switch op {
	case OpAdd:
		return x + y
	case OpSub:
		return x - y
	case OpMul:
		return x * y
	case OpDiv:
		return x / y
	case OpPow:
		return pow(x, y)
	case OpAtan2:
		return detmath.Atan2(x, y)
	case OpMin:
		return min2(x, y)
	case OpMax:
		return max2(x, y)
	}
	panic("expr: eval2 of " + op.String())
}

// sign is -1, 0 or 1 by the sign of x (0 at ±0, NaN for NaN). It is the
// derivative of abs, which plumb defines as 0 at the kink x = 0.
func sign(x float64) float64 {
	switch {
	case x > 0:
		return 1
	case x < 0:
		return -1
	case x == 0:
		return 0
	}
	return x
}

// step is 1 for x >= 0 and 0 for x < 0 (NaN for NaN). It selects the branch
// of min and max in their derivatives.
func step(x float64) float64 {
	switch {
	case x >= 0:
		return 1
	case x < 0:
		return 0
	}
	return x
}

// min2 is the smaller of x and y; at a tie it is x. NaN if either is NaN.
func min2(x, y float64) float64 {
	if x != x || y != y {
		return math.NaN()
	}
	if y < x {
		return y
	}
	return x
}

// max2 is the larger of x and y; at a tie it is x. NaN if either is NaN.
func max2(x, y float64) float64 {
	if x != x || y != y {
		return math.NaN()
	}
	if y > x {
		return y
	}
	return x
}

// pow is x^y: by repeated squaring when y is an integer of magnitude at most
// maxIntPow (so x^2 is exactly x*x), math.Pow otherwise.
func pow(x, y float64) float64 {
	if n := int(y); float64(n) == y && n >= -maxIntPow && n <= maxIntPow {
		return powi(x, n)
	}
	return detmath.Pow(x, y)
}

// maxIntPow bounds the integer exponents evaluated by repeated squaring.
const maxIntPow = 64

// powi is x^n by binary powering; x^(-n) = 1/x^n.
func powi(x float64, n int) float64 {
	neg := n < 0
	if neg {
		n = -n
	}
	r := 1.0
	for b := x; n > 0; n >>= 1 {
		if n&1 == 1 {
			r *= b
		}
		if n > 1 {
			b *= b
		}
	}
	if neg {
		return 1 / r
	}
	return r
}

// String returns the operation's name.
func (op Op) String() string {
	switch op {
	case OpConst:
		return "const"
	case OpVar:
		return "var"
	case OpNeg:
		return "neg"
	case OpAdd:
		return "+"
	case OpSub:
		return "-"
	case OpMul:
		return "*"
	case OpDiv:
		return "/"
	case OpPow:
		return "^"
	}
	if op < numOps && funcNames[op] != "" {
		return funcNames[op]
	}
	return "op?"
}
