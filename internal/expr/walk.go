package expr

import (
	"fmt"
	"slices"
)

// Walks over a graph never recurse: a formula of a million chained
// operations is a path of a million nodes, deeper than any stack. They go
// by explicit stacks or by node number (operands come before their users).

// SetLimits bounds what the graph may grow to, for formulas from untrusted
// input. Parse fails with ErrTooLarge once the graph holds more than
// maxNodes nodes; Derivative fails with ErrTooLarge once the graph holds
// more than maxNodes nodes or its calls together have visited more than
// maxWork nodes (each call visits the nodes of its formula). Zero means no bound. Diff ignores the
// limits.
func (g *Graph) SetLimits(maxNodes, maxWork int) {
	g.maxNodes, g.maxWork = maxNodes, maxWork
}

// reachable returns the nodes reachable from roots for which skip (if not
// nil) is false, in increasing order, so operands come before their users.
// A node for which skip is true is neither returned nor walked through.
func (g *Graph) reachable(roots []Expr, skip func(Expr) bool) []Expr {
	// seen[x] == g.stamp marks the nodes of this walk: no clearing, no
	// hashing.
	g.stamp++
	if g.stamp == 0 { // wrapped: start the marks afresh
		clear(g.seen)
		g.stamp = 1
	}
	if len(g.seen) < len(g.nodes) {
		g.seen = append(g.seen, make([]uint32, len(g.nodes)-len(g.seen))...)
	}
	seen, stamp := g.seen, g.stamp
	var out []Expr
	stack := append([]Expr(nil), roots...)
	for len(stack) > 0 {
		e := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if seen[e] == stamp {
			continue
		}
		seen[e] = stamp
		if skip != nil && skip(e) {
			continue
		}
		out = append(out, e)
		n := g.nodes[e]
		switch n.op.arity() {
		case 1:
			stack = append(stack, n.a)
		case 2:
			stack = append(stack, n.a, n.b)
		}
	}
	slices.Sort(out)
	return out
}

// Slots returns the variable slots e depends on, in increasing order. It
// costs time in proportion to the nodes reachable from e, not to the number
// of variables of the graph.
func (g *Graph) Slots(e Expr) []int {
	var slots []int
	for _, x := range g.reachable([]Expr{e}, nil) {
		if n := g.nodes[x]; n.op == OpVar {
			slots = append(slots, int(n.a))
		}
	}
	slices.Sort(slots)
	return slots
}

// Derivative is Diff within the limits set by SetLimits: past them it
// returns an error wrapping ErrTooLarge (the graph keeps the derivatives
// made so far, which stay valid).
func (g *Graph) Derivative(e Expr, v int) (Expr, error) {
	if v < 0 || v >= len(g.vars) {
		return 0, fmt.Errorf("expr: derivative by variable slot %d of %d", v, len(g.vars))
	}
	return g.diffWalk(e, v, true)
}

// diffWalk differentiates e by slot v: it differentiates every node of e,
// operands first, into g.dval (where diff finds the operands'
// derivatives), and memoizes the result for e. With limited set it stops
// at the graph's limits. Only the roots are memoized: a walk costs the
// size of its formula, and a graph of millions of nodes needs no memo of
// millions of (node, variable) pairs.
func (g *Graph) diffWalk(e Expr, v int, limited bool) (Expr, error) {
	key := [2]int32{int32(e), int32(v)}
	if d, ok := g.diffs[key]; ok {
		return d, nil
	}
	order := g.reachable([]Expr{e}, nil)
	if limited {
		g.work += len(order)
		if g.maxWork > 0 && g.work > g.maxWork {
			return 0, fmt.Errorf("expr: differentiating the formulas takes more than the limit of %d steps: %w", g.maxWork, ErrTooLarge)
		}
	}
	if len(g.dval) < len(g.nodes) {
		g.dval = append(g.dval, make([]Expr, len(g.nodes)-len(g.dval))...)
	}
	for _, x := range order {
		g.dval[x] = g.diffRule(x, v)
		if limited && g.maxNodes > 0 && len(g.nodes) > g.maxNodes {
			return 0, fmt.Errorf("expr: the formulas and their derivatives are larger than the limit of %d nodes: %w", g.maxNodes, ErrTooLarge)
		}
	}
	d := g.dval[e]
	g.diffs[key] = d
	return d, nil
}

// zeroOne returns the constants 0 and 1, made once.
func (g *Graph) zeroOne() (Expr, Expr) {
	if !g.haveZO {
		g.zero, g.one, g.haveZO = g.Const(0), g.Const(1), true
	}
	return g.zero, g.one
}
