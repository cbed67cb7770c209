package render

import (
	"fmt"
	"math"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"unicode"

	"github.com/yuin/goldmark/ast"
	east "github.com/yuin/goldmark/extension/ast"
	"github.com/yuin/goldmark/util"

	"worth/compute"
	"worth/parse"
)

// DocOptions choose what BuildDoc puts in the document.
type DocOptions struct {
	// AllowHTML lets raw HTML in the prose through to the HTML writer
	// (links with script or data schemes are neutralised all the same).
	AllowHTML bool
	// AppendixOnly leaves the body out: the document is the calculation
	// appendix alone, to attach to a proposal.
	AppendixOnly bool
}

// BuildDoc turns a computed report into the document model that the HTML
// and PDF writers draw: the memo heading from the front matter, the prose
// in order with inline values filled in, each worth block replaced by its
// tables, charts, equations and callouts, and the calculation appendix.
// Every figure and label is formatted here, once.
func BuildDoc(rep *compute.Report, opt DocOptions) *Doc {
	m := rep.Memo
	b := &builder{rep: rep, m: m, src: m.Source, f: NewFormat(rep, true), slugs: map[string]int{}}
	fm := m.Front
	doc := &Doc{
		Title:        strings.TrimSpace(fm.Title.Value.Src),
		Date:         strings.TrimSpace(fm.Date.Value.Src),
		Paper:        "letter",
		Logo:         strings.TrimSpace(fm.Logo.Value.Src),
		Currency:     rep.Currency.Code,
		Caution:      Caution,
		AllowHTML:    opt.AllowHTML,
		AppendixOnly: opt.AppendixOnly,
	}
	if doc.Title == "" {
		doc.Title = "Decision memo"
	}
	if strings.EqualFold(strings.TrimSpace(fm.Paper.Value.Src), "a4") {
		doc.Paper = "a4"
	}
	if m.File != "" && m.File != "-" {
		doc.Dir = filepath.Dir(m.File)
	}
	for _, kv := range []struct {
		k string
		f parse.Field
	}{{"To", fm.To}, {"From", fm.From}, {"Date", fm.Date}, {"Subject", fm.Subject}} {
		if v := strings.TrimSpace(kv.f.Value.Src); v != "" {
			doc.Heading = append(doc.Heading, KV{kv.k, v})
		}
	}
	for _, x := range fm.Extra {
		if v := strings.TrimSpace(x.Value.Src); v != "" {
			doc.Heading = append(doc.Heading, KV{capital(x.Key), v})
		}
	}
	if !opt.AppendixOnly && m.Doc != nil {
		doc.Body = b.blocks(m.Doc)
		// The appendix's headings take the level of the memo's own
		// sections (a memo whose sections are "##" gets a "##" appendix).
		walk(doc.Body, func(n Node) {
			if h, ok := n.(Heading); ok && (b.top == 0 || h.Level < b.top) {
				b.top = h.Level
			}
		})
	}
	if b.top == 0 || b.top > 5 {
		b.top = 1
	}
	if rep.Revision != nil && !opt.AppendixOnly {
		// "worth build --changes-since REV": what changed, first.
		doc.Body = append(revisionNodes(rep.Revision, b.f, b.top, b.slug), doc.Body...)
	}
	doc.Appendix = b.appendix()
	return doc
}

type builder struct {
	rep   *compute.Report
	m     *parse.Memo
	src   []byte
	f     Format
	slugs map[string]int
	// top is the level of the memo's top headings.
	top int
}

// ---- prose ----

func (b *builder) blocks(parent ast.Node) []Node {
	var out []Node
	for c := parent.FirstChild(); c != nil; c = c.NextSibling() {
		switch x := c.(type) {
		case *ast.Heading:
			text := b.inlines(x)
			out = append(out, Heading{Level: x.Level, Text: text, ID: b.slug(plain(text))})
		case *ast.Paragraph, *ast.TextBlock:
			if text := b.inlines(x); len(text) > 0 {
				out = append(out, Paragraph{Text: text})
			}
		case *ast.List:
			l := List{Ordered: x.IsOrdered(), Start: x.Start}
			if l.Ordered && l.Start == 0 && x.Start == 0 {
				l.Start = 0
			}
			for it := x.FirstChild(); it != nil; it = it.NextSibling() {
				l.Items = append(l.Items, b.blocks(it))
			}
			out = append(out, l)
		case *ast.Blockquote:
			out = append(out, Quote{Body: b.blocks(x)})
		case *ast.FencedCodeBlock:
			if blk, ok := b.m.Nodes[x]; ok {
				out = append(out, b.worthBlock(blk)...)
				continue
			}
			lang := ""
			if x.Info != nil {
				lang, _, _ = strings.Cut(strings.TrimSpace(string(x.Info.Segment.Value(b.src))), " ")
			}
			out = append(out, CodeBlock{Lang: lang, Text: b.lines(x)})
		case *ast.CodeBlock:
			out = append(out, CodeBlock{Text: b.lines(x)})
		case *ast.ThematicBreak:
			out = append(out, Rule{})
		case *ast.HTMLBlock:
			text := b.lines(x)
			if x.HasClosure() {
				text += string(x.ClosureLine.Value(b.src))
			}
			text = strings.TrimRight(text, "\n")
			if text != "" {
				out = append(out, Paragraph{Text: []Inline{{Text: text, RawHTML: true}}})
			}
		case *east.Table:
			out = append(out, b.proseTable(x))
		default:
			out = append(out, b.blocks(c)...)
		}
	}
	return out
}

// walk calls fn for every node of a tree, list items and quotes included.
func walk(ns []Node, fn func(Node)) {
	for _, n := range ns {
		fn(n)
		switch x := n.(type) {
		case List:
			for _, it := range x.Items {
				walk(it, fn)
			}
		case Quote:
			walk(x.Body, fn)
		}
	}
}

// lines joins a block's lines verbatim.
func (b *builder) lines(n ast.Node) string {
	var s strings.Builder
	ls := n.Lines()
	for i := 0; i < ls.Len(); i++ {
		seg := ls.At(i)
		s.Write(seg.Value(b.src))
	}
	return s.String()
}

// slug makes a unique id for a heading.
func (b *builder) slug(text string) string {
	var s strings.Builder
	dash := false
	for _, r := range strings.ToLower(text) {
		switch {
		case unicode.IsLetter(r) || unicode.IsDigit(r):
			if dash && s.Len() > 0 {
				s.WriteByte('-')
			}
			dash = false
			s.WriteRune(r)
		default:
			dash = true
		}
	}
	id := s.String()
	if id == "" {
		id = "section"
	}
	b.slugs[id]++
	if n := b.slugs[id]; n > 1 {
		id += "-" + strconv.Itoa(n)
	}
	return id
}

// inlines flattens a block's inline children into styled runs.
func (b *builder) inlines(n ast.Node) []Inline {
	var out []Inline
	b.inline(n, Inline{}, &out)
	// Trim the trailing space a soft break may leave.
	if k := len(out) - 1; k >= 0 && !out[k].Value && !out[k].Break && !out[k].RawHTML {
		out[k].Text = strings.TrimRight(out[k].Text, " ")
		if out[k].Text == "" {
			out = out[:k]
		}
	}
	return out
}

// add appends a run, merging it into the previous one where the style is
// the same.
// maxRunBytes bounds the text merged into one run of inline text.
const maxRunBytes = 4096

func add(out *[]Inline, r Inline) {
	if r.Text == "" && !r.Break {
		return
	}
	if k := len(*out) - 1; k >= 0 && !r.Value && !r.Break {
		p := &(*out)[k]
		// Fix (hostile input): a paragraph of 80,000 short lines took
		// seconds, since each line was appended to one growing string; a
		// run stops taking more text at maxRunBytes (never reached by a
		// real paragraph), which keeps the work linear.
		if len(p.Text) < maxRunBytes && !p.Value && !p.Break && p.Bold == r.Bold && p.Italic == r.Italic && p.Code == r.Code &&
			p.Strike == r.Strike && p.Link == r.Link && p.RawHTML == r.RawHTML {
			p.Text += r.Text
			return
		}
	}
	*out = append(*out, r)
}

func unescape(s []byte) string {
	return string(util.ResolveEntityNames(util.ResolveNumericReferences(util.UnescapePunctuations(s))))
}

func (b *builder) inline(n ast.Node, st Inline, out *[]Inline) {
	for c := n.FirstChild(); c != nil; c = c.NextSibling() {
		switch x := c.(type) {
		case *ast.Text:
			r := st
			if x.IsRaw() {
				r.Text = string(x.Segment.Value(b.src))
			} else {
				r.Text = unescape(x.Segment.Value(b.src))
			}
			add(out, r)
			switch {
			case x.HardLineBreak():
				add(out, Inline{Break: true})
			case x.SoftLineBreak():
				r.Text = " "
				add(out, r)
			}
		case *ast.String:
			r := st
			r.Text = string(x.Value)
			add(out, r)
		case *ast.CodeSpan:
			if in, ok := b.m.InlineAt[x]; ok {
				r := Inline{Value: true, Source: in.Expr.Src, Line: in.Expr.Pos.Line, Bold: st.Bold, Italic: st.Italic, Link: st.Link}
				if r.Link == "" {
					r.Link = b.valueLink(in.Expr.Src) // its worked solution
				}
				r.Text = "n/a"
				if v, ok := b.rep.Inline[in.Offset]; ok {
					r.Text = b.f.Value(v)
				}
				add(out, r)
				continue
			}
			var s strings.Builder
			for t := x.FirstChild(); t != nil; t = t.NextSibling() {
				if tx, ok := t.(*ast.Text); ok {
					s.WriteString(strings.ReplaceAll(string(tx.Segment.Value(b.src)), "\n", " "))
				}
			}
			r := st
			r.Code, r.Text = true, s.String()
			add(out, r)
		case *ast.Emphasis:
			s := st
			if x.Level >= 2 {
				s.Bold = true
			} else {
				s.Italic = true
			}
			b.inline(x, s, out)
		case *east.Strikethrough:
			s := st
			s.Strike = true
			b.inline(x, s, out)
		case *ast.Link:
			s := st
			s.Link = SafeLink(unescape(x.Destination))
			b.inline(x, s, out)
		case *ast.AutoLink:
			url := string(x.URL(b.src))
			if x.AutoLinkType == ast.AutoLinkEmail && !strings.HasPrefix(strings.ToLower(url), "mailto:") {
				url = "mailto:" + url
			}
			r := st
			r.Text, r.Link = string(x.Label(b.src)), SafeLink(url)
			add(out, r)
		case *ast.Image:
			var alt []Inline
			b.inline(x, Inline{}, &alt)
			r := st
			r.Text = plain(alt)
			if r.Text == "" {
				r.Text = "image"
			}
			r.Link = SafeLink(unescape(x.Destination))
			add(out, r)
		case *ast.RawHTML:
			var s strings.Builder
			for i := 0; i < x.Segments.Len(); i++ {
				seg := x.Segments.At(i)
				s.Write(seg.Value(b.src))
			}
			add(out, Inline{Text: s.String(), RawHTML: true})
		case *east.TaskCheckBox:
			r := st
			r.Text = "☐ "
			if x.IsChecked {
				r.Text = "☑ "
			}
			add(out, r)
		default:
			b.inline(c, st, out)
		}
	}
}

// plain is the text of runs without their styles.
func plain(runs []Inline) string {
	var s strings.Builder
	for _, r := range runs {
		if r.Break {
			s.WriteByte(' ')
			continue
		}
		s.WriteString(r.Text)
	}
	return s.String()
}

var unsafeScheme = regexp.MustCompile(`^(?i)\s*(javascript|vbscript|data|file)\s*:`)

// SafeLink returns a link target, or "" for a target whose scheme could run
// code or smuggle content (javascript:, vbscript:, data:, file:). Control
// characters and whitespace inside the scheme are ignored, as browsers do.
func SafeLink(u string) string {
	cleaned := strings.Map(func(r rune) rune {
		if r < 0x21 || r == 0x7f {
			return -1
		}
		return r
	}, u)
	if unsafeScheme.MatchString(cleaned) {
		return ""
	}
	return u
}

var numericCell = regexp.MustCompile(`^[-−+(]?[$€£¥]?\s?[0-9][0-9,.]*\s?(%|k|M|[A-Z]{3})?\)?$`)

func (b *builder) proseTable(x *east.Table) Table {
	t := Table{}
	for row := x.FirstChild(); row != nil; row = row.NextSibling() {
		var cells []string
		for cell := row.FirstChild(); cell != nil; cell = cell.NextSibling() {
			cells = append(cells, strings.TrimSpace(plain(b.inlines(cell))))
		}
		if _, ok := row.(*east.TableHeader); ok {
			t.Header = cells
		} else {
			t.Rows = append(t.Rows, cells)
		}
	}
	for i, a := range x.Alignments {
		switch a {
		case east.AlignRight:
			t.Align = append(t.Align, 'r')
		case east.AlignCenter:
			t.Align = append(t.Align, 'c')
		case east.AlignLeft:
			t.Align = append(t.Align, 'l')
		default:
			// Unaligned: right-align a column of numbers.
			num := len(t.Rows) > 0
			for _, r := range t.Rows {
				if i < len(r) && r[i] != "" && !numericCell.MatchString(r[i]) {
					num = false
				}
			}
			if num {
				t.Align = append(t.Align, 'r')
			} else {
				t.Align = append(t.Align, 'l')
			}
		}
	}
	return t
}

// ---- worth blocks ----

func (b *builder) worthBlock(blk parse.Block) []Node {
	switch x := blk.(type) {
	case *parse.Assume:
		return b.assume(x)
	case *parse.Alternative:
		return b.alternative(x)
	case *parse.Compare:
		if c := findComp(b.rep, x.ID); c != nil {
			return b.compare(c)
		}
	case *parse.Expect:
		return b.expect(x)
	case *parse.Replacement:
		return b.replacement(x)
	case *parse.Risk:
		return b.risk(x)
	case *parse.Sensitivity, *parse.Scenario, *parse.Budget:
		return b.analysis(x)
	case *parse.Place:
		p := b.rep.Places[x]
		if p == nil || p.Result == nil {
			return nil
		}
		if x.Kind == "schedule" {
			return []Node{b.schedule(p.Result, p.Comp)}
		}
		return []Node{b.cashflow(p.Alt, p.Result, p.Comp, fmt.Sprintf("diagram %s, line %d", x.ID, x.Pos.Line))}
	}
	return nil
}

func lineRange(h *parse.BlockHead) string {
	return fmt.Sprintf("lines %d–%d", h.Pos.Line, h.EndLine)
}

func (b *builder) assume(x *parse.Assume) []Node {
	byName := map[string]*compute.Assumption{}
	for _, a := range b.rep.Assumptions {
		byName[a.Name] = a
	}
	t := Table{
		Caption: "Assumptions",
		Header:  []string{"Input", "Value", "As written", "Line"},
		Align:   []byte{'l', 'r', 'l', 'r'},
		Source:  "assume, " + lineRange(&x.BlockHead),
	}
	for _, it := range x.Items {
		a := byName[it.Name]
		if a == nil {
			continue
		}
		written := a.Expr
		if a.Dist != nil && it.Dist != nil {
			written += " ~ " + it.Dist.Kind + "(" + joinNums(b.f, a.Dist.Params) + ")"
		}
		t.Rows = append(t.Rows, []string{a.Name, b.f.Num(a.Value), written, strconv.Itoa(a.Line)})
	}
	b.traceAssume(&t)
	return []Node{t}
}

// itemWhen is when an item falls, with its gradient.
func (b *builder) itemWhen(a *compute.Alternative, it *compute.Item) string {
	s := ItemWhen(a, it)
	switch {
	case it.HasEscalation:
		s += ", escalating " + b.f.Rate(it.Escalation) + " a year"
	case it.HasGradient:
		s += fmt.Sprintf(", then %s%s a year", sign(it.Gradient), b.f.Money(abs(it.Gradient)))
	}
	return s
}

func (b *builder) alternative(x *parse.Alternative) []Node {
	a := findAlt(b.rep, x.ID)
	if a == nil {
		return nil
	}
	t := Table{
		Caption: "Alternative: " + a.Name,
		Header:  []string{"Line item", "Kind", "Amount", "When", "Line"},
		Align:   []byte{'l', 'l', 'r', 'l', 'r'},
		Note:    fmt.Sprintf("Id %s; life: %s.", a.ID, LifeText(a)),
		Source:  fmt.Sprintf("alternative %s, %s", a.ID, lineRange(&x.BlockHead)),
	}
	for _, it := range a.Items {
		t.Rows = append(t.Rows, []string{it.Label, KindWord(it), b.f.Money(it.Amount), b.itemWhen(a, it), ItemLine(it)})
	}
	if a.Residual != nil {
		t.Rows = append(t.Rows, []string{"residual", "value at a study period's end", b.f.Money(*a.Residual), "end of a study period that cuts a life", strconv.Itoa(a.ResidualLine)})
	}
	b.traceAlternative(&t, a, x)
	t.Rows = append(t.Rows, b.f.taxInputRows(a)...)
	out := append([]Node{t}, b.altFinance(a)...)
	if c, r := b.firstComparison(a); r != nil {
		out = append(out, b.cashflow(a, r, c, fmt.Sprintf("alternative %s, line %d", a.ID, x.Pos.Line)))
	}
	return out
}

// firstComparison is the first comparison that holds a, and a's result
// in it.
func (b *builder) firstComparison(a *compute.Alternative) (*compute.Comparison, *compute.Result) {
	for _, c := range b.rep.Comparisons {
		for _, r := range c.Results {
			if r.Alt.ID == a.ID {
				return c, r
			}
		}
	}
	return nil, nil
}

// horizonPhrase is a short description of the span a result's flows cover.
func (b *builder) horizonPhrase(c *compute.Comparison) string {
	return fmt.Sprintf("%s at %s%s", horizonShort(c), b.f.Rate(c.Rate.Effective), afterTaxWords(c))
}

// cashflow is the arrow diagram of an alternative's net flows under a
// comparison.
func (b *builder) cashflow(a *compute.Alternative, r *compute.Result, c *compute.Comparison, source string) Chart {
	ch := Chart{
		Kind:    "cashflow",
		Title:   "Cash-flow diagram: " + a.Name,
		XLabel:  "Year",
		YLabel:  "Net cash flow",
		XFormat: "year",
		YFormat: "money",
		Source:  source,
	}
	labels := b.arrowLabels(a, r, c)
	ylo, yhi := 0.0, 0.0
	for _, y := range r.Flows {
		ch.Arrows = append(ch.Arrows, Arrow{Year: y.Year, Amount: y.Net, Label: labels[y.Year]})
		ylo, yhi = math.Min(ylo, y.Net), math.Max(yhi, y.Net)
	}
	n := 0
	if len(r.Flows) > 0 {
		n = r.Flows[len(r.Flows)-1].Year
	}
	ch.XMin, ch.XMax, ch.XTicks = b.axis(0, float64(n), 12, "year", true)
	ch.YMin, ch.YMax, ch.YTicks = b.axis(math.Min(0, ylo), math.Max(0, yhi), 6, "money", false)
	// Annual series are told under the chart rather than on every arrow.
	for _, it := range a.Items {
		if it.Kind == parse.Annual {
			ch.Notes = append(ch.Notes, fmt.Sprintf("%s: %s, %s", it.Label, b.f.Money(it.Amount), b.itemWhen(a, it)))
		}
	}
	note := fmt.Sprintf("Years 0 to %d, %s", n, b.horizonPhrase(c))
	if r.FlowsNote != "" {
		note += ": " + r.FlowsNote
	}
	ch.Notes = append([]string{note + "."}, ch.Notes...)
	// Text alternative.
	var alt strings.Builder
	fmt.Fprintf(&alt, "Cash-flow diagram of %s, one arrow per year from year 0 to year %d, up for a net inflow and down for a net outflow. ", a.Name, n)
	lo, hi := math.Inf(1), math.Inf(-1)
	var labelled []string
	for _, ar := range ch.Arrows {
		if ar.Label != "" {
			labelled = append(labelled, fmt.Sprintf("year %d: %s (%s)", ar.Year, b.f.Money(ar.Amount), ar.Label))
			continue
		}
		lo, hi = math.Min(lo, ar.Amount), math.Max(hi, ar.Amount)
	}
	if len(labelled) > 0 {
		alt.WriteString("Net flows " + strings.Join(labelled, "; ") + ". ")
	}
	if !math.IsInf(lo, 1) {
		if lo == hi {
			fmt.Fprintf(&alt, "Every other year: %s.", b.f.Money(lo))
		} else {
			fmt.Fprintf(&alt, "Other years range from %s to %s.", b.f.Money(lo), b.f.Money(hi))
		}
	}
	ch.Alt = strings.TrimSpace(alt.String())
	return ch
}

// arrowLabels names the one-time and periodic amounts of each year (first
// costs, amounts at a year, amounts every K years, salvage and residual
// values) with their line labels and amounts.
func (b *builder) arrowLabels(a *compute.Alternative, r *compute.Result, c *compute.Comparison) map[int]string {
	out := map[int]string{}
	byLabel := map[string][]*compute.Item{}
	var first []*compute.Item
	for _, it := range a.Items {
		switch it.Kind {
		case parse.FirstCost:
			first = append(first, it)
			byLabel[it.Label] = append(byLabel[it.Label], it)
		case parse.Once, parse.Periodic, parse.Salvage:
			byLabel[it.Label] = append(byLabel[it.Label], it)
		}
	}
	for _, y := range r.Flows {
		var parts []string
		if y.Year == 0 {
			for _, it := range first {
				parts = append(parts, it.Label+" "+b.f.Money(it.Amount))
			}
		}
		used := map[string]int{}
		for _, note := range y.Notes {
			if note == "residual value" {
				age := y.Year
				if a.Life > 0 && y.Year > 0 {
					age = y.Year - ((y.Year-1)/a.Life)*a.Life
				}
				parts = append(parts, "residual value "+b.f.Money(a.ResidualAt(age)))
				continue
			}
			its := byLabel[note]
			k := used[note]
			used[note]++
			if k < len(its) {
				parts = append(parts, note+" "+b.f.Money(its[k].Amount))
			} else {
				parts = append(parts, note)
			}
		}
		if len(parts) > 0 {
			out[y.Year] = strings.Join(parts, "; ")
		}
	}
	return out
}

func (b *builder) compare(c *compute.Comparison) []Node {
	var out []Node
	header, rows := b.f.ResultsTable(c)
	t := Table{
		Caption: "Comparison " + c.ID,
		Header:  header,
		Align:   []byte{'l'},
		Note: fmt.Sprintf("Rate %s; horizon: %s; decided by %s.",
			b.f.RateText(c.Rate), HorizonText(c), RuleText(c)),
		Source:   fmt.Sprintf("compare %s, line %d", c.ID, c.Line),
		BoldCols: []bool{false},
	}
	t.Note += b.f.BasisText(c)
	for _, r := range c.Results {
		t.Align = append(t.Align, 'r')
		t.BoldCols = append(t.BoldCols, r.Alt.ID == c.Recommended)
	}
	for _, row := range rows {
		t.Rows = append(t.Rows, append([]string{row.Label}, row.Cells...))
	}
	b.traceResults(&t, c)
	t = b.resultsTable(t, c) // one row an alternative past a handful (scale.go)
	out = append(out, t)

	// The recommendation.
	call := Callout{Kind: "recommendation", Title: "Recommendation", Text: b.f.Recommendation(c)}
	call.Facts = append(call.Facts, KV{"Rule", RuleText(c)})
	if c.RunnerUp != "" {
		word := measureWord(c)
		if c.CostOnly {
			word = map[string]string{"present worth": "present cost", "annual worth": "equivalent annual cost"}[word]
		}
		if c.Recommended == compute.DoNothing {
			call.Facts = append(call.Facts, KV{"Best alternative", name(c, c.RunnerUp)})
		} else {
			call.Facts = append(call.Facts, KV{"Margin", fmt.Sprintf("%s of %s over %s", b.f.Money(c.Margin), word, name(c, c.RunnerUp))})
		}
	}
	call.Facts = append(call.Facts, KV{"Rate", b.f.RateText(c.Rate)}, KV{"Horizon", HorizonText(c)})
	call.Facts = append(call.Facts, b.f.basisFacts(c)...)
	if c.Tie && c.RunnerUp != "" {
		call.Items = append(call.Items, fmt.Sprintf("Tie: %s and %s are within one currency unit of each other by %s.", name(c, c.Recommended), name(c, c.RunnerUp), measureWord(c)))
	}
	call.Items = append(call.Items, Warnings(c)...)
	for _, e := range b.failedFor(c) {
		call.Items = append(call.Items, fmt.Sprintf("The expectation %s on line %d does not hold.", e.Text, e.Line))
	}
	out = append(out, call)

	if len(c.Steps) > 0 {
		out = append(out, Paragraph{Text: []Inline{{Text: "Incremental analysis, in order of first cost:"}}})
		l := List{Ordered: true, Start: 1}
		for _, s := range c.Steps {
			l.Items = append(l.Items, []Node{Paragraph{Text: []Inline{{Text: b.f.StepText(c, s)}}}})
		}
		out = append(out, l)
	}
	out = append(out, b.financeNodes(c)...)
	for _, r := range c.Results {
		eq := Equations{Title: fmt.Sprintf("Worked solution: %s (%s)", r.Alt.Name, r.Alt.ID), ID: workID(c, r)}
		for _, w := range r.Work {
			eq.Steps = append(eq.Steps, b.f.Equation(w))
		}
		out = append(out, eq)
	}
	out = append(out, b.rateChart(c))
	if ch, ok := b.paybackChart(c); ok {
		out = append(out, ch)
	}
	return out
}

// failedFor lists the failed expectations that concern a comparison: those
// that name it or one of its alternatives, or all of them where the memo
// has one comparison.
func (b *builder) failedFor(c *compute.Comparison) []*compute.Expectation {
	words := []string{c.ID}
	for _, r := range c.Results {
		words = append(words, r.Alt.ID)
	}
	var out []*compute.Expectation
	for _, e := range b.rep.Expectations {
		if e.Passed {
			continue
		}
		hit := len(b.rep.Comparisons) == 1
		for _, w := range words {
			if mentions(e.Text, w) {
				hit = true
			}
		}
		if hit {
			out = append(out, e)
		}
	}
	return out
}

// mentions reports whether id appears in text as a whole word.
func mentions(text, id string) bool {
	isID := func(r byte) bool {
		return r == '_' || r == '-' || r >= '0' && r <= '9' || r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z'
	}
	for i := 0; ; {
		k := strings.Index(text[i:], id)
		if k < 0 {
			return false
		}
		s, e := i+k, i+k+len(id)
		if (s == 0 || !isID(text[s-1])) && (e == len(text) || !isID(text[e])) {
			return true
		}
		i = s + 1
	}
}

// rateChart is present worth against the interest rate, one curve per
// alternative, with each one's rate of return, the crossover rates and the
// comparison's rate.
func (b *builder) rateChart(c *compute.Comparison) Chart {
	curves, xs := chartCurves(c) // the leaders only past a handful (scale.go)
	word := "Present worth"
	if c.Horizon.Perpetual() {
		word = "Capitalized worth"
	}
	ch := Chart{
		Kind:    "lines",
		Title:   word + " versus interest rate",
		XLabel:  "Interest rate a year",
		YLabel:  word,
		XFormat: "percent",
		YFormat: "money",
		Source:  fmt.Sprintf("compare %s, line %d", c.ID, c.Line),
	}
	idx := map[string]int{}
	lo, hi := math.Inf(1), math.Inf(-1)
	ylo, yhi := math.Inf(1), math.Inf(-1)
	for k, cv := range curves {
		idx[cv.Alt] = k
		ch.Series = append(ch.Series, Series{Name: name(c, cv.Alt), X: cv.Rates, Y: cv.Worths, Emphasis: leading(c, cv.Alt)})
		for j, y := range cv.Worths {
			lo, hi = math.Min(lo, cv.Rates[j]), math.Max(hi, cv.Rates[j])
			if !math.IsNaN(y) && !math.IsInf(y, 0) {
				ylo, yhi = math.Min(ylo, y), math.Max(yhi, y)
			}
		}
	}
	if math.IsInf(lo, 1) {
		lo, hi = 0, 0.1
	}
	if math.IsInf(ylo, 1) {
		ylo, yhi = -1, 1
	}
	in := func(x float64) bool { return x >= lo-1e-12 && x <= hi+1e-12 }
	rate := c.Rate.Effective
	ch.Marks = append(ch.Marks, Mark{X: rate, HasX: true, Label: "rate " + b.f.Rate(rate), Series: -1, Kind: "rate"})
	var alt []string
	for _, r := range chartResults(c) {
		roots := r.IRRRoots
		if r.IRR != nil && len(roots) == 0 {
			roots = []float64{*r.IRR}
		}
		var shown []string
		for _, root := range roots {
			shown = append(shown, b.f.Percent(root))
			if in(root) && (len(c.Results) <= manySeries || leading(c, r.Alt.ID)) {
				ch.Marks = append(ch.Marks, Mark{X: root, Y: 0, HasX: true, HasY: true, Label: b.f.Percent(root), Series: idx[r.Alt.ID], Kind: "irr"})
				ylo, yhi = math.Min(ylo, 0), math.Max(yhi, 0)
			}
		}
		s := fmt.Sprintf("%s: %s at %s", r.Alt.Name, b.f.Money(r.PW), b.f.Rate(rate))
		if len(shown) > 0 {
			s += ", rate of return " + strings.Join(shown, " and ")
		}
		alt = append(alt, s)
	}
	var cross []string
	for _, x := range xs {
		if !in(x.Rate) {
			continue
		}
		cross = append(cross, fmt.Sprintf("%s and %s cross at %s", name(c, x.A), name(c, x.B), b.f.Percent(x.Rate)))
		if len(c.Results) > manySeries && !(leading(c, x.A) && leading(c, x.B)) {
			continue
		}
		ch.Marks = append(ch.Marks, Mark{X: x.Rate, Y: x.Worth, HasX: true, HasY: true, Label: "crossover " + b.f.Percent(x.Rate), Series: -1, Kind: "crossover"})
	}
	// Keep the curves readable where one runs off towards infinity (an
	// escalation near the rate): the span is at most three times the
	// largest worth at the comparison's rate or at a crossover.
	ref := 0.0
	for _, r := range chartResults(c) {
		ref = math.Max(ref, math.Abs(r.PW))
	}
	for _, x := range xs {
		ref = math.Max(ref, math.Abs(x.Worth))
	}
	if ref > 0 {
		ylo, yhi = math.Max(ylo, -3*ref), math.Min(yhi, 3*ref)
	}
	if ylo >= yhi {
		ylo, yhi = -1, 1
	}
	ch.XMin, ch.XMax, ch.XTicks = b.axis(lo, hi, 8, "percent", true)
	ch.YMin, ch.YMax, ch.YTicks = b.axis(ylo, yhi, 6, "money", false)
	text := fmt.Sprintf("%s of each alternative at interest rates from %s to %s. At the comparison's rate, %s.", word, b.f.Rate(lo), b.f.Rate(hi), strings.Join(alt, "; "))
	if len(cross) > 0 {
		text += " " + capital(strings.Join(cross, "; ")) + "."
	} else if len(c.Results) > 1 {
		text += " The curves do not cross in this range."
	}
	ch.Alt = text
	noteLeaders(&ch, c)
	return ch
}

// manySeries is the number of alternatives past which a chart marks only
// the recommended alternative and the runner-up, and draws the others
// faintly.
const manySeries = 6

// leading reports whether an alternative is the recommended one or the
// runner-up of a comparison.
func leading(c *compute.Comparison, id string) bool {
	return id == c.Recommended || id == c.RunnerUp
}

// paybackChart is the cumulative net cash flow of each alternative by year,
// where any alternative has benefits.
func (b *builder) paybackChart(c *compute.Comparison) (Chart, bool) {
	any := false
	for _, r := range c.Results {
		if r.Alt.HasBenefits {
			any = true
		}
	}
	if !any {
		return Chart{}, false
	}
	ch := Chart{
		Kind:    "lines",
		Title:   "Cumulative cash flow (payback)",
		XLabel:  "Year",
		YLabel:  "Cumulative net cash flow",
		XFormat: "year",
		YFormat: "money",
		Source:  fmt.Sprintf("compare %s, line %d", c.ID, c.Line),
	}
	xmax := 0.0
	ylo, yhi := 0.0, 0.0
	var alt []string
	for k, r := range chartResults(c) {
		s := Series{Name: r.Alt.Name, Emphasis: leading(c, r.Alt.ID)}
		for _, y := range r.Flows {
			s.X = append(s.X, float64(y.Year))
			s.Y = append(s.Y, y.Cumulative)
			xmax = math.Max(xmax, float64(y.Year))
			ylo, yhi = math.Min(ylo, y.Cumulative), math.Max(yhi, y.Cumulative)
		}
		ch.Series = append(ch.Series, s)
		last := len(s.X) - 1
		switch {
		case r.Payback != nil && last >= 0 && *r.Payback <= s.X[last]:
			if len(c.Results) > manySeries && !s.Emphasis {
				alt = append(alt, fmt.Sprintf("%s pays back in %s", r.Alt.Name, b.f.Years(*r.Payback)))
				break
			}
			ch.Marks = append(ch.Marks, Mark{X: *r.Payback, Y: 0, HasX: true, HasY: true, Label: "payback " + b.f.Years(*r.Payback), Series: k, Kind: "payback"})
			alt = append(alt, fmt.Sprintf("%s pays back in %s", r.Alt.Name, b.f.Years(*r.Payback)))
		case r.Payback != nil:
			alt = append(alt, fmt.Sprintf("%s pays back in %s, past the years shown", r.Alt.Name, b.f.Years(*r.Payback)))
		default:
			alt = append(alt, fmt.Sprintf("%s does not pay back", r.Alt.Name))
		}
	}
	if xmax == 0 {
		xmax = 1
	}
	if ylo == yhi {
		yhi = ylo + 1
	}
	ch.XMin, ch.XMax, ch.XTicks = b.axis(0, xmax, 12, "year", true)
	ch.YMin, ch.YMax, ch.YTicks = b.axis(ylo, yhi, 6, "money", false)
	ch.Alt = fmt.Sprintf("Cumulative undiscounted net cash flow of each alternative from year 0 to year %d, %s. %s.", int(xmax), b.horizonPhrase(c), capital(strings.Join(alt, "; ")))
	noteLeaders(&ch, c)
	return ch, true
}

func (b *builder) expect(x *parse.Expect) []Node {
	var out []Node
	l := List{}
	var failed []*compute.Expectation
	for _, e := range b.rep.Expectations {
		if e.Line < x.Pos.Line || e.Line > x.EndLine {
			continue
		}
		var runs []Inline
		if e.Passed {
			runs = []Inline{{Text: "✓ holds: "}, {Text: e.Text, Code: true}, {Text: fmt.Sprintf(" (line %d)", e.Line)}}
		} else {
			runs = []Inline{{Text: "✗ FAILED: ", Bold: true}, {Text: e.Text, Code: true}, {Text: fmt.Sprintf(" (line %d)", e.Line)}}
			if e.Detail != "" {
				runs = append(runs, Inline{Text: " — " + e.Detail})
			}
			failed = append(failed, e)
		}
		l.Items = append(l.Items, []Node{Paragraph{Text: runs}})
	}
	if len(l.Items) == 0 {
		return nil
	}
	out = append(out, Paragraph{Text: []Inline{{Text: "Checks", Bold: true}}}, l)
	for _, e := range failed {
		c := Callout{
			Kind:  "warning",
			Title: "Expectation does not hold",
			Text:  fmt.Sprintf("The expectation %s on line %d does not hold. The figures above are as computed; the memo's text may rely on something that is no longer true.", e.Text, e.Line),
		}
		if e.Detail != "" {
			c.Items = []string{e.Detail}
		}
		out = append(out, c)
	}
	return out
}

// schedule is the year-by-year table of one alternative under a comparison.
func (b *builder) schedule(r *compute.Result, c *compute.Comparison) Table {
	if r.AfterTax != nil {
		return b.afterTaxSchedule(r, c)
	}
	t := Table{
		Caption: fmt.Sprintf("Cash flows of %s", r.Alt.Name),
		Header:  []string{"Year", "Costs", "Benefits and recovered value", "Net", "Discounted", "Cumulative discounted", "Events"},
		Align:   []byte{'r', 'r', 'r', 'r', 'r', 'r', 'l'},
		Source:  fmt.Sprintf("comparison %s, line %d", c.ID, c.Line),
	}
	note := fmt.Sprintf("Comparison %s, %s", c.ID, b.horizonPhrase(c))
	if r.FlowsNote != "" {
		note += "; " + r.FlowsNote
	}
	t.Note = note + "."
	for _, y := range r.Flows {
		out := y.ByCategory[compute.Investment] + y.ByCategory[compute.Operating] + y.ByCategory[compute.Disbenefits]
		in := y.ByCategory[compute.Benefits] + y.ByCategory[compute.Recovery]
		t.Rows = append(t.Rows, []string{strconv.Itoa(y.Year), b.wholeOrBlank(-out), b.wholeOrBlank(in),
			b.whole(y.Net), b.whole(y.Discounted), b.whole(y.CumDiscounted), FlowNotes(y)})
	}
	return t
}

// whole formats money in whole currency units, so that a column of a
// schedule rounds alike (small discounted amounts would otherwise take
// cents).
func (b *builder) whole(x float64) string {
	s := number(x, 0)
	if x < 0 && !isZero(s) {
		return b.f.Minus + b.f.Cur.Symbol + s
	}
	return b.f.Cur.Symbol + s
}

func (b *builder) wholeOrBlank(x float64) string {
	if x == 0 {
		return ""
	}
	return b.whole(x)
}

// ---- appendix ----

func (b *builder) appendix() []Node {
	out := []Node{Heading{Level: b.top, Text: []Inline{{Text: "Appendix: calculations"}}, ID: b.slug("appendix")}}
	out = append(out, Heading{Level: b.top + 1, Text: []Inline{{Text: "Inputs"}}, ID: b.slug("inputs")}, b.inputsAppendix())
	for _, c := range b.rep.Comparisons {
		out = append(out, Heading{Level: b.top + 1, Text: []Inline{{Text: "Year-by-year cash flows, comparison " + c.ID}}, ID: b.slug("cash flows " + c.ID)})
		for _, r := range c.Results {
			t := b.schedule(r, c)
			b.anchorSchedule(&t, r, c)
			out = append(out, t)
		}
	}
	if t, ok := b.factorTable(); ok {
		out = append(out, Heading{Level: b.top + 1, Text: []Inline{{Text: "Factor values used"}}, ID: b.slug("factor values")}, t)
	}
	out = append(out, Heading{Level: b.top + 1, Text: []Inline{{Text: "Conventions"}}, ID: b.slug("conventions")})
	out = append(out, b.conventions())
	return out
}

func (b *builder) factorTable() (Table, bool) {
	type fv struct {
		f    compute.Factor
		text string
	}
	seen := map[string]bool{}
	var all []fv
	for _, c := range b.rep.Comparisons {
		for _, r := range c.Results {
			for _, eq := range r.Work {
				for _, t := range eq.Terms {
					for _, f := range t.Factors {
						s := b.f.FactorNotation(f)
						if !seen[s] {
							seen[s] = true
							all = append(all, fv{f, s})
						}
					}
				}
			}
		}
	}
	if len(all) == 0 {
		return Table{}, false
	}
	order := map[string]int{"P/F": 0, "F/P": 1, "P/A": 2, "A/P": 3, "F/A": 4, "A/F": 5, "P/G": 6, "A/G": 7, "P/A,g": 8}
	sort.SliceStable(all, func(i, j int) bool {
		x, y := all[i].f, all[j].f
		if (x.Sum != nil) != (y.Sum != nil) {
			return y.Sum != nil
		}
		if order[x.Name] != order[y.Name] {
			return order[x.Name] < order[y.Name]
		}
		if x.I != y.I {
			return x.I < y.I
		}
		if x.G != y.G {
			return x.G < y.G
		}
		return x.N < y.N
	})
	t := Table{
		Caption: "Compound-interest factors",
		Header:  []string{"Factor", "Value"},
		Align:   []byte{'l', 'r'},
		Note:    "Each factor used in the worked solutions, in (X/Y, i, n) notation; ∞ marks a perpetuity.",
	}
	for _, x := range all {
		t.Rows = append(t.Rows, []string{x.text, b.f.FactorValue(x.f.Value)})
	}
	return t, true
}

func (b *builder) conventions() List {
	para := func(s string) []Node { return []Node{Paragraph{Text: []Inline{{Text: s}}}} }
	l := List{}
	l.Items = append(l.Items,
		para("Amounts fall at the end of each year; year 0 is now. Costs are negative and benefits positive."),
		para("Years inside an alternative count from the start of its own life cycle, and each cycle repeats as written."))
	for _, c := range b.rep.Comparisons {
		l.Items = append(l.Items, para(fmt.Sprintf("Comparison %s: rate %s; horizon: %s; decided by %s.", c.ID, b.f.RateText(c.Rate), HorizonText(c), RuleText(c))))
	}
	l.Items = append(l.Items, para("A study period that cuts a life cycle ends it with its residual value: the value stated in the alternative, or straight line between first cost and salvage over the life (zero for an alternative with no life)."))
	seen := map[string]bool{}
	conv := func(what string, r *compute.Rate) {
		if r == nil || r.Conversion == "" || seen[r.Text] {
			return
		}
		seen[r.Text] = true
		l.Items = append(l.Items, para(fmt.Sprintf("%s %s converts as %s.", what, r.Text, r.Conversion)))
	}
	conv("The memo's rate", b.rep.Rate)
	for _, c := range b.rep.Comparisons {
		r := c.Rate
		conv("The rate of comparison "+c.ID, &r)
	}
	conv("The tax rate", b.rep.TaxRate)
	conv("The inflation rate", b.rep.Inflation)
	for _, s := range b.f.taxConventions(b.rep) {
		l.Items = append(l.Items, para(s))
	}
	l.Items = append(l.Items, para("Factors are the standard discrete compound-interest factors in (X/Y, i, n) notation; (P/A, g, i, n) is the geometric-gradient factor. Money is rounded to whole units for display; the JSON output keeps unrounded values."))
	return l
}

// ---- chart axes ----

// axisStep rounds a raw step up to 1, 2, 2.5 or 5 times a power of ten.
func axisStep(raw float64) float64 {
	if raw <= 0 || math.IsNaN(raw) || math.IsInf(raw, 0) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		if m*p >= raw*(1-1e-9) {
			return m * p
		}
	}
	return 10 * p
}

// axis places about n labelled ticks over [lo, hi] and returns the span
// of the axis: widened to the outer ticks, or with clip kept to [lo, hi]
// and the ticks outside it dropped.
func (b *builder) axis(lo, hi float64, n int, kind string, clip bool) (min, max float64, ticks []Tick) {
	if hi < lo {
		lo, hi = hi, lo
	}
	if hi == lo {
		hi = lo + 1
	}
	step := axisStep((hi - lo) / float64(n-1))
	if kind == "year" && step < 1 {
		step = 1
	}
	if kind == "year" && step == 2.5 {
		step = 2
	}
	start := math.Floor(lo/step+1e-9) * step
	end := math.Ceil(hi/step-1e-9) * step
	var vals []float64
	for k := 0; k <= 1000; k++ {
		v := start + float64(k)*step
		if v > end+step*1e-6 {
			break
		}
		if math.Abs(v) < step*1e-9 {
			v = 0
		}
		if clip && (v < lo-step*1e-6 || v > hi+step*1e-6) {
			continue
		}
		vals = append(vals, v)
	}
	min, max = lo, hi
	if !clip && len(vals) > 0 {
		min, max = math.Min(lo, vals[0]), math.Max(hi, vals[len(vals)-1])
	}
	big := 0.0
	for _, v := range vals {
		big = math.Max(big, math.Abs(v))
	}
	for _, v := range vals {
		ticks = append(ticks, Tick{At: v, Label: b.tickLabel(v, step, big, kind)})
	}
	return min, max, ticks
}

// tickLabel formats an axis label: money compactly in one unit for the
// whole axis ($1.5M, −$250k), percentages and years plainly.
func (b *builder) tickLabel(v, step, big float64, kind string) string {
	f := b.f
	decimals := func(scaled float64) int {
		d := 0
		for d < 4 && math.Abs(scaled-math.Round(scaled)) > 1e-6 {
			scaled *= 10
			d++
		}
		return d
	}
	switch kind {
	case "percent":
		d := decimals(step * 100)
		s := strconv.FormatFloat(math.Abs(v)*100, 'f', d, 64) + "%"
		if v < 0 {
			s = f.Minus + s
		}
		return s
	case "year":
		return strconv.Itoa(int(math.Round(v)))
	case "money":
		if v == 0 {
			return f.Cur.Symbol + "0"
		}
		unit, div := "", 1.0
		switch {
		case big >= 1e9:
			unit, div = "B", 1e9
		case big >= 1e6:
			unit, div = "M", 1e6
		case big >= 1e4:
			unit, div = "k", 1e3
		}
		d := decimals(step / div)
		s := f.Cur.Symbol + number(v/div, d) + unit
		if v < 0 {
			s = f.Minus + s
		}
		return s
	}
	return f.Num(v)
}
