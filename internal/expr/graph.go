package expr

import (
	"math"
)

// Op is the operation of a node.
type Op uint8

// The operations. Leaves are constants and variables; the rest take one or
// two operands.
const (
	OpConst Op = iota
	OpVar
	OpNeg
	OpAdd
	OpSub
	OpMul
	OpDiv
	OpPow
	OpSin
	OpCos
	OpTan
	OpExp
	OpLog
	OpSqrt
	OpAbs
	OpTanh
	OpSinh
	OpCosh
	OpAtan
	OpSign
	OpStep
	OpAtan2
	OpMin
	OpMax
	numOps
)

// funcNames maps the function operations to their spelling in formulas.
var funcNames = [numOps]string{
	OpSin: "sin", OpCos: "cos", OpTan: "tan", OpExp: "exp", OpLog: "log",
	OpSqrt: "sqrt", OpAbs: "abs", OpTanh: "tanh", OpSinh: "sinh", OpCosh: "cosh",
	OpAtan: "atan", OpSign: "sign", OpStep: "step", OpAtan2: "atan2", OpMin: "min",
	OpMax: "max", OpPow: "pow",
}

// arity returns the number of operands of op.
func (op Op) arity() int {
	switch op {
	case OpConst, OpVar:
		return 0
	case OpAdd, OpSub, OpMul, OpDiv, OpPow, OpAtan2, OpMin, OpMax:
		return 2
	}
	return 1
}

// lookupFunc returns the operation spelled name in a formula.
func lookupFunc(name string) (Op, bool) {
	for op, s := range funcNames {
		if s != "" && s == name {
			return Op(op), true
		}
	}
	return 0, false
}

// IsReserved reports whether name is a function name or a constant of the
// formula language (pi), and so cannot name a variable.
func IsReserved(name string) bool {
	_, ok := lookupFunc(name)
	return ok || name == "pi"
}

// Expr is a node of a Graph: a handle valid only in the graph that made it.
type Expr int32

// node is one vertex of the expression graph. For OpConst, bits holds the
// value's IEEE bits; for OpVar, a holds the variable's slot.
type node struct {
	op   Op
	a, b Expr
	bits uint64
}

// Graph holds expressions as a directed acyclic graph in which equal
// subexpressions are one node (hash-consing), so common subexpressions of
// formulas and of their derivatives are shared and computed once.
//
// Nodes are built only through the simplifying constructors (Add, Mul, ...),
// which fold constants and apply x+0 = x, x*1 = x, x*0 = 0 and a few more
// identities listed at each constructor. Nodes are numbered in creation
// order, so every node's operands come before it.
//
// A Graph is not safe for concurrent modification; compiled Programs are
// independent of it.
type Graph struct {
	vars  []string
	slot  map[string]int // the first slot of each non-empty name
	nodes []node
	index map[node]Expr
	diffs map[[2]int32]Expr
	// maxNodes and maxWork are the limits of SetLimits (0: none); work
	// counts the nodes visited by Derivative.
	maxNodes, maxWork, work int
	// seen and stamp mark the nodes of a walk (see reachable).
	seen  []uint32
	stamp uint32
	// dval holds the derivatives of the nodes of the current diffWalk.
	dval []Expr
	// zero and one are the constants 0 and 1 once haveZO (see zeroOne).
	zero, one Expr
	haveZO    bool
}

// NewGraph returns an empty graph whose formulas may use the named variables;
// variable i is slot i of every evaluator compiled from the graph. An empty
// name reserves a slot that formulas cannot mention.
func NewGraph(vars []string) *Graph {
	g := &Graph{
		vars:  append([]string(nil), vars...),
		slot:  make(map[string]int, len(vars)),
		index: make(map[node]Expr),
		diffs: make(map[[2]int32]Expr),
	}
	for i, v := range vars {
		if _, dup := g.slot[v]; v != "" && !dup {
			g.slot[v] = i
		}
	}
	return g
}

// Vars returns the variable names in slot order.
func (g *Graph) Vars() []string { return append([]string(nil), g.vars...) }

// Len returns the number of nodes in the graph.
func (g *Graph) Len() int { return len(g.nodes) }

func (g *Graph) intern(n node) Expr {
	if e, ok := g.index[n]; ok {
		return e
	}
	e := Expr(len(g.nodes))
	g.nodes = append(g.nodes, n)
	g.index[n] = e
	return e
}

// Const returns the constant v. Non-finite v are kept as written.
func (g *Graph) Const(v float64) Expr {
	return g.intern(node{op: OpConst, bits: math.Float64bits(v)})
}

// Var returns variable slot i; it panics if i is out of range (a programmer
// error: user formulas reach variables only through Parse).
func (g *Graph) Var(i int) Expr {
	if i < 0 || i >= len(g.vars) {
		panic("expr: variable slot out of range")
	}
	return g.intern(node{op: OpVar, a: Expr(i)})
}

// Op returns e's operation.
func (g *Graph) Op(e Expr) Op { return g.nodes[e].op }

// Args returns e's operands (none for leaves).
func (g *Graph) Args(e Expr) []Expr {
	n := g.nodes[e]
	switch n.op.arity() {
	case 1:
		return []Expr{n.a}
	case 2:
		return []Expr{n.a, n.b}
	}
	return nil
}

// Value returns the value of a constant node and true, or 0 and false.
func (g *Graph) Value(e Expr) (float64, bool) {
	n := g.nodes[e]
	if n.op != OpConst {
		return 0, false
	}
	return math.Float64frombits(n.bits), true
}

// Slot returns the slot of a variable node and true, or -1 and false.
func (g *Graph) Slot(e Expr) (int, bool) {
	n := g.nodes[e]
	if n.op != OpVar {
		return -1, false
	}
	return int(n.a), true
}

func (g *Graph) isConst(e Expr, v float64) bool {
	c, ok := g.Value(e)
	return ok && c == v
}

// fold returns the constant v when it is finite; otherwise ok is false and
// the caller keeps the operation (so 1/0 stays a division, visible in a
// printed formula, rather than becoming an unprintable Inf).
func (g *Graph) fold(v float64) (Expr, bool) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, false
	}
	return g.Const(v), true
}

// Neg returns -a, with -(c) folded and -(-a) = a.
func (g *Graph) Neg(a Expr) Expr {
	if c, ok := g.Value(a); ok {
		return g.Const(-c)
	}
	if g.nodes[a].op == OpNeg {
		return g.nodes[a].a
	}
	return g.intern(node{op: OpNeg, a: a})
}

// Add returns a+b, with constants folded, a+0 = 0+a = a, a+(-b) = a-b and
// (-a)+b = b-a.
func (g *Graph) Add(a, b Expr) Expr {
	ca, oka := g.Value(a)
	cb, okb := g.Value(b)
	if oka && okb {
		if e, ok := g.fold(ca + cb); ok {
			return e
		}
	}
	switch {
	case oka && ca == 0:
		return b
	case okb && cb == 0:
		return a
	case g.nodes[b].op == OpNeg:
		return g.Sub(a, g.nodes[b].a)
	case g.nodes[a].op == OpNeg:
		return g.Sub(b, g.nodes[a].a)
	}
	return g.intern(node{op: OpAdd, a: a, b: b})
}

// Sub returns a-b, with constants folded, a-0 = a, 0-b = -b, a-a = 0 and
// a-(-b) = a+b.
func (g *Graph) Sub(a, b Expr) Expr {
	ca, oka := g.Value(a)
	cb, okb := g.Value(b)
	if oka && okb {
		if e, ok := g.fold(ca - cb); ok {
			return e
		}
	}
	switch {
	case okb && cb == 0:
		return a
	case oka && ca == 0:
		return g.Neg(b)
	case a == b:
		return g.Const(0)
	case g.nodes[b].op == OpNeg:
		return g.Add(a, g.nodes[b].a)
	}
	return g.intern(node{op: OpSub, a: a, b: b})
}

// Mul returns a*b, with constants folded, 1*a = a*1 = a, 0*a = a*0 = 0 (also
// for non-finite a: formulas are taken as real functions), (-1)*a = -a, and
// a constant factor moved to the left.
func (g *Graph) Mul(a, b Expr) Expr {
	ca, oka := g.Value(a)
	cb, okb := g.Value(b)
	if oka && okb {
		if e, ok := g.fold(ca * cb); ok {
			return e
		}
	}
	if okb && !oka {
		a, b, ca, oka = b, a, cb, true
	}
	if oka {
		switch ca {
		case 0:
			return g.Const(0)
		case 1:
			return b
		case -1:
			return g.Neg(b)
		}
	}
	return g.intern(node{op: OpMul, a: a, b: b})
}

// Div returns a/b, with constants folded, a/1 = a, a/(-1) = -a,
// and (c·x)/d = (c/d)·x for constants c and d when d is a power of two and
// c/d is a normal number (then both round alike: scaling by a power of two
// commutes with rounding, barring overflow of c·x). 0/b is kept as it is:
// it is not 0 where b is 0, and folding it would hide that singularity.
func (g *Graph) Div(a, b Expr) Expr {
	ca, oka := g.Value(a)
	cb, okb := g.Value(b)
	if oka && okb {
		if e, ok := g.fold(ca / cb); ok {
			return e
		}
	}
	if n := g.nodes[a]; okb && n.op == OpMul && isPow2(cb) {
		if c, ok := g.Value(n.a); ok {
			if q := c / cb; q != 0 && math.Abs(q) >= 0x1p-1000 && math.Abs(q) <= 0x1p1000 {
				return g.Mul(g.Const(q), n.b)
			}
		}
	}
	switch {
	case okb && cb == 1:
		return a
	case okb && cb == -1:
		return g.Neg(a)
	}
	return g.intern(node{op: OpDiv, a: a, b: b})
}

// isPow2 reports whether |c| is a power of two (in the normal range).
func isPow2(c float64) bool {
	frac, exp := math.Frexp(math.Abs(c))
	return frac == 0.5 && exp > -1000 && exp < 1000
}

// Pow returns a^b, with constants folded, a^1 = a, a^0 = 1 and 1^b = 1.
func (g *Graph) Pow(a, b Expr) Expr {
	ca, oka := g.Value(a)
	cb, okb := g.Value(b)
	if oka && okb {
		if e, ok := g.fold(pow(ca, cb)); ok { // the evaluators' own power, so a folded constant has their bits
			return e
		}
	}
	switch {
	case okb && cb == 1:
		return a
	case okb && cb == 0:
		return g.Const(1)
	case oka && ca == 1:
		return g.Const(1)
	}
	return g.intern(node{op: OpPow, a: a, b: b})
}

// Func1 returns op(a) for a one-operand function (OpSin ... OpStep), folding
// a constant operand.
func (g *Graph) Func1(op Op, a Expr) Expr {
	if op.arity() != 1 || op == OpNeg {
		if op == OpNeg {
			return g.Neg(a)
		}
		panic("expr: Func1 with a non-unary operation")
	}
	if c, ok := g.Value(a); ok {
		if e, ok := g.fold(eval1(op, c)); ok {
			return e
		}
	}
	if op == OpAbs && g.nodes[a].op == OpAbs {
		return a
	}
	return g.intern(node{op: op, a: a})
}

// Func2 returns op(a, b) for a two-operand operation, folding constants.
func (g *Graph) Func2(op Op, a, b Expr) Expr {
	switch op {
	case OpAdd:
		return g.Add(a, b)
	case OpSub:
		return g.Sub(a, b)
	case OpMul:
		return g.Mul(a, b)
	case OpDiv:
		return g.Div(a, b)
	case OpPow:
		return g.Pow(a, b)
	case OpAtan2, OpMin, OpMax:
	default:
		panic("expr: Func2 with a non-binary operation")
	}
	ca, oka := g.Value(a)
	cb, okb := g.Value(b)
	if oka && okb {
		if e, ok := g.fold(eval2(op, ca, cb)); ok {
			return e
		}
	}
	if (op == OpMin || op == OpMax) && a == b {
		return a
	}
	return g.intern(node{op: op, a: a, b: b})
}

// build applies op to args through the simplifying constructors.
func (g *Graph) build(op Op, a, b Expr) Expr {
	switch op.arity() {
	case 1:
		return g.Func1(op, a)
	case 2:
		return g.Func2(op, a, b)
	}
	panic("expr: build of a leaf")
}

// Uses reports which variable slots e depends on.
func (g *Graph) Uses(e Expr) []bool {
	used := make([]bool, len(g.vars))
	for _, v := range g.Slots(e) {
		used[v] = true
	}
	return used
}
