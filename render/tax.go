package render

import (
	"bytes"
	"fmt"
	"math"
	"strconv"
	"strings"

	"worth/compute"
	"worth/parse"
)

// After-tax analysis, depreciation, loans, the money basis and replacement
// studies in every writer. The content is laid out once as document-model
// nodes (builder.financeNodes, builder.replacement); the Markdown writer
// writes the same nodes as Markdown (mdNodes), and the JSON writer has its
// own pieces (financeJSON). Every number comes from the compute.Report.

// TaxCaution is the caution shown wherever after-tax results appear.
const TaxCaution = "Tax rules differ by country and by year, and change. The tax figures here (depreciation, taxable income, tax, and the after-tax results built on them) are estimates from the rules stated in this memo, to be reviewed by a qualified tax professional before a decision rests on them."

// DepreciationText describes a depreciation method in words.
func (f Format) DepreciationText(d *compute.DepreciationPlan) string {
	to := ""
	if d.Salvage > 0 {
		to = " to " + f.Money(d.Salvage)
	}
	switch d.Method {
	case "macrs":
		return fmt.Sprintf("MACRS %d-year property (general depreciation system, half-year convention; IRS Publication 946, Table A-1)", d.Years)
	case "straight line":
		return fmt.Sprintf("straight line over %d years%s", d.Years, to)
	case "declining balance":
		return fmt.Sprintf("%s declining balance over %d years%s (%s of book value a year), switching to straight line when that is larger", f.Rate(d.Multiple), d.Years, to, f.Rate(d.Rate))
	case "sum of years":
		return fmt.Sprintf("sum-of-years digits over %d years%s", d.Years, to)
	}
	return d.Method
}

func yearsText(n int) string {
	if n == 1 {
		return "1 year"
	}
	return strconv.Itoa(n) + " years"
}

// DepreciationShort names a depreciation method in a few words.
func (f Format) DepreciationShort(d *compute.DepreciationPlan) string {
	to := ""
	if d.Salvage > 0 {
		to = " to " + f.Money(d.Salvage)
	}
	switch d.Method {
	case "macrs":
		return fmt.Sprintf("MACRS %d-year", d.Years)
	case "declining balance":
		return fmt.Sprintf("%s declining balance, %d years%s", f.Rate(d.Multiple), d.Years, to)
	case "sum of years":
		return fmt.Sprintf("sum of years, %d years%s", d.Years, to)
	}
	return fmt.Sprintf("straight line, %d years%s", d.Years, to)
}

// taxInputRows are the rows an alternative's inputs table adds for its
// depreciation and loan lines: label, kind, amount, when, line.
func (f Format) taxInputRows(a *compute.Alternative) [][]string {
	var rows [][]string
	if d := a.Depreciation; d != nil {
		when := "on the first cost, " + f.Money(a.FirstCost) + ", in each life cycle; after tax"
		if d.Method == "macrs" {
			when = "Table A-1, half-year convention, " + when
		}
		rows = append(rows, []string{"depreciation", "tax depreciation", f.DepreciationShort(d), when, strconv.Itoa(d.Line)})
	}
	if l := a.Loan; l != nil {
		rows = append(rows, []string{"loan", "financing", fmt.Sprintf("%s at %s", f.Money(l.Amount), f.Rate(l.Rate.Effective)),
			fmt.Sprintf("year 0 of each life cycle; %d payments of %s", l.Years, f.Money(l.Payment)), strconv.Itoa(l.Line)})
	}
	return rows
}

// ---- the money basis ----

// moneyBasisStated reports whether the report should state the money
// basis: when the memo names it, gives an inflation rate or a real rate.
func moneyBasisStated(rep *compute.Report) bool {
	fm := rep.Memo.Front
	if fm.Amounts.Value.Src != "" || fm.Inflation != nil || (fm.Rate != nil && fm.Rate.Mode == "real") {
		return true
	}
	for _, c := range rep.Comparisons {
		if c.Rate.Mode == "real" {
			return true
		}
	}
	return false
}

// MoneyBasisText says which money the amounts are in and what that means
// for the rates; "" when the memo gives no reason to say.
func (f Format) MoneyBasisText(rep *compute.Report) string {
	if !moneyBasisStated(rep) {
		return ""
	}
	if rep.Amounts == parse.Constant {
		s := "Amounts are in constant money (today's money, before inflation), so they are discounted at a real rate; an escalation written on a line is growth above general inflation"
		if rep.Inflation != nil {
			s += fmt.Sprintf(", which is %s a year", f.Rate(rep.Inflation.Effective))
		}
		s += "."
		if afterTaxOrLoans(rep) {
			s += " Depreciation, loan payments and book values are fixed in the money of the year they fall in, so they are deflated by (1 + inflation)^−t, t counted from the start of each life cycle."
		}
		return s
	}
	s := "Amounts are in then-current money (the money of the year each falls in), so they are discounted at a market rate, which includes inflation; an escalation written on a line is its growth in then-current money."
	if rep.Inflation != nil {
		s += fmt.Sprintf(" General inflation is %s a year; a rate given as real is turned into a market rate with the Fisher equation, (1 + market) = (1 + real)(1 + inflation).", f.Rate(rep.Inflation.Effective))
	}
	return s
}

// afterTaxOrLoans reports whether a memo has an after-tax comparison or a
// loan.
func afterTaxOrLoans(rep *compute.Report) bool {
	for _, c := range rep.Comparisons {
		if c.Basis == "after tax" {
			return true
		}
	}
	for _, a := range rep.Alternatives {
		if a.Loan != nil {
			return true
		}
	}
	return false
}

// taxConventions are the lines the conventions add for after-tax
// comparisons and loans.
func (f Format) taxConventions(rep *compute.Report) []string {
	var out []string
	if s := f.MoneyBasisText(rep); s != "" {
		out = append(out, s)
	}
	after, loans := false, false
	for _, c := range rep.Comparisons {
		if c.Basis == "after tax" {
			after = true
		}
	}
	for _, a := range rep.Alternatives {
		if a.Loan != nil {
			loans = true
		}
	}
	if after {
		out = append(out, fmt.Sprintf("After tax, at the tax rate of %s: each year's taxable income is its benefits less its costs other than first costs, less that year's depreciation and loan interest; the tax is the rate times it, a negative tax being a saving against the organization's other income. Disbenefits, a loss to the public, are not taxed. A disposal (salvage at the end of a life, or the residual value at a study period's end) pays tax on its gain over book value, or saves tax on a loss. Each life cycle depreciates afresh; MACRS takes half of a year's deduction in a year of disposal before its recovery period ends. In the benefit-cost and savings-to-investment ratios, taxes (less tax savings) and loan payments count as other costs, and a loan reduces the first cost.", f.Rate(rep.TaxRate.Effective)))
	}
	if loans {
		out = append(out, "A loan brings its amount at year 0 of each life cycle and is repaid in level payments, amount × (A/P, loan rate, term), each the year's interest on the balance plus principal; a balance still owed at the end of a life or of a study period is repaid then. Its flows count on either basis; after tax its interest is deductible.")
	}
	if after {
		out = append(out, TaxCaution)
	}
	return out
}

// ---- the basis of a comparison ----

// taxRateOf is the tax rate of an after-tax comparison.
func taxRateOf(c *compute.Comparison) float64 {
	for _, r := range c.Results {
		if r.AfterTax != nil {
			return r.AfterTax.TaxRate
		}
	}
	return 0
}

func hasLoan(c *compute.Comparison) bool {
	for _, r := range c.Results {
		if r.Alt.Loan != nil {
			return true
		}
	}
	return false
}

// BasisText is a sentence that says a comparison is made after tax, or
// includes loans, to follow its rate and horizon ("" for a plain
// before-tax comparison).
func (f Format) BasisText(c *compute.Comparison) string {
	switch {
	case c.Basis == "after tax" && hasLoan(c):
		return fmt.Sprintf(" After tax, at a tax rate of %s; the measures are of the after-tax cash flows, loan flows included.", f.Rate(taxRateOf(c)))
	case c.Basis == "after tax":
		return fmt.Sprintf(" After tax, at a tax rate of %s; the measures are of the after-tax cash flows.", f.Rate(taxRateOf(c)))
	case hasLoan(c):
		return " Before tax; the loan flows are included."
	}
	return ""
}

// afterTaxWords is ", after tax" for an after-tax comparison, to follow
// its horizon and rate in notes.
func afterTaxWords(c *compute.Comparison) string {
	if c.Basis == "after tax" {
		return ", after tax"
	}
	return ""
}

// basisFacts are the recommendation's lines on the basis.
func (f Format) basisFacts(c *compute.Comparison) []KV {
	switch {
	case c.Basis == "after tax":
		return []KV{{"Basis", fmt.Sprintf("after tax, at a tax rate of %s", f.Rate(taxRateOf(c)))}}
	case hasLoan(c):
		return []KV{{"Basis", "before tax, loan flows included"}}
	}
	return nil
}

// ---- nodes of a comparison ----

// altFinance is what an alternative's inputs add: its loan schedule.
func (b *builder) altFinance(a *compute.Alternative) []Node {
	if a.Loan == nil {
		return nil
	}
	return []Node{b.loanTable(a)}
}

// financeNodes are what an after-tax comparison adds: each alternative's
// depreciation table and after-tax cash-flow table, and the caution on tax
// figures.
func (b *builder) financeNodes(c *compute.Comparison) []Node {
	var out []Node
	after := c.Basis == "after tax"
	for _, r := range c.Results {
		a := r.Alt
		if r.AfterTax != nil && a.Depreciation != nil {
			out = append(out, b.depreciationTable(a, c))
		}
		if r.AfterTax != nil {
			out = append(out, b.afterTaxTable(r, c))
		}
	}
	if after {
		out = append(out, Callout{Kind: "note", Title: "Tax figures are estimates", Text: TaxCaution})
	}
	return out
}

// depreciationTable is one life cycle's depreciation of an alternative.
func (b *builder) depreciationTable(a *compute.Alternative, c *compute.Comparison) Table {
	d := a.Depreciation
	end := a.Life
	deps := d.Deductions(a.FirstCost, end)
	macrs := d.Method == "macrs"
	t := Table{
		Caption: "Depreciation: " + a.Name,
		Header:  []string{"Year of the cycle", "Deduction", "Cumulative", "Book value"},
		Align:   []byte{'r', 'r', 'r', 'r'},
		Source:  fmt.Sprintf("alternative %s, line %d", a.ID, d.Line),
	}
	if macrs {
		t.Header = []string{"Year of the cycle", "Table A-1 %", "Deduction", "Cumulative", "Book value"}
		t.Align = append(t.Align, 'r')
	}
	cum := 0.0
	for k, x := range deps {
		if x == 0 && k >= d.RecoveryYears() {
			break
		}
		cum += x
		row := []string{strconv.Itoa(k + 1)}
		if macrs {
			p := ""
			if k < len(compute.MACRSPercent[d.Years]) {
				p = strconv.FormatFloat(compute.MACRSPercent[d.Years][k], 'f', -1, 64)
				if a.Life > 0 && k+1 == a.Life && a.Life <= d.Years {
					p += " ÷ 2"
				}
			}
			row = append(row, p)
		}
		row = append(row, b.whole(x), b.whole(cum), b.whole(a.FirstCost-cum))
		t.Rows = append(t.Rows, row)
	}
	note := fmt.Sprintf("%s; basis %s, the first cost.", capital(b.f.DepreciationText(d)), b.f.Money(a.FirstCost))
	switch {
	case a.Life > 0 && a.Life < d.RecoveryYears():
		note += fmt.Sprintf(" The asset is disposed of at the end of its %d-year life, before the recovery period ends: the book value left is set against its salvage value then.", a.Life)
		if macrs {
			note += " The year of disposal takes half of its table deduction."
		}
	case a.Life > 0:
		note += " Each life cycle depreciates afresh."
	}
	if c.Horizon.Kind == "study period" && a.Life > 0 && c.Horizon.Years%a.Life != 0 || c.Horizon.Kind == "study period" && a.Life == 0 {
		note += fmt.Sprintf(" The study period's end, year %d, is a disposal at the residual value; the after-tax table shows that year's deduction and gain.", c.Horizon.Years)
	}
	t.Note = note
	return t
}

// loanTable is an alternative's loan amortization.
func (b *builder) loanTable(a *compute.Alternative) Table {
	l := a.Loan
	t := Table{
		Caption: "Loan schedule: " + a.Name,
		Header:  []string{"Year", "Payment", "Interest", "Principal", "Balance"},
		Align:   []byte{'r', 'r', 'r', 'r', 'r'},
		Source:  fmt.Sprintf("alternative %s, line %d", a.ID, l.Line),
	}
	t.Rows = append(t.Rows, []string{"0", "", "", "", b.whole(l.Amount)})
	for _, y := range l.Schedule {
		t.Rows = append(t.Rows, []string{strconv.Itoa(y.Year), b.whole(y.Payment), b.whole(y.Interest), b.whole(y.Principal), b.whole(y.Balance)})
	}
	t.Note = fmt.Sprintf("%s borrowed at %s over %s: payment = %s × (A/P, %s, %d) = %s. Interest is the rate times the balance at the start of the year; principal is the rest of the payment.",
		b.f.Money(l.Amount), b.f.Rate(l.Rate.Effective), yearsText(l.Years), b.f.Amount(l.Amount), b.f.Rate(l.Rate.Effective), l.Years, b.f.Money(l.Payment))
	if a.Life > 0 && l.Years > a.Life {
		t.Note += fmt.Sprintf(" The term is longer than the %d-year life: the balance then, %s, is repaid at the end of each life.", a.Life, b.f.Money(l.BalanceAfter(a.Life)))
	}
	return t
}

// afterTaxTable is an alternative's after-tax cash flows, year by year.
func (b *builder) afterTaxTable(r *compute.Result, c *compute.Comparison) Table {
	at := r.AfterTax
	loan := r.Alt.Loan != nil
	t := Table{
		Caption: "After-tax cash flows: " + r.Alt.Name,
		Header:  []string{"Year", "Before tax", "Depreciation", "Taxable income", "Tax", "After tax"},
		Align:   []byte{'r', 'r', 'r', 'r', 'r', 'r'},
		Source:  fmt.Sprintf("comparison %s, line %d", c.ID, c.Line),
	}
	if loan {
		t.Header = []string{"Year", "Before tax", "Depreciation", "Interest", "Taxable income", "Tax", "After tax"}
		t.Align = append(t.Align, 'r')
	}
	gains := false
	for _, y := range at.Years {
		row := []string{strconv.Itoa(y.Year), b.whole(y.BeforeTax), b.wholeOrBlank(y.Depreciation)}
		if loan {
			row = append(row, b.wholeOrBlank(y.Interest))
		}
		ti := b.whole(y.TaxableIncome)
		if y.Disposal && math.Abs(y.Gain) >= 0.5 {
			gains = true
		}
		row = append(row, ti, b.whole(y.Tax), b.whole(y.AfterTax))
		t.Rows = append(t.Rows, row)
	}
	note := "Taxable income = benefits − costs other than first costs − depreciation"
	if loan {
		note += " − loan interest"
	}
	note += fmt.Sprintf("; tax = %s × taxable income (negative: a saving); after tax = before tax − tax.", b.f.Rate(at.TaxRate))
	if loan {
		note += " Before tax includes the loan's amount and payments."
	}
	if gains {
		var parts []string
		for _, y := range at.Years {
			if y.Disposal && math.Abs(y.Gain) >= 0.5 {
				word := "gain"
				if y.Gain < 0 {
					word = "loss"
				}
				parts = append(parts, fmt.Sprintf("year %d, a %s of %s over book value %s", y.Year, word, b.f.Money(math.Abs(y.Gain)), b.f.Money(y.BookValue)))
			}
		}
		note += " Taxable income includes the gain or loss on disposal: " + strings.Join(parts, "; ") + "."
	}
	if at.Constant {
		note += fmt.Sprintf(" Amounts in constant money; depreciation and interest deflated at %s a year.", b.f.Rate(at.Inflation))
	}
	if r.FlowsNote != "" {
		note += " Years shown: " + r.FlowsNote + "."
	}
	t.Note = note
	return t
}

// afterTaxSchedule is the appendix's year-by-year table of an after-tax
// result: flows before and after tax, discounted, with running totals.
func (b *builder) afterTaxSchedule(r *compute.Result, c *compute.Comparison) Table {
	t := Table{
		Caption: fmt.Sprintf("Cash flows of %s, after tax", r.Alt.Name),
		Header:  []string{"Year", "Before tax", "Tax", "After tax", "Discounted", "Cumulative discounted", "Events"},
		Align:   []byte{'r', 'r', 'r', 'r', 'r', 'r', 'l'},
		Source:  fmt.Sprintf("comparison %s, line %d", c.ID, c.Line),
	}
	note := fmt.Sprintf("Comparison %s, %s", c.ID, b.horizonPhrase(c))
	if r.FlowsNote != "" {
		note += "; " + r.FlowsNote
	}
	t.Note = note + "."
	for k, y := range r.Flows {
		var bt, tax float64
		if k < len(r.AfterTax.Years) {
			bt, tax = r.AfterTax.Years[k].BeforeTax, r.AfterTax.Years[k].Tax
		}
		t.Rows = append(t.Rows, []string{strconv.Itoa(y.Year), b.whole(bt), b.whole(tax), b.whole(y.Net), b.whole(y.Discounted), b.whole(y.CumDiscounted), FlowNotes(y)})
	}
	return t
}

// ---- replacement ----

func findReplacement(rep *compute.Report, src *parse.Replacement) *compute.Replacement {
	for _, r := range rep.Replacements {
		if r.Source == src {
			return r
		}
	}
	return nil
}

// ReplacementText states a replacement study's recommendation.
func (f Format) ReplacementText(rp *compute.Replacement) string {
	d, c := rp.Defender, rp.Challenger
	eacD, eacC := -d.AW, -c.AW
	if !rp.Keep {
		return fmt.Sprintf("Replace %s now with %s. The challenger's least equivalent annual cost, %s (kept %s, its economic service life), is below the least the defender can do, %s (kept %s more). Plan to renew %s after %s.",
			d.Alt.Name, c.Alt.Name, f.Money(eacC), yearsText(c.Economic), f.Money(eacD), yearsText(d.Economic), c.Alt.Name, yearsText(c.Economic))
	}
	than := "below"
	if math.Abs(eacD-eacC) < 1 {
		than = "no more than"
	}
	return fmt.Sprintf("Keep %s for now. Its least equivalent annual cost, %s (kept %s more, its economic service life), is %s the challenger's least, %s (%s kept %s). At these estimates it is best replaced after %s; revisit the decision then, and each year before then as the estimates change.",
		d.Alt.Name, f.Money(eacD), yearsText(d.Economic), than, f.Money(eacC), c.Alt.Name, yearsText(c.Economic), yearsText(rp.ReplaceAfter))
}

// replacement is the document-model content of a replacement block.
func (b *builder) replacement(x *parse.Replacement) []Node {
	rp := findReplacement(b.rep, x)
	if rp == nil {
		return nil
	}
	f := b.f
	d, c := rp.Defender, rp.Challenger
	var out []Node
	// The inputs.
	in := Table{
		Caption: "Replacement study " + rp.ID,
		Header:  []string{"", "Defender: " + d.Alt.Name, "Challenger: " + c.Alt.Name},
		Align:   []byte{'l', 'r', 'r'},
		Source:  fmt.Sprintf("replacement %s, %s", rp.ID, lineRange(&x.BlockHead)),
		Note:    fmt.Sprintf("Rate %s. Each life is tried from 1 year to the longest the asset can serve; the costs of each year come from the lines of its alternative.", f.RateText(rp.Rate)),
	}
	in.Rows = append(in.Rows,
		[]string{"First cost in the study", f.Money(d.FirstCost) + " (market value today)", f.Money(c.FirstCost)},
		[]string{"Market value after k years", b.marketRule(d), b.marketRule(c)},
		[]string{"Lives tried", "1 to " + yearsText(len(d.Lives)), "1 to " + yearsText(len(c.Lives))},
		[]string{"Economic service life", yearsText(d.Economic), yearsText(c.Economic)},
		[]string{"Least equivalent annual cost", f.Money(-d.AW), f.Money(-c.AW)},
	)
	out = append(out, in)
	stmt := fmt.Sprintf("The defender's first cost in this study is its market value today, %s: the money given up by keeping it rather than selling it (its opportunity cost).", f.Money(d.FirstCost))
	if d.SunkCost > 0 {
		stmt += fmt.Sprintf(" The %s written as its first cost in alternative %s is what it cost when bought, a sunk cost that no choice made now can change, and is not used.", f.Money(d.SunkCost), d.Alt.ID)
	}
	out = append(out, Paragraph{Text: []Inline{{Text: stmt}}})
	// Equivalent annual cost by years kept.
	n := len(d.Lives)
	if len(c.Lives) > n {
		n = len(c.Lives)
	}
	t := Table{
		Caption: "Equivalent annual cost by years kept",
		Header:  []string{"Years kept", "Defender: market value then", "Defender: EAC", "Challenger: market value then", "Challenger: EAC"},
		Align:   []byte{'r', 'r', 'r', 'r', 'r'},
		Source:  fmt.Sprintf("replacement %s, line %d", rp.ID, rp.Line),
		Note:    "EAC(k) = −PW(k) (A/P, i, k), PW(k) = −first cost + the year-by-year flows of its lines over k years + the market value after k years (P/F, i, k). * marks the economic service life, the least EAC.",
	}
	cell := func(s *compute.ServiceAsset, k int) (string, string) {
		if k > len(s.Lives) {
			return "", ""
		}
		l := s.Lives[k-1]
		e := f.Money(-l.AW)
		if k == s.Economic {
			e += " *"
		}
		return f.Money(l.MarketValue), e
	}
	for k := 1; k <= n; k++ {
		dm, de := cell(d, k)
		cm, ce := cell(c, k)
		t.Rows = append(t.Rows, []string{strconv.Itoa(k), dm, de, cm, ce})
	}
	out = append(out, t)
	// The recommendation.
	call := Callout{Kind: "recommendation", Title: "Recommendation", Text: f.ReplacementText(rp)}
	call.Facts = append(call.Facts,
		KV{"Defender", fmt.Sprintf("%s: least EAC %s, kept %s", d.Alt.Name, f.Money(-d.AW), yearsText(d.Economic))},
		KV{"Challenger", fmt.Sprintf("%s: least EAC %s, kept %s", c.Alt.Name, f.Money(-c.AW), yearsText(c.Economic))},
	)
	if rp.Keep {
		call.Facts = append(call.Facts, KV{"Revisit", fmt.Sprintf("year %d (replace then at these estimates)", rp.ReplaceAfter)})
	} else {
		call.Facts = append(call.Facts, KV{"Revisit", fmt.Sprintf("year %d (the challenger's economic service life)", c.Economic)})
	}
	call.Facts = append(call.Facts, KV{"Rate", f.RateText(rp.Rate)})
	out = append(out, call)
	out = append(out, Paragraph{Text: []Inline{{Text: "The year to replace is the K that makes least the present cost of keeping the defender K more years and then serving with challengers, each renewed at its economic service life at its least EAC (K = 0 is replacing now). It agrees with comparing the two least EACs: the defender is worth keeping exactly when its least EAC is below the challenger's."}}})
	for _, s := range []*compute.ServiceAsset{d, c} {
		eq := Equations{Title: fmt.Sprintf("Worked solution: %s kept %s (%s)", s.Alt.Name, yearsText(s.Economic), s.Role)}
		for _, w := range s.Work {
			eq.Steps = append(eq.Steps, f.Equation(w))
		}
		out = append(out, eq)
	}
	out = append(out, b.eacChart(rp))
	return out
}

// marketRule describes how an asset's market value falls with age.
func (b *builder) marketRule(s *compute.ServiceAsset) string {
	f := b.f
	switch s.Market {
	case "declining":
		return fmt.Sprintf("%s × (1 − %s)^k", f.Money(s.MarketValue[0]), f.Rate(s.Decline))
	case "straight line":
		return fmt.Sprintf("straight line from %s to %s over %s", f.Money(s.MarketValue[0]), f.Money(s.MarketValue[len(s.MarketValue)-1]), yearsText(len(s.MarketValue)-1))
	}
	return "as listed"
}

// eacChart is equivalent annual cost against years kept, for both assets,
// with each economic service life marked.
func (b *builder) eacChart(rp *compute.Replacement) Chart {
	ch := Chart{
		Kind:    "lines",
		Title:   "Equivalent annual cost against years kept",
		XLabel:  "Years kept",
		YLabel:  "Equivalent annual cost",
		XFormat: "year",
		YFormat: "money",
		Source:  fmt.Sprintf("replacement %s, line %d", rp.ID, rp.Line),
	}
	xmax := 1.0
	ylo, yhi := math.Inf(1), math.Inf(-1)
	var alt []string
	for k, s := range []*compute.ServiceAsset{rp.Defender, rp.Challenger} {
		ser := Series{Name: fmt.Sprintf("%s (%s)", s.Alt.Name, s.Role), Emphasis: true}
		for _, l := range s.Lives {
			ser.X = append(ser.X, float64(l.Years))
			ser.Y = append(ser.Y, -l.AW)
			xmax = math.Max(xmax, float64(l.Years))
			ylo, yhi = math.Min(ylo, -l.AW), math.Max(yhi, -l.AW)
		}
		ch.Series = append(ch.Series, ser)
		ch.Marks = append(ch.Marks, Mark{X: float64(s.Economic), Y: -s.AW, HasX: true, HasY: true, Series: k, Kind: "life",
			Label: fmt.Sprintf("%s: %s", yearsText(s.Economic), b.f.Money(-s.AW))})
		alt = append(alt, fmt.Sprintf("%s's least equivalent annual cost is %s, kept %s", s.Alt.Name, b.f.Money(-s.AW), yearsText(s.Economic)))
	}
	if rp.Keep && rp.ReplaceAfter != rp.Defender.Economic {
		k := rp.ReplaceAfter
		ch.Marks = append(ch.Marks, Mark{X: float64(k), Y: -rp.Defender.Lives[k-1].AW, HasX: true, HasY: true, Series: 0, Kind: "life",
			Label: "replace after " + yearsText(k)})
	}
	if rp.Keep {
		alt = append(alt, "at these estimates the defender is best replaced after "+yearsText(rp.ReplaceAfter))
	}
	if math.IsInf(ylo, 1) {
		ylo, yhi = 0, 1
	}
	if ylo == yhi {
		yhi = ylo + 1
	}
	ch.XMin, ch.XMax, ch.XTicks = b.axis(1, xmax, 12, "year", true)
	ch.YMin, ch.YMax, ch.YTicks = b.axis(ylo, yhi, 6, "money", false)
	ch.Alt = fmt.Sprintf("Equivalent annual cost of keeping each asset from 1 to %d years. %s.", int(xmax), capital(strings.Join(alt, "; ")))
	return ch
}

// ---- Markdown ----

// mdReplacement writes a replacement block as Markdown.
func mdReplacement(rep *compute.Report, f Format, x *parse.Replacement) string {
	var s strings.Builder
	mdNodes(&s, mdBuilder(rep, f).replacement(x))
	return s.String()
}

// mdFinance writes what a comparison adds for loans and after-tax results.
func mdFinance(s *strings.Builder, c *compute.Comparison, f Format) {
	nodes := mdBuilder(nil, f).financeNodes(c)
	if len(nodes) > 0 {
		s.WriteString("\n")
		mdNodes(s, nodes)
	}
}

// mdAltFinance writes what an alternative's inputs add: its loan schedule.
func mdAltFinance(s *strings.Builder, a *compute.Alternative, f Format) {
	if nodes := mdBuilder(nil, f).altFinance(a); len(nodes) > 0 {
		s.WriteString("\n")
		mdNodes(s, nodes)
	}
}

// mdAfterTaxSchedule writes the appendix table of an after-tax result.
func mdAfterTaxSchedule(s *strings.Builder, r *compute.Result, c *compute.Comparison, f Format) {
	mdNodes(s, []Node{mdBuilder(nil, f).afterTaxSchedule(r, c)})
}

// mdTaxConventions adds the conventions of the money basis, after-tax
// comparisons and loans to the Markdown appendix.
func mdTaxConventions(b *bytes.Buffer, rep *compute.Report, f Format) {
	for _, s := range f.taxConventions(rep) {
		b.WriteString(" " + s)
	}
}

// mdBuilder is a document builder with the Markdown writer's format (rep
// may be nil where the nodes need no more than the format).
func mdBuilder(rep *compute.Report, f Format) *builder {
	b := &builder{rep: rep, f: f, slugs: map[string]int{}}
	if rep != nil {
		b.m, b.src = rep.Memo, rep.Memo.Source
	}
	return b
}

// mdNodes writes document-model nodes as Markdown: tables with their
// captions and notes, paragraphs, callouts as quotes, equations as
// indented text, and a chart as its text description.
func mdNodes(s *strings.Builder, nodes []Node) {
	for _, n := range nodes {
		switch x := n.(type) {
		case Table:
			if x.Caption != "" {
				fmt.Fprintf(s, "**%s**\n\n", escapeMD(x.Caption))
			}
			right := make([]bool, len(x.Header))
			for i := range right {
				right[i] = i < len(x.Align) && x.Align[i] == 'r'
			}
			table(s, x.Header, x.Rows, right)
			if x.Note != "" {
				fmt.Fprintf(s, "\n%s\n", escapeMD(x.Note))
			}
			s.WriteString("\n")
		case Paragraph:
			s.WriteString(escapeMD(plain(x.Text)) + "\n\n")
		case Callout:
			fmt.Fprintf(s, "> **%s:** %s\n", x.Title, escapeMD(x.Text))
			for _, kv := range x.Facts {
				fmt.Fprintf(s, ">\n> **%s:** %s\n", kv.Key, escapeMD(kv.Value))
			}
			for _, it := range x.Items {
				fmt.Fprintf(s, ">\n> %s\n", escapeMD(it))
			}
			s.WriteString("\n")
		case Equations:
			fmt.Fprintf(s, "*%s*:\n\n", escapeMD(x.Title))
			for _, st := range x.Steps {
				fmt.Fprintf(s, "    # %s\n", st.Label)
				for _, l := range st.Lines(100) {
					fmt.Fprintf(s, "    %s\n", l)
				}
			}
			s.WriteString("\n")
		case Chart:
			fmt.Fprintf(s, "*Chart: %s.* %s\n\n", escapeMD(x.Title), escapeMD(x.Alt))
		}
	}
}

// ---- JSON ----

// jsonFinance is the report-level JSON of this file's features.
type jsonFinance struct {
	Amounts      string            `json:"amounts"`
	Replacements []jsonReplacement `json:"replacements,omitempty"`
}

// jsonResultFinance is what an after-tax result adds.
type jsonResultFinance struct {
	Schedule []jsonTaxYear `json:"schedule,omitempty"`
}

// jsonAltFinance is what an alternative adds.
type jsonAltFinance struct {
	Depreciation *jsonDepreciation `json:"depreciation,omitempty"`
	Loan         *jsonLoan         `json:"loan,omitempty"`
}

type jsonTaxYear struct {
	Year          int     `json:"year"`
	BeforeTax     float64 `json:"before_tax"`
	Depreciation  float64 `json:"depreciation"`
	TaxableIncome float64 `json:"taxable_income"`
	Tax           float64 `json:"tax"`
	AfterTax      float64 `json:"after_tax"`
	Interest      float64 `json:"interest"`
	Principal     float64 `json:"principal"`
	// In a year of disposal: the book value then and the gain over it.
	BookValue *float64 `json:"book_value,omitempty"`
	Gain      *float64 `json:"gain_on_disposal,omitempty"`
}

type jsonDepreciation struct {
	Method   string          `json:"method"`
	Years    int             `json:"years"`
	Rate     *float64        `json:"rate,omitempty"`
	Salvage  float64         `json:"salvage"`
	Basis    float64         `json:"basis"`
	Schedule []jsonDepRecord `json:"schedule"`
}

type jsonDepRecord struct {
	Year      int     `json:"year"`
	Deduction float64 `json:"deduction"`
	BookValue float64 `json:"book_value"`
}

type jsonLoan struct {
	Amount   float64          `json:"amount"`
	Rate     float64          `json:"rate"`
	Years    int              `json:"years"`
	Payment  float64          `json:"payment"`
	Schedule []jsonLoanRecord `json:"schedule"`
}

type jsonLoanRecord struct {
	Year      int     `json:"year"`
	Payment   float64 `json:"payment"`
	Interest  float64 `json:"interest"`
	Principal float64 `json:"principal"`
	Balance   float64 `json:"balance"`
}

type jsonReplacement struct {
	ID             string           `json:"id"`
	Rate           float64          `json:"rate"`
	Defender       jsonServiceAsset `json:"defender"`
	Challenger     jsonServiceAsset `json:"challenger"`
	Recommendation string           `json:"recommendation"` // "keep" or "replace"
	ReplaceAfter   int              `json:"replace_after_years"`
	Text           string           `json:"text"`
}

type jsonServiceAsset struct {
	Alternative   string            `json:"alternative"`
	FirstCost     float64           `json:"first_cost"`
	EconomicLife  int               `json:"economic_life"`
	AnnualWorth   float64           `json:"annual_worth"`
	ByYearsKept   []jsonServiceLife `json:"by_years_kept"`
	MarketValue   []float64         `json:"market_value"`
	SunkFirstCost *float64          `json:"sunk_first_cost,omitempty"`
}

type jsonServiceLife struct {
	Years       int     `json:"years"`
	MarketValue float64 `json:"market_value"`
	PresentWth  float64 `json:"present_worth"`
	AnnualWorth float64 `json:"annual_worth"`
}

// financeJSON is the report-level JSON.
func financeJSON(rep *compute.Report) jsonFinance {
	out := jsonFinance{Amounts: rep.Amounts}
	f := NewFormat(rep, false)
	for _, rp := range rep.Replacements {
		out.Replacements = append(out.Replacements, jsonReplacement{
			ID: rp.ID, Rate: rp.Rate.Effective,
			Defender: serviceJSON(rp.Defender), Challenger: serviceJSON(rp.Challenger),
			Recommendation: map[bool]string{true: "keep", false: "replace"}[rp.Keep],
			ReplaceAfter:   rp.ReplaceAfter,
			Text:           f.ReplacementText(rp),
		})
	}
	return out
}

func serviceJSON(s *compute.ServiceAsset) jsonServiceAsset {
	j := jsonServiceAsset{Alternative: s.Alt.ID, FirstCost: s.FirstCost, EconomicLife: s.Economic, AnnualWorth: s.AW, MarketValue: s.MarketValue}
	for _, l := range s.Lives {
		j.ByYearsKept = append(j.ByYearsKept, jsonServiceLife{Years: l.Years, MarketValue: l.MarketValue, PresentWth: l.PW, AnnualWorth: l.AW})
	}
	if s.SunkCost > 0 {
		v := s.SunkCost
		j.SunkFirstCost = &v
	}
	return j
}

// resultFinanceJSON is what a result adds: the after-tax schedule.
func resultFinanceJSON(r *compute.Result) jsonResultFinance {
	var out jsonResultFinance
	if r.AfterTax == nil {
		return out
	}
	for _, y := range r.AfterTax.Years {
		j := jsonTaxYear{Year: y.Year, BeforeTax: y.BeforeTax, Depreciation: y.Depreciation,
			TaxableIncome: y.TaxableIncome, Tax: y.Tax, AfterTax: y.AfterTax, Interest: y.Interest, Principal: y.Principal}
		if y.Disposal {
			bv, g := y.BookValue, y.Gain
			j.BookValue, j.Gain = &bv, &g
		}
		out.Schedule = append(out.Schedule, j)
	}
	return out
}

// altFinanceJSON is what an alternative adds: its depreciation over one
// life cycle and its loan.
func altFinanceJSON(a *compute.Alternative) jsonAltFinance {
	var out jsonAltFinance
	if d := a.Depreciation; d != nil {
		jd := &jsonDepreciation{Method: d.Method, Years: d.Years, Salvage: d.Salvage, Basis: a.FirstCost, Schedule: []jsonDepRecord{}}
		if d.Method == "declining balance" {
			r := d.Rate
			jd.Rate = &r
		}
		bv := a.FirstCost
		for k, x := range d.Deductions(a.FirstCost, a.Life) {
			bv -= x
			jd.Schedule = append(jd.Schedule, jsonDepRecord{Year: k + 1, Deduction: x, BookValue: bv})
		}
		out.Depreciation = jd
	}
	if l := a.Loan; l != nil {
		jl := &jsonLoan{Amount: l.Amount, Rate: l.Rate.Effective, Years: l.Years, Payment: l.Payment}
		for _, y := range l.Schedule {
			jl.Schedule = append(jl.Schedule, jsonLoanRecord{Year: y.Year, Payment: y.Payment, Interest: y.Interest, Principal: y.Principal, Balance: y.Balance})
		}
		out.Loan = jl
	}
	return out
}
