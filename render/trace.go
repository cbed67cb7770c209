package render

import (
	"fmt"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"unicode/utf8"

	"worth/compute"
	"worth/parse"
)

// Traceable figures: every computed figure of the document carries where
// it came from, the block and source line and the equation that produced
// it (Trace.Title), and a link to where it is worked out (Trace.Href): an
// input's row in the appendix's list of inputs, an alternative's worked
// solution, or its year-by-year schedule in the appendix. The HTML writer
// shows the title on hover and makes the figure a link; the appendix
// lists every input with its line.

// Trace says where a computed figure comes from.
type Trace struct {
	Title string // the block and line, and the equation that produced it
	Href  string // "#id" of where it is worked out; "" for none
}

// inputID anchors an input's row in the appendix: "in-L31" for line 31 of
// the memo, "in-retrofit-csv-L5" for a row of a CSV file.
func inputID(file string, line int) string {
	if file == "" {
		return "in-L" + strconv.Itoa(line)
	}
	return "in-" + idWord(filepath.Base(file)) + "-L" + strconv.Itoa(line)
}

// workID anchors an alternative's worked solution under a comparison.
func workID(c *compute.Comparison, r *compute.Result) string {
	return "work-" + idWord(c.ID) + "-" + idWord(r.Alt.ID)
}

// flowsID anchors an alternative's schedule in the appendix.
func flowsID(c *compute.Comparison, r *compute.Result) string {
	return "flows-" + idWord(c.ID) + "-" + idWord(r.Alt.ID)
}

var notIDChar = regexp.MustCompile(`[^A-Za-z0-9_-]+`)

func idWord(s string) string { return notIDChar.ReplaceAllString(s, "-") }

// clip shortens a title to about n characters.
func clip(s string, n int) string {
	if utf8.RuneCountInString(s) <= n {
		return s
	}
	r := []rune(s)
	return string(r[:n]) + " …"
}

// traceCells makes a table's Trace the shape of its rows.
func traceCells(t *Table) {
	if t.Trace != nil {
		return
	}
	t.Trace = make([][]Trace, len(t.Rows))
	for i, r := range t.Rows {
		t.Trace[i] = make([]Trace, len(r))
	}
}

// traceAssume traces each value of an assume block's table to its line.
func (b *builder) traceAssume(t *Table) {
	traceCells(t)
	for i, row := range t.Rows {
		line, err := strconv.Atoi(row[len(row)-1])
		if err != nil {
			continue
		}
		t.Trace[i][1] = Trace{Title: fmt.Sprintf("%s = %s (assume, line %d)", row[0], row[2], line), Href: "#" + inputID("", line)}
	}
}

// traceAlternative traces each amount of an alternative's inputs table to
// its line (of the memo, or of the CSV file it was read from).
func (b *builder) traceAlternative(t *Table, a *compute.Alternative, src *parse.Alternative) {
	traceCells(t)
	for i, it := range a.Items {
		if i >= len(t.Rows) {
			break
		}
		written := ""
		if i < len(src.Lines) {
			written = writtenAmount(src.Lines[i])
		}
		where := fmt.Sprintf("alternative %s, line %d", a.ID, it.Line)
		if it.File != "" {
			where = fmt.Sprintf("alternative %s, %s line %d", a.ID, filepath.Base(it.File), it.Line)
		}
		t.Trace[i][2] = Trace{Title: fmt.Sprintf("%s: %s = %s (%s)", it.Label, written, b.f.Money(it.Amount), where), Href: "#" + inputID(it.File, it.Line)}
	}
	if a.Residual != nil && len(t.Rows) > len(a.Items) {
		t.Trace[len(a.Items)][2] = Trace{Title: fmt.Sprintf("residual: %s (alternative %s, line %d)", b.f.Money(*a.Residual), a.ID, a.ResidualLine), Href: "#" + inputID("", a.ResidualLine)}
	}
}

// equationText is an equation on one line: "PW = −480,000 − 12,500 (P/A,
// 7%, 24) … = −$1,094,310".
func (b *builder) equationText(eq *compute.Equation) string {
	e := b.f.Equation(eq)
	return clip(e.LHS+" = "+strings.Join(e.Symbolic, " "), 360) + " = " + e.Result
}

// lastEquation is the last step of a worked solution with the given left
// side.
func lastEquation(r *compute.Result, lhs string) *compute.Equation {
	for k := len(r.Work) - 1; k >= 0; k-- {
		if r.Work[k].LHS == lhs {
			return r.Work[k]
		}
	}
	return nil
}

// traceResults traces each figure of a comparison's results table: present,
// annual and future worth to their equations and the worked solution; the
// other measures to what they are read from.
func (b *builder) traceResults(t *Table, c *compute.Comparison) {
	traceCells(t)
	where := fmt.Sprintf("compare %s, line %d", c.ID, c.Line)
	for i, m := range c.Show {
		if i >= len(t.Rows) {
			break
		}
		for k, r := range c.Results {
			if k+1 >= len(t.Rows[i]) {
				break
			}
			work, flows := "#"+workID(c, r), "#"+flowsID(c, r)
			var tr Trace
			switch m {
			case "present worth", "annual worth", "future worth":
				lhs := map[string]string{"present worth": "PW", "annual worth": "AW", "future worth": "FW"}[m]
				if eq := lastEquation(r, lhs); eq != nil {
					what := m
					if c.CostOnly {
						// The table shows the cost, the negative of the worth.
						what = strings.Replace(m, "worth", "cost", 1) + " (the negative of " + lhs + ")"
					}
					tr = Trace{Title: fmt.Sprintf("%s of %s: %s (%s; worked solution below)", what, r.Alt.Name, b.equationText(eq), where), Href: work}
				}
			case "irr":
				tr = Trace{Title: fmt.Sprintf("rate of return of %s: the rate at which its present worth over the horizon is zero, from its yearly flows (%s; schedule in the appendix)", r.Alt.Name, where), Href: flows}
			case "benefit-cost", "modified benefit-cost":
				pc := r.ByCategory
				if m == "benefit-cost" {
					tr.Title = fmt.Sprintf("benefit-cost ratio of %s = (PW of benefits %s − disbenefits %s) / (first costs %s + other costs %s − salvage and residual %s) (%s)",
						r.Alt.Name, b.f.Money(pc[compute.Benefits]), b.f.Money(pc[compute.Disbenefits]), b.f.Money(pc[compute.Investment]), b.f.Money(pc[compute.Operating]), b.f.Money(pc[compute.Recovery]), where)
				} else {
					tr.Title = fmt.Sprintf("modified benefit-cost ratio of %s = (PW of benefits %s − disbenefits %s − other costs %s) / (first costs %s − salvage and residual %s) (%s)",
						r.Alt.Name, b.f.Money(pc[compute.Benefits]), b.f.Money(pc[compute.Disbenefits]), b.f.Money(pc[compute.Operating]), b.f.Money(pc[compute.Investment]), b.f.Money(pc[compute.Recovery]), where)
				}
				tr.Href = work
			case "payback", "discounted payback":
				col := "cumulative net cash flow"
				if m == "discounted payback" {
					col = "cumulative discounted cash flow"
				}
				tr = Trace{Title: fmt.Sprintf("%s of %s: when its %s first reaches zero, interpolated within the year (%s; schedule in the appendix)", m, r.Alt.Name, col, where), Href: flows}
			default:
				tr = Trace{Title: fmt.Sprintf("%s of %s (%s)", m, r.Alt.Name, where), Href: work}
			}
			t.Trace[i][k+1] = tr
		}
	}
}

// anchorSchedule anchors an appendix schedule and traces its figures:
// each year's net flow to the events of that year, its discounted value to
// the factor that discounts it.
func (b *builder) anchorSchedule(t *Table, r *compute.Result, c *compute.Comparison) {
	t.ID = flowsID(c, r)
	traceCells(t)
	t.RowIDs = make([]string, len(t.Rows))
	rate := b.f.Rate(c.Rate.Effective) // once, not a row (scale)
	for i, y := range r.Flows {
		if i >= len(t.Rows) || len(t.Rows[i]) < 6 {
			break
		}
		t.RowIDs[i] = fmt.Sprintf("%s-y%d", t.ID, y.Year)
		if len(y.Notes) > 0 {
			t.Trace[i][3] = Trace{Title: fmt.Sprintf("year %d of %s: %s", y.Year, r.Alt.Name, strings.Join(y.Notes, ", "))}
		}
		t.Trace[i][4] = Trace{Title: fmt.Sprintf("year %d: %s × (P/F, %s, %d) = %s", y.Year, b.whole(y.Net), rate, y.Year, b.whole(y.Discounted))}
	}
}

// valueLink links an inline value that reads one alternative's result
// (pw(steel), irr("wedge-wire")) to that alternative's worked solution.
func (b *builder) valueLink(src string) string {
	m := resultCall.FindStringSubmatch(src)
	if m == nil {
		return ""
	}
	for _, c := range b.rep.Comparisons {
		if m[3] != "" && c.ID != m[3] {
			continue
		}
		for _, r := range c.Results {
			if r.Alt.ID == m[2] {
				return "#" + workID(c, r)
			}
		}
	}
	return ""
}

var resultCall = regexp.MustCompile(`^-?\s*(pw|aw|fw|irr|bc|payback)\(\s*"?([A-Za-z0-9_-]+)"?\s*(?:,\s*"?([A-Za-z0-9_-]+)"?\s*)?\)`)

// inputsAppendix lists every input of the memo with its line, each row
// anchored so that the figures above can link to it: the front matter's
// rates, each assumption, each line of each alternative (and the rows of
// the CSV files they read), and each comparison's own rate.
func (b *builder) inputsAppendix() Table {
	t := Table{
		Caption: "Where each input is written",
		Header:  []string{"Input", "Where", "As written", "Value"},
		Align:   []byte{'l', 'l', 'l', 'r'},
		Note:    "Every input of the memo with the line it is written on; the figures above link here.",
	}
	add := func(id, name, where, written, value string) {
		t.Rows = append(t.Rows, []string{name, where, written, value})
		t.RowIDs = append(t.RowIDs, id)
	}
	fm := b.m.Front
	for _, r := range []struct {
		key  string
		spec *parse.RateSpec
		rate *compute.Rate
	}{{"rate", fm.Rate, b.rep.Rate}, {"tax rate", fm.TaxRate, b.rep.TaxRate}, {"inflation", fm.Inflation, b.rep.Inflation}} {
		if r.spec != nil && r.rate != nil {
			add(inputID("", r.spec.Text.Pos.Line), r.key, fmt.Sprintf("front matter, line %d", r.spec.Text.Pos.Line), r.spec.Text.Src, b.f.Rate(r.rate.Effective))
		}
	}
	assumed := map[string]*compute.Assumption{}
	for _, a := range b.rep.Assumptions {
		assumed[a.Name] = a
	}
	for _, blk := range b.m.Blocks {
		switch x := blk.(type) {
		case *parse.Assume:
			for _, it := range x.Items {
				if a := assumed[it.Name]; a != nil {
					add(inputID("", a.Line), a.Name, fmt.Sprintf("assume, line %d", a.Line), a.Expr, b.f.Num(a.Value))
				}
			}
		case *parse.Alternative:
			a := findAlt(b.rep, x.ID)
			if a == nil {
				continue
			}
			if x.Life != nil {
				add(inputID("", x.Life.Pos.Line), a.ID+": life", fmt.Sprintf("alternative %s, line %d", a.ID, x.Life.Pos.Line), x.Life.Src, LifeText(a))
			}
			for i, it := range a.Items {
				written := ""
				if i < len(x.Lines) {
					written = writtenAmount(x.Lines[i])
				}
				where := fmt.Sprintf("alternative %s, line %d", a.ID, it.Line)
				if it.File != "" {
					where = fmt.Sprintf("alternative %s, %s line %d", a.ID, filepath.Base(it.File), it.Line)
				}
				add(inputID(it.File, it.Line), a.ID+": "+it.Label, where, written, b.f.Money(it.Amount))
			}
			if a.Residual != nil && x.Residual != nil {
				add(inputID("", a.ResidualLine), a.ID+": residual", fmt.Sprintf("alternative %s, line %d", a.ID, a.ResidualLine), x.Residual.Src, b.f.Money(*a.Residual))
			}
		case *parse.Compare:
			c := findComp(b.rep, x.ID)
			if c != nil && x.Rate != nil {
				add(inputID("", x.Rate.Text.Pos.Line), c.ID+": rate", fmt.Sprintf("compare %s, line %d", c.ID, x.Rate.Text.Pos.Line), x.Rate.Text.Src, b.f.Rate(c.Rate.Effective))
			}
		}
	}
	// Two inputs on one line (never in a valid memo) keep the first id.
	seen := map[string]bool{}
	for i, id := range t.RowIDs {
		if seen[id] {
			t.RowIDs[i] = ""
		}
		seen[id] = true
	}
	return t
}

// writeTraced finishes a table cell (after "<td" and its class) whose
// figure carries a trace: the title on the cell, the figure a link to
// where it is worked out.
func writeTraced(b *strings.Builder, text string, tr Trace) {
	b.WriteString(` title="`)
	escapeHTML(b, tr.Title)
	b.WriteString(`">`)
	if tr.Href != "" {
		b.WriteString(`<a class="trace" href="`)
		writeLink(b, tr.Href)
		b.WriteString(`">`)
		escapeHTML(b, text)
		b.WriteString("</a></td>")
		return
	}
	escapeHTML(b, text)
	b.WriteString("</td>")
}

// writtenAmount is a money line's amount as written, with its gradient.
func writtenAmount(fl *parse.FlowLine) string {
	s := fl.Amount.Src
	switch {
	case fl.Escalating != nil:
		s += " escalating " + fl.Escalating.Src
	case fl.Gradient != nil:
		s += " gradient " + fl.Gradient.Src
	}
	return s
}

// rowID is the id of a table's row r, "" for none.
func rowID(t Table, r int) string {
	if r < len(t.RowIDs) {
		return t.RowIDs[r]
	}
	return ""
}

// cellTrace is where the figure in row r, column i of a table comes from:
// its own trace, or else, for any figure of a table that names its source,
// that block and line. The zero Trace for none.
func cellTrace(t Table, r, i int) Trace {
	if r < len(t.Trace) && i < len(t.Trace[r]) && t.Trace[r][i].Title != "" {
		return t.Trace[r][i]
	}
	if t.Source != "" && i < len(t.Align) && t.Align[i] == 'r' && r < len(t.Rows) && i < len(t.Rows[r]) && t.Rows[r][i] != "" {
		return Trace{Title: "Source: " + t.Source}
	}
	return Trace{}
}
