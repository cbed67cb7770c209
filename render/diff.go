package render

import (
	"bytes"
	"fmt"
	"math"
	"strings"
	"text/tabwriter"
	"unicode/utf8"

	"worth/compute"
)

// The revision note: what changed between two versions of a memo (see
// compute.Diff), for the terminal, as Markdown, and as document nodes for
// the HTML and PDF writers. Formatting only: every number comes from the
// Revision.

// revLabel is a measure's label as the results table words it, and
// whether its amounts are shown as costs (sign flipped).
func revLabel(m string, costOnly bool) (string, bool) {
	switch m {
	case "present worth":
		if costOnly {
			return "Present cost", true
		}
		return "Present worth", false
	case "annual worth":
		if costOnly {
			return "Equivalent annual cost", true
		}
		return "Annual worth", false
	case "future worth":
		if costOnly {
			return "Future cost", true
		}
		return "Future worth", false
	case "irr":
		return "Rate of return", false
	case "benefit-cost":
		return "Benefit-cost ratio", false
	case "modified benefit-cost":
		return "Modified benefit-cost ratio", false
	case "payback":
		return "Payback", false
	case "discounted payback":
		return "Discounted payback", false
	case "net savings":
		return "Net savings", false
	case "sir":
		return "Savings-to-investment ratio", false
	case "airr":
		return "Adjusted rate of return", false
	}
	return capital(m), false
}

// revValue formats a value of a kind; "n/a" for nil.
func (f Format) revValue(v *float64, k compute.ValueKind, flip bool) string {
	if v == nil {
		return "n/a"
	}
	x := *v
	if flip {
		x = -x
	}
	if k == compute.Percent && math.Abs(x) < 1 {
		return f.Rate(x)
	}
	return f.Value(compute.Value{Kind: k, Num: x})
}

// revDelta formats a change with its sign: +$3,200, −0.4 points, +0.05.
func (f Format) revDelta(d *float64, k compute.ValueKind, flip bool) string {
	if d == nil {
		return ""
	}
	x := *d
	if flip {
		x = -x
	}
	var s string
	switch k {
	case compute.Money:
		s = f.Money(math.Abs(x))
	case compute.Percent:
		s = strings.TrimSuffix(f.Percent(math.Abs(x)), "%") + " points"
	case compute.Ratio:
		s = f.Ratio(math.Abs(x))
	case compute.Years:
		s = f.Years(math.Abs(x))
	default:
		s = f.Num(math.Abs(x))
	}
	if strings.IndexFunc(s, func(r rune) bool { return r >= '1' && r <= '9' }) < 0 {
		return "no change" // prints as zero
	}
	if x < 0 {
		return f.Minus + s
	}
	return "+" + s
}

// revInput writes an input line's text with its value where the text does
// not already say it: "48k ($48,000)", "area_m2 * tpo_per_m2 ($499,200)".
func (f Format) revInput(text string, v *float64, k compute.ValueKind) string {
	if text == "" && v == nil {
		return ""
	}
	if v == nil {
		return text
	}
	val := f.revValue(v, k, false)
	plain := func(s string) string {
		return strings.NewReplacer(",", "", f.Cur.Symbol, "", " ", "", "−", "-").Replace(s)
	}
	if text == "" || plain(text) == plain(val) {
		return val
	}
	return text + " (" + val + ")"
}

// revWhere names a line's place: "assume, line 31", "alternative tpo,
// retrofit.csv:5".
func revWhere(c compute.InputChange) string {
	at := c.NewAt
	if at == "" {
		at = c.OldAt
	}
	switch {
	case at == "":
		return c.Block
	case strings.Contains(at, ":"):
		return c.Block + ", " + at
	}
	return c.Block + ", line " + at
}

// RevisionTitle is the revision note's heading.
func RevisionTitle(rev *compute.Revision) string {
	return "Changes since " + rev.Old
}

// revSummary is one sentence that says what changed overall.
func (f Format) revSummary(rev *compute.Revision) string {
	n := len(rev.Inputs)
	var s string
	switch n {
	case 0:
		s = "No input changed"
	case 1:
		s = "One input changed"
	default:
		s = fmt.Sprintf("%d inputs changed", n)
	}
	changed := 0
	for _, c := range rev.Comparisons {
		if c.RecommendationChanged {
			changed++
		}
	}
	switch {
	case changed == 0 && len(rev.Comparisons) == 1:
		s += "; the recommendation is unchanged."
	case changed == 0:
		s += "; no recommendation changed."
	case changed == 1 && len(rev.Comparisons) == 1:
		s += "; the recommendation changed."
	default:
		s += fmt.Sprintf("; %d recommendations changed.", changed)
	}
	return s
}

// revRecommendation says what happened to a comparison's recommendation;
// loud shouts a change (for the terminal, where no box can flag it).
func revRecommendation(c *compute.ComparisonChange, loud bool) string {
	switch {
	case c.RecommendationChanged && !loud:
		return "the recommendation changed: was " + c.OldBestName + ", now " + c.NewBestName
	case c.Change == compute.RevAdded:
		return "new comparison; recommends " + c.NewBestName
	case c.Change == compute.RevRemoved:
		return "comparison removed; it recommended " + c.OldBestName
	case c.RecommendationChanged:
		return "RECOMMENDATION CHANGED: was " + c.OldBestName + ", now " + c.NewBestName
	}
	return "recommendation unchanged: " + c.NewBestName
}

// RevisionText is the revision note for the terminal: aligned columns,
// plain text.
func RevisionText(rev *compute.Revision, f Format) string {
	var b bytes.Buffer
	fmt.Fprintf(&b, "Changes from %s to %s\n%s\n", rev.Old, rev.New, f.revSummary(rev))
	tw := func() *tabwriter.Writer { return tabwriter.NewWriter(&b, 0, 0, 2, ' ', 0) }
	if len(rev.Inputs) > 0 {
		fmt.Fprintf(&b, "\nInputs\n")
		w := tw()
		for _, c := range rev.Inputs {
			old, new := f.revInput(c.Old, c.OldValue, c.Kind), f.revInput(c.New, c.NewValue, c.Kind)
			switch c.Change {
			case compute.RevAdded:
				old = "(added)"
			case compute.RevRemoved:
				new = "(removed)"
			}
			fmt.Fprintf(w, "  %s\t%s\t%s\t→ %s\n", revWhere(c), c.Name, old, new)
		}
		w.Flush()
	}
	if len(rev.Follows) > 0 {
		fmt.Fprintf(&b, "\nAmounts that follow from them\n")
		w := tw()
		for _, c := range rev.Follows {
			fmt.Fprintf(w, "  %s\t%s\t%s\t%s\t→ %s\n", revWhere(c), c.Name, c.New, f.revValue(c.OldValue, c.Kind, false), f.revValue(c.NewValue, c.Kind, false))
		}
		w.Flush()
	}
	for _, c := range rev.Comparisons {
		fmt.Fprintf(&b, "\nComparison %s: %s\n", c.ID, revRecommendation(c, true))
		if c.OldMargin != nil && c.NewMargin != nil && *c.OldMargin != *c.NewMargin && !c.RecommendationChanged {
			fmt.Fprintf(&b, "  margin over the runner-up: %s → %s\n", f.Money(*c.OldMargin), f.Money(*c.NewMargin))
		}
		rows := [][]string{{"alternative", "measure", "was", "now", "change"}}
		for k, m := range c.Measures {
			label, flip := revLabel(m.Measure, c.CostOnly)
			alt := m.Alt
			if k > 0 && c.Measures[k-1].Alt == m.Alt {
				alt = ""
			}
			rows = append(rows, []string{alt, label, f.revValue(m.Old, m.Kind, flip), f.revValue(m.New, m.Kind, flip), f.revDelta(m.Delta, m.Kind, flip)})
		}
		textTable(&b, rows, []bool{false, false, true, true, true})
	}
	if len(rev.Expectations) > 0 {
		fmt.Fprintf(&b, "\nExpectations\n")
		w := tw()
		for _, x := range rev.Expectations {
			fmt.Fprintf(w, "  line %d\t%s\t%s\n", x.Line, x.Text, revOutcome(x))
		}
		w.Flush()
	}
	return b.String()
}

// revOutcome says how an expectation's outcome changed.
func revOutcome(x compute.ExpectationChange) string {
	switch {
	case x.Old == "":
		return "added; " + x.New
	case x.New == "":
		return "removed; it " + strings.TrimSuffix(x.Old, "s") + "ed"
	case x.New == "fails":
		return "held, now fails"
	}
	return "failed, now holds"
}

// revisionTables are the revision note's content, shared by the Markdown
// and the document writers: the inputs, the amounts that follow, and per
// comparison its measures.
type revisionTables struct {
	summary  string
	alerts   []string // recommendation changes, to flag
	inputs   Table
	follows  Table
	comps    []revComp
	expects  Table
	hasInput bool
}

type revComp struct {
	title string
	note  string
	table Table
}

func (f Format) revisionTables(rev *compute.Revision) revisionTables {
	t := revisionTables{summary: f.revSummary(rev)}
	for _, c := range rev.Comparisons {
		if c.RecommendationChanged {
			t.alerts = append(t.alerts, fmt.Sprintf("Comparison %s: the recommendation changed from %s to %s.", c.ID, c.OldBestName, c.NewBestName))
		}
	}
	t.inputs = Table{Caption: "Inputs that changed", Header: []string{"Where", "Input", "Was", "Now"}, Align: []byte{'l', 'l', 'l', 'l'}}
	for _, c := range rev.Inputs {
		old, new := f.revInput(c.Old, c.OldValue, c.Kind), f.revInput(c.New, c.NewValue, c.Kind)
		switch c.Change {
		case compute.RevAdded:
			old = "(added)"
		case compute.RevRemoved:
			new = "(removed)"
		}
		t.inputs.Rows = append(t.inputs.Rows, []string{revWhere(c), c.Name, old, new})
	}
	t.follows = Table{Caption: "Amounts that follow from the changed inputs", Header: []string{"Where", "Input", "As written", "Was", "Now"},
		Align: []byte{'l', 'l', 'l', 'r', 'r'}, Note: "The text of these lines is the same; their values moved with the inputs they use."}
	for _, c := range rev.Follows {
		t.follows.Rows = append(t.follows.Rows, []string{revWhere(c), c.Name, c.New, f.revValue(c.OldValue, c.Kind, false), f.revValue(c.NewValue, c.Kind, false)})
	}
	for _, c := range rev.Comparisons {
		rc := revComp{title: "Comparison " + c.ID, note: capital(revRecommendation(c, false)) + "."}
		if c.OldMargin != nil && c.NewMargin != nil && !c.RecommendationChanged && *c.OldMargin != *c.NewMargin {
			rc.note += fmt.Sprintf(" Its margin over the runner-up went from %s to %s.", f.Money(*c.OldMargin), f.Money(*c.NewMargin))
		}
		tb := Table{Caption: "Results of comparison " + c.ID, Header: []string{"Alternative", "Measure", "Was", "Now", "Change"}, Align: []byte{'l', 'l', 'r', 'r', 'r'}}
		for k, m := range c.Measures {
			label, flip := revLabel(m.Measure, c.CostOnly)
			name := m.AltName
			if k > 0 && c.Measures[k-1].Alt == m.Alt {
				name = "" // the alternative's rows follow one another
			}
			tb.Rows = append(tb.Rows, []string{name, label, f.revValue(m.Old, m.Kind, flip), f.revValue(m.New, m.Kind, flip), f.revDelta(m.Delta, m.Kind, flip)})
		}
		rc.table = tb
		t.comps = append(t.comps, rc)
	}
	t.expects = Table{Caption: "Expectations whose outcome changed", Header: []string{"Line", "Condition", "Outcome"}, Align: []byte{'r', 'l', 'l'}}
	for _, x := range rev.Expectations {
		t.expects.Rows = append(t.expects.Rows, []string{fmt.Sprint(x.Line), x.Text, revOutcome(x)})
	}
	return t
}

// mdRevision writes the revision note as a Markdown section with headings
// at level (1 for a note of its own).
func mdRevision(rev *compute.Revision, f Format, level int) string {
	var b strings.Builder
	h := func(l int, s string) { fmt.Fprintf(&b, "%s %s\n\n", strings.Repeat("#", min(l, 6)), escapeMD(s)) }
	t := f.revisionTables(rev)
	h(level, RevisionTitle(rev))
	fmt.Fprintf(&b, "From `%s` to `%s`. %s\n\n", rev.Old, rev.New, escapeMD(t.summary))
	for _, a := range t.alerts {
		fmt.Fprintf(&b, "> **Warning:** %s\n\n", escapeMD(a))
	}
	mdTable := func(tb Table) {
		if len(tb.Rows) == 0 {
			return
		}
		fmt.Fprintf(&b, "**%s**\n\n", escapeMD(tb.Caption))
		right := make([]bool, len(tb.Align))
		for i, a := range tb.Align {
			right[i] = a == 'r'
		}
		table(&b, tb.Header, tb.Rows, right)
		if tb.Note != "" {
			fmt.Fprintf(&b, "\n%s\n", escapeMD(tb.Note))
		}
		b.WriteString("\n")
	}
	mdTable(t.inputs)
	mdTable(t.follows)
	for _, c := range t.comps {
		h(level+1, c.title)
		fmt.Fprintf(&b, "%s\n\n", escapeMD(c.note))
		mdTable(c.table)
	}
	mdTable(t.expects)
	return b.String()
}

// RevisionMarkdown is the revision note as a Markdown file of its own.
func RevisionMarkdown(rev *compute.Revision, rep *compute.Report) []byte {
	s := mdRevision(rev, NewFormat(rep, false), 1)
	if rep.Title != "" {
		s = strings.Replace(s, "\n\n", "\n\n*"+escapeMD(rep.Title)+"*\n\n", 1)
	}
	return []byte(s)
}

// revisionNodes are the revision note as document nodes, headings at
// level; slug makes the headings' ids.
func revisionNodes(rev *compute.Revision, f Format, level int, slug func(string) string) []Node {
	t := f.revisionTables(rev)
	title := RevisionTitle(rev)
	out := []Node{
		Heading{Level: level, Text: []Inline{{Text: title}}, ID: slug(title)},
		Paragraph{Text: []Inline{{Text: "From "}, {Text: rev.Old, Code: true}, {Text: " to "}, {Text: rev.New, Code: true}, {Text: ". " + t.summary}}},
	}
	if len(t.alerts) > 0 {
		out = append(out, Callout{Kind: "warning", Title: "The recommendation changed", Text: strings.Join(t.alerts, " ")})
	}
	for _, tb := range []Table{t.inputs, t.follows} {
		if len(tb.Rows) > 0 {
			out = append(out, tb)
		}
	}
	for _, c := range t.comps {
		out = append(out, Heading{Level: level + 1, Text: []Inline{{Text: c.title}}, ID: slug(title + " " + c.title)},
			Paragraph{Text: []Inline{{Text: c.note}}})
		if len(c.table.Rows) > 0 {
			out = append(out, c.table)
		}
	}
	if len(t.expects.Rows) > 0 {
		out = append(out, t.expects)
	}
	return out
}

// RevisionDoc is the revision note as a document of its own, for the HTML
// and PDF writers.
func RevisionDoc(rev *compute.Revision, rep *compute.Report) *Doc {
	b := &builder{rep: rep, m: rep.Memo, f: NewFormat(rep, true), slugs: map[string]int{}}
	title := "Revision note"
	if rep.Title != "" {
		title += ": " + rep.Title
	}
	doc := &Doc{Title: title, Paper: "letter", Currency: rep.Currency.Code, Caution: Caution}
	fm := rep.Memo.Front
	if strings.EqualFold(strings.TrimSpace(fm.Paper.Value.Src), "a4") {
		doc.Paper = "a4"
	}
	doc.Date = strings.TrimSpace(fm.Date.Value.Src)
	doc.Heading = []KV{{"Old version", rev.Old}, {"New version", rev.New}}
	if doc.Date != "" {
		doc.Heading = append(doc.Heading, KV{"Memo date", doc.Date})
	}
	doc.Body = revisionNodes(rev, b.f, 1, b.slug)
	return doc
}

// The revision in the JSON output ("worth build --changes-since REV"):
// amounts signed and unrounded, rates as fractions, null where absent.
type jsonRevision struct {
	Old          string                  `json:"old"`
	New          string                  `json:"new"`
	Inputs       []jsonInputChange       `json:"inputs"`
	Follows      []jsonInputChange       `json:"follows"`
	Comparisons  []jsonComparisonChange  `json:"comparisons"`
	Expectations []jsonExpectationChange `json:"expectations"`
}

type jsonInputChange struct {
	Block    string   `json:"block"`
	Name     string   `json:"name"`
	Change   string   `json:"change"`
	OldAt    string   `json:"old_at,omitempty"`
	NewAt    string   `json:"new_at,omitempty"`
	Old      string   `json:"old"`
	New      string   `json:"new"`
	OldValue *float64 `json:"old_value"`
	NewValue *float64 `json:"new_value"`
}

type jsonComparisonChange struct {
	ID                    string              `json:"id"`
	Change                string              `json:"change"`
	OldRecommended        string              `json:"old_recommended"`
	NewRecommended        string              `json:"new_recommended"`
	RecommendationChanged bool                `json:"recommendation_changed"`
	OldMargin             *float64            `json:"old_margin"`
	NewMargin             *float64            `json:"new_margin"`
	Measures              []jsonMeasureChange `json:"measures"`
}

type jsonMeasureChange struct {
	Alternative string   `json:"alternative"`
	Measure     string   `json:"measure"`
	Old         *float64 `json:"old"`
	New         *float64 `json:"new"`
	Change      *float64 `json:"change"`
}

type jsonExpectationChange struct {
	Line int    `json:"line"`
	Text string `json:"text"`
	Old  string `json:"old"`
	New  string `json:"new"`
}

func revisionJSON(rev *compute.Revision) *jsonRevision {
	if rev == nil {
		return nil
	}
	out := &jsonRevision{Old: rev.Old, New: rev.New, Inputs: []jsonInputChange{}, Follows: []jsonInputChange{},
		Comparisons: []jsonComparisonChange{}, Expectations: []jsonExpectationChange{}}
	in := func(c compute.InputChange) jsonInputChange {
		return jsonInputChange{Block: c.Block, Name: c.Name, Change: c.Change, OldAt: c.OldAt, NewAt: c.NewAt,
			Old: c.Old, New: c.New, OldValue: c.OldValue, NewValue: c.NewValue}
	}
	for _, c := range rev.Inputs {
		out.Inputs = append(out.Inputs, in(c))
	}
	for _, c := range rev.Follows {
		out.Follows = append(out.Follows, in(c))
	}
	for _, c := range rev.Comparisons {
		jc := jsonComparisonChange{ID: c.ID, Change: c.Change, OldRecommended: c.OldBest, NewRecommended: c.NewBest,
			RecommendationChanged: c.RecommendationChanged, OldMargin: c.OldMargin, NewMargin: c.NewMargin, Measures: []jsonMeasureChange{}}
		for _, m := range c.Measures {
			jc.Measures = append(jc.Measures, jsonMeasureChange{Alternative: m.Alt, Measure: m.Measure, Old: m.Old, New: m.New, Change: m.Delta})
		}
		out.Comparisons = append(out.Comparisons, jc)
	}
	for _, x := range rev.Expectations {
		out.Expectations = append(out.Expectations, jsonExpectationChange{Line: x.Line, Text: x.Text, Old: x.Old, New: x.New})
	}
	return out
}

// textTable writes rows in aligned columns, two spaces apart, indented by
// two; right marks the columns to align right (figures).
func textTable(b *bytes.Buffer, rows [][]string, right []bool) {
	width := make([]int, len(right))
	for _, r := range rows {
		for i, c := range r {
			width[i] = max(width[i], utf8.RuneCountInString(c))
		}
	}
	for _, r := range rows {
		var line strings.Builder
		line.WriteString("  ")
		for i, c := range r {
			pad := strings.Repeat(" ", width[i]-utf8.RuneCountInString(c))
			if i > 0 {
				line.WriteString("  ")
			}
			if right[i] {
				line.WriteString(pad + c)
			} else {
				line.WriteString(c + pad)
			}
		}
		b.WriteString(strings.TrimRight(line.String(), " ") + "\n")
	}
}
