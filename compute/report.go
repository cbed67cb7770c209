// Package compute turns a parsed memo into a Report: every alternative's
// cash flows, the measures of each comparison, worked equations in the
// trade's factor notation, the decisions, and the checked expectations.
//
// It is pure: no files, no clocks, no printing. The time-value-of-money
// mathematics lives in small functions (factors.go, roots.go) with their
// formulas in their doc comments.
package compute

import "worth/parse"

// Report is everything the writers need, computed once.
type Report struct {
	Memo         *parse.Memo
	Title        string
	Currency     Currency
	Rate         *Rate // the front matter's rate (MARR), nil when none
	TaxRate      *Rate
	Inflation    *Rate
	Assumptions  []*Assumption
	Alternatives []*Alternative
	Comparisons  []*Comparison
	Expectations []*Expectation
	// Inline holds the value of each inline code span, keyed by the span's
	// byte offset in the source (parse.Inline.Offset).
	Inline map[int]Value
	// Places holds what each schedule or diagram block shows.
	Places map[*parse.Place]*Placement
	// Amounts is the money the memo's amounts are in: "then-current" or
	// "constant" (aftertax.go).
	Amounts string
	// Replacements are the replacement blocks, in memo order
	// (replacement.go).
	Replacements []*Replacement
	// Revision, when set (by "worth build --changes-since REV"), is what
	// changed since an earlier version; the writers add it as a section.
	Revision *Revision
	// The analysis blocks, in memo order (sensitivity.go, scenario.go,
	// budget.go).
	Sensitivities []*Sensitivity
	Scenarios     []*Scenario
	Budgets       []*Budget
	// Risks holds the evaluated risk blocks, in source order (risk.go).
	Risks []*Risk
}

// Currency is an ISO 4217 code with its symbol and minor-unit decimals.
type Currency struct {
	Code     string
	Symbol   string
	Decimals int
}

// Rate is an interest rate as written and the effective annual rate it
// converts to, with the conversion spelled out for the report.
type Rate struct {
	Text      string  // as written, e.g. "6% nominal monthly"
	Stated    float64 // the number written, as a fraction
	Mode      string  // "", "nominal", "continuous", "real"
	PerYear   int     // compounding periods a year (nominal)
	Inflation float64 // for real rates
	Effective float64 // effective annual rate used for discounting
	// Conversion is the formula with values, empty when none was needed.
	Conversion string
}

// Assumption is one evaluated named input.
type Assumption struct {
	Name  string
	Value float64
	Expr  string
	Line  int
	Dist  *Distribution
}

// Distribution is an uncertainty of an assumption, evaluated.
type Distribution struct {
	Kind   string
	Params []float64
}

// Alternative is an alternative with every line evaluated.
type Alternative struct {
	ID    string
	Name  string
	Line  int // line of the opening fence
	Life  int // years; 0 when the asset serves forever
	Items []*Item
	// Residual is the stated value at a study period's end, nil for the
	// default straight-line rule.
	Residual     *float64
	ResidualLine int
	HasBenefits  bool // any benefit line (salvage excluded)
	FirstCost    float64
	// Depreciation and Loan are the alternative's "depreciation:" and
	// "loan:" lines, nil when not given (depreciation.go, loan.go).
	Depreciation *DepreciationPlan
	Loan         *Loan
	Source       *parse.Alternative
}

// Forever reports whether the alternative has no life.
func (a *Alternative) Forever() bool { return a.Life == 0 }

// Item is one money line of an alternative, evaluated. Years count from the
// start of the alternative's own life cycle.
type Item struct {
	Line   int
	Label  string // as written
	Kind   parse.FlowKind
	Sign   parse.Sign
	Amount float64 // positive as written
	At     int     // Once
	Every  int     // Periodic
	From   int     // Annual, Periodic: first year
	To     int     // Annual, Periodic: last year; 0 = to the end of life (or forever)
	// Escalation is a geometric gradient (fraction a year); Gradient an
	// arithmetic one (amount a year).
	Escalation    float64
	HasEscalation bool
	Gradient      float64
	HasGradient   bool
	// File is the CSV file the line was read from ("cash flows from:"),
	// "" for a line of the memo itself; Line is then the CSV's line.
	File string
}

// Category sorts flows for the ratios: investment (first costs), other
// costs, benefits, disbenefits, and recovered value (salvage, residual).
type Category int

// The categories of a flow.
const (
	Investment Category = iota
	Operating
	Benefits
	Disbenefits
	Recovery
	numCategories
)

func (c Category) String() string {
	return [...]string{"first costs", "other costs", "benefits", "disbenefits", "salvage and residual"}[c]
}

// Horizon is the span a comparison values alternatives over.
type Horizon struct {
	Kind  string // "perpetual", "study period", "repeat lives"
	Years int    // 0 for perpetual
	// Default is true when the compare block did not name a horizon.
	Default bool
}

// Perpetual reports whether the horizon is infinite.
func (h Horizon) Perpetual() bool { return h.Kind == "perpetual" }

// Comparison is one evaluated compare block.
type Comparison struct {
	ID       string
	Line     int
	Rate     Rate
	Horizon  Horizon
	DecideBy string
	Show     []string
	Basis    string
	Base     string
	Results  []*Result
	// Recommended is the id of the chosen alternative, or "do-nothing".
	Recommended string
	RunnerUp    string
	// Margin is how much better the recommendation is than the runner-up
	// by the measure of the decision (present or annual worth).
	Margin   float64
	Tie      bool
	CostOnly bool
	// Steps of an incremental analysis, in order.
	Steps    []*Step
	Ranking  []string // ids, best first by present worth
	Reason   string   // the recommendation in words
	Warnings []string
	Source   *parse.Compare
}

// Result is one alternative's measures in one comparison.
type Result struct {
	Alt *Alternative
	PW  float64
	AW  float64
	FW  *float64
	// IRR is the rate of return when exactly one was found; IRRRoots every
	// one found; SignChanges counts sign changes of the net flows.
	IRR         *float64
	IRRRoots    []float64
	SignChanges int
	BC          *float64 // conventional benefit-cost ratio
	ModifiedBC  *float64
	Payback     *float64
	DiscPayback *float64
	NetSavings  *float64
	SIR         *float64
	AIRR        *float64
	// ByCategory is the present worth of each category, as positive
	// amounts.
	ByCategory [numCategories]float64
	// Flows are the year-by-year flows over the horizon; on a perpetual
	// horizon, the first life cycle (or the first years of an alternative
	// with no life), FlowsNote says which.
	Flows     []YearFlow
	FlowsNote string
	// Work is the worked solution: equations in factor notation.
	Work     []*Equation
	Warnings []string
	// AfterTax is the after-tax cash-flow table of an after-tax
	// comparison, nil before tax (aftertax.go).
	AfterTax *AfterTax
}

// YearFlow is the cash flow of one year, split by category. Amounts are
// positive; Net is signed.
type YearFlow struct {
	Year          int
	ByCategory    [numCategories]float64
	Net           float64
	Discounted    float64
	Cumulative    float64
	CumDiscounted float64
	Notes         []string // what happens this year (labels of one-time amounts)
}

// Equation is one step of a worked solution: LHS = sum of terms = Result.
type Equation struct {
	LHS   string // e.g. "PW", "PW₁", "AW"
	Label string // what the step computes, in words
	Terms []Term
	Value float64
}

// Term is a coefficient times a product of factors: e.g.
// -12,500 (P/A, 7%, 24) (P/F, 7%, 5). Coef is signed.
type Term struct {
	Coef float64
	// Symbol names the coefficient when it is an earlier result (e.g. "PW₁").
	Symbol  string
	Factors []Factor
	Value   float64
	Label   string // the source line's label
	Line    int
	Cat     Category
}

// Factor is a compound-interest factor in the standard notation
// (X/Y, i, n) or, for a geometric gradient, (P/A, g, i, n). N is +Inf for a
// perpetuity. Sum, when set, is a sum of (P/F, i, t) over the listed years.
type Factor struct {
	Name  string // "P/F", "F/P", "P/A", "A/P", "F/A", "A/F", "P/G", "A/G", "P/A,g"
	I     float64
	G     float64
	N     float64
	Sum   []int
	Value float64
}

// Step is one challenger-against-defender step of an incremental analysis.
type Step struct {
	Challenger, Defender string // ids; the defender may be "do-nothing"
	DeltaPW              float64
	DeltaIRR             *float64
	DeltaRoots           []float64
	DeltaBenefits        float64 // for benefit-cost
	DeltaCosts           float64
	DeltaBC              *float64
	Accepted             bool
	Note                 string
}

// Expectation is one checked condition of an expect block.
type Expectation struct {
	Line   int
	Col    int
	Text   string
	Passed bool
	// Detail shows the values of the result functions it used.
	Detail string
}

// Value is a computed inline value with its kind, so writers format it.
type Value struct {
	Kind ValueKind
	Num  float64
	Str  string
	Null bool // a measure that does not apply
}

// ValueKind says how to format a value.
type ValueKind int

// The kinds of inline values.
const (
	Number ValueKind = iota
	Money
	Percent
	Ratio
	Years
	Text
	Bool
)

// Placement is what a schedule or diagram block shows: an alternative's
// flows under one comparison (or on its own horizon).
type Placement struct {
	Alt    *Alternative
	Result *Result
	Comp   *Comparison
}
