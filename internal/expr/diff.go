package expr

// Diff returns the partial derivative of e with respect to variable slot v,
// built in the same graph through the simplifying constructors, so
// derivatives share nodes with the formula and with each other. Results are
// memoized: asking twice costs nothing.
//
// The rules are the usual ones of calculus; where a function has a kink the
// derivative there is defined as follows (a one-sided or averaged choice that
// keeps evaluators total):
//
//	d abs(u)      = sign(u)·du                  (0 at u = 0)
//	d min(u, w)   = step(w-u)·du + (1-step(w-u))·dw   (du at a tie)
//	d max(u, w)   = step(u-w)·du + (1-step(u-w))·dw   (du at a tie)
//	d sign(u) = d step(u) = 0                   (also at 0, where they jump)
//	d u^c         = c·u^(c-1)·du                (constant c)
//	d u^w         = u^w·(dw·log(u) + w·du/u)    (general w; real only for u > 0)
//	d atan2(u, w) = (w·du - u·dw)/(u² + w²)
//
// Diff walks the graph without recursion and ignores the limits of
// SetLimits (Derivative honours them). It panics if v is not a slot of the
// graph (a programmer error).
func (g *Graph) Diff(e Expr, v int) Expr {
	if v < 0 || v >= len(g.vars) {
		panic("expr: Diff with a variable slot out of range")
	}
	d, _ := g.diffWalk(e, v, false)
	return d
}

// diff returns the derivative of an operand in the current walk:
// diffWalk differentiates operands before their users.
func (g *Graph) diff(e Expr, v int) Expr {
	if int(e) < len(g.seen) && g.seen[e] == g.stamp {
		return g.dval[e]
	}
	panic("expr: operand differentiated out of order")
}

func (g *Graph) diffRule(e Expr, v int) Expr {
	n := g.nodes[e]
	zero, one := g.zeroOne()
	switch n.op {
	case OpConst:
		return zero
	case OpVar:
		if int(n.a) == v {
			return one
		}
		return zero
	}
	a := n.a
	da := g.diff(a, v)
	var b, db Expr
	if n.op.arity() == 2 {
		b = n.b
		db = g.diff(b, v)
	}
	// An expression that does not depend on v has derivative 0 wherever it
	// is defined; the rules below then need not build 0/b (which Div keeps).
	if g.isZero(da) && (n.op.arity() == 1 || g.isZero(db)) {
		return zero
	}
	switch n.op {
	case OpNeg:
		return g.Neg(da)
	case OpAdd:
		return g.Add(da, db)
	case OpSub:
		return g.Sub(da, db)
	case OpMul:
		return g.Add(g.Mul(da, b), g.Mul(a, db))
	case OpDiv:
		// (a/b)' = da/b - a·db/b², without the term whose factor is 0
		switch {
		case g.isZero(db):
			return g.Div(da, b)
		case g.isZero(da):
			return g.Neg(g.Div(g.Mul(a, db), g.Mul(b, b)))
		}
		return g.Sub(g.Div(da, b), g.Div(g.Mul(a, db), g.Mul(b, b)))
	case OpPow:
		if c, ok := g.Value(b); ok {
			return g.Mul(g.Mul(b, g.Pow(a, g.Const(c-1))), da)
		}
		// a^b·(db·log a + b·da/a), without the term whose factor is 0
		if g.isZero(da) {
			return g.Mul(e, g.Mul(db, g.Func1(OpLog, a)))
		}
		return g.Mul(e, g.Add(g.Mul(db, g.Func1(OpLog, a)), g.Div(g.Mul(b, da), a)))
	case OpSin:
		return g.Mul(g.Func1(OpCos, a), da)
	case OpCos:
		return g.Neg(g.Mul(g.Func1(OpSin, a), da))
	case OpTan:
		// (1 + tan²)·da
		return g.Mul(g.Add(one, g.Mul(e, e)), da)
	case OpExp:
		return g.Mul(e, da)
	case OpLog:
		return g.Div(da, a)
	case OpSqrt:
		return g.Div(da, g.Mul(g.Const(2), e))
	case OpAbs:
		return g.Mul(g.Func1(OpSign, a), da)
	case OpTanh:
		return g.Mul(g.Sub(one, g.Mul(e, e)), da)
	case OpSinh:
		return g.Mul(g.Func1(OpCosh, a), da)
	case OpCosh:
		return g.Mul(g.Func1(OpSinh, a), da)
	case OpAtan:
		return g.Div(da, g.Add(one, g.Mul(a, a)))
	case OpSign, OpStep:
		return zero
	case OpAtan2:
		return g.Div(g.Sub(g.Mul(b, da), g.Mul(a, db)), g.Add(g.Mul(a, a), g.Mul(b, b)))
	case OpMin, OpMax:
		var s Expr
		if n.op == OpMin {
			s = g.Func1(OpStep, g.Sub(b, a))
		} else {
			s = g.Func1(OpStep, g.Sub(a, b))
		}
		return g.Add(g.Mul(s, da), g.Mul(g.Sub(one, s), db))
	}
	panic("expr: no derivative rule for " + n.op.String())
}

// Gradient returns the derivatives of e with respect to the given slots.
func (g *Graph) Gradient(e Expr, slots []int) []Expr {
	out := make([]Expr, len(slots))
	for i, v := range slots {
		out[i] = g.Diff(e, v)
	}
	return out
}

// isZero reports whether e is the constant 0.
func (g *Graph) isZero(e Expr) bool {
	c, ok := g.Value(e)
	return ok && c == 0
}
