package render

import (
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"worth/compute"
	"worth/parse"
)

// loadReport parses and computes a memo file for the tests.
func loadReport(t testing.TB, path string) *compute.Report {
	t.Helper()
	src, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	m, err := parse.ParseWith(path, src, parse.Options{Resolve: besideFiles(path)})
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	rep, err := compute.Compute(m)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return rep
}

func TestBuildDocConveyor(t *testing.T) {
	rep := loadReport(t, "testdata/conveyor.md")
	doc := BuildDoc(rep, DocOptions{})
	if doc.Title != "Sorting line automation at the Eastgate depot" || doc.Date != "2026-03-02" || doc.Paper != "letter" || doc.Currency != "EUR" {
		t.Errorf("heading: %q %q %q %q", doc.Title, doc.Date, doc.Paper, doc.Currency)
	}
	wantHeading := []KV{{"To", "Operations Investment Panel"}, {"From", "Depot Engineering"}, {"Date", "2026-03-02"},
		{"Subject", "Whether to automate parcel sorting, and how far"}, {"Prepared by", "R. Okafor"}}
	if !reflect.DeepEqual(doc.Heading, wantHeading) {
		t.Errorf("heading = %v", doc.Heading)
	}
	var tables []Table
	var charts []Chart
	var callouts []Callout
	var eqs []Equations
	var values []Inline
	walk(doc.Body, func(n Node) {
		switch x := n.(type) {
		case Table:
			tables = append(tables, x)
		case Chart:
			charts = append(charts, x)
		case Callout:
			callouts = append(callouts, x)
		case Equations:
			eqs = append(eqs, x)
		case Paragraph:
			for _, r := range x.Text {
				if r.Value {
					values = append(values, r)
				}
			}
		}
	})
	// Inline values, formatted, with their source.
	if len(values) != 3 || values[0].Text != "Full sortation system" || !values[0].Bold || values[1].Text != "27.2%" || values[2].Text != "3.6 years" {
		t.Errorf("inline values = %+v", values)
	}
	if values[1].Source != "irr(full)" || values[1].Line != 17 {
		t.Errorf("inline source = %q line %d", values[1].Source, values[1].Line)
	}
	// Assumptions, two alternatives, results, schedule.
	var captions []string
	for _, tb := range tables {
		captions = append(captions, tb.Caption)
	}
	want := []string{"Assumptions", "Alternative: Partial automation (induction only)", "Alternative: Full sortation system", "Comparison eastgate", "Cash flows of Partial automation (induction only)"}
	if !reflect.DeepEqual(captions, want) {
		t.Fatalf("tables = %q", captions)
	}
	res := tables[3]
	if res.Rows[0][0] != "Present worth" || res.Rows[0][2] != "€1,064,840" || !res.BoldCols[2] || res.BoldCols[1] {
		t.Errorf("results table = %+v", res)
	}
	if res.Align[1] != 'r' || res.Align[0] != 'l' {
		t.Errorf("results align = %q", res.Align)
	}
	alt := tables[1]
	if alt.Rows[0][2] != "€210,000" || alt.Rows[0][4] != "28" {
		t.Errorf("alternative table row = %q", alt.Rows[0])
	}
	// Recommendation with rule and margin; two warnings of several sign changes.
	if len(callouts) != 1 || callouts[0].Kind != "recommendation" || !strings.HasPrefix(callouts[0].Text, "Choose Full sortation system") {
		t.Fatalf("callouts = %+v", callouts)
	}
	facts := map[string]string{}
	for _, kv := range callouts[0].Facts {
		facts[kv.Key] = kv.Value
	}
	if facts["Rule"] != "incremental rate of return, in order of first cost" || !strings.HasPrefix(facts["Margin"], "€427,387 of present worth over Partial") {
		t.Errorf("facts = %v", facts)
	}
	if len(callouts[0].Items) != 2 {
		t.Errorf("warnings = %q", callouts[0].Items)
	}
	// Worked equations in factor notation with values substituted.
	if len(eqs) != 2 || !strings.Contains(strings.Join(eqs[0].Steps[0].Symbolic, " "), "(P/A, 9%, 8)") ||
		!strings.Contains(strings.Join(eqs[0].Steps[0].Substituted, " "), "× 5.5348") {
		t.Errorf("equations = %+v", eqs)
	}
	// Two cash-flow diagrams, the rate chart and the payback chart.
	var kinds []string
	for _, c := range charts {
		kinds = append(kinds, c.Kind+":"+c.Title)
		if c.Alt == "" || len(c.XTicks) < 2 || len(c.YTicks) < 2 || c.XMax <= c.XMin || c.YMax <= c.YMin {
			t.Errorf("chart %q lacks alt text or axes: %+v", c.Title, c)
		}
	}
	wantCharts := []string{"cashflow:Cash-flow diagram: Partial automation (induction only)", "cashflow:Cash-flow diagram: Full sortation system",
		"lines:Present worth versus interest rate", "lines:Cumulative cash flow (payback)"}
	if !reflect.DeepEqual(kinds, wantCharts) {
		t.Fatalf("charts = %q", kinds)
	}
	cf := charts[0]
	if len(cf.Arrows) != 25 || cf.Arrows[0].Amount != -210000 || cf.Arrows[0].Label != "first cost €210,000" {
		t.Errorf("cash-flow arrows: %d, first %+v", len(cf.Arrows), cf.Arrows[0])
	}
	if cf.Arrows[8].Label != "salvage €20,000; first cost €210,000" {
		t.Errorf("year 8 label = %q", cf.Arrows[8].Label)
	}
	rc := charts[2]
	if len(rc.Series) != 2 || len(rc.Series[0].X) != 101 {
		t.Errorf("rate chart series = %d", len(rc.Series))
	}
	var markKinds []string
	for _, m := range rc.Marks {
		markKinds = append(markKinds, m.Kind)
	}
	if !reflect.DeepEqual(markKinds, []string{"rate", "irr", "irr", "crossover"}) {
		t.Errorf("rate chart marks = %+v", rc.Marks)
	}
	pb := charts[3]
	if len(pb.Marks) != 2 || pb.Marks[0].Kind != "payback" || pb.Marks[0].Label != "payback 2.0 years" {
		t.Errorf("payback marks = %+v", pb.Marks)
	}
	// Appendix: heading, one schedule per alternative, factors, conventions.
	var app []string
	for _, n := range doc.Appendix {
		switch x := n.(type) {
		case Heading:
			app = append(app, "h:"+plain(x.Text))
		case Table:
			app = append(app, "t:"+x.Caption)
		case List:
			app = append(app, "list")
		}
	}
	wantApp := []string{"h:Appendix: calculations", "h:Inputs", "t:Where each input is written", "h:Year-by-year cash flows, comparison eastgate",
		"t:Cash flows of Partial automation (induction only)", "t:Cash flows of Full sortation system",
		"h:Factor values used", "t:Compound-interest factors", "h:Conventions", "list"}
	if !reflect.DeepEqual(app, wantApp) {
		t.Errorf("appendix = %q", app)
	}
	if doc.Caution != Caution {
		t.Errorf("caution missing")
	}
}

func TestBuildDocProse(t *testing.T) {
	rep := loadReport(t, "testdata/pumps.md")
	doc := BuildDoc(rep, DocOptions{})
	if doc.Paper != "a4" {
		t.Errorf("paper = %q", doc.Paper)
	}
	var got []string
	walk(doc.Body, func(n Node) {
		switch x := n.(type) {
		case Heading:
			got = append(got, "h"+string(rune('0'+x.Level))+":"+x.ID)
		case Paragraph:
			for _, r := range x.Text {
				switch {
				case r.Link != "":
					got = append(got, "link:"+r.Text+"→"+r.Link)
				case r.Strike:
					got = append(got, "strike:"+r.Text)
				case r.Italic:
					got = append(got, "em:"+r.Text)
				case r.Code:
					got = append(got, "code:"+r.Text)
				}
			}
		case List:
			got = append(got, "list")
		case Quote:
			got = append(got, "quote")
		case CodeBlock:
			got = append(got, "code["+x.Lang+"]:"+strings.TrimSpace(x.Text))
		case Rule:
			got = append(got, "rule")
		case Table:
			if x.Caption == "" {
				got = append(got, "table:"+strings.Join(x.Header, ",")+":"+string(x.Align))
			}
		case Callout:
			got = append(got, x.Kind)
		}
	})
	want := []string{"h1:purpose", "em:life-cycle", "link:the asset plan→https://example.org/plan",
		"link:https://example.org/auto→https://example.org/auto", "strike:Old option",
		"h2:inputs", "h2:alternatives", "h2:comparison", "recommendation",
		// Inline values that read one alternative's result link to its
		// worked solution (trace.go).
		"link:−$971,131→#work-pumps-vfd", "link:−$1,068,500→#work-pumps-fixed",
		"list", "list", "em:a", "quote", "code:code", "table:Item,Cost:lr",
		"code[]:indented code", "code[text]:plain fenced code", "rule",
		"list", "code:best() == \"vfd\"", "code:pw(vfd) > 0", "warning", "warning"}
	if !reflect.DeepEqual(got, want) {
		t.Errorf("prose =\n%q\nwant\n%q", got, want)
	}
}

func TestBuildDocAppendixOnly(t *testing.T) {
	rep := loadReport(t, "testdata/conveyor.md")
	doc := BuildDoc(rep, DocOptions{AppendixOnly: true})
	if len(doc.Body) != 0 || len(doc.Appendix) == 0 || !doc.AppendixOnly {
		t.Fatalf("appendix only: body %d, appendix %d", len(doc.Body), len(doc.Appendix))
	}
	if h, ok := doc.Appendix[0].(Heading); !ok || plain(h.Text) != "Appendix: calculations" {
		t.Errorf("first appendix node = %+v", doc.Appendix[0])
	}
}

func TestBuildDocDeterministic(t *testing.T) {
	for _, p := range memoFiles(t) {
		a := BuildDoc(loadReport(t, p), DocOptions{})
		b := BuildDoc(loadReport(t, p), DocOptions{})
		// Printed, since curves may hold NaN, which DeepEqual never equates.
		if fmt.Sprintf("%#v", a) != fmt.Sprintf("%#v", b) {
			t.Errorf("%s: two builds differ", p)
		}
	}
}

func TestSafeLink(t *testing.T) {
	for in, want := range map[string]string{
		"https://example.org/x":        "https://example.org/x",
		"mailto:a@example.org":         "mailto:a@example.org",
		"#section":                     "#section",
		"javascript:alert(1)":          "",
		"  JavaScript:alert(1)":        "",
		"java\tscript:alert(1)":        "",
		"vbscript:msgbox":              "",
		"data:text/html;base64,PHNjcg": "",
		"file:///etc/passwd":           "",
	} {
		if got := SafeLink(in); got != want {
			t.Errorf("SafeLink(%q) = %q, want %q", in, got, want)
		}
	}
}

func TestAxisTicks(t *testing.T) {
	b := &builder{f: Format{Cur: compute.Currency{Code: "USD", Symbol: "$", Decimals: 2}, Minus: "−"}}
	lo, hi, ticks := b.axis(-2.4e6, -0.6e6, 6, "money", false)
	var labels []string
	for _, tk := range ticks {
		labels = append(labels, tk.Label)
	}
	if lo != -2.5e6 || hi != -0.5e6 || strings.Join(labels, " ") != "−$2.5M −$2.0M −$1.5M −$1.0M −$0.5M" {
		t.Errorf("money axis %v..%v %q", lo, hi, labels)
	}
	_, _, ticks = b.axis(0, 0.123, 8, "percent", true)
	labels = nil
	for _, tk := range ticks {
		labels = append(labels, tk.Label)
	}
	if strings.Join(labels, " ") != "0% 2% 4% 6% 8% 10% 12%" {
		t.Errorf("percent axis %q", labels)
	}
	_, _, ticks = b.axis(-350000, 120000, 6, "money", false)
	labels = nil
	for _, tk := range ticks {
		labels = append(labels, tk.Label)
	}
	if strings.Join(labels, " ") != "−$400k −$300k −$200k −$100k $0 $100k $200k" {
		t.Errorf("money axis %q", labels)
	}
}

// memoFiles lists the test memos and every example memo that exists.
func memoFiles(t testing.TB) []string {
	files := []string{"testdata/conveyor.md", "testdata/pumps.md"}
	ex, _ := filepath.Glob("../examples/*.md")
	return append(files, ex...)
}
