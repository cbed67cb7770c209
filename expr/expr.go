// Package expr compiles and evaluates the expressions of a worth memo
// (`first cost: $480,000`, `annual cost: power_kwh * power_price`,
// `pw(steel) > -1.5M`). It is the only package that uses govaluate.
//
// The source is read by a small lexer and parser in this package, which keep
// byte offsets into the original text so that every error points at the
// right column; the parsed expression is then handed to govaluate as a token
// stream (govaluate.NewEvaluableExpressionFromTokens) and govaluate evaluates
// it. govaluate's own text lexer is never used, so its quirks (glued
// operators such as `*-`, backslash escapes that panic, strings that turn
// into dates) do not reach memo authors.
//
// # Numbers
//
// A number literal is written in one of these forms:
//
//	480000   0.11   .5   1e6   2.5e-3
//	$480,000   €1,250,000.50   £12   ¥900     (a leading $, €, £ or ¥ is dropped)
//	480k  1.2M                                (k = ×1,000, M = ×1,000,000)
//	7%   2.5%                                 (N% = N/100: 7% is 0.07)
//
// A comma is a thousands separator when it stands between digits of the
// integer part and is followed by exactly three digits (and then no further
// digit): `1,250,000` is 1250000. Every other comma separates function
// arguments; a comma followed by a space always does. So `pf(7%, 10)` has two
// arguments, while `pf(7,100)` reads as pf(7100) — one argument. When a call
// with such a number fails (typically because the function wants two
// arguments), the error message says how the number was read.
//
// The suffixes k, M and % must follow the digits directly; only one of them
// may be used. A name directly after a number (`480kg`, `2x`) is an error. A
// `%` that does not directly follow a number is the remainder operator
// (`a % b`).
//
// # Operators
//
// From lowest to highest precedence:
//
//	c ? a : b          conditional (c must be true or false)
//	||                 or
//	&&                 and
//	== != < <= > >=    comparisons of two numbers or two strings; not chainable
//	+ -                (+ also joins strings)
//	* / %              % is the remainder
//	- + !              unary minus, plus, not
//	^ **               power, right-associative: 2^3^2 = 2^9
//
// `^` is the power operator, as engineers write (1+i)^n; it never means
// govaluate's bitwise exclusive-or. Unary minus binds looser than power, as
// in mathematics: -2^2 = -4, and 2^-1 = 0.5. Parentheses group. Strings are
// written in double or single quotes; true and false are the boolean
// constants.
//
// # Functions and ids
//
// Every callable function is supplied by the caller in Options.Funcs; there
// are no built-in ones. A function is called with parentheses, `pf(7%, 10)`;
// an unknown function is an error that suggests the closest known name. For
// the functions listed in Options.IDArgFuncs a bare identifier argument is an
// id, passed as a string: `pw(steel)` is pw("steel"). Ids holding a `-` must
// be quoted: pw("wedge-wire").
//
// # Errors
//
// Compile and Eval return *Error, whose Col is the 0-based byte offset in the
// original source of the problem (0 when unknown). Evaluation errors point at
// the call whose Func failed, at the first use of an unknown name (with a
// suggestion from the names supplied), or at the first operator of the kind
// that got a value of the wrong type. Neither function panics, whatever the
// input: panics inside govaluate or inside a Func are recovered into *Error.
//
// A function name used without parentheses is an error, not a variable.
package expr

import (
	"errors"
	"fmt"
	"math"
	"regexp"
	"slices"
	"sort"
	"strings"

	"github.com/Knetic/govaluate"
)

// Func is a function callable from expressions. Args are float64 or string
// (or bool, when the author passes a condition). It should return a float64,
// string or bool.
type Func func(args ...any) (any, error)

// Options for Compile.
type Options struct {
	// Funcs holds every callable function, by name.
	Funcs map[string]Func
	// IDArgFuncs lists functions whose bare-identifier arguments are ids:
	// pw(steel) is compiled as pw("steel").
	IDArgFuncs []string
}

// Error is a compile or evaluation error. Col is the 0-based byte offset in
// the original source text where the problem is (best effort; 0 if unknown).
type Error struct {
	Col int
	Msg string
}

// Error returns the message without the column; callers add their own
// file:line:col prefix.
func (e *Error) Error() string { return e.Msg }

// Ref is a use of a name at 0-based byte offset Col in the original source.
type Ref struct {
	Name string
	Col  int
}

// Expr is a compiled expression. It is safe for concurrent use by multiple
// goroutines (its Funcs are then called concurrently too).
type Expr struct {
	src   string
	ge    *govaluate.EvaluableExpression
	konst any // the value, when the whole expression is a constant
	vars  []Ref
	calls []Ref
	ops   []opRef
}

// opRef records an operator of the source, for placing evaluation errors.
type opRef struct {
	kind   govaluate.TokenKind
	symbol string // as govaluate spells it ("**" for ^)
	text   string // as written in the source
	col    int
}

// Compile parses src. On failure the error is an *Error.
func Compile(src string, opt Options) (ex *Expr, err error) {
	defer func() {
		if r := recover(); r != nil {
			ex, err = nil, &Error{Msg: fmt.Sprintf("cannot read expression: %v", r)}
		}
	}()
	if len(src) > MaxLen {
		return nil, tooLong(src) // limits.go
	}
	toks, lerr := lex(src)
	if lerr != nil {
		return nil, lerr
	}
	p := &parser{src: src, toks: toks, funcs: opt.Funcs, idArg: map[string]bool{}}
	for _, name := range opt.IDArgFuncs {
		p.idArg[name] = true
	}
	root, perr := p.parse()
	if perr != nil {
		return nil, perr
	}
	slices.SortFunc(p.ops, func(a, b opRef) int { return a.col - b.col })
	ex = &Expr{src: src, vars: p.vars, calls: p.calls, ops: p.ops}
	switch root.kind {
	case nNum:
		ex.konst = root.num
		return ex, nil
	case nStr:
		ex.konst = root.str
		return ex, nil
	case nBool:
		ex.konst = root.b
		return ex, nil
	}
	var em emitter
	em.emit(root, false)
	ge, gerr := govaluate.NewEvaluableExpressionFromTokens(em.toks)
	if gerr != nil {
		return nil, &Error{Msg: plain(gerr.Error())}
	}
	ex.ge = ge
	return ex, nil
}

// Source returns the text the expression was compiled from.
func (e *Expr) Source() string { return e.src }

// Vars returns every use of a variable, in source order, with its position.
// Function names and id arguments (pw(steel)) are not variables.
func (e *Expr) Vars() []Ref { return slices.Clone(e.vars) }

// Calls returns every function call, in source order, with the position of
// the function name.
func (e *Expr) Calls() []Ref { return slices.Clone(e.calls) }

// params gives govaluate the caller's map without copying it.
type params map[string]any

// missingVar is returned by params.Get; Eval turns it into an *Error.
type missingVar struct{ name string }

func (m *missingVar) Error() string { return "unknown name " + m.name }

func (p params) Get(name string) (any, error) {
	v, ok := p[name]
	if !ok {
		return nil, &missingVar{name}
	}
	if f, ok := v.(float32); ok {
		return float64(f), nil
	}
	return v, nil
}

// Eval evaluates the expression with the given variable values (float64,
// float32 or any Go integer type, string or bool). The result is a float64, a bool
// or a string. Eval never panics; every error is an *Error.
func (e *Expr) Eval(vars map[string]any) (res any, err error) {
	if e.ge == nil {
		return e.konst, nil
	}
	defer func() {
		if r := recover(); r != nil {
			res, err = nil, &Error{Msg: fmt.Sprintf("cannot evaluate %q: %v", e.src, r)}
		}
	}()
	res, err = e.ge.Eval(params(vars))
	if err != nil {
		return nil, e.explain(err, vars)
	}
	return res, nil
}

// Number evaluates the expression and requires a finite number.
func (e *Expr) Number(vars map[string]any) (float64, error) {
	v, err := e.Eval(vars)
	if err != nil {
		return 0, err
	}
	switch x := v.(type) {
	case float64:
		if math.IsNaN(x) {
			return 0, &Error{Msg: "the result is not a number (NaN: 0/0, or a fractional power of a negative number?)"}
		}
		if math.IsInf(x, 0) {
			// Fix (limits): a huge power (10^400) is infinite too, not only a
			// division by zero.
			return 0, &Error{Msg: "the result is infinite (a division by zero, or a number past about 1.8 × 10^308)"}
		}
		return x, nil
	case bool:
		return 0, &Error{Msg: "expected a number, but this is a true/false condition"}
	case string:
		return 0, &Error{Msg: fmt.Sprintf("expected a number, but this is the text %q", x)}
	}
	return 0, &Error{Msg: fmt.Sprintf("expected a number, got %v (%T)", v, v)}
}

// explain turns an evaluation error into an *Error.
func (e *Expr) explain(err error, vars map[string]any) error {
	var xe *Error
	if errors.As(err, &xe) {
		return xe
	}
	var mv *missingVar
	if errors.As(err, &mv) {
		col := 0
		for _, r := range e.vars {
			if r.Name == mv.name {
				col = r.Col
				break
			}
		}
		names := make([]string, 0, len(vars))
		for k := range vars {
			names = append(names, k)
		}
		sort.Strings(names)
		return &Error{Col: col, Msg: unknownMsg("name", mv.name, names)}
	}
	msg := err.Error()
	if m := typeErrRE.FindStringSubmatch(msg); m != nil {
		return e.typeError(m[1], m[2], m[3])
	}
	return &Error{Msg: plain(msg)}
}

var typeErrRE = regexp.MustCompile(`^Value '(.*)' cannot be used with the (modifier|comparator|logical operator|ternary operator|prefix) '(.*)'`)

// typeError rewrites one of govaluate's type errors and places it at the
// first operator of that kind in the source.
func (e *Expr) typeError(value, what, symbol string) *Error {
	kind := map[string]govaluate.TokenKind{
		"modifier": govaluate.MODIFIER, "comparator": govaluate.COMPARATOR,
		"logical operator": govaluate.LOGICALOP, "ternary operator": govaluate.TERNARY,
		"prefix": govaluate.PREFIX,
	}[what]
	op := opRef{text: symbol}
	for _, o := range e.ops {
		if o.kind == kind && o.symbol == symbol {
			op = o
			break
		}
	}
	var msg string
	switch {
	case kind == govaluate.COMPARATOR:
		msg = fmt.Sprintf("%q compares two numbers or two strings; got '%s' on one side", op.text, value)
	case kind == govaluate.LOGICALOP:
		msg = fmt.Sprintf("%q needs true/false conditions, got '%s'", op.text, value)
	case kind == govaluate.TERNARY:
		msg = fmt.Sprintf("the condition before %q must be true or false, got '%s'", op.text, value)
	case symbol == "!":
		msg = fmt.Sprintf("%q needs a true/false condition, got '%s'", op.text, value)
	default:
		msg = fmt.Sprintf("%q needs numbers, got '%s'", op.text, value)
	}
	return &Error{Col: op.col, Msg: msg}
}

// plain strips govaluate jargon from a message we have no better wording for.
func plain(msg string) string {
	msg = strings.TrimSpace(msg)
	r := strings.NewReplacer(
		"parameter", "name",
		"Parameter", "Name",
		"token kind", "part",
		"token types", "parts",
		"CLAUSE_CLOSE", "')'",
		"CLAUSE", "'('",
		"MODIFIER", "operator",
		"COMPARATOR", "comparison",
		"LOGICALOP", "operator",
		"PREFIX", "sign",
		"NUMERIC", "number",
		"VARIABLE", "name",
		"FUNCTION", "function",
		"SEPARATOR", "','",
		"TERNARY", "'?:'",
	)
	return r.Replace(msg)
}

// unknownMsg words an unknown name with a suggestion, if there is one.
func unknownMsg(what, name string, candidates []string) string {
	msg := fmt.Sprintf("unknown %s %q", what, name)
	if c := Closest(name, candidates); c != "" {
		msg += fmt.Sprintf("; did you mean %q?", c)
	}
	return msg
}

// callFunc wraps a Func for one call site, so that its errors and panics
// carry the call's column.
func callFunc(name string, col int, f Func, hint string) govaluate.ExpressionFunction {
	return func(args ...any) (res any, err error) {
		defer func() {
			if r := recover(); r != nil {
				res, err = nil, &Error{Col: col, Msg: fmt.Sprintf("%s failed: %v%s", name, r, hint)}
			}
		}()
		res, err = f(args...)
		if err != nil {
			msg := err.Error()
			if !strings.HasPrefix(msg, name) {
				msg = name + ": " + msg
			}
			return nil, &Error{Col: col, Msg: msg + hint}
		}
		switch v := res.(type) {
		case float64, string, bool:
			return res, nil
		case int:
			return float64(v), nil
		case int64:
			return float64(v), nil
		case float32:
			return float64(v), nil
		case nil:
			return nil, &Error{Col: col, Msg: name + " returned no value"}
		}
		return nil, &Error{Col: col, Msg: fmt.Sprintf("%s returned %v (%T), not a number, string or condition", name, res, res)}
	}
}
