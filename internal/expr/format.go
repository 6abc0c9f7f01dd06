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
// that reads back to the same float64. It works by an explicit stack, so a
// formula of any depth prints.
func (g *Graph) Format(e Expr) string {
	var b strings.Builder
	g.format(&b, e, 0)
	return b.String()
}

// FormatMax is Format cut short once the text exceeds max bytes: it
// returns the text so far and false when it was cut. A derivative shares
// subexpressions that Format writes out in full each time, so its text can
// grow with the square of the graph's size (the derivative of x*x*...*x).
func (g *Graph) FormatMax(e Expr, max int) (string, bool) {
	var b strings.Builder
	whole := g.format(&b, e, max)
	return b.String(), whole
}

// fmtItem is a pending piece of output: a literal string, or node e to be
// written in parentheses when its precedence is below min.
type fmtItem struct {
	s   string
	e   Expr
	min int
	lit bool
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

// format writes root into b; with max > 0 it stops once b holds more than
// max bytes and returns false.
func (g *Graph) format(b *strings.Builder, root Expr, max int) bool {
	stack := []fmtItem{{e: root}}
	// push queues items to be written in the order given.
	push := func(items ...fmtItem) {
		for k := len(items) - 1; k >= 0; k-- {
			stack = append(stack, items[k])
		}
	}
	lit := func(s string) fmtItem { return fmtItem{s: s, lit: true} }
	for len(stack) > 0 {
		if max > 0 && b.Len() > max {
			return false
		}
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if it.lit {
			b.WriteString(it.s)
			continue
		}
		e := it.e
		if g.prec(e) < it.min {
			push(lit("("), fmtItem{e: e}, lit(")"))
			continue
		}
		n := g.nodes[e]
		switch n.op {
		case OpConst:
			v, _ := g.Value(e)
			if v == 0 && 1/v < 0 {
				b.WriteString("-0")
				continue
			}
			b.WriteString(strconv.FormatFloat(v, 'g', -1, 64))
		case OpVar:
			b.WriteString(g.vars[n.a])
		case OpNeg:
			b.WriteByte('-')
			push(fmtItem{e: n.a, min: precUnary})
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
			// The right operand binds tighter (a-(b-c), a/(b*c)); a negative
			// right operand is bracketed for readability: a - (-b).
			min := lo + 1
			if g.prec(n.b) == precUnary {
				min = precPower
			}
			push(fmtItem{e: n.a, min: lo}, lit(sym), fmtItem{e: n.b, min: min})
		case OpPow:
			push(fmtItem{e: n.a, min: precAtom}, lit("^"), fmtItem{e: n.b, min: precUnary})
		default:
			b.WriteString(funcNames[n.op])
			b.WriteByte('(')
			if n.op.arity() == 2 {
				push(fmtItem{e: n.a}, lit(", "), fmtItem{e: n.b}, lit(")"))
			} else {
				push(fmtItem{e: n.a}, lit(")"))
			}
		}
	}
	return true
}
