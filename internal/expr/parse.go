package expr

import (
	"math"
	"strconv"
	"unicode"
	"unicode/utf8"
)

// Grammar of formulas (ordinary infix mathematics; spaces, tabs and newlines
// are ignored between tokens):
//
//	sum     = product { ("+" | "-") product }
//	product = unary { ("*" | "/") unary }
//	unary   = ("-" | "+") unary | power
//	power   = primary [ "^" unary ]        (right-associative: a^b^c = a^(b^c))
//	primary = number | name | name "(" sum { "," sum } ")" | "(" sum ")"
//	number  = digits [ "." digits ] [ ("e" | "E") [ "+" | "-" ] digits ]  (or "." digits ...)
//	name    = letter { letter | digit | "_" }    (letters include "_")
//
// Unary minus binds looser than ^ (-x^2 = -(x^2)) and tighter than * and /.
// Names are the graph's variables, the constant pi, and the functions
//
//	sin cos tan exp log sqrt abs tanh sinh cosh atan sign step   (one argument)
//	atan2(y, x)  pow(x, y)  min(x, y)  max(x, y)                  (two arguments)
//
// log is the natural logarithm. sign(x) is -1, 0, 1; step(x) is 1 for x >= 0
// and 0 otherwise (they appear in the derivatives of abs, min and max).

// maxDepth bounds the nesting of parentheses, function calls and exponents
// (each is one level; signs and chains of + - * / are read in loops and cost
// none), so that hostile input cannot exhaust the stack.
const maxDepth = 1000

// maxListed is how many variables an unknown-name error lists.
const maxListed = 20

type parser struct {
	g     *Graph
	src   string
	pos   int // byte offset of the next unread character
	depth int
}

// Parse reads one formula over the graph's variables and returns its node.
// Errors are *ParseError values wrapping ErrSyntax, ErrUnknown, ErrArity or
// (past the limit set by SetLimits) ErrTooLarge. Parse uses stack space in
// proportion to the nesting (at most maxDepth = 1000 levels), not to the
// length of the formula.
func (g *Graph) Parse(src string) (Expr, error) {
	p := &parser{g: g, src: src}
	e, err := p.sum()
	if err != nil {
		return 0, err
	}
	p.space()
	if p.pos < len(p.src) {
		r, _ := utf8.DecodeRuneInString(p.src[p.pos:])
		return 0, p.errAt(p.pos, ErrSyntax, "unexpected %q after the end of the formula", r)
	}
	if err := p.grown(p.pos); err != nil {
		return 0, err
	}
	return e, nil
}

func (p *parser) errAt(pos int, err error, format string, args ...any) error {
	return newError(p.src, pos, err, format, args...)
}

func (p *parser) space() {
	for p.pos < len(p.src) {
		switch p.src[p.pos] {
		case ' ', '\t', '\n', '\r':
			p.pos++
		default:
			return
		}
	}
}

// peek returns the next non-space byte, or 0 at the end.
func (p *parser) peek() byte {
	p.space()
	if p.pos < len(p.src) {
		return p.src[p.pos]
	}
	return 0
}

func (p *parser) enter() error {
	p.depth++
	if p.depth > maxDepth {
		return p.errAt(p.pos, ErrSyntax, "formula nested deeper than %d levels (of parentheses, function calls and exponents)", maxDepth)
	}
	return nil
}

// grown reports a graph that outgrew its node limit (see Graph.SetLimits),
// at byte offset pos.
func (p *parser) grown(pos int) error {
	if g := p.g; g.maxNodes > 0 && len(g.nodes) > g.maxNodes {
		return p.errAt(pos, ErrTooLarge, "the formulas are larger than the limit of %d nodes (distinct numbers, names and operations)", g.maxNodes)
	}
	return nil
}

func (p *parser) sum() (Expr, error) {
	a, err := p.product()
	if err != nil {
		return 0, err
	}
	for {
		switch p.peek() {
		case '+':
			p.pos++
			b, err := p.product()
			if err != nil {
				return 0, err
			}
			a = p.g.Add(a, b)
			if err := p.grown(p.pos); err != nil {
				return 0, err
			}
		case '-':
			p.pos++
			b, err := p.product()
			if err != nil {
				return 0, err
			}
			a = p.g.Sub(a, b)
			if err := p.grown(p.pos); err != nil {
				return 0, err
			}
		default:
			return a, nil
		}
	}
}

func (p *parser) product() (Expr, error) {
	a, err := p.unary()
	if err != nil {
		return 0, err
	}
	for {
		switch p.peek() {
		case '*':
			p.pos++
			b, err := p.unary()
			if err != nil {
				return 0, err
			}
			a = p.g.Mul(a, b)
			if err := p.grown(p.pos); err != nil {
				return 0, err
			}
		case '/':
			p.pos++
			b, err := p.unary()
			if err != nil {
				return 0, err
			}
			a = p.g.Div(a, b)
			if err := p.grown(p.pos); err != nil {
				return 0, err
			}
		default:
			return a, nil
		}
	}
}

// unary reads the signs in a loop: -(-a) is a in the graph, so only the
// parity of the minus signs matters.
func (p *parser) unary() (Expr, error) {
	neg := false
	for {
		switch p.peek() {
		case '-':
			neg = !neg
			p.pos++
			continue
		case '+':
			p.pos++
			continue
		}
		break
	}
	a, err := p.power()
	if err != nil || !neg {
		return a, err
	}
	return p.g.Neg(a), nil
}

func (p *parser) power() (Expr, error) {
	a, err := p.primary()
	if err != nil {
		return 0, err
	}
	if p.peek() == '^' {
		if err := p.enter(); err != nil {
			return 0, err
		}
		defer func() { p.depth-- }()
		p.pos++
		b, err := p.unary()
		if err != nil {
			return 0, err
		}
		return p.g.Pow(a, b), nil
	}
	return a, nil
}

func isLetter(r rune) bool { return r == '_' || unicode.IsLetter(r) }

func (p *parser) primary() (Expr, error) {
	c := p.peek()
	start := p.pos
	switch {
	case c == 0:
		return 0, p.errAt(start, ErrSyntax, "formula ends where a number, name or ( was expected")
	case c == '(':
		if err := p.enter(); err != nil {
			return 0, err
		}
		defer func() { p.depth-- }()
		p.pos++
		e, err := p.sum()
		if err != nil {
			return 0, err
		}
		if p.peek() != ')' {
			return 0, p.errAt(p.pos, ErrSyntax, "missing ) to close the ( at column %d", newError(p.src, start, nil, "").Col)
		}
		p.pos++
		return e, nil
	case c >= '0' && c <= '9' || c == '.':
		return p.number()
	}
	r, _ := utf8.DecodeRuneInString(p.src[p.pos:])
	if !isLetter(r) {
		return 0, p.errAt(start, ErrSyntax, "unexpected %q where a number, name or ( was expected", r)
	}
	name := p.name()
	if p.peek() == '(' {
		return p.call(name, start)
	}
	if name == "pi" {
		return p.g.Const(math.Pi), nil
	}
	if i, ok := p.g.slot[name]; ok {
		return p.g.Var(i), nil
	}
	if _, ok := lookupFunc(name); ok {
		return 0, p.errAt(start, ErrSyntax, "function %s needs its arguments in parentheses", name)
	}
	var known []string
	more := 0
	for _, v := range p.g.vars {
		switch {
		case v == "":
		case len(known) < maxListed:
			known = append(known, v)
		default:
			more++
		}
	}
	if more > 0 {
		return 0, p.errAt(start, ErrUnknown, "unknown name %q (variables: %v and %d more)", name, known, more)
	}
	return 0, p.errAt(start, ErrUnknown, "unknown name %q (variables: %v)", name, known)
}

func (p *parser) name() string {
	start := p.pos
	for p.pos < len(p.src) {
		r, n := utf8.DecodeRuneInString(p.src[p.pos:])
		if !isLetter(r) && !unicode.IsDigit(r) {
			break
		}
		p.pos += n
	}
	return p.src[start:p.pos]
}

func (p *parser) number() (Expr, error) {
	start := p.pos
	digits := func() int {
		n := 0
		for p.pos < len(p.src) && p.src[p.pos] >= '0' && p.src[p.pos] <= '9' {
			p.pos++
			n++
		}
		return n
	}
	n := digits()
	if p.pos < len(p.src) && p.src[p.pos] == '.' {
		p.pos++
		n += digits()
	}
	if n == 0 {
		return 0, p.errAt(start, ErrSyntax, "a number needs at least one digit")
	}
	if p.pos < len(p.src) && (p.src[p.pos] == 'e' || p.src[p.pos] == 'E') {
		p.pos++
		if p.pos < len(p.src) && (p.src[p.pos] == '+' || p.src[p.pos] == '-') {
			p.pos++
		}
		if digits() == 0 {
			return 0, p.errAt(p.pos, ErrSyntax, "exponent of the number at column %d has no digits", newError(p.src, start, nil, "").Col)
		}
	}
	if p.pos < len(p.src) {
		if r, _ := utf8.DecodeRuneInString(p.src[p.pos:]); isLetter(r) {
			return 0, p.errAt(p.pos, ErrSyntax, "a name cannot start right after a number (write 2*x, not 2x)")
		}
	}
	v, err := strconv.ParseFloat(p.src[start:p.pos], 64)
	if err != nil {
		return 0, p.errAt(start, ErrSyntax, "number %s is out of the float64 range", p.src[start:p.pos])
	}
	return p.g.Const(v), nil
}

func (p *parser) call(name string, start int) (Expr, error) {
	op, ok := lookupFunc(name)
	if !ok {
		return 0, p.errAt(start, ErrUnknown, "unknown function %q", name)
	}
	if err := p.enter(); err != nil {
		return 0, err
	}
	defer func() { p.depth-- }()
	p.pos++ // (
	var args []Expr
	for {
		a, err := p.sum()
		if err != nil {
			return 0, err
		}
		args = append(args, a)
		c := p.peek()
		if c == ',' {
			p.pos++
			continue
		}
		if c != ')' {
			return 0, p.errAt(p.pos, ErrSyntax, "expected , or ) in the arguments of %s", name)
		}
		p.pos++
		break
	}
	if want := op.arity(); len(args) != want {
		return 0, p.errAt(start, ErrArity, "%s takes %d argument(s), got %d", name, want, len(args))
	}
	if len(args) == 1 {
		return p.g.Func1(op, args[0]), nil
	}
	return p.g.Func2(op, args[0], args[1]), nil
}
