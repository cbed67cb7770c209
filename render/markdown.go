package render

import (
	"bytes"
	"fmt"
	"sort"
	"strings"

	"worth/compute"
	"worth/parse"
)

// Markdown writes the memo as plain Markdown: the heading from the front
// matter, the prose as written with inline values filled in, each worth
// block replaced by what it computes (inputs tables, results, worked
// equations, the recommendation in words, checks), and an appendix with
// every alternative's cash flows and the conventions used.
func Markdown(rep *compute.Report) []byte {
	f := NewFormat(rep, false)
	m := rep.Memo
	var b bytes.Buffer
	heading(&b, m)
	if rep.Revision != nil {
		b.WriteString(mdRevision(rep.Revision, f, 2))
	}
	// Replacements of source ranges: blocks (by lines) and inline values
	// (by bytes), applied in order.
	type repl struct {
		start, end int
		text       string
	}
	var rs []repl
	starts := lineStarts(m.Source)
	for _, blk := range m.Blocks {
		h := blk.Head()
		from := starts[h.Pos.Line-1]
		end := len(m.Source)
		if h.EndLine < len(starts) {
			end = starts[h.EndLine]
		}
		rs = append(rs, repl{from, end, mdBlock(rep, f, blk)})
	}
	for _, in := range m.Inline {
		s, e := spanBounds(m.Source, in.Offset, in.End)
		v, ok := rep.Inline[in.Offset]
		text := "n/a"
		if ok {
			text = f.Value(v)
		}
		rs = append(rs, repl{s, e, escapeMD(text)})
	}
	sort.Slice(rs, func(i, j int) bool { return rs[i].start < rs[j].start })
	pos := bodyStart(m)
	for _, r := range rs {
		if r.start < pos {
			continue // inside a block already replaced
		}
		b.Write(m.Source[pos:r.start])
		b.WriteString(r.text)
		pos = r.end
	}
	b.Write(m.Source[pos:])
	if !bytes.HasSuffix(b.Bytes(), []byte("\n")) {
		b.WriteByte('\n')
	}
	appendix(&b, rep, f)
	return b.Bytes()
}

func lineStarts(src []byte) []int {
	s := []int{0}
	for i, c := range src {
		if c == '\n' {
			s = append(s, i+1)
		}
	}
	return s
}

// bodyStart is the offset after the front matter.
func bodyStart(m *parse.Memo) int {
	if len(m.Front.Fields) == 0 && !bytes.HasPrefix(m.Source, []byte("---")) {
		return 0
	}
	src := m.Source
	if !bytes.HasPrefix(src, []byte("---")) {
		return 0
	}
	i := bytes.Index(src[3:], []byte("\n---"))
	if i < 0 {
		return 0
	}
	end := 3 + i + 4
	if nl := bytes.IndexByte(src[end:], '\n'); nl >= 0 {
		return end + nl + 1
	}
	return len(src)
}

// spanBounds widens a code span's text range to its backticks.
func spanBounds(src []byte, start, end int) (int, int) {
	s := start
	if s > 0 && src[s-1] == ' ' {
		s--
	}
	for s > 0 && src[s-1] == '`' {
		s--
	}
	e := end
	if e < len(src) && src[e] == ' ' {
		e++
	}
	for e < len(src) && src[e] == '`' {
		e++
	}
	return s, e
}

// mdEscaper escapes what Markdown would read as markup. It is built once:
// building a replacer was nearly all the cost of a call, and the Markdown
// report of 1,000 alternatives makes some 250,000 calls (scale.go).
var mdEscaper = strings.NewReplacer("*", `\*`, "_", `\_`, "`", "\\`", "[", `\[`, "]", `\]`, "<", `\<`, "|", `\|`)

func escapeMD(s string) string {
	return mdEscaper.Replace(s)
}

func heading(b *bytes.Buffer, m *parse.Memo) {
	fm := m.Front
	title := fm.Title.Value.Src
	if title == "" {
		title = "Decision memo"
	}
	fmt.Fprintf(b, "# %s\n\n", escapeMD(title))
	var rows [][2]string
	for _, kv := range []struct {
		k string
		f parse.Field
	}{{"To", fm.To}, {"From", fm.From}, {"Date", fm.Date}, {"Subject", fm.Subject}} {
		if kv.f.Value.Src != "" {
			rows = append(rows, [2]string{kv.k, kv.f.Value.Src})
		}
	}
	for _, x := range fm.Extra {
		rows = append(rows, [2]string{capital(x.Key), x.Value.Src})
	}
	if len(rows) > 0 {
		b.WriteString("| | |\n| --- | --- |\n")
		for _, r := range rows {
			fmt.Fprintf(b, "| **%s** | %s |\n", r[0], escapeMD(r[1]))
		}
		b.WriteString("\n")
	}
}

func capital(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

func table(b *strings.Builder, header []string, rows [][]string, right []bool) {
	b.WriteString("|")
	for _, h := range header {
		fmt.Fprintf(b, " %s |", escapeMD(h))
	}
	b.WriteString("\n|")
	for i := range header {
		if i < len(right) && right[i] {
			b.WriteString(" ---: |")
		} else {
			b.WriteString(" --- |")
		}
	}
	b.WriteString("\n")
	for _, r := range rows {
		b.WriteString("|")
		for _, c := range r {
			fmt.Fprintf(b, " %s |", escapeMD(c))
		}
		b.WriteString("\n")
	}
}

func mdBlock(rep *compute.Report, f Format, blk parse.Block) string {
	var b strings.Builder
	switch x := blk.(type) {
	case *parse.Assume:
		var rows [][]string
		for _, it := range x.Items {
			for _, a := range rep.Assumptions {
				if a.Name == it.Name {
					expr := a.Expr
					if a.Dist != nil {
						expr += " ~ " + it.Dist.Kind + "(" + joinNums(f, a.Dist.Params) + ")"
					}
					rows = append(rows, []string{a.Name, f.Num(a.Value), expr, fmt.Sprint(a.Line)})
				}
			}
		}
		b.WriteString("**Assumptions**\n\n")
		table(&b, []string{"Input", "Value", "As written", "Line"}, rows, []bool{false, true, false, true})
	case *parse.Alternative:
		a := findAlt(rep, x.ID)
		if a == nil {
			return ""
		}
		fmt.Fprintf(&b, "**Alternative %s** (`%s`), life: %s\n\n", escapeMD(a.Name), a.ID, LifeText(a))
		var rows [][]string
		for _, it := range a.Items {
			rows = append(rows, []string{it.Label, KindWord(it), f.ItemAmount(it), ItemWhen(a, it), ItemLine(it)})
		}
		if a.Residual != nil {
			rows = append(rows, []string{"residual", "value at a study period's end", f.Money(*a.Residual), "end of a study period that cuts a life", fmt.Sprint(a.ResidualLine)})
		}
		rows = append(rows, f.taxInputRows(a)...)
		table(&b, []string{"Line item", "Kind", "Amount", "When", "Line"}, rows, []bool{false, false, true, false, true})
		mdAltFinance(&b, a, f)
	case *parse.Compare:
		c := findComp(rep, x.ID)
		if c == nil {
			return ""
		}
		mdCompare(&b, c, f)
	case *parse.Expect:
		b.WriteString("**Checks**\n\n")
		for _, e := range rep.Expectations {
			if e.Line < x.Pos.Line || e.Line > x.EndLine {
				continue
			}
			if e.Passed {
				fmt.Fprintf(&b, "- holds: `%s` (line %d)\n", e.Text, e.Line)
			} else {
				fmt.Fprintf(&b, "- **FAILED**: `%s` (line %d)", e.Text, e.Line)
				if e.Detail != "" {
					fmt.Fprintf(&b, " — %s", e.Detail)
				}
				b.WriteString("\n")
			}
		}
		for _, e := range rep.Expectations {
			if e.Line >= x.Pos.Line && e.Line <= x.EndLine && !e.Passed {
				fmt.Fprintf(&b, "\n> **Warning:** the expectation `%s` on line %d does not hold. The figures above are as computed; the memo's text may rely on something that is no longer true.\n", e.Text, e.Line)
			}
		}
	case *parse.Sensitivity, *parse.Scenario, *parse.Budget:
		b.WriteString(mdAnalysis(rep, f, x))
	case *parse.Risk:
		b.WriteString(mdRisk(rep, f, x))
	case *parse.Replacement:
		b.WriteString(mdReplacement(rep, f, x))
	case *parse.Place:
		p := rep.Places[x]
		if p == nil {
			return ""
		}
		if x.Kind == "schedule" {
			mdSchedule(&b, p.Result, p.Comp, f)
		} else {
			mdDiagram(&b, p.Result, p.Comp, f)
		}
	}
	b.WriteString("\n")
	return b.String()
}

func joinNums(f Format, xs []float64) string {
	s := make([]string, len(xs))
	for i, x := range xs {
		s[i] = f.Num(x)
	}
	return strings.Join(s, ", ")
}

func findAlt(rep *compute.Report, id string) *compute.Alternative {
	for _, a := range rep.Alternatives {
		if a.ID == id {
			return a
		}
	}
	return nil
}

func findComp(rep *compute.Report, id string) *compute.Comparison {
	for _, c := range rep.Comparisons {
		if c.ID == id {
			return c
		}
	}
	return nil
}

func mdCompare(b *strings.Builder, c *compute.Comparison, f Format) {
	fmt.Fprintf(b, "**Comparison `%s`** — rate %s; horizon: %s; decided by %s.%s\n\n", c.ID, f.RateText(c.Rate), HorizonText(c), RuleText(c), f.BasisText(c))
	header, rows := f.ResultsTable(c)
	var cells [][]string
	right := []bool{false}
	for range c.Results {
		right = append(right, true)
	}
	for _, r := range rows {
		cells = append(cells, append([]string{r.Label}, r.Cells...))
	}
	mdResultsTable(b, c, header, cells, right) // one row an alternative past a handful (scale.go)
	fmt.Fprintf(b, "\n> **Recommendation:** %s\n", escapeMD(f.Recommendation(c)))
	for _, w := range Warnings(c) {
		fmt.Fprintf(b, ">\n> **Note:** %s\n", escapeMD(w))
	}
	if len(c.Steps) > 0 {
		b.WriteString("\nIncremental analysis, in order of first cost:\n\n")
		for k, s := range c.Steps {
			fmt.Fprintf(b, "%d. %s\n", k+1, escapeMD(f.StepText(c, s)))
		}
	}
	mdFinance(b, c, f)
	b.WriteString("\nWorked equations:\n")
	for _, r := range c.Results {
		fmt.Fprintf(b, "\n*%s* (`%s`):\n\n", escapeMD(r.Alt.Name), r.Alt.ID)
		for _, eq := range r.Work {
			t := f.Equation(eq)
			fmt.Fprintf(b, "    # %s\n", t.Label)
			for _, l := range t.Lines(100) {
				fmt.Fprintf(b, "    %s\n", l)
			}
		}
	}
}

func mdSchedule(b *strings.Builder, r *compute.Result, c *compute.Comparison, f Format) {
	if r.AfterTax != nil {
		mdAfterTaxSchedule(b, r, c, f)
		return
	}
	fmt.Fprintf(b, "**Cash flows of %s** (comparison `%s`, %s at %s)", escapeMD(r.Alt.Name), c.ID, horizonShort(c), f.Rate(c.Rate.Effective))
	if r.FlowsNote != "" {
		fmt.Fprintf(b, ": %s", r.FlowsNote)
	}
	b.WriteString("\n\n")
	var rows [][]string
	for _, y := range r.Flows {
		inv := y.ByCategory[compute.Investment] + y.ByCategory[compute.Operating] + y.ByCategory[compute.Disbenefits]
		in := y.ByCategory[compute.Benefits] + y.ByCategory[compute.Recovery]
		rows = append(rows, []string{fmt.Sprint(y.Year), moneyOrBlank(f, -inv), moneyOrBlank(f, in), f.Money(y.Net), f.Money(y.Discounted), f.Money(y.CumDiscounted), FlowNotes(y)})
	}
	table(b, []string{"Year", "Costs", "Benefits and recovered value", "Net", "Discounted", "Cumulative discounted", "Events"}, rows, []bool{true, true, true, true, true, true, false})
}

func moneyOrBlank(f Format, x float64) string {
	if x == 0 {
		return ""
	}
	return f.Money(x)
}

func horizonShort(c *compute.Comparison) string {
	switch c.Horizon.Kind {
	case "perpetual":
		return "perpetual horizon"
	case "study period":
		return fmt.Sprintf("study period of %d years", c.Horizon.Years)
	}
	return fmt.Sprintf("repeated lives, %d years", c.Horizon.Years)
}

// mdDiagram draws a cash-flow diagram as text: one line a year, an arrow up
// for a net inflow and down for a net outflow, its length to scale.
func mdDiagram(b *strings.Builder, r *compute.Result, c *compute.Comparison, f Format) {
	fmt.Fprintf(b, "**Cash-flow diagram of %s** (net flow each year; ↑ benefit, ↓ cost; %s)\n\n", escapeMD(r.Alt.Name), horizonShort(c))
	max := 0.0
	for _, y := range r.Flows {
		if abs(y.Net) > max {
			max = abs(y.Net)
		}
	}
	for _, y := range r.Flows {
		n := 0
		if max > 0 {
			n = int(abs(y.Net)/max*30 + 0.5)
		}
		arrow := ""
		switch {
		case y.Net > 0:
			arrow = strings.Repeat("─", n) + "↑"
		case y.Net < 0:
			arrow = strings.Repeat("─", n) + "↓"
		}
		fmt.Fprintf(b, "    %4d %-32s %s\n", y.Year, arrow, f.Money(y.Net))
	}
}

func appendix(b *bytes.Buffer, rep *compute.Report, f Format) {
	b.WriteString("\n---\n\n## Appendix: cash flows and conventions\n\n")
	var sb strings.Builder
	for _, c := range rep.Comparisons {
		for _, r := range c.Results {
			mdSchedule(&sb, r, c, f)
			sb.WriteString("\n")
		}
	}
	b.WriteString(sb.String())
	b.WriteString("**Conventions.** Amounts fall at the end of each year; year 0 is now. Costs are negative and benefits positive. Years inside an alternative count from the start of its own life cycle, and each cycle repeats as written. A study period that cuts a life ends it with its residual value: the value stated, or straight-line between first cost and salvage over the life. Factors are the standard discrete compound-interest factors in (X/Y, i, n) notation.")
	if rep.Rate != nil && rep.Rate.Conversion != "" {
		fmt.Fprintf(b, " The memo's rate %s converts as %s.", rep.Rate.Text, rep.Rate.Conversion)
	}
	mdTaxConventions(b, rep, f)
	b.WriteString("\n\n**Caution.** " + Caution + "\n")
}
