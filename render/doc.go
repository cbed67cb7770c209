package render

// The document model: what the HTML and PDF writers draw. BuildDoc (in
// build.go) turns a compute.Report and the memo's Markdown into a Doc once;
// each writer walks it and recomputes nothing.

// Doc is a whole memo report.
type Doc struct {
	Title    string
	Heading  []KV   // To, From, Date, Subject and further front-matter keys, in order
	Date     string // for running headers (from the memo, never the clock)
	Paper    string // "letter" or "a4"
	Logo     string // path of an optional logo image, relative to the memo's folder
	Currency string
	Body     []Node
	Appendix []Node
	Caution  string
	// AllowHTML lets raw HTML in the prose through to the HTML writer.
	AllowHTML bool
	// Dir is the memo's folder, where a logo is looked for ("" when the
	// memo was not read from a file).
	Dir string
	// AppendixOnly is set when the document holds only the calculation
	// appendix (Body is empty).
	AppendixOnly bool
}

// KV is a labelled value of the memo heading.
type KV struct {
	Key, Value string
}

// Node is one block of the document: one of the types below.
type Node interface{ node() }

// Inline is a run of text with its style. Exactly one of the flags that
// make sense is set; Link holds a target for links.
type Inline struct {
	Text   string
	Bold   bool
	Italic bool
	Code   bool
	Strike bool
	Link   string
	// Value marks a computed inline value; Source is its expression and
	// Line its source line, for traceability.
	Value  bool
	Source string
	Line   int
	// RawHTML is raw HTML from the prose: escaped as text unless the
	// document allows HTML.
	RawHTML bool
	// Break is a hard line break.
	Break bool
}

// Heading is a section title of the prose.
type Heading struct {
	Level int
	Text  []Inline
	ID    string
}

// Paragraph is prose.
type Paragraph struct{ Text []Inline }

// List is a bulleted or numbered list; each item is a list of blocks.
type List struct {
	Ordered bool
	Start   int
	Items   [][]Node
}

// Quote is a block quote.
type Quote struct{ Body []Node }

// CodeBlock is verbatim text (an ordinary fenced or indented code block).
type CodeBlock struct {
	Lang string
	Text string
}

// Rule is a thematic break.
type Rule struct{}

// Table is a table with a header row. Align per column: 'l', 'r' or 'c'.
// Numeric columns are right-aligned. Caption is a title above it; Note a
// line below it.
type Table struct {
	Caption string
	Header  []string
	Rows    [][]string
	Align   []byte
	Note    string
	// Emphasis marks rows to set in bold (totals, the recommended column).
	BoldRows []bool
	// Source names the block and line the table comes from, e.g.
	// "alternative steel, line 20".
	Source string
	// BoldCols marks columns to set in bold (the recommended alternative
	// of a results table).
	BoldCols []bool
	// ID anchors the table and RowIDs its rows ("" for none), so that
	// figures elsewhere can link to them; Trace, when set, holds for each
	// cell (the shape of Rows) where its figure comes from (trace.go).
	ID     string
	RowIDs []string
	Trace  [][]Trace
}

// Equations is the worked solution of one alternative: steps of
// equations with their labels.
type Equations struct {
	Title string
	Steps []EqText
	ID    string // anchors the worked solution, for figures that link to it
}

// Callout is a boxed statement: the recommendation, a warning, a note.
type Callout struct {
	Kind  string // "recommendation", "warning", "note"
	Title string
	Text  string
	Items []string // further lines, e.g. the warnings of a comparison
	// Facts are labelled lines shown before the items, e.g. the rule used
	// and the margin over the runner-up.
	Facts []KV
}

// Chart is a chart described once and drawn by each writer.
type Chart struct {
	Kind   string // "cashflow" (arrow diagram), "lines" (x-y curves), "bars", "tornado"
	Title  string
	Alt    string // text alternative for readers who cannot see it
	XLabel string
	YLabel string
	// XFormat and YFormat say how to label the axes: "money", "percent",
	// "year", "number".
	XFormat, YFormat string
	Series           []Series
	// Arrows is the cash-flow diagram: one arrow per year.
	Arrows []Arrow
	// Bars are the rows of a tornado chart, top to bottom.
	Bars []Bar
	// Marks are labelled points (a rate of return, a crossover rate, a
	// payback year) and vertical or horizontal reference lines.
	Marks []Mark
	// The axes, computed once so every writer draws the same: the span of
	// each axis and its ticks with their labels, formatted by XFormat and
	// YFormat. For a cash-flow diagram X is the year and Y the net flow.
	XMin, XMax, YMin, YMax float64
	XTicks, YTicks         []Tick
	// Notes are short lines shown under the chart, e.g. the annual series
	// of a cash-flow diagram ("annual cost: $12,500, years 1 to 24").
	Notes []string
	// Source names the block and line the chart comes from.
	Source string
}

// Tick is a labelled position on an axis.
type Tick struct {
	At    float64
	Label string
}

// Series is one named curve (Y may hold NaN where undefined) or set of bars.
type Series struct {
	Name string
	X, Y []float64
	// Emphasis marks the series to bring forward (the recommended
	// alternative and the runner-up) where a chart has many.
	Emphasis bool
}

// Arrow is one year's net flow on a cash-flow diagram: up for a benefit,
// down for a cost, its length to scale; Label is shown beside it where it
// is a one-time or periodic amount (e.g. "overhaul 65,000").
type Arrow struct {
	Year   int
	Amount float64
	Label  string
}

// Bar is one row of a tornado chart: a category (an input) and the chart's
// value at the input's low and at its high end, each drawn as a bar along
// the x axis from Base, the base case's value. Low or High is NaN where
// the value is undefined; the labels name the input's value at each end.
type Bar struct {
	Label               string
	Base, Low, High     float64
	LowLabel, HighLabel string
}

// Mark is a labelled point or reference line on a chart. Vertical lines
// have only X; horizontal lines only Y (HasX false).
type Mark struct {
	X, Y       float64
	HasX, HasY bool
	Label      string
	// Series is the index of the series the mark belongs to (drawn in its
	// colour), or -1 for a mark of the whole chart.
	Series int
	// Kind says what the mark is: "rate" (the comparison's rate), "irr",
	// "crossover" or "payback".
	Kind string
}

func (Heading) node()   {}
func (Paragraph) node() {}
func (List) node()      {}
func (Quote) node()     {}
func (CodeBlock) node() {}
func (Rule) node()      {}
func (Table) node()     {}
func (Equations) node() {}
func (Callout) node()   {}
func (Chart) node()     {}
