package expr

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"

	"github.com/Knetic/govaluate"
)

type nodeKind uint8

const (
	nNum nodeKind = iota
	nStr
	nBool
	nVar
	nCall
	nUnary
	nBinary
	nTernary
)

// node is the parsed expression tree.
type node struct {
	kind nodeKind
	num  float64
	str  string // string value, variable or function name, or operator
	b    bool
	args []*node // call arguments, or operands
	fn   govaluate.ExpressionFunction
}

// parser is a recursive-descent parser over the tokens of one expression.
type parser struct {
	src   string
	toks  []token
	i     int
	funcs map[string]Func
	idArg map[string]bool
	depth int // nesting of unary (limits.go)
	vars  []Ref
	calls []Ref
	ops   []opRef
}

func (p *parser) peek() *token { return &p.toks[p.i] }

func (p *parser) advance() *token {
	t := &p.toks[p.i]
	if t.kind != tEOF {
		p.i++
	}
	return t
}

func (p *parser) isOp(ops ...string) bool {
	t := p.peek()
	return t.kind == tOp && slices.Contains(ops, t.text)
}

func (p *parser) text(t *token) string {
	if t.kind == tEOF {
		return "end"
	}
	return p.src[t.pos:t.end]
}

func (p *parser) parse() (*node, *Error) {
	if p.toks[0].kind == tEOF {
		return nil, &Error{Msg: "empty expression"}
	}
	if err := p.balance(); err != nil {
		return nil, err
	}
	n, err := p.ternary()
	if err != nil {
		return nil, err
	}
	if t := p.peek(); t.kind != tEOF {
		return nil, p.unexpected(t, "")
	}
	return n, nil
}

// balance checks the parentheses before parsing, so that a missing or an
// extra one is reported where it is.
func (p *parser) balance() *Error {
	var open []int
	for _, t := range p.toks {
		switch t.kind {
		case tLParen:
			open = append(open, t.pos)
		case tRParen:
			if len(open) == 0 {
				return &Error{Col: t.pos, Msg: `unexpected ")" without a matching "("`}
			}
			open = open[:len(open)-1]
		}
	}
	if len(open) > 0 {
		return &Error{Col: open[len(open)-1], Msg: `this "(" is never closed: a ")" is missing`}
	}
	return nil
}

// unexpected reports token t, found after a complete value where an
// operator, the end or one of want was expected.
func (p *parser) unexpected(t *token, want string) *Error {
	switch t.kind {
	case tComma:
		if p.toks[p.i-1].kind == tNum && p.toks[p.i+1].kind == tNum {
			return &Error{Col: t.pos, Msg: `unexpected ","; a thousands separator takes groups of exactly three digits (1,250,000)`}
		}
		return &Error{Col: t.pos, Msg: `unexpected "," outside the parentheses of a function call`}
	case tNum, tStr, tIdent, tLParen:
		return &Error{Col: t.pos, Msg: fmt.Sprintf("expected an operator%s before %q", want, p.text(t))}
	case tOp:
		if t.text == ":" {
			return &Error{Col: t.pos, Msg: `unexpected ":" without a "?" before it (write c ? a : b)`}
		}
		return &Error{Col: t.pos, Msg: fmt.Sprintf("unexpected %q", p.text(t))}
	}
	return &Error{Col: t.pos, Msg: fmt.Sprintf("unexpected %q", p.text(t))}
}

// missingValue reports token t, found where a value was expected.
func (p *parser) missingValue(t *token) *Error {
	if p.i == 0 {
		return &Error{Col: t.pos, Msg: fmt.Sprintf("expected a value before %q", p.text(t))}
	}
	prev := &p.toks[p.i-1]
	hint := ""
	if prev.kind == tOp && prev.text == "%" {
		if p.i >= 2 && p.toks[p.i-2].kind == tNum && p.toks[p.i-2].end == prev.pos {
			hint = " (a number takes only one of the suffixes k, M and %)"
		} else {
			hint = " (a % that does not directly follow a number is the remainder operator; write 7% with no space)"
		}
	}
	if t.kind == tEOF {
		return &Error{Col: prev.pos, Msg: fmt.Sprintf("the expression ends too early: expected a value after %q%s", p.text(prev), hint)}
	}
	return &Error{Col: t.pos, Msg: fmt.Sprintf("expected a value between %q and %q%s", p.text(prev), p.text(t), hint)}
}

func (p *parser) ternary() (*node, *Error) {
	c, err := p.or()
	if err != nil || !p.isOp("?") {
		return c, err
	}
	q := p.advance()
	a, err := p.ternary()
	if err != nil {
		return nil, err
	}
	if !p.isOp(":") {
		t := p.peek()
		where := ""
		if t.kind != tEOF {
			where = fmt.Sprintf(" before %q", p.text(t))
		}
		return nil, &Error{Col: t.pos, Msg: fmt.Sprintf(`expected ":"%s (write condition ? value if true : value if false)`, where)}
	}
	colon := p.advance()
	b, err := p.ternary()
	if err != nil {
		return nil, err
	}
	p.record(q, govaluate.TERNARY)
	p.record(colon, govaluate.TERNARY)
	return &node{kind: nTernary, args: []*node{c, a, b}}, nil
}

// leftAssoc parses operands joined by left-associative operators.
func (p *parser) leftAssoc(next func() (*node, *Error), ops ...string) (*node, *Error) {
	l, err := next()
	for err == nil && p.isOp(ops...) {
		op := p.advance()
		var r *node
		if r, err = next(); err == nil {
			l = p.binary(op, l, r)
		}
	}
	return l, err
}

func (p *parser) or() (*node, *Error) { return p.leftAssoc(p.and, "||") }

func (p *parser) and() (*node, *Error) { return p.leftAssoc(p.compare, "&&") }

var comparisons = []string{"==", "!=", "<", "<=", ">", ">="}

func (p *parser) compare() (*node, *Error) {
	l, err := p.add()
	if err != nil || !p.isOp(comparisons...) {
		return l, err
	}
	op := p.advance()
	r, err := p.add()
	if err != nil {
		return nil, err
	}
	if p.isOp(comparisons...) {
		return nil, &Error{Col: p.peek().pos, Msg: "comparisons cannot be chained; join them with && (a < b && b < c)"}
	}
	return p.binary(op, l, r), nil
}

func (p *parser) add() (*node, *Error) { return p.leftAssoc(p.mul, "+", "-") }

func (p *parser) mul() (*node, *Error) { return p.leftAssoc(p.unary, "*", "/", "%") }

func (p *parser) unary() (*node, *Error) {
	// Every nested level passes through here (limits.go).
	if err := p.enter(p.peek()); err != nil {
		return nil, err
	}
	defer p.leave()
	if !p.isOp("-", "+", "!") {
		return p.power()
	}
	op := p.advance()
	x, err := p.unary()
	if err != nil {
		return nil, err
	}
	switch {
	case op.text == "+":
		return x, nil
	case op.text == "-" && x.kind == nNum:
		return &node{kind: nNum, num: -x.num}, nil
	}
	p.record(op, govaluate.PREFIX)
	return &node{kind: nUnary, str: op.text, args: []*node{x}}, nil
}

// power is right-associative, and its exponent may carry a sign: 2^-1.
func (p *parser) power() (*node, *Error) {
	base, err := p.primary()
	if err != nil || !p.isOp("**") {
		return base, err
	}
	op := p.advance()
	exp, err := p.unary()
	if err != nil {
		return nil, err
	}
	return p.binary(op, base, exp), nil
}

func (p *parser) primary() (*node, *Error) {
	t := p.peek()
	switch t.kind {
	case tNum:
		p.advance()
		return &node{kind: nNum, num: t.num}, nil
	case tStr:
		p.advance()
		return &node{kind: nStr, str: t.text}, nil
	case tIdent:
		p.advance()
		if p.peek().kind == tLParen {
			return p.call(t)
		}
		if t.text == "true" || t.text == "false" {
			return &node{kind: nBool, b: t.text == "true"}, nil
		}
		if _, ok := p.funcs[t.text]; ok {
			return nil, &Error{Col: t.pos, Msg: fmt.Sprintf("%s is a function; call it with parentheses: %s(...)", t.text, t.text)}
		}
		p.vars = append(p.vars, Ref{Name: t.text, Col: t.pos})
		return &node{kind: nVar, str: t.text}, nil
	case tLParen:
		p.advance()
		n, err := p.ternary()
		if err != nil {
			return nil, err
		}
		if c := p.peek(); c.kind != tRParen {
			return nil, p.unexpected(c, ` or ")"`)
		}
		p.advance()
		return n, nil
	}
	return nil, p.missingValue(t)
}

func (p *parser) call(name *token) (*node, *Error) {
	f, ok := p.funcs[name.text]
	if !ok {
		known := make([]string, 0, len(p.funcs))
		for k := range p.funcs {
			known = append(known, k)
		}
		sort.Strings(known)
		return nil, &Error{Col: name.pos, Msg: unknownMsg("function", name.text, known)}
	}
	p.calls = append(p.calls, Ref{Name: name.text, Col: name.pos})
	p.advance() // (
	n := &node{kind: nCall, str: name.text}
	hint := ""
	if p.peek().kind == tRParen {
		p.advance()
	} else {
		for {
			if t := p.peek(); t.kind == tNum && t.grouped && (p.toks[p.i+1].kind == tComma || p.toks[p.i+1].kind == tRParen) {
				hint += fmt.Sprintf(" (note: %q is read as one number, %s, because a comma followed by three digits is a thousands separator; put a space after the comma to separate arguments)",
					p.text(t), strconv.FormatFloat(t.num, 'f', -1, 64))
			}
			a, err := p.arg(name.text)
			if err != nil {
				return nil, err
			}
			n.args = append(n.args, a)
			t := p.peek()
			if t.kind == tComma {
				p.advance()
				continue
			}
			if t.kind != tRParen {
				return nil, p.unexpected(t, `, "," or ")"`)
			}
			p.advance()
			break
		}
	}
	n.fn = callFunc(name.text, name.pos, f, hint)
	return n, nil
}

// arg parses one argument of function fn; for the id-argument functions a
// bare identifier is an id, passed as a string.
func (p *parser) arg(fn string) (*node, *Error) {
	t := p.peek()
	if !p.idArg[fn] || t.kind != tIdent {
		return p.ternary()
	}
	ends := func(k tokKind) bool { return k == tComma || k == tRParen }
	if ends(p.toks[p.i+1].kind) {
		p.advance()
		return &node{kind: nStr, str: t.text}, nil
	}
	// an id holding "-" written bare: pw(wedge-wire)
	j, end := p.i, t.end
	for {
		m, w := &p.toks[j+1], &p.toks[j+2]
		if m.kind != tOp || m.text != "-" || m.pos != end || (w.kind != tIdent && w.kind != tNum) || w.pos != m.end {
			break
		}
		j, end = j+2, w.end
	}
	if j > p.i && ends(p.toks[j+1].kind) {
		return nil, &Error{Col: t.pos, Msg: fmt.Sprintf("an id holding \"-\" must be quoted: %s(%q)", fn, p.src[t.pos:end])}
	}
	return p.ternary()
}

// record keeps an operator's position for evaluation errors.
func (p *parser) record(op *token, kind govaluate.TokenKind) {
	p.ops = append(p.ops, opRef{kind: kind, symbol: op.text, text: p.text(op), col: op.pos})
}

func (p *parser) binary(op *token, l, r *node) *node {
	if l.kind == nNum && r.kind == nNum {
		// Fix (limits): a constant that is not finite (1/0) is left to
		// the checked operation, which reports it at the operator.
		if v, ok := fold(op.text, l.num, r.num); ok && finite(v) {
			return &node{kind: nNum, num: v}
		}
	}
	p.record(op, gvKind(op.text))
	if checked(op.text) {
		// Division, remainder and power report a result that is not a
		// finite number at the operator (checked.go).
		return &node{kind: nCall, str: op.text, args: []*node{l, r}, fn: checkedOp(op.text, p.text(op), op.pos)}
	}
	return &node{kind: nBinary, str: op.text, args: []*node{l, r}}
}

// fold computes arithmetic on two constants at compile time, exactly as
// govaluate would at run time.
func fold(op string, a, b float64) (float64, bool) {
	switch op {
	case "+":
		return a + b, true
	case "-":
		return a - b, true
	case "*":
		return a * b, true
	case "/":
		return a / b, true
	case "%":
		return math.Mod(a, b), true
	case "**":
		return math.Pow(a, b), true
	}
	return 0, false
}

func gvKind(op string) govaluate.TokenKind {
	switch op {
	case "==", "!=", "<", "<=", ">", ">=":
		return govaluate.COMPARATOR
	case "&&", "||":
		return govaluate.LOGICALOP
	case "?", ":":
		return govaluate.TERNARY
	case "!":
		return govaluate.PREFIX
	}
	return govaluate.MODIFIER
}

// emitter writes the tree as govaluate tokens. Every operand that is itself
// an operation is put in parentheses, so govaluate's precedence and
// associativity rules never come into play: the tree decides.
type emitter struct {
	toks []govaluate.ExpressionToken
}

func (em *emitter) add(kind govaluate.TokenKind, v any) {
	em.toks = append(em.toks, govaluate.ExpressionToken{Kind: kind, Value: v})
}

func (em *emitter) emit(n *node, wrap bool) {
	switch n.kind {
	case nNum:
		em.add(govaluate.NUMERIC, n.num)
		return
	case nStr:
		em.add(govaluate.STRING, n.str)
		return
	case nBool:
		em.add(govaluate.BOOLEAN, n.b)
		return
	case nVar:
		em.add(govaluate.VARIABLE, n.str)
		return
	case nCall:
		em.add(govaluate.FUNCTION, n.fn)
		em.add(govaluate.CLAUSE, '(')
		for i, a := range n.args {
			if i > 0 {
				em.add(govaluate.SEPARATOR, ",")
			}
			em.emit(a, true)
		}
		em.add(govaluate.CLAUSE_CLOSE, ')')
		return
	}
	if wrap {
		em.add(govaluate.CLAUSE, '(')
	}
	switch n.kind {
	case nUnary:
		em.add(govaluate.PREFIX, n.str)
		em.emit(n.args[0], true)
	case nBinary:
		em.emit(n.args[0], true)
		em.add(gvKind(n.str), n.str)
		em.emit(n.args[1], true)
	case nTernary:
		// govaluate's c ? a yields a or nothing, and x : b yields x unless
		// it is nothing; so (c ? a) : b is the conditional.
		em.add(govaluate.CLAUSE, '(')
		em.emit(n.args[0], true)
		em.add(govaluate.TERNARY, "?")
		em.emit(n.args[1], true)
		em.add(govaluate.CLAUSE_CLOSE, ')')
		em.add(govaluate.TERNARY, ":")
		em.emit(n.args[2], true)
	}
	if wrap {
		em.add(govaluate.CLAUSE_CLOSE, ')')
	}
}
