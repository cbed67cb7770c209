package expr

import "fmt"

// Bounds on one expression (README.md, "Limits"). No formula written by
// hand comes near them; they keep a hostile memo from making the parser
// recurse without end or read megabytes as one formula.
const (
	// MaxLen is the longest expression read, in bytes.
	MaxLen = 10000
	// MaxDepth is the deepest nesting read: parentheses, signs and powers
	// each add a level.
	MaxDepth = 100
)

// tooLong is the error for an expression longer than MaxLen.
func tooLong(src string) *Error {
	return &Error{Msg: fmt.Sprintf("the expression is %d characters long; an expression may be at most %d (split it into named assumptions)", len(src), MaxLen)}
}

// enter counts one level of nesting at token t; past MaxDepth it returns
// the error to report there. Each enter is paired with a leave.
func (p *parser) enter(t *token) *Error {
	p.depth++
	if p.depth > MaxDepth {
		return &Error{Col: t.pos, Msg: fmt.Sprintf("the expression nests more than %d levels deep here (parentheses, signs and powers); an expression may nest at most %d (split it into named assumptions)", MaxDepth, MaxDepth)}
	}
	return nil
}

func (p *parser) leave() { p.depth-- }
