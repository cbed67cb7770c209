package render

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"worth/compute"
	"worth/parse"
)

// The analysis blocks (sensitivity, scenario, budget) in every writer: the
// words and tables are laid out once here (analysisText), then written as
// Markdown (mdAnalysis), as document-model nodes for HTML and PDF
// (builder.analysis) and as JSON (analysisJSON). Every number comes from
// the compute.Report.

// ---- words and tables, shared by the writers ----

// aTable is a table of an analysis block before it becomes Markdown or a
// document table.
type aTable struct {
	Caption string
	Header  []string
	Rows    [][]string
	Align   []byte // 'l' or 'r' per column
	Note    string
	Bold    []bool // rows to set in bold
}

// aPart is one piece of an analysis block's output, in order: a paragraph,
// a table, a list of sentences, a callout, or a chart (document model only).
type aPart struct {
	Para    string
	Table   *aTable
	Items   []string
	Callout *Callout
	Chart   func(b *builder) (Chart, bool)
	// Text is a plain-text figure for the Markdown writer (a tornado drawn
	// with characters).
	Text string
}

func findSensitivity(rep *compute.Report, src *parse.Sensitivity) *compute.Sensitivity {
	for _, s := range rep.Sensitivities {
		if s.Source == src {
			return s
		}
	}
	return nil
}

func findScenario(rep *compute.Report, src *parse.Scenario) *compute.Scenario {
	for _, s := range rep.Scenarios {
		if s.Source == src {
			return s
		}
	}
	return nil
}

func findBudget(rep *compute.Report, src *parse.Budget) *compute.Budget {
	for _, s := range rep.Budgets {
		if s.Source == src {
			return s
		}
	}
	return nil
}

// analysisParts lays out one analysis block.
func analysisParts(rep *compute.Report, ff Format, blk parse.Block) []aPart {
	f := newAFmt(rep, ff)
	switch x := blk.(type) {
	case *parse.Sensitivity:
		if s := findSensitivity(rep, x); s != nil {
			return sensitivityParts(f, s)
		}
	case *parse.Scenario:
		if s := findScenario(rep, x); s != nil {
			parts := scenarioParts(f, s)
			if len(rep.Scenarios) > 1 && rep.Scenarios[len(rep.Scenarios)-1] == s {
				parts = append(parts, scenarioSummary(f, rep))
			}
			return parts
		}
	case *parse.Budget:
		if b := findBudget(rep, x); b != nil {
			return budgetParts(f, b)
		}
	}
	return nil
}

// aFmt is the format of a report's analysis blocks: its Format, and the
// assumptions written as percentages ("power_escal = 2%"), whose values
// are shown as percentages too.
type aFmt struct {
	Format
	pct map[string]bool
}

func newAFmt(rep *compute.Report, f Format) aFmt {
	a := aFmt{Format: f, pct: map[string]bool{}}
	for _, x := range rep.Assumptions {
		if strings.HasSuffix(strings.TrimSpace(x.Expr), "%") {
			a.pct[x.Name] = true
		}
	}
	return a
}

func (b *builder) af() aFmt { return newAFmt(b.rep, b.f) }

// input formats a value of an input: the rate, or an assumption written as
// a percentage, as a percentage; another assumption as a number.
func (f aFmt) input(name string, rate bool, x float64) string {
	if rate || f.pct[name] {
		return f.Rate(x)
	}
	return f.Num(x)
}

// inputName is how an input is named in the report.
func inputName(name string, rate bool) string {
	if rate {
		return "interest rate"
	}
	return name
}

// inputLabel is an input's name at the head of a column or an axis: an
// assumption's name as written, "Interest rate" for the rate.
func inputLabel(name string, rate bool) string {
	if rate {
		return "Interest rate"
	}
	return name
}

// change is a signed percentage change from base to x: "+20%", "−38.8%".
func change(f Format, base, x float64) string {
	if base == 0 {
		return ""
	}
	d := (x - base) / math.Abs(base) * 100
	s := strconv.FormatFloat(math.Abs(d), 'f', 1, 64)
	s = strings.TrimSuffix(s, ".0")
	switch {
	case s == "0":
		return "±0%"
	case d < 0:
		return f.Minus + s + "%"
	}
	return "+" + s + "%"
}

// measureName is the decision measure of a sensitivity's margin.
func sensMeasure(s *compute.Sensitivity) string {
	if s.Measure == "annual worth" {
		return "annual worth"
	}
	if s.Compare.Horizon.Perpetual() {
		return "capitalized worth"
	}
	return "present worth"
}

func (s aPart) isZero() bool {
	return s.Para == "" && s.Table == nil && len(s.Items) == 0 && s.Callout == nil && s.Chart == nil && s.Text == ""
}

func marginText(f Format, p compute.WhatIf) string {
	if !p.Valid() {
		return "invalid"
	}
	return f.Money(p.Margin)
}

func sensitivityParts(f aFmt, s *compute.Sensitivity) []aPart {
	c := s.Compare
	var parts []aPart
	rec, rival := name(c, s.Recommended), name(c, s.RunnerUp)
	measure := sensMeasure(s)
	intro := fmt.Sprintf("How the decision of comparison %s responds to its inputs, one at a time, the others held at their base values. The margin is the %s of %s (recommended) less that of the best other choice, %s: %s at the base values. Where it turns negative, the recommendation changes.",
		c.ID, measure, rec, rival, f.Money(s.Margin))
	if s.Recommended == compute.DoNothing {
		intro = fmt.Sprintf("How the decision of comparison %s responds to its inputs, one at a time, the others held at their base values. Doing nothing is recommended; the margin is minus the %s of the best alternative, %s: %s at the base values. Where it turns negative, an alternative becomes worth doing.",
			c.ID, measure, rival, f.Money(s.Margin))
	}
	parts = append(parts, aPart{Para: intro})
	if len(s.Swings) > 0 {
		t := &aTable{
			Caption: "Sensitivity of comparison " + c.ID + ", widest swing first",
			Header:  []string{"Input", "Base value", "Low", "High", "Margin at low", "Margin at high", "Recommendation changes"},
			Align:   []byte{'l', 'r', 'r', 'r', 'r', 'r', 'l'},
			Note:    fmt.Sprintf("Margin: %s of %s less that of the best other choice; base %s. Each input is moved alone.", measure, rec, f.Money(s.Margin)),
		}
		for _, sw := range s.Swings {
			lo, hi := f.input(sw.Name, sw.Rate, sw.Low.Value), f.input(sw.Name, sw.Rate, sw.High.Value)
			if sw.Percent > 0 {
				lo += " (" + change(f.Format, sw.Base, sw.Low.Value) + ")"
				hi += " (" + change(f.Format, sw.Base, sw.High.Value) + ")"
			}
			t.Rows = append(t.Rows, []string{inputName(sw.Name, sw.Rate), f.input(sw.Name, sw.Rate, sw.Base), lo, hi,
				marginText(f.Format, sw.Low), marginText(f.Format, sw.High), swingVerdict(c, s.Recommended, sw)})
		}
		parts = append(parts, aPart{Table: t})
		parts = append(parts, aPart{Chart: func(b *builder) (Chart, bool) { return b.tornadoChart(s) }, Text: textTornado(f, s)})
		var invalid []string
		for _, sw := range s.Swings {
			for _, p := range []compute.WhatIf{sw.Low, sw.High} {
				if !p.Valid() {
					invalid = append(invalid, fmt.Sprintf("At %s = %s the memo cannot be computed: %s", inputName(sw.Name, sw.Rate), f.input(sw.Name, sw.Rate, p.Value), p.Invalid))
				}
			}
		}
		if len(invalid) > 0 {
			parts = append(parts, aPart{Items: invalid})
		}
	}
	if len(s.Spider) > 0 {
		parts = append(parts, aPart{Chart: func(b *builder) (Chart, bool) { return b.spiderChart(s) }, Table: spiderTable(f, s)})
	}
	for _, sw := range s.Ranges {
		sw := sw
		parts = append(parts, aPart{Table: sweepTable(f, s, sw), Chart: func(b *builder) (Chart, bool) { return b.sweepChart(s, sw) }})
		parts = append(parts, aPart{Para: sweepSentence(f, s, sw)})
	}
	if len(s.Breakevens) > 0 {
		call := &Callout{Kind: "note", Title: "Breakeven values"}
		for _, be := range s.Breakevens {
			call.Items = append(call.Items, breakevenSentence(f, s, be))
		}
		parts = append(parts, aPart{Callout: call})
	}
	return parts
}

// swingVerdict says whether a swing changes the recommendation.
func swingVerdict(c *compute.Comparison, rec string, sw *compute.Swing) string {
	var ch []string
	if sw.Low.Valid() && sw.Low.Recommended != rec {
		ch = append(ch, "at low: "+name(c, sw.Low.Recommended))
	}
	if sw.High.Valid() && sw.High.Recommended != rec {
		ch = append(ch, "at high: "+name(c, sw.High.Recommended))
	}
	if len(ch) == 0 {
		return "no"
	}
	return strings.Join(ch, "; ")
}

// textTornado draws the tornado with characters for the Markdown writer:
// one bar per input from its lower to its higher margin, on a common
// scale, with the base margin and zero marked.
func textTornado(f aFmt, s *compute.Sensitivity) string {
	const width = 40
	lo, hi := math.Min(0, s.Margin), math.Max(0, s.Margin)
	for _, sw := range s.Swings {
		for _, p := range []compute.WhatIf{sw.Low, sw.High} {
			if p.Valid() {
				lo, hi = math.Min(lo, p.Margin), math.Max(hi, p.Margin)
			}
		}
	}
	if hi <= lo {
		return ""
	}
	col := func(x float64) int { return int(math.Round((x - lo) / (hi - lo) * (width - 1))) }
	nameW := 0
	for _, sw := range s.Swings {
		nameW = max(nameW, len([]rune(inputName(sw.Name, sw.Rate))))
	}
	var b strings.Builder
	for _, sw := range s.Swings {
		row := []rune(strings.Repeat(" ", width))
		a, z := s.Margin, s.Margin
		for _, p := range []compute.WhatIf{sw.Low, sw.High} {
			if p.Valid() {
				a, z = math.Min(a, p.Margin), math.Max(z, p.Margin)
			}
		}
		for k := col(a); k <= col(z); k++ {
			row[k] = '█'
		}
		if k := col(0); row[k] == ' ' {
			row[k] = '┆'
		}
		row[col(s.Margin)] = '│'
		n := inputName(sw.Name, sw.Rate)
		fmt.Fprintf(&b, "%s%s  %s  %s to %s\n", n, strings.Repeat(" ", nameW-len([]rune(n))), string(row), f.Money(a), f.Money(z))
	}
	fmt.Fprintf(&b, "%s  │ base margin %s; ┆ zero: the decision changes past it\n", strings.Repeat(" ", nameW), f.Money(s.Margin))
	return b.String()
}

// spiderTable is the spider chart as a table: the margin at each
// percentage change of each input.
func spiderTable(f aFmt, s *compute.Sensitivity) *aTable {
	line := s.Spider[0]
	// Every other step of the chart's, so that the table stays narrow.
	keep := func(k int) bool { return k%2 == 0 || len(line.Percent) <= 5 }
	same := true
	for _, l := range s.Spider {
		same = same && len(l.Percent) == len(line.Percent) && l.Percent[0] == line.Percent[0]
	}
	t := &aTable{Caption: "Margin against the change in each input", Header: []string{"Input"}, Align: []byte{'l'}}
	if !same {
		// Inputs swung by different percentages: a column for the swing,
		// and the steps named by their place in it.
		t.Header = append(t.Header, "Swing")
		t.Align = append(t.Align, 'r')
	}
	for k, p := range line.Percent {
		if !keep(k) {
			continue
		}
		h := signedPct(f.Format, p)
		if !same {
			h = spiderStep(p / line.Percent[len(line.Percent)-1])
		}
		t.Header = append(t.Header, h)
		t.Align = append(t.Align, 'r')
	}
	for _, l := range s.Spider {
		row := []string{inputName(l.Name, l.Rate)}
		if !same {
			row = append(row, "±"+signedPct(f.Format, l.Percent[len(l.Percent)-1])[1:])
		}
		for k, p := range l.Points {
			if keep(k) {
				row = append(row, marginText(f.Format, p))
			}
		}
		t.Rows = append(t.Rows, row)
	}
	return t
}

// spiderStep names a step as a fraction of an input's swing.
func spiderStep(frac float64) string {
	switch {
	case frac == 0:
		return "Base"
	case frac == -1:
		return "Low end"
	case frac == 1:
		return "High end"
	case frac < 0:
		return fmt.Sprintf("%s down", strconv.FormatFloat(-frac*100, 'f', -1, 64)+"%")
	}
	return fmt.Sprintf("%s up", strconv.FormatFloat(frac*100, 'f', -1, 64)+"%")
}

func signedPct(f Format, p float64) string {
	s := strconv.FormatFloat(math.Abs(p)*100, 'f', 1, 64)
	s = strings.TrimSuffix(s, ".0") + "%"
	switch {
	case p < 0:
		return f.Minus + s
	case p > 0:
		return "+" + s
	}
	return "0%"
}

// sweepTable shows a range's sweep at a few of its values and at each
// change of recommendation.
func sweepTable(f aFmt, s *compute.Sensitivity, sw *compute.Sweep) *aTable {
	c := s.Compare
	word := capital(sensMeasure(s))
	t := &aTable{
		Caption: fmt.Sprintf("%s across %s from %s to %s", word, inputName(sw.Name, sw.Rate), f.input(sw.Name, sw.Rate, sw.From), f.input(sw.Name, sw.Rate, sw.To)),
		Header:  []string{inputLabel(sw.Name, sw.Rate)},
		Align:   []byte{'r'},
	}
	for _, r := range c.Results {
		t.Header = append(t.Header, r.Alt.Name)
		t.Align = append(t.Align, 'r')
	}
	t.Header = append(t.Header, "Recommended")
	t.Align = append(t.Align, 'l')
	// A few rows: the ends and the multiples of a round step.
	step := compute.NiceStep((sw.To - sw.From) / 8)
	shown := 0
	for k, p := range sw.Points {
		if q := p.Value / step; k != 0 && k != len(sw.Points)-1 &&
			(math.Abs(q-math.Round(q)) > 1e-6 || p.Value-sw.From < step/2 || sw.To-p.Value < step/2) {
			continue
		}
		shown++
		row := []string{f.input(sw.Name, sw.Rate, p.Value)}
		for j := range c.Results {
			if !p.Valid() {
				row = append(row, "—")
			} else {
				row = append(row, f.Money(p.Worths[j]))
			}
		}
		if p.Valid() {
			row = append(row, name(c, p.Recommended))
		} else {
			row = append(row, "invalid: "+p.Invalid)
		}
		t.Rows = append(t.Rows, row)
	}
	t.Note = fmt.Sprintf("Computed at %d values from %s to %s; %d shown here, all in the chart.", len(sw.Points), f.input(sw.Name, sw.Rate, sw.From), f.input(sw.Name, sw.Rate, sw.To), shown)
	return t
}

// sweepSentence says where a sweep changes the recommendation.
func sweepSentence(f aFmt, s *compute.Sensitivity, sw *compute.Sweep) string {
	c := s.Compare
	n := inputName(sw.Name, sw.Rate)
	var parts []string
	for _, ch := range sw.Changes {
		if sw.Discrete {
			parts = append(parts, fmt.Sprintf("from %s to %s between %s = %s and %s", name(c, ch.From), name(c, ch.To), n, f.input(sw.Name, sw.Rate, ch.Lo), f.input(sw.Name, sw.Rate, ch.Hi)))
			continue
		}
		at := f.input(sw.Name, sw.Rate, ch.At)
		if !ch.Exact {
			at = "about " + at
		}
		parts = append(parts, fmt.Sprintf("from %s to %s at %s = %s", name(c, ch.From), name(c, ch.To), n, at))
	}
	invalid := 0
	for _, p := range sw.Points {
		if !p.Valid() {
			invalid++
		}
	}
	var out string
	if len(parts) == 0 {
		first := ""
		for _, p := range sw.Points {
			if p.Valid() {
				first = p.Recommended
				break
			}
		}
		if first == "" {
			return fmt.Sprintf("Across %s from %s to %s the memo cannot be computed.", n, f.input(sw.Name, sw.Rate, sw.From), f.input(sw.Name, sw.Rate, sw.To))
		}
		out = fmt.Sprintf("Across %s from %s to %s the recommendation stays %s.", n, f.input(sw.Name, sw.Rate, sw.From), f.input(sw.Name, sw.Rate, sw.To), name(c, first))
	} else {
		out = fmt.Sprintf("Across %s from %s to %s the recommendation changes %s.", n, f.input(sw.Name, sw.Rate, sw.From), f.input(sw.Name, sw.Rate, sw.To), strings.Join(parts, ", then "))
	}
	if invalid > 0 {
		out += fmt.Sprintf(" At %d of the %d values the memo cannot be computed (the table says why); the chart leaves them out.", invalid, len(sw.Points))
	}
	return out
}

// breakevenSentence states one breakeven, or that none was found.
func breakevenSentence(f aFmt, s *compute.Sensitivity, be *compute.Breakeven) string {
	c := s.Compare
	n := inputLabel(be.Name, be.Rate)
	base := f.input(be.Name, be.Rate, be.Base)
	switch {
	case be.NoEffect:
		return fmt.Sprintf("%s: does not affect comparison %s; there is no breakeven.", n, c.ID)
	case be.Tied:
		return fmt.Sprintf("%s: the alternatives are tied at the base value, %s, which is itself the breakeven.", n, base)
	case be.Value == nil:
		out := fmt.Sprintf("%s: no breakeven between %s and %s; %s stays recommended throughout (base %s).", n,
			f.input(be.Name, be.Rate, be.SearchedLow), f.input(be.Name, be.Rate, be.SearchedHigh), name(c, s.Recommended), base)
		for _, l := range be.Limits {
			out += " The search stopped " + l + "."
		}
		return out
	}
	v := *be.Value
	if be.Discrete {
		out := fmt.Sprintf("%s (whole numbers only): %s stays recommended at %s and %s is recommended at %s (base %s).", n, name(c, s.Recommended),
			f.input(be.Name, be.Rate, be.Holds), name(c, be.To), f.input(be.Name, be.Rate, v), base)
		if be.Other != nil {
			out += fmt.Sprintf(" On the other side of the base value it changes to %s at %s.", name(c, be.OtherTo), f.input(be.Name, be.Rate, *be.Other))
		}
		return out
	}
	out := fmt.Sprintf("%s: the recommendation changes from %s to %s at %s (base %s, %s).", n, name(c, s.Recommended), name(c, be.To),
		f.input(be.Name, be.Rate, v), base, change(f.Format, be.Base, v))
	if be.Verified {
		out += fmt.Sprintf(" Substituted back, the margin there is %s and the recommendation differs just on either side.", f.Money(be.MarginAt))
	} else {
		out += " Substituted back, this value could not be confirmed (the margin jumps there), so treat it as approximate."
	}
	if be.Other != nil {
		out += fmt.Sprintf(" On the other side of the base value it changes to %s at %s.", name(c, be.OtherTo), f.input(be.Name, be.Rate, *be.Other))
	}
	return out
}

// ---- scenarios ----

func scenarioParts(f aFmt, s *compute.Scenario) []aPart {
	var parts []aPart
	var vals []string
	for _, v := range s.Values {
		n := v.Name
		val := f.input(v.Name, v.Rate, v.Value)
		text := n + " = " + val
		if !v.Rate && strings.TrimSpace(v.Text) != val && strings.TrimSpace(v.Text) != f.Num(v.Value) && !plainNumber(v.Text) {
			text = fmt.Sprintf("%s = %s = %s", n, v.Text, val)
		}
		if !math.IsNaN(v.Base) {
			text += " (base " + f.input(v.Name, v.Rate, v.Base) + ")"
		}
		vals = append(vals, text)
	}
	title := "Scenario " + s.ID
	if s.Name != s.ID {
		title += " (" + s.Name + ")"
	}
	parts = append(parts, aPart{Para: title + " sets " + andList(vals) + ". Every other input keeps its base value, and every assumption that uses a changed one follows it."})
	var changed, same []string
	for _, r := range s.Comparisons {
		c := r.Base
		if unchanged(r) {
			same = append(same, c.ID)
			continue
		}
		word := capital(measureWord(c))
		if c.Horizon.Perpetual() && word == "Present worth" {
			word = "Capitalized worth"
		}
		t := &aTable{
			Caption: fmt.Sprintf("Comparison %s under scenario %s", c.ID, s.ID),
			Header:  []string{"Alternative", word + ", base case", word + ", scenario", "Change"},
			Align:   []byte{'l', 'r', 'r', 'r'},
		}
		for k, res := range c.Results {
			u := r.Under.Results[k]
			b, x := measureOf(c, res), measureOf(r.Under, u)
			t.Rows = append(t.Rows, []string{res.Alt.Name, f.Money(b), f.Money(x), signedMoney(f.Format, x-b)})
			t.Bold = append(t.Bold, false)
		}
		t.Rows = append(t.Rows, []string{"Recommended", name(c, c.Recommended), name(r.Under, r.Under.Recommended), ""})
		t.Bold = append(t.Bold, true)
		t.Note = fmt.Sprintf("Rate %s in the base case, %s under the scenario.", f.Rate(c.Rate.Effective), f.Rate(r.Under.Rate.Effective))
		parts = append(parts, aPart{Table: t})
		if r.Changed() {
			changed = append(changed, fmt.Sprintf("comparison %s recommends %s instead of %s", c.ID, name(r.Under, r.Under.Recommended), name(c, c.Recommended)))
		}
	}
	if len(same) > 0 {
		verb := "does not use the changed inputs and is unchanged"
		if len(same) > 1 {
			verb = "do not use the changed inputs and are unchanged"
		}
		parts = append(parts, aPart{Para: fmt.Sprintf("%s %s %s.", plural(len(same), "Comparison", "Comparisons"), andList(same), verb)})
	}
	if len(changed) > 0 {
		parts = append(parts, aPart{Callout: &Callout{Kind: "warning", Title: "The recommendation changes", Text: "Under scenario " + s.Name + ", " + strings.Join(changed, "; ") + "."}})
	} else if len(s.Comparisons) > 0 {
		parts = append(parts, aPart{Para: "Under this scenario no recommendation changes."})
	}
	return parts
}

// unchanged reports whether a scenario leaves a comparison exactly as it
// is in the base case.
func unchanged(r *compute.ScenarioResult) bool {
	if r.Base.Rate.Effective != r.Under.Rate.Effective || r.Changed() {
		return false
	}
	for k, res := range r.Base.Results {
		if res.PW != r.Under.Results[k].PW || res.AW != r.Under.Results[k].AW {
			return false
		}
	}
	return true
}

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

// andList joins words as "a", "a and b", "a, b and c".
func andList(xs []string) string {
	if len(xs) <= 1 {
		return strings.Join(xs, "")
	}
	return strings.Join(xs[:len(xs)-1], ", ") + " and " + xs[len(xs)-1]
}

// plainNumber reports whether text is a number as written, with no names.
func plainNumber(s string) bool {
	for _, r := range s {
		if r >= 'a' && r <= 'z' && r != 'k' || r >= 'A' && r <= 'Z' && r != 'M' || r == '_' {
			return false
		}
	}
	return true
}

func measureOf(c *compute.Comparison, r *compute.Result) float64 {
	if c.DecideBy == "annual worth" {
		return r.AW
	}
	return r.PW
}

func signedMoney(f Format, x float64) string {
	if x > 0 && f.Money(x) != f.Money(0) {
		return "+" + f.Money(x)
	}
	return f.Money(x)
}

// scenarioSummary is the recommendation of every comparison in the base
// case and under every scenario, shown after the last scenario block.
func scenarioSummary(f aFmt, rep *compute.Report) aPart {
	t := &aTable{Caption: "Recommendations under every scenario", Header: []string{"Comparison", "Base case"}, Align: []byte{'l', 'l'}}
	for _, s := range rep.Scenarios {
		t.Header = append(t.Header, s.Name)
		t.Align = append(t.Align, 'l')
	}
	for _, c := range rep.Comparisons {
		row := []string{c.ID, name(c, c.Recommended)}
		for _, s := range rep.Scenarios {
			cell := "—"
			for _, r := range s.Comparisons {
				if r.Base == c {
					cell = name(r.Under, r.Under.Recommended)
					if r.Changed() {
						cell += " (changed)"
					}
				}
			}
			row = append(row, cell)
		}
		t.Rows = append(t.Rows, row)
	}
	return aPart{Table: t}
}

// ---- budgets ----

func budgetParts(f aFmt, bu *compute.Budget) []aPart {
	var parts []aPart
	intro := fmt.Sprintf("Budget %s: at most one alternative from each of %d projects, or none, chosen to give the greatest total present worth with total first cost within %s. The choice is exact: every undominated combination was weighed, not ranked one by one.", bu.ID, len(bu.Projects), f.Money(bu.Limit))
	parts = append(parts, aPart{Para: intro})
	if !bu.Feasible {
		parts = append(parts, aPart{Callout: &Callout{Kind: "warning", Title: "Nothing fits", Text: fmt.Sprintf("The required projects alone cost more than the limit of %s; no program fits.", f.Money(bu.Limit))}})
	}
	t := &aTable{
		Caption: "Program within " + f.Money(bu.Limit),
		Header:  []string{"Project", "Alternative", "First cost", "Present worth", "In the program"},
		Align:   []byte{'l', 'l', 'r', 'r', 'l'},
	}
	var left []string
	for _, p := range bu.Projects {
		c := p.Comparison
		proj := c.ID
		if p.Required {
			proj += " (required)"
		}
		for k, o := range p.Options {
			in := ""
			if k == p.Choice {
				in = "chosen"
			}
			t.Rows = append(t.Rows, []string{proj, o.Name, f.Money(o.FirstCost), f.Money(o.PW), in})
			t.Bold = append(t.Bold, k == p.Choice)
			proj = ""
		}
		if p.Chosen() == nil {
			left = append(left, leftOutReason(f, p, bu))
		}
	}
	if bu.Feasible {
		t.Rows = append(t.Rows, []string{"Total", "", f.Money(bu.TotalFirstCost), f.Money(bu.TotalPW), f.Money(bu.Limit-bu.TotalFirstCost) + " of the limit unspent"})
		t.Bold = append(t.Bold, true)
	}
	t.Note = "Each alternative's first cost, and its present worth in its own comparison (at that comparison's rate and horizon)."
	parts = append(parts, aPart{Table: t})
	if len(left) > 0 {
		parts = append(parts, aPart{Para: "Left out:", Items: left})
	}
	g := &aTable{
		Caption: "The best program as the limit grows",
		Header:  []string{"Limit", "Chosen", "First cost", "Present worth"},
		Align:   []byte{'r', 'l', 'r', 'r'},
	}
	for _, s := range bu.Growth {
		lim := f.Money(s.Limit) + " (" + strconv.Itoa(int(math.Round(s.Limit/bu.Limit*100))) + "%)"
		if !s.Feasible {
			g.Rows = append(g.Rows, []string{lim, "nothing fits", "", ""})
			g.Bold = append(g.Bold, false)
			continue
		}
		g.Rows = append(g.Rows, []string{lim, chosenNames(bu, s.Chosen), f.Money(s.TotalFirstCost), f.Money(s.TotalPW)})
		g.Bold = append(g.Bold, math.Abs(s.Limit-bu.Limit) < 1e-9*bu.Limit)
	}
	parts = append(parts, aPart{Table: g})
	if bu.Next != nil && bu.Feasible {
		n := bu.Next
		parts = append(parts, aPart{Para: fmt.Sprintf("The next step up: a limit of %s (%s more) would %s, raising the total present worth by %s to %s.",
			f.Money(n.TotalFirstCost), f.Money(n.TotalFirstCost-bu.Limit), programChange(bu, n.Chosen), f.Money(n.TotalPW-bu.TotalPW), f.Money(n.TotalPW))})
	} else if bu.Feasible {
		parts = append(parts, aPart{Para: "No larger limit would add present worth: every project already contributes its best alternative, or none is worth its cost."})
	}
	return parts
}

// leftOutReason says why a project contributes nothing.
func leftOutReason(f aFmt, p *compute.BudgetProject, bu *compute.Budget) string {
	c := p.Comparison
	best := -1
	for k, o := range p.Options {
		if best < 0 || o.PW > p.Options[best].PW {
			best = k
		}
	}
	if best < 0 || p.Options[best].PW <= 0 {
		if c.CostOnly {
			return fmt.Sprintf("%s: every alternative only costs money (no present worth above zero); mark it required to fund its least-cost alternative.", c.ID)
		}
		return fmt.Sprintf("%s: no alternative has a positive present worth.", c.ID)
	}
	o := p.Options[best]
	return fmt.Sprintf("%s: its best alternative, %s (%s, first cost %s), does not fit beside better uses of the limit.", c.ID, o.Name, f.Money(o.PW), f.Money(o.FirstCost))
}

// programChange says how a program with the given chosen alternatives
// differs from the budget's chosen program, project by project.
func programChange(bu *compute.Budget, ids []string) string {
	in := map[string]bool{}
	for _, id := range ids {
		in[id] = true
	}
	var out []string
	for _, p := range bu.Projects {
		was, now := p.Chosen(), (*compute.BudgetOption)(nil)
		for k := range p.Options {
			if in[p.Options[k].ID] {
				now = &p.Options[k]
			}
		}
		switch {
		case was == nil && now != nil:
			out = append(out, fmt.Sprintf("add %s (%s)", now.Name, p.Comparison.ID))
		case was != nil && now == nil:
			out = append(out, fmt.Sprintf("drop %s (%s)", was.Name, p.Comparison.ID))
		case was != nil && now != nil && was.ID != now.ID:
			out = append(out, fmt.Sprintf("take %s instead of %s (%s)", now.Name, was.Name, p.Comparison.ID))
		}
	}
	if len(out) == 0 {
		return "keep the same program"
	}
	return andList(out)
}

// chosenNames lists chosen alternatives by name with their project.
func chosenNames(bu *compute.Budget, ids []string) string {
	if len(ids) == 0 {
		return "nothing"
	}
	var out []string
	for _, id := range ids {
		for _, p := range bu.Projects {
			for _, o := range p.Options {
				if o.ID == id {
					out = append(out, o.Name)
				}
			}
		}
	}
	return strings.Join(out, "; ")
}

// ---- Markdown ----

// mdAnalysis writes an analysis block as Markdown.
func mdAnalysis(rep *compute.Report, f Format, blk parse.Block) string {
	var b strings.Builder
	for _, p := range analysisParts(rep, f, blk) {
		if p.Para != "" {
			b.WriteString(escapeMD(p.Para) + "\n\n")
		}
		if p.Table != nil {
			if p.Table.Caption != "" {
				fmt.Fprintf(&b, "**%s**\n\n", escapeMD(p.Table.Caption))
			}
			right := make([]bool, len(p.Table.Align))
			for k, a := range p.Table.Align {
				right[k] = a == 'r'
			}
			table(&b, p.Table.Header, p.Table.Rows, right)
			if p.Table.Note != "" {
				fmt.Fprintf(&b, "\n%s\n", escapeMD(p.Table.Note))
			}
			b.WriteString("\n")
		}
		if p.Text != "" {
			for _, l := range strings.Split(strings.TrimRight(p.Text, "\n"), "\n") {
				b.WriteString("    " + l + "\n")
			}
			b.WriteString("\n")
		}
		if len(p.Items) > 0 {
			for _, it := range p.Items {
				fmt.Fprintf(&b, "- %s\n", escapeMD(it))
			}
			b.WriteString("\n")
		}
		if p.Callout != nil {
			c := p.Callout
			fmt.Fprintf(&b, "> **%s.**", escapeMD(c.Title))
			if c.Text != "" {
				fmt.Fprintf(&b, " %s", escapeMD(c.Text))
			}
			b.WriteString("\n")
			for _, it := range c.Items {
				fmt.Fprintf(&b, ">\n> - %s\n", escapeMD(it))
			}
			b.WriteString("\n")
		}
	}
	return strings.TrimRight(b.String(), "\n") + "\n"
}

// ---- the document model ----

// analysis lays out an analysis block as document nodes.
func (b *builder) analysis(blk parse.Block) []Node {
	var out []Node
	h := blk.Head()
	src := fmt.Sprintf("%s %s, %s", h.Kind, h.ID, lineRange(h))
	for _, p := range analysisParts(b.rep, b.f, blk) {
		if p.Para != "" {
			out = append(out, Paragraph{Text: []Inline{{Text: p.Para}}})
		}
		if len(p.Items) > 0 {
			l := List{}
			for _, it := range p.Items {
				l.Items = append(l.Items, []Node{Paragraph{Text: []Inline{{Text: it}}}})
			}
			out = append(out, l)
		}
		if p.Chart != nil {
			if ch, ok := p.Chart(b); ok {
				ch.Source = src
				out = append(out, ch)
			}
		}
		if p.Table != nil {
			t := Table{Caption: p.Table.Caption, Header: p.Table.Header, Rows: p.Table.Rows, Align: p.Table.Align, Note: p.Table.Note, Source: src}
			if len(p.Table.Bold) == len(p.Table.Rows) {
				t.BoldRows = p.Table.Bold
			}
			out = append(out, t)
		}
		if p.Callout != nil {
			out = append(out, *p.Callout)
		}
	}
	return out
}

// tornadoChart is the tornado of a sensitivity block: one bar per input,
// widest swing at the top, from the base margin to the margin at the
// input's low and at its high value.
func (b *builder) tornadoChart(s *compute.Sensitivity) (Chart, bool) {
	rec := name(s.Compare, s.Recommended)
	ch := Chart{
		Kind:    "tornado",
		Title:   fmt.Sprintf("Tornado: margin of %s as each input swings alone", rec),
		XLabel:  fmt.Sprintf("Margin (%s) of %s over the best other choice", sensMeasure(s), rec),
		XFormat: "money",
	}
	lo, hi := math.Min(0, s.Margin), math.Max(0, s.Margin)
	var alt []string
	for _, sw := range s.Swings {
		bar := Bar{Label: inputName(sw.Name, sw.Rate), Base: s.Margin, Low: sw.Low.Margin, High: sw.High.Margin,
			LowLabel: b.af().input(sw.Name, sw.Rate, sw.Low.Value), HighLabel: b.af().input(sw.Name, sw.Rate, sw.High.Value)}
		for _, v := range []float64{bar.Low, bar.High} {
			if !math.IsNaN(v) {
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
		ch.Bars = append(ch.Bars, bar)
		alt = append(alt, fmt.Sprintf("%s %s at %s and %s at %s", bar.Label, marginText(b.f, sw.Low), bar.LowLabel, marginText(b.f, sw.High), bar.HighLabel))
	}
	if len(ch.Bars) == 0 {
		return Chart{}, false
	}
	if hi <= lo {
		hi = lo + 1
	}
	pad := (hi - lo) * 0.04
	ch.XMin, ch.XMax, ch.XTicks = b.axis(lo-pad, hi+pad, 7, "money", false)
	ch.Marks = append(ch.Marks, Mark{X: s.Margin, HasX: true, Label: "base " + b.f.Money(s.Margin), Series: -1, Kind: "rate"})
	if s.Margin != 0 {
		ch.Marks = append(ch.Marks, Mark{X: 0, HasX: true, Label: "zero: the decision changes", Series: -1, Kind: "crossover"})
	}
	ch.Alt = fmt.Sprintf("Tornado chart of the margin of %s over the best other choice, %s at the base values, as each input moves alone to its low and its high value, widest swing first: %s.", rec, b.f.Money(s.Margin), strings.Join(alt, "; "))
	return ch, true
}

// tornadoLegend names the two halves of every bar.
var tornadoLegend = [2]string{"input at its low value", "input at its high value"}

// layoutTornado lays out a tornado chart for the HTML writer: a row per
// bar, its category on the left, the two halves in the first two series
// colours, the values of the input at the bar ends, and the base and zero
// lines.
func layoutTornado(c *Chart, id string) svgChart {
	const W, rowH, barH = 720.0, 30.0, 15.0
	labelW := 0.0
	for _, b := range c.Bars {
		labelW = math.Max(labelW, textWidth(b.Label, tickSize))
	}
	top := 34.0
	H := top + rowH*float64(len(c.Bars)) + 44
	out := svgChart{ID: id, Kind: "tornado", W: int(W), H: int(math.Ceil(H)), Title: c.Title, Desc: c.Alt, Notes: c.Notes}
	f := frame{left: math.Max(80, labelW+18), top: top, right: W - 24, bottom: top + rowH*float64(len(c.Bars)),
		xmin: c.XMin, xmax: c.XMax, ymin: 0, ymax: 1}
	if f.xmax <= f.xmin {
		f.xmax = f.xmin + 1
	}
	out.Groups = append(out.Groups, axes(c, f, H, false))
	bars := svgGroup{Class: "series"}
	labels := svgGroup{Class: "marks"}
	p := &placer{bounds: labelBox{f.left - 4, f.top - 30, W, f.bottom}}
	for k, b := range c.Bars {
		yc := f.top + (float64(k)+0.5)*rowH
		labels.Texts = append(labels.Texts, svgText{X: coord(f.left - 8), Y: coord(yc + 4), Anchor: "end", Class: "tick", Text: b.Label})
		x0 := f.x(b.Base)
		ends := []struct {
			v     float64
			label string
			cls   string
		}{{b.Low, b.LowLabel, seriesClass(0)}, {b.High, b.HighLabel, seriesClass(1)}}
		// The longer half first, so that the shorter stays visible on it.
		if math.Abs(b.High-b.Base) > math.Abs(b.Low-b.Base) {
			ends[0], ends[1] = ends[1], ends[0]
		}
		for _, e := range ends {
			if math.IsNaN(e.v) {
				continue
			}
			x1 := f.x(e.v)
			if math.Abs(x1-x0) < 1.5 {
				x1 = x0 + 1.5
			}
			bars.Paths = append(bars.Paths, svgPath{"M" + coord(x0) + " " + coord(yc) + "H" + coord(x1), e.cls, coord(barH)})
		}
		for _, e := range ends {
			// Beside the bar's end, else just inside it.
			type try struct {
				x      float64
				anchor string
			}
			var tries []try
			text := e.label
			switch x := f.x(e.v); {
			case math.IsNaN(e.v):
				text = e.label + ": invalid"
				tries = []try{{x0 + 4, "start"}, {x0 - 4, "end"}}
			case e.v >= b.Base:
				tries = []try{{x + 4, "start"}, {x - 4, "end"}}
			default:
				tries = []try{{x - 4, "end"}, {x + 4, "start"}}
			}
			for _, t := range tries {
				if pos, ok := p.place(text, labelSize, t.anchor, [][2]float64{{t.x, yc + 4}}); ok {
					labels.Texts = append(labels.Texts, svgText{X: coord(pos[0]), Y: coord(pos[1]), Anchor: t.anchor, Class: "mark-label", Text: text})
					break
				}
			}
		}
	}
	out.Groups = append(out.Groups, bars)
	for _, m := range c.Marks {
		if !m.HasX || m.X < f.xmin || m.X > f.xmax {
			continue
		}
		x := f.x(m.X)
		labels.Lines = append(labels.Lines, svgLine{coord(x), coord(f.top - 6), coord(x), coord(f.bottom), "refline"})
		cands := [][2]float64{{x + 4, f.top - 10}, {x - 4, f.top - 10}, {x + 4, f.top - 22}, {x - 4, f.top - 22}}
		for k, cand := range cands {
			anchor := "start"
			if k%2 == 1 {
				anchor = "end"
			}
			if pos, ok := p.place(m.Label, labelSize, anchor, [][2]float64{cand}); ok {
				labels.Texts = append(labels.Texts, svgText{X: coord(pos[0]), Y: coord(pos[1]), Anchor: anchor, Class: "mark-label", Text: m.Label})
				break
			}
		}
	}
	out.Groups = append(out.Groups, labels)
	out.Legend = []svgLegend{{tornadoLegend[0], seriesClass(0)}, {tornadoLegend[1], seriesClass(1)}}
	return out
}

// tornadoHeight is the height a tornado chart's plot takes in the PDF.
func tornadoHeight(c *Chart) float64 {
	return 30 + 19*float64(len(c.Bars)) + 40
}

// tornadoPDF draws a tornado chart in area a of the PDF.
func (w *pdfWriter) tornadoPDF(c *Chart, a pdfRect) {
	n := float64(len(c.Bars))
	if n == 0 {
		return
	}
	labelW := 0.0
	for _, b := range c.Bars {
		labelW = math.Max(labelW, pdfStrWidth(pdfClean(b.Label, fRegular), fRegular, pdfChartTextSize))
	}
	plot := pdfRect{a.x + labelW + 10, a.y + 22, 0, 0}
	plot.w = a.x + a.w - plot.x - 14
	plot.h = a.h - 22 - 40
	rowH := plot.h / n
	barH := math.Min(10, rowH*0.55)
	xlo, xhi := c.XMin, c.XMax
	if xhi <= xlo {
		xhi = xlo + 1
	}
	px := func(x float64) float64 { return plot.x + (x-xlo)/(xhi-xlo)*plot.w }
	// Grid and ticks.
	lastRight := math.Inf(-1)
	for _, t := range c.XTicks {
		if t.At < xlo-1e-9*(xhi-xlo) || t.At > xhi+1e-9*(xhi-xlo) {
			continue
		}
		x := px(t.At)
		w.setDraw(pdfColGrid, 0.4)
		w.pdf.Line(x, plot.y, x, plot.y+plot.h)
		s := pdfClean(t.Label, fRegular)
		lw := pdfStrWidth(s, fRegular, pdfChartTextSize)
		if x-lw/2 > lastRight+3 {
			w.textCenter(x, plot.y+plot.h+4+pdfChartTextSize, s, fRegular, pdfChartTextSize, pdfColMuted)
			lastRight = x + lw/2
		}
	}
	w.setDraw(pdfColAxis, 0.6)
	w.pdf.Line(plot.x, plot.y+plot.h, plot.x+plot.w, plot.y+plot.h)
	w.pdf.Line(plot.x, plot.y, plot.x, plot.y+plot.h)
	if c.XLabel != "" {
		w.textCenter(plot.x+plot.w/2, plot.y+plot.h+16+pdfChartTextSize, pdfFit(c.XLabel, fItalic, pdfChartTextSize, plot.w), fItalic, pdfChartTextSize, pdfColMuted)
	}
	var taken []pdfRect
	label := func(s string, x, y float64, right bool) bool {
		s = pdfClean(s, fRegular)
		lw := pdfStrWidth(s, fRegular, pdfChartTextSize)
		r := pdfRect{x, y - pdfChartTextSize, lw, pdfChartTextSize + 2}
		if !right {
			r.x = x - lw
		}
		if r.x < plot.x || r.x+r.w > a.x+a.w {
			return false
		}
		for _, t := range taken {
			if r.overlaps(t) {
				return false
			}
		}
		taken = append(taken, r)
		return true
	}
	type pending struct {
		s     string
		x, y  float64
		white bool
	}
	var texts []pending
	// place puts a label beside a bar's end, else just inside it (in white).
	place := func(s string, x, y float64, right bool) {
		if label(s, x, y, right) {
			texts = append(texts, pending{s, taken[len(taken)-1].x, y, false})
			return
		}
		dx := -6.0
		if !right {
			dx = 6
		}
		if label(s, x+dx, y, !right) {
			texts = append(texts, pending{s, taken[len(taken)-1].x, y, true})
		}
	}
	for k, b := range c.Bars {
		yc := plot.y + (float64(k)+0.5)*rowH
		w.textRight(plot.x-6, yc+pdfChartTextSize*0.35, b.Label, fRegular, pdfChartTextSize, pdfColText)
		x0 := px(b.Base)
		type end struct {
			v     float64
			label string
			style int
		}
		ends := []end{{b.Low, b.LowLabel, 0}, {b.High, b.HighLabel, 1}}
		if math.Abs(b.High-b.Base) > math.Abs(b.Low-b.Base) {
			ends[0], ends[1] = ends[1], ends[0]
		}
		for _, e := range ends {
			if math.IsNaN(e.v) {
				continue
			}
			x1 := px(e.v)
			if math.Abs(x1-x0) < 0.8 {
				x1 = x0 + 0.8
			}
			w.setFill(pdfSeriesStyles[e.style].c)
			w.pdf.Rect(math.Min(x0, x1), yc-barH/2, math.Abs(x1-x0), barH, "F")
		}
		for _, e := range ends {
			switch {
			case math.IsNaN(e.v):
				place(e.label+": invalid", x0+3, yc+pdfChartTextSize*0.35, true)
			case e.v >= b.Base:
				place(e.label, px(e.v)+3, yc+pdfChartTextSize*0.35, true)
			default:
				place(e.label, px(e.v)-3, yc+pdfChartTextSize*0.35, false)
			}
		}
	}
	for _, t := range texts {
		col := pdfColText
		if t.white {
			col = pdfRgb{255, 255, 255}
		}
		w.text(t.x, t.y, t.s, fRegular, pdfChartTextSize, col)
	}
	for _, m := range c.Marks {
		if !m.HasX || m.X < xlo || m.X > xhi {
			continue
		}
		x := px(m.X)
		w.setDraw(pdfColMuted, 0.5)
		w.pdf.SetDashPattern([]float64{2, 2}, 0)
		w.pdf.Line(x, plot.y-4, x, plot.y+plot.h)
		w.pdf.SetDashPattern(nil, 0)
		for _, y := range []float64{plot.y - 7, plot.y - 16} {
			if label(m.Label, x+3, y, true) || label(m.Label, x-3, y, false) {
				w.text(taken[len(taken)-1].x, y, m.Label, fRegular, pdfChartTextSize, pdfColText)
				break
			}
		}
	}
	// The legend.
	ly := a.y + a.h - 8
	x := plot.x
	for k, name := range tornadoLegend {
		w.setFill(pdfSeriesStyles[k].c)
		w.pdf.Rect(x, ly-6, 14, 6, "F")
		w.text(x+20, ly, name, fRegular, pdfChartTextSize, pdfColText)
		x += 20 + pdfStrWidth(name, fRegular, pdfChartTextSize) + 16
	}
}

// spiderChart is the margin against the percentage change of each input.
func (b *builder) spiderChart(s *compute.Sensitivity) (Chart, bool) {
	ch := Chart{
		Kind:    "lines",
		Title:   fmt.Sprintf("Margin of %s against the change in each input", name(s.Compare, s.Recommended)),
		XLabel:  "Change from the base value",
		YLabel:  "Margin (" + sensMeasure(s) + ")",
		XFormat: "percent",
		YFormat: "money",
	}
	xlo, xhi := 0.0, 0.0
	ylo, yhi := math.Min(0, s.Margin), math.Max(0, s.Margin)
	var alt []string
	for _, l := range s.Spider {
		se := Series{Name: inputName(l.Name, l.Rate)}
		for k, p := range l.Points {
			se.X = append(se.X, l.Percent[k])
			y := math.NaN()
			if p.Valid() {
				y = p.Margin
				ylo, yhi = math.Min(ylo, y), math.Max(yhi, y)
			}
			se.Y = append(se.Y, y)
			xlo, xhi = math.Min(xlo, l.Percent[k]), math.Max(xhi, l.Percent[k])
		}
		ch.Series = append(ch.Series, se)
		first, last := l.Points[0], l.Points[len(l.Points)-1]
		alt = append(alt, fmt.Sprintf("%s from %s at %s to %s at %s", se.Name, marginText(b.f, first), signedPct(b.f, l.Percent[0]), marginText(b.f, last), signedPct(b.f, l.Percent[len(l.Percent)-1])))
	}
	if ylo < 0 && yhi > 0 {
		ch.Marks = append(ch.Marks, Mark{Y: 0, HasY: true, Label: "zero margin: the decision changes", Series: -1})
	}
	ch.XMin, ch.XMax, ch.XTicks = b.axis(xlo, xhi, 9, "percent", true)
	ch.YMin, ch.YMax, ch.YTicks = b.axis(ylo, yhi, 6, "money", false)
	ch.Alt = fmt.Sprintf("Margin of %s over the best other choice as each input changes alone, the base margin being %s: %s.", name(s.Compare, s.Recommended), b.f.Money(s.Margin), strings.Join(alt, "; "))
	return ch, true
}

// sweepChart is each alternative's worth across a range of one input,
// with the base value and the values where the recommendation changes.
func (b *builder) sweepChart(s *compute.Sensitivity, sw *compute.Sweep) (Chart, bool) {
	c := s.Compare
	xf := "number"
	if sw.Rate {
		xf = "percent"
	}
	word := capital(sensMeasure(s))
	ch := Chart{
		Kind:    "lines",
		Title:   fmt.Sprintf("%s across %s", word, inputName(sw.Name, sw.Rate)),
		XLabel:  inputLabel(sw.Name, sw.Rate),
		YLabel:  word,
		XFormat: xf,
		YFormat: "money",
	}
	ylo, yhi := math.Inf(1), math.Inf(-1)
	for k, r := range c.Results {
		se := Series{Name: r.Alt.Name, Emphasis: leading(c, r.Alt.ID)}
		for _, p := range sw.Points {
			se.X = append(se.X, p.Value)
			y := math.NaN()
			if p.Valid() {
				y = p.Worths[k]
				ylo, yhi = math.Min(ylo, y), math.Max(yhi, y)
			}
			se.Y = append(se.Y, y)
		}
		ch.Series = append(ch.Series, se)
	}
	if math.IsInf(ylo, 1) {
		return Chart{}, false
	}
	if sw.Base >= sw.From && sw.Base <= sw.To {
		ch.Marks = append(ch.Marks, Mark{X: sw.Base, HasX: true, Label: "base " + b.af().input(sw.Name, sw.Rate, sw.Base), Series: -1, Kind: "rate"})
	}
	for _, x := range sw.Changes {
		if math.IsNaN(x.Worth) {
			continue
		}
		label := "changes at " + b.af().input(sw.Name, sw.Rate, x.At)
		if sw.Discrete {
			label = "changes between " + b.af().input(sw.Name, sw.Rate, x.Lo) + " and " + b.af().input(sw.Name, sw.Rate, x.Hi)
		}
		ch.Marks = append(ch.Marks, Mark{X: x.At, Y: x.Worth, HasX: true, HasY: true, Label: label, Series: -1, Kind: "crossover"})
	}
	ch.XMin, ch.XMax, ch.XTicks = b.axis(sw.From, sw.To, 8, xf, true)
	ch.YMin, ch.YMax, ch.YTicks = b.axis(ylo, yhi, 6, "money", false)
	ch.Alt = sweepSentence(b.af(), s, sw)
	return ch, true
}

// ---- JSON ----

// jsonAnalysis holds the analysis blocks' arrays of the JSON output.
type jsonAnalysis struct {
	Sensitivities []jsonSensitivity `json:"sensitivities,omitempty"`
	Scenarios     []jsonScenario    `json:"scenarios,omitempty"`
	Budgets       []jsonBudget      `json:"budgets,omitempty"`
}

type jsonSensitivity struct {
	ID          string           `json:"id"`
	Compare     string           `json:"compare"`
	Measure     string           `json:"measure"`
	Recommended string           `json:"recommended"`
	RunnerUp    string           `json:"runner_up"`
	Margin      float64          `json:"margin"`
	Swings      []jsonSwing      `json:"swings"`
	Breakevens  []jsonBreakeven  `json:"breakevens"`
	Ranges      []jsonSweep      `json:"ranges"`
	Spider      []jsonSpiderLine `json:"spider"`
}

type jsonSwing struct {
	Name            string   `json:"name"`
	BaseValue       float64  `json:"base_value"`
	Percent         *float64 `json:"percent"`
	LowValue        float64  `json:"low_value"`
	HighValue       float64  `json:"high_value"`
	LowMargin       *float64 `json:"low_margin"`
	HighMargin      *float64 `json:"high_margin"`
	LowRecommended  *string  `json:"low_recommended"`
	HighRecommended *string  `json:"high_recommended"`
	LowInvalid      string   `json:"low_invalid,omitempty"`
	HighInvalid     string   `json:"high_invalid,omitempty"`
}

type jsonBreakeven struct {
	Name         string   `json:"name"`
	Value        *float64 `json:"value"`
	BaseValue    float64  `json:"base_value"`
	Recommended  *string  `json:"recommended_beyond"`
	Verified     bool     `json:"verified"`
	MarginAt     *float64 `json:"margin_at_value"`
	Other        *float64 `json:"other_value"`
	SearchedLow  float64  `json:"searched_low"`
	SearchedHigh float64  `json:"searched_high"`
	Limits       []string `json:"search_limits,omitempty"`
	NoEffect     bool     `json:"no_effect,omitempty"`
	Tied         bool     `json:"tied,omitempty"`
	Discrete     bool     `json:"whole_numbers,omitempty"`
	Holds        *float64 `json:"last_value_holding,omitempty"`
}

type jsonWhatIf struct {
	Value       float64             `json:"value"`
	Margin      *float64            `json:"margin"`
	Recommended *string             `json:"recommended"`
	Worths      map[string]*float64 `json:"worths,omitempty"`
	Invalid     string              `json:"invalid,omitempty"`
}

type jsonSweep struct {
	Name      string       `json:"name"`
	From      float64      `json:"from"`
	To        float64      `json:"to"`
	BaseValue float64      `json:"base_value"`
	Points    []jsonWhatIf `json:"points"`
	Changes   []jsonChange `json:"changes"`
}

type jsonChange struct {
	Value float64 `json:"value"`
	From  string  `json:"from"`
	To    string  `json:"to"`
	Exact bool    `json:"exact"`
}

type jsonSpiderLine struct {
	Name    string       `json:"name"`
	Percent []float64    `json:"percent"`
	Points  []jsonWhatIf `json:"points"`
}

type jsonScenario struct {
	ID          string               `json:"id"`
	Name        string               `json:"name"`
	Line        int                  `json:"line"`
	Overrides   []jsonOverride       `json:"overrides"`
	Comparisons []jsonScenarioResult `json:"comparisons"`
}

type jsonOverride struct {
	Name      string   `json:"name"`
	Value     float64  `json:"value"`
	BaseValue *float64 `json:"base_value"`
	Text      string   `json:"text"`
	Line      int      `json:"line"`
}

type jsonScenarioResult struct {
	ID              string              `json:"id"`
	Rate            float64             `json:"rate"`
	Recommended     string              `json:"recommended"`
	BaseRecommended string              `json:"base_recommended"`
	Changed         bool                `json:"changed"`
	Margin          float64             `json:"margin"`
	Results         []jsonScenarioWorth `json:"results"`
}

type jsonScenarioWorth struct {
	Alternative      string  `json:"alternative"`
	PresentWorth     float64 `json:"present_worth"`
	AnnualWorth      float64 `json:"annual_worth"`
	BasePresentWorth float64 `json:"base_present_worth"`
	BaseAnnualWorth  float64 `json:"base_annual_worth"`
}

type jsonBudget struct {
	ID                string              `json:"id"`
	Limit             float64             `json:"limit"`
	Feasible          bool                `json:"feasible"`
	Chosen            []string            `json:"chosen"`
	TotalFirstCost    float64             `json:"total_first_cost"`
	TotalPresentWorth float64             `json:"total_present_worth"`
	LeftOut           []string            `json:"left_out"`
	Projects          []jsonBudgetProject `json:"projects"`
	Growth            []jsonBudgetStep    `json:"growth"`
	Next              *jsonBudgetStep     `json:"next"`
}

type jsonBudgetProject struct {
	Compare  string             `json:"compare"`
	Required bool               `json:"required"`
	Chosen   *string            `json:"chosen"`
	Options  []jsonBudgetOption `json:"options"`
}

type jsonBudgetOption struct {
	Alternative  string  `json:"alternative"`
	FirstCost    float64 `json:"first_cost"`
	PresentWorth float64 `json:"present_worth"`
}

type jsonBudgetStep struct {
	Limit             float64  `json:"limit"`
	Feasible          bool     `json:"feasible"`
	Chosen            []string `json:"chosen"`
	TotalFirstCost    float64  `json:"total_first_cost"`
	TotalPresentWorth float64  `json:"total_present_worth"`
}

// finite is x, or nil (null) where it is NaN or infinite.
func finite(x float64) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return &x
}

func strOrNil(s string) *string {
	if s == "" {
		return nil
	}
	return &s
}

func jsonPoint(c *compute.Comparison, p compute.WhatIf, worths bool) jsonWhatIf {
	j := jsonWhatIf{Value: p.Value, Margin: finite(p.Margin), Invalid: p.Invalid}
	if p.Valid() {
		j.Recommended = strOrNil(p.Recommended)
		if worths {
			j.Worths = map[string]*float64{}
			for k, r := range c.Results {
				j.Worths[r.Alt.ID] = finite(p.Worths[k])
			}
		}
	}
	return j
}

// analysisJSON builds the analysis arrays of the JSON output.
func analysisJSON(rep *compute.Report) jsonAnalysis {
	var out jsonAnalysis
	for _, s := range rep.Sensitivities {
		c := s.Compare
		js := jsonSensitivity{ID: s.ID, Compare: c.ID, Measure: s.Measure, Recommended: s.Recommended, RunnerUp: s.RunnerUp,
			Margin: s.Margin, Swings: []jsonSwing{}, Breakevens: []jsonBreakeven{}, Ranges: []jsonSweep{}, Spider: []jsonSpiderLine{}}
		for _, sw := range s.Swings {
			j := jsonSwing{Name: sw.Name, BaseValue: sw.Base, LowValue: sw.Low.Value, HighValue: sw.High.Value,
				LowMargin: finite(sw.Low.Margin), HighMargin: finite(sw.High.Margin), LowInvalid: sw.Low.Invalid, HighInvalid: sw.High.Invalid}
			if sw.Percent > 0 {
				j.Percent = finite(sw.Percent)
			}
			if sw.Low.Valid() {
				j.LowRecommended = strOrNil(sw.Low.Recommended)
			}
			if sw.High.Valid() {
				j.HighRecommended = strOrNil(sw.High.Recommended)
			}
			js.Swings = append(js.Swings, j)
		}
		for _, be := range s.Breakevens {
			j := jsonBreakeven{Name: be.Name, Value: be.Value, BaseValue: be.Base, Verified: be.Verified, Other: be.Other,
				SearchedLow: be.SearchedLow, SearchedHigh: be.SearchedHigh, Limits: be.Limits, NoEffect: be.NoEffect, Tied: be.Tied}
			if be.Value != nil {
				j.Recommended = strOrNil(be.To)
				j.MarginAt = finite(be.MarginAt)
				if be.Discrete {
					j.Discrete, j.Holds = true, finite(be.Holds)
				}
			}
			js.Breakevens = append(js.Breakevens, j)
		}
		for _, sw := range s.Ranges {
			j := jsonSweep{Name: sw.Name, From: sw.From, To: sw.To, BaseValue: sw.Base, Changes: []jsonChange{}}
			for _, p := range sw.Points {
				j.Points = append(j.Points, jsonPoint(c, p, true))
			}
			for _, ch := range sw.Changes {
				j.Changes = append(j.Changes, jsonChange{Value: ch.At, From: ch.From, To: ch.To, Exact: ch.Exact})
			}
			js.Ranges = append(js.Ranges, j)
		}
		for _, l := range s.Spider {
			j := jsonSpiderLine{Name: l.Name, Percent: l.Percent}
			for _, p := range l.Points {
				j.Points = append(j.Points, jsonPoint(c, p, false))
			}
			js.Spider = append(js.Spider, j)
		}
		out.Sensitivities = append(out.Sensitivities, js)
	}
	for _, s := range rep.Scenarios {
		js := jsonScenario{ID: s.ID, Name: s.Name, Line: s.Line, Overrides: []jsonOverride{}, Comparisons: []jsonScenarioResult{}}
		for _, v := range s.Values {
			js.Overrides = append(js.Overrides, jsonOverride{Name: v.Name, Value: v.Value, BaseValue: finite(v.Base), Text: v.Text, Line: v.Line})
		}
		for _, r := range s.Comparisons {
			jr := jsonScenarioResult{ID: r.Base.ID, Rate: r.Under.Rate.Effective, Recommended: r.Under.Recommended,
				BaseRecommended: r.Base.Recommended, Changed: r.Changed(), Margin: r.Under.Margin}
			for k, res := range r.Under.Results {
				b := r.Base.Results[k]
				jr.Results = append(jr.Results, jsonScenarioWorth{Alternative: res.Alt.ID, PresentWorth: res.PW, AnnualWorth: res.AW,
					BasePresentWorth: b.PW, BaseAnnualWorth: b.AW})
			}
			js.Comparisons = append(js.Comparisons, jr)
		}
		out.Scenarios = append(out.Scenarios, js)
	}
	for _, bu := range rep.Budgets {
		jb := jsonBudget{ID: bu.ID, Limit: bu.Limit, Feasible: bu.Feasible, Chosen: append([]string{}, bu.Chosen...),
			TotalFirstCost: bu.TotalFirstCost, TotalPresentWorth: bu.TotalPW, LeftOut: []string{}}
		for _, p := range bu.Projects {
			jp := jsonBudgetProject{Compare: p.Comparison.ID, Required: p.Required}
			if ch := p.Chosen(); ch != nil {
				jp.Chosen = strOrNil(ch.ID)
			} else {
				jb.LeftOut = append(jb.LeftOut, p.Comparison.ID)
			}
			for _, o := range p.Options {
				jp.Options = append(jp.Options, jsonBudgetOption{Alternative: o.ID, FirstCost: o.FirstCost, PresentWorth: o.PW})
			}
			jb.Projects = append(jb.Projects, jp)
		}
		step := func(s compute.BudgetStep) jsonBudgetStep {
			return jsonBudgetStep{Limit: s.Limit, Feasible: s.Feasible, Chosen: append([]string{}, s.Chosen...),
				TotalFirstCost: s.TotalFirstCost, TotalPresentWorth: s.TotalPW}
		}
		for _, s := range bu.Growth {
			jb.Growth = append(jb.Growth, step(s))
		}
		if bu.Next != nil {
			n := step(*bu.Next)
			jb.Next = &n
		}
		out.Budgets = append(out.Budgets, jb)
	}
	return out
}
