// Package parse reads a worth memo: YAML front matter, Markdown prose and the
// fenced blocks of the memo language (see the memo-language contract). It
// knows Markdown and the language's grammar and nothing of money: every value
// is kept as expression text with its source position, for the compute stage
// to evaluate. Errors are collected into an ErrorList, never thrown one at a
// time.
package parse

import "github.com/yuin/goldmark/ast"

// Memo is a parsed memo: the source, its front matter, the Markdown document
// and the typed worth blocks in source order.
type Memo struct {
	File   string
	Source []byte
	Front  FrontMatter
	// Doc is the goldmark document of the whole file (front matter blanked
	// out, byte offsets unchanged). Worth blocks are *ast.FencedCodeBlock
	// nodes; Nodes maps each to its typed block.
	Doc    ast.Node
	Blocks []Block
	Nodes  map[ast.Node]Block
	// Inline holds every inline value (a code span starting with "="), in
	// source order. InlineAt maps the code span node to it.
	Inline   []*Inline
	InlineAt map[ast.Node]*Inline
	// Includes lists the files the memo names ("cash flows from:"), in
	// source order.
	Includes []*Include
	// Limits are the bounds the memo was read under, defaults filled in
	// (limits.go); compute checks its own against them.
	Limits Limits
}

// Text is a piece of source text (usually an expression) and where it starts.
type Text struct {
	Src string
	Pos Pos
}

// IsZero reports whether the text was not given.
func (t Text) IsZero() bool { return t.Src == "" && !t.Pos.IsValid() }

// Field is one "key: value" entry of the front matter or of a block.
type Field struct {
	Key    string
	KeyPos Pos
	Value  Text
}

// FrontMatter is the memo's YAML header. Every field keeps its position.
type FrontMatter struct {
	Title, To, From, Date, Subject Field
	Currency                       Field
	Rate, TaxRate, Inflation       *RateSpec
	Paper, Logo                    Field
	// Amounts says which money the amounts are in: "then-current" (the
	// default) or "constant" (see tax.go).
	Amounts Field
	// Extra holds further keys (e.g. "project", "prepared by"), shown in the
	// memo heading in the order written.
	Extra []Field
	// Fields lists every key in source order.
	Fields []Field
}

// RateSpec is a rate as written: a value (an expression of a percentage or
// fraction) and how it compounds.
type RateSpec struct {
	Text  Text   // the whole text as written
	Value Text   // the numeric part
	Mode  string // "" (effective annual), "nominal", "continuous" or "real"
	// PerYear is the number of compounding periods a year of a nominal rate.
	PerYear int
	// Period names the compounding of a nominal rate ("monthly", ...).
	Period string
}

// Block is one worth block.
type Block interface {
	Head() *BlockHead
}

// BlockHead is what every block has: its kind, id and position.
type BlockHead struct {
	Kind  string
	ID    string
	Pos   Pos // the opening fence
	IDPos Pos
	Node  ast.Node
	// EndLine is the line of the closing fence (or the last line).
	EndLine int
}

// Head returns the block's head.
func (h *BlockHead) Head() *BlockHead { return h }

// Assume is an `assume` block of named inputs.
type Assume struct {
	BlockHead
	Items []*Assumption
}

// Assumption is one `name = expression [~ distribution]` line.
type Assumption struct {
	Name    string
	NamePos Pos
	Expr    Text
	Dist    *Distribution
	Comment string
	Line    int
}

// Distribution is an uncertainty attached to an assumption with `~`.
type Distribution struct {
	Kind string // triangular, uniform, normal, pert, lognormal
	Args []Text
	Pos  Pos
}

// Sign says which way an amount flows.
type Sign int

// The three directions of an amount.
const (
	Cost Sign = iota
	Benefit
	Disbenefit
)

func (s Sign) String() string {
	switch s {
	case Benefit:
		return "benefit"
	case Disbenefit:
		return "disbenefit"
	}
	return "cost"
}

// FlowKind is the shape of an amount over a life cycle.
type FlowKind int

// The line forms of an alternative that carry money.
const (
	FirstCost FlowKind = iota // year 0 of each cycle
	Once                      // one amount at a year of each cycle
	Annual                    // every year of a range
	Periodic                  // every K years
	Salvage                   // end of each cycle
)

// FlowLine is one money line of an alternative.
type FlowLine struct {
	Line   int    // source line
	Label  string // the text before the colon, as written
	Pos    Pos    // start of the line
	Kind   FlowKind
	Sign   Sign
	Amount Text
	At     *Text // Once: the year; Salvage read from a CSV: the year it falls
	Every  *Text // Periodic: K
	From   *Text // Annual, Periodic: first year (optional)
	To     *Text // Annual, Periodic: last year (optional)
	// Escalating is a geometric gradient rate (Annual only); Gradient an
	// arithmetic one.
	Escalating *Text
	Gradient   *Text
}

// Depreciation is a `depreciation:` line.
type Depreciation struct {
	Pos    Pos
	Method string // "straight line", "declining balance", "sum of years", "macrs"
	Rate   *Text  // declining balance rate
	Years  Text
	To     *Text // the salvage value to depreciate to ("to S"), nil for zero
}

// Alternative is an `alternative ID` block.
type Alternative struct {
	BlockHead
	Name         Field
	Life         *Text
	Lines        []*FlowLine
	Residual     *Text
	Depreciation *Depreciation
	Loan         *Loan // a "loan:" line (tax.go)
}

// DisplayName is the name, or the id where none is given.
func (a *Alternative) DisplayName() string {
	if a.Name.Value.Src != "" {
		return a.Name.Value.Src
	}
	return a.ID
}

// Ref names another block by id.
type Ref struct {
	ID  string
	Pos Pos
}

// Horizon is a compare block's horizon line.
type Horizon struct {
	Kind  string // "perpetual", "study period", "repeat lives"
	Years *Text  // study period length
	Pos   Pos
}

// Compare is a `compare ID` block: one decision.
type Compare struct {
	BlockHead
	Alternatives []Ref // nil: every alternative in the memo
	Horizon      *Horizon
	Rate         *RateSpec
	DecideBy     Field // "present worth", "annual worth", "incremental rate of return", "benefit-cost"
	Show         []Field
	Basis        Field // "before tax" or "after tax"
	Base         *Ref
}

// Expect is an `expect` block: conditions that must hold.
type Expect struct {
	BlockHead
	Conditions []Text
}

// Place is a `schedule ALT` or `diagram ALT` block: put the table or the
// diagram of one alternative here.
type Place struct {
	BlockHead
	Alt Ref
	// Compare optionally names the comparison whose horizon to use
	// ("compare: ID" line).
	Compare *Ref
}

// Inline is an inline value: a code span whose text starts with "=".
type Inline struct {
	Expr Text
	Node ast.Node
	// Offset is the byte offset of the code span's text in the source, End
	// the offset just after it (backticks not included).
	Offset, End int
}
