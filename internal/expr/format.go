package expr

import (
	"strconv"
	"strings"
)

// Precedence levels of the printer, loosest first.
const (
	precSum = iota + 1
	precProduct
	precUnary
	precPower
	precAtom
)

// Format writes e as a formula that Parse reads back to the same node of
// the same graph (parse(format(e)) == e). Shared subexpressions are written
// out in full each time they occur. Numbers use the shortest decimal form
// that reads back to the same float64.
func (g *Graph) Format(e Expr) string {
	var b strings.Builder
	g.format(&b, e)
	return b.String()
}

// prec returns the precedence of e's top operation.
func (g *Graph) prec(e Expr) int {
	n := g.nodes[e]
	switch n.op {
	case OpConst:
		if v, _ := g.Value(e); v < 0 || (v == 0 && 1/v < 0) {
			return precUnary
		}
		return precAtom
	case OpVar:
		return precAtom
	case OpAdd, OpSub:
		return precSum
	case OpMul, OpDiv:
		return precProduct
	case OpNeg:
		return precUnary
	case OpPow:
		return precPower
	}
	return precAtom
}

// operand writes e, in parentheses when its precedence is below min.
func (g *Graph) operand(b *strings.Builder, e Expr, min int) {
	if g.prec(e) < min {
		b.WriteByte('(')
		g.format(b, e)
		b.WriteByte(')')
		return
	}
	g.format(b, e)
}

func (g *Graph) format(b *strings.Builder, e Expr) {
	n := g.nodes[e]
	switch n.op {
	case OpConst:
		v, _ := g.Value(e)
		if v == 0 && 1/v < 0 {
			b.WriteString("-0")
			return
		}
		b.WriteString(strconv.FormatFloat(v, 'g', -1, 64))
	case OpVar:
		b.WriteString(g.vars[n.a])
	case OpNeg:
		b.WriteByte('-')
		g.operand(b, n.a, precUnary)
	case OpAdd, OpSub, OpMul, OpDiv:
		lo, sym := precSum, " + "
		switch n.op {
		case OpSub:
			sym = " - "
		case OpMul:
			lo, sym = precProduct, "*"
		case OpDiv:
			lo, sym = precProduct, "/"
		}
		g.operand(b, n.a, lo)
		b.WriteString(sym)
		// The right operand binds tighter (a-(b-c), a/(b*c)); a negative
		// right operand is bracketed for readability: a - (-b).
		min := lo + 1
		if g.prec(n.b) == precUnary {
			min = precPower
		}
		g.operand(b, n.b, min)
	case OpPow:
		g.operand(b, n.a, precAtom)
		b.WriteByte('^')
		g.operand(b, n.b, precUnary)
	default:
		b.WriteString(funcNames[n.op])
		b.WriteByte('(')
		g.format(b, n.a)
		if n.op.arity() == 2 {
			b.WriteString(", ")
			g.format(b, n.b)
		}
		b.WriteByte(')')
	}
}
