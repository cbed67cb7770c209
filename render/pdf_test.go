package render

import (
	"bytes"
	"fmt"
	"image"
	"image/color"
	"image/jpeg"
	"image/png"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"worth/compute"
)

// The tests here build documents by hand, shaped like what BuildDoc makes
// of a memo: prose, inputs tables, cash-flow diagrams, results, worked
// equations, charts, the recommendation and an appendix of schedules.

func testFormat(code string) Format {
	cur, _ := compute.CurrencyOf(code)
	return Format{Cur: cur, Minus: "−"}
}

// screenAlt is an invented alternative: first cost, annual cost, an
// overhaul every few years and a salvage value.
type screenAlt struct {
	id, name           string
	life               int
	first, annual      float64
	overhaul, every    int
	overhaulCost, salv float64
	benefit            float64
}

func (a screenAlt) flows() []float64 {
	cf := make([]float64, a.life+1)
	cf[0] = -a.first
	for t := 1; t <= a.life; t++ {
		cf[t] = -a.annual + a.benefit
		if a.every > 0 && t%a.every == 0 && t < a.life {
			cf[t] -= a.overhaulCost
		}
	}
	cf[a.life] += a.salv
	return cf
}

func (a screenAlt) equation(f Format, i float64) []EqText {
	n := float64(a.life)
	terms := []compute.Term{
		{Coef: -a.first},
		{Coef: -a.annual, Factors: []compute.Factor{{Name: "P/A", I: i, N: n, Value: compute.PA(i, n)}}},
	}
	var years []int
	for t := a.every; a.every > 0 && t < a.life; t += a.every {
		years = append(years, t)
	}
	if len(years) > 0 {
		var v float64
		for _, t := range years {
			v += compute.PF(i, float64(t))
		}
		terms = append(terms, compute.Term{Coef: -a.overhaulCost, Factors: []compute.Factor{{Name: "P/F", I: i, N: n, Sum: years, Value: v}}})
	}
	if a.benefit > 0 {
		terms = append(terms, compute.Term{Coef: a.benefit, Factors: []compute.Factor{{Name: "P/A", I: i, N: n, Value: compute.PA(i, n)}}})
	}
	terms = append(terms, compute.Term{Coef: a.salv, Factors: []compute.Factor{{Name: "P/F", I: i, N: n, Value: compute.PF(i, n)}}})
	pw := compute.NPV(i, a.flows())
	e1 := f.Equation(&compute.Equation{LHS: "PW₁", Label: "Present worth of one life cycle", Terms: terms, Value: pw})
	cap := pw / (1 - compute.PF(i, n))
	e2 := f.Equation(&compute.Equation{LHS: "PW", Label: "Capitalized worth: the cycle repeated forever", Terms: []compute.Term{
		{Coef: pw, Symbol: "PW₁", Factors: []compute.Factor{{Name: "A/P", I: i, N: n, Value: compute.AP(i, n)}, {Name: "P/A", I: i, N: math.Inf(1), Value: 1 / i}}},
	}, Value: cap})
	return []EqText{e1, e2}
}

func (a screenAlt) arrows(f Format) []Arrow {
	var out []Arrow
	for t, v := range a.flows() {
		ar := Arrow{Year: t, Amount: v}
		switch {
		case t == 0:
			ar.Label = "first cost " + f.Amount(a.first)
		case t == a.life && a.salv > 0:
			ar.Label = "salvage " + f.Amount(a.salv)
		case a.every > 0 && t%a.every == 0:
			ar.Label = "overhaul " + f.Amount(a.overhaulCost)
		}
		out = append(out, ar)
	}
	return out
}

func (a screenAlt) schedule(f Format, i float64) Table {
	t := Table{
		Caption: a.name + ": cash flows by year",
		Header:  []string{"Year", "Cash flow", "(P/F, " + f.Rate(i) + ", t)", "Present worth", "Cumulative"},
		Align:   []byte{'r', 'r', 'r', 'r', 'r'},
		Source:  "alternative " + a.id + ", line 20",
	}
	var cum float64
	for y, v := range a.flows() {
		d := v * compute.PF(i, float64(y))
		cum += d
		t.Rows = append(t.Rows, []string{strconv.Itoa(y), f.Money(v), f.FactorValue(compute.PF(i, float64(y))), f.Money(d), f.Money(cum)})
	}
	t.Rows = append(t.Rows, []string{"Total", "", "", f.Money(cum), ""})
	t.BoldRows = make([]bool, len(t.Rows))
	t.BoldRows[len(t.Rows)-1] = true
	return t
}

func pwCurve(flows []float64, life int, lo, hi float64) ([]float64, []float64) {
	var xs, ys []float64
	for k := 0; k <= 100; k++ {
		r := lo + (hi-lo)*float64(k)/100
		pw := compute.NPV(r, flows)
		v := pw / (1 - compute.PF(r, float64(life)))
		if r <= 0.002 {
			v = math.NaN() // no capitalized worth at a zero rate
		}
		xs = append(xs, r)
		ys = append(ys, v)
	}
	return xs, ys
}

// testDoc is a realistic memo: two screens compared on a perpetual
// horizon, in the given currency.
func testDoc(code string) *Doc {
	f := testFormat(code)
	i := 0.07
	steel := screenAlt{id: "steel", name: "Steel traveling screen", life: 24, first: 480000, annual: 12500, every: 8, overhaulCost: 65000, salv: 40000}
	wedge := screenAlt{id: "wedge-wire", name: "Wedge-wire passive screen", life: 30, first: 655000, annual: 4200, every: 10, overhaulCost: 38000, salv: 25000}
	alts := []screenAlt{steel, wedge}
	var body []Node
	body = append(body,
		Heading{Level: 1, ID: "purpose", Text: []Inline{{Text: "Purpose"}}},
		Paragraph{Text: []Inline{
			{Text: "The intake at the river pumping station needs a new screen before the "},
			{Text: "2027", Bold: true},
			{Text: " spawning season. This memo compares two designs on their life-cycle cost at the committee's rate of "},
			{Text: f.Rate(i), Value: true, Source: "rate", Line: 6},
			{Text: " and recommends one. Inputs come from the vendor quotes of October; see "},
			{Text: "the appendix", Link: "#appendix"},
			{Text: " for every year's cash flow and "},
			{Text: "the utility's rate policy", Link: "https://example.org/policy"},
			{Text: " for the discount rate. The "},
			{Text: "worth", Code: true},
			{Text: " file holds the calculation, and "},
			{Text: "nothing here is final", Italic: true},
			{Text: " until the committee votes."},
		}},
		List{Items: [][]Node{
			{Paragraph{Text: []Inline{{Text: "Both screens meet the 0.5 ft/s approach velocity limit (≥ the state minimum)."}}}},
			{Paragraph{Text: []Inline{{Text: "Costs are in "}, {Text: code}, {Text: " of 2026; escalation is "}, {Text: "not", Bold: true}, {Text: " modelled."}}}},
			{Paragraph{Text: []Inline{{Text: "The horizon is perpetual: the intake serves indefinitely (∞)."}}},
				List{Ordered: true, Start: 1, Items: [][]Node{
					{Paragraph{Text: []Inline{{Text: "Each design is replaced like for like at the end of its life."}}}},
					{Paragraph{Text: []Inline{{Text: "Salvage is net of removal cost."}}}},
				}}},
		}},
		Quote{Body: []Node{Paragraph{Text: []Inline{{Text: "The committee asked in September for a comparison that shows its work, so that the choice can be defended in the annual report."}}}}},
	)
	for _, a := range alts {
		body = append(body,
			Heading{Level: 2, ID: a.id, Text: []Inline{{Text: a.name}}},
			Table{
				Caption: "Inputs: " + a.name,
				Header:  []string{"Input", "Value", "Line"},
				Rows: [][]string{
					{"Life", strconv.Itoa(a.life) + " years", "21"},
					{"First cost", f.Money(a.first), "22"},
					{"Annual cost", f.Money(a.annual), "23"},
					{"Overhaul every " + strconv.Itoa(a.every) + " years", f.Money(a.overhaulCost), "24"},
					{"Salvage", f.Money(a.salv), "25"},
				},
				Align:  []byte{'l', 'r', 'r'},
				Source: "alternative " + a.id + ", line 20",
			},
			Chart{Kind: "cashflow", Title: "Cash-flow diagram: " + a.name, XLabel: "year", Arrows: a.arrows(f), Alt: "arrows"},
		)
	}
	// The comparison.
	header := []string{"Measure", steel.name, wedge.name}
	var caps []float64
	for _, a := range alts {
		pw := compute.NPV(i, a.flows())
		caps = append(caps, pw/(1-compute.PF(i, float64(a.life))))
	}
	body = append(body,
		Heading{Level: 1, ID: "comparison", Text: []Inline{{Text: "Comparison at "}, {Text: f.Rate(i), Value: true}}},
		Table{
			Caption: "Results: screens (perpetual horizon, " + f.Rate(i) + ")",
			Header:  header,
			Rows: [][]string{
				{"Capitalized cost", f.Money(-caps[0]), f.Money(-caps[1])},
				{"Equivalent annual cost", f.Money(-caps[0] * i), f.Money(-caps[1] * i)},
				{"Rate of return", "n/a", "n/a"},
			},
			Align:    []byte{'l', 'r', 'r'},
			BoldRows: []bool{true, false, false},
			Note:     "Costs are shown as positive amounts: both alternatives are cost-only.",
			Source:   "compare screens, line 40",
		},
	)
	for _, a := range alts {
		body = append(body, Equations{Title: "Worked solution: " + a.name, Steps: a.equation(f, i)})
	}
	var series []Series
	var marks []Mark
	for _, a := range alts {
		xs, ys := pwCurve(a.flows(), a.life, 0, 0.14)
		series = append(series, Series{Name: a.name, X: xs, Y: ys})
	}
	marks = append(marks, Mark{X: i, HasX: true, Label: "MARR " + f.Rate(i)})
	marks = append(marks, Mark{X: 0.0412, Y: -1.9e6, HasX: true, HasY: true, Label: "crossover 4.1%"})
	body = append(body,
		Chart{Kind: "lines", Title: "Capitalized worth against interest rate", XLabel: "interest rate", YLabel: "capitalized worth", XFormat: "percent", YFormat: "money", Series: series, Marks: marks},
		Callout{Kind: "recommendation", Title: "Recommendation", Text: fmt.Sprintf("Choose %s, the least-cost alternative: its capitalized cost is %s at %s, %s less than %s.", steel.name, f.Money(-caps[0]), f.Rate(i), f.Money(caps[0]-caps[1]), wedge.name)},
		Callout{Kind: "warning", Title: "Check failed", Text: "An expectation in this memo does not hold.", Items: []string{"line 57: pw(steel) > −1.0M is false: pw(steel) is " + f.Money(caps[0]) + ".", "Several rates of return: the flows change sign 3 times."}},
		Paragraph{Text: []Inline{{Text: "Cumulative cash flow, for comparison, with the payback marked:"}}},
		Chart{Kind: "lines", Title: "Cumulative cash flow", XLabel: "year", YLabel: "cumulative", XFormat: "year", YFormat: "money",
			Series: []Series{cumSeries("Steel", steel.flows()), cumSeries("Wedge-wire", wedge.flows())},
			Marks:  []Mark{{Y: 0, HasY: true, Label: "break-even"}, {X: 6.3, Y: 0, HasX: true, HasY: true, Label: "payback 6.3 years"}}},
		CodeBlock{Text: "compare screens\n  alternatives: steel, wedge-wire\n  horizon: perpetual\n  rate: 7%\n  decide by: present worth  # a rather long comment that runs past the right edge of the page and must wrap somewhere sensible"},
		Rule{},
		Paragraph{Text: []Inline{{Text: "Currency signs print as themselves: € £ ¥ and the minus sign −12,500; "}, {Text: "struck text", Strike: true}, {Text: "; a line"}, {Break: true}, {Text: "break; and a URL-like word "}, {Text: "https://example.org/a/very/long/path/that/does/not/fit/on/one/line/of/the/memo/at/all/really/none", Link: "https://example.org/x"}}},
	)
	var app []Node
	app = append(app, Heading{Level: 1, ID: "appendix", Text: []Inline{{Text: "Appendix: calculations"}}})
	for _, a := range alts {
		app = append(app, a.schedule(f, i))
	}
	app = append(app,
		Table{Caption: "Factor values used", Header: []string{"Factor", "Value"}, Align: []byte{'l', 'r'}, Rows: [][]string{
			{f.FactorNotation(compute.Factor{Name: "P/A", I: i, N: 24}), f.FactorValue(compute.PA(i, 24))},
			{f.FactorNotation(compute.Factor{Name: "A/P", I: i, N: 24}), f.FactorValue(compute.AP(i, 24))},
			{f.FactorNotation(compute.Factor{Name: "P/F", I: i, N: 24}), f.FactorValue(compute.PF(i, 24))},
			{f.FactorNotation(compute.Factor{Name: "P/A", I: i, N: math.Inf(1)}), f.FactorValue(1 / i)},
		}},
		Heading{Level: 2, Text: []Inline{{Text: "Conventions"}}},
		List{Items: [][]Node{
			{Paragraph{Text: []Inline{{Text: "Cash flows at the end of each year; year 0 is now."}}}},
			{Paragraph{Text: []Inline{{Text: "Horizon: " + "perpetual (each life cycle repeats forever; present worth is the capitalized worth)."}}}},
			{Paragraph{Text: []Inline{{Text: "Rate: " + f.Rate(i) + " a year, effective."}}}},
		}},
	)
	return &Doc{
		Title: "Intake screen replacement",
		Heading: []KV{
			{"To", "Utilities Committee"}, {"From", "Capital Planning"}, {"Date", "2026-11-30"},
			{"Subject", "Choosing the intake screen on life-cycle cost"},
		},
		Date:     "2026-11-30",
		Paper:    "letter",
		Currency: code,
		Body:     body,
		Appendix: app,
		Caution:  Caution,
	}
}

func cumSeries(name string, flows []float64) Series {
	s := Series{Name: name}
	var c float64
	for t, v := range flows {
		c += v
		s.X = append(s.X, float64(t))
		s.Y = append(s.Y, c)
	}
	return s
}

func buildPDF(t testing.TB, doc *Doc, opt PDFOptions) []byte {
	t.Helper()
	b, err := PDF(doc, opt)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// tool returns the path of a poppler tool, skipping the test when it is
// missing (failing instead under WORTH_REQUIRE_TOOLS=1).
func tool(t *testing.T, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		if os.Getenv("WORTH_REQUIRE_TOOLS") == "1" {
			t.Fatalf("%s is not installed (Debian package poppler-utils)", name)
		}
		t.Skipf("%s is not installed (Debian package poppler-utils)", name)
	}
	return p
}

func writeTemp(t *testing.T, b []byte) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "memo.pdf")
	if err := os.WriteFile(p, b, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// pdfText runs pdftotext on a PDF and returns its pages.
func pdfText(t *testing.T, b []byte) []string {
	t.Helper()
	bin := tool(t, "pdftotext")
	out, err := exec.Command(bin, "-layout", writeTemp(t, b), "-").Output()
	if err != nil {
		t.Fatalf("pdftotext: %v", err)
	}
	pages := strings.Split(string(out), "\f")
	if len(pages) > 0 && strings.TrimSpace(pages[len(pages)-1]) == "" {
		pages = pages[:len(pages)-1]
	}
	return pages
}

func pdfPages(t *testing.T, b []byte) int {
	t.Helper()
	bin := tool(t, "pdfinfo")
	out, err := exec.Command(bin, writeTemp(t, b)).Output()
	if err != nil {
		t.Fatalf("pdfinfo: %v", err)
	}
	m := regexp.MustCompile(`(?m)^Pages:\s+(\d+)`).FindStringSubmatch(string(out))
	if m == nil {
		t.Fatalf("pdfinfo gave no page count:\n%s", out)
	}
	n, _ := strconv.Atoi(m[1])
	return n
}

func TestPDFByteIdentical(t *testing.T) {
	t.Setenv("SOURCE_DATE_EPOCH", "")
	a := buildPDF(t, testDoc("USD"), PDFOptions{})
	b := buildPDF(t, testDoc("USD"), PDFOptions{})
	if !bytes.Equal(a, b) {
		t.Fatalf("two builds of one document differ (%d and %d bytes)", len(a), len(b))
	}
	if !bytes.HasPrefix(a, []byte("%PDF-")) {
		t.Fatalf("not a PDF: %q", a[:8])
	}
	if !bytes.Contains(a, []byte("/CreationDate (D:20261130000000)")) {
		t.Errorf("the creation date is not the memo's date")
	}
	t.Setenv("SOURCE_DATE_EPOCH", "1700000000")
	c := buildPDF(t, testDoc("USD"), PDFOptions{})
	if !bytes.Contains(c, []byte("D:20231114221320")) {
		t.Errorf("SOURCE_DATE_EPOCH not used for the creation date")
	}
}

func TestPDFText(t *testing.T) {
	doc := testDoc("USD")
	b := buildPDF(t, doc, PDFOptions{})
	pages := pdfText(t, b)
	all := strings.Join(pages, "\n")
	f := testFormat("USD")
	steel := screenAlt{life: 24, first: 480000, annual: 12500, every: 8, overhaulCost: 65000, salv: 40000}
	pw := compute.NPV(0.07, steel.flows()) / (1 - compute.PF(0.07, 24))
	for _, want := range []string{
		"Intake screen replacement", "Utilities Committee", "Capital Planning",
		f.Money(-pw),    // the capitalized cost, e.g. $1,0xx,xxx
		"(P/A, 7%, 24)", // factor notation
		"(P/A, 7%, ∞)",  // a perpetuity
		"Σ(P/F, 7%, t)", // a sum of single payments
		"PW₁",           // subscript digits
		"11.4693",       // a factor value
		"−480,000",      // the minus sign
		"€ £ ¥",         // currency signs in prose
		"Recommendation",
		"Check failed",
		"Appendix: calculations",
		"Cash-flow diagram",
		"first cost 480,000",
		"page 1 of ",
		"Results depend on the assumptions",
	} {
		if !strings.Contains(all, want) {
			t.Errorf("pdftotext does not find %q", want)
		}
	}
	if n := pdfPages(t, b); n < 5 || n > 20 {
		t.Errorf("pdfinfo: %d pages; want 5 to 20 for this memo", n)
	}
	if !strings.Contains(pages[len(pages)-1], fmt.Sprintf("page %d of %d", len(pages), len(pages))) {
		t.Errorf("last page lacks its number: %q", pages[len(pages)-1])
	}
	if strings.Contains(all, "\u25a1") || strings.Contains(all, "\ufffd") {
		t.Errorf("a missing glyph was printed")
	}
}

func TestPDFEuro(t *testing.T) {
	doc := testDoc("EUR")
	all := strings.Join(pdfText(t, buildPDF(t, doc, PDFOptions{})), "\n")
	for _, want := range []string{"€480,000", "−€", "€1,"} {
		if !strings.Contains(all, want) {
			t.Errorf("pdftotext does not find %q in the EUR memo", want)
		}
	}
	if strings.Contains(all, "$") {
		t.Errorf("a dollar sign in the EUR memo")
	}
}

func TestPDFA4(t *testing.T) {
	doc := testDoc("GBP")
	doc.Paper = "a4"
	b := buildPDF(t, doc, PDFOptions{})
	bin := tool(t, "pdfinfo")
	out, err := exec.Command(bin, writeTemp(t, b)).Output()
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(string(out), "595.28 x 841.89") {
		t.Errorf("not A4:\n%s", out)
	}
}

// A long table breaks across pages and repeats its header on each.
func TestPDFLongTable(t *testing.T) {
	f := testFormat("USD")
	tb := Table{Caption: "Two hundred years", Header: []string{"Year", "Cash flow", "Discounted", "Cumulative"}, Align: []byte{'r', 'r', 'r', 'r'}}
	var cum float64
	for y := 0; y < 200; y++ {
		v := -1000.0 - float64(y)*37
		d := v * compute.PF(0.05, float64(y))
		cum += d
		tb.Rows = append(tb.Rows, []string{strconv.Itoa(y), f.Money(v), f.Money(d), f.Money(cum)})
	}
	doc := &Doc{Title: "Long table", Date: "2026-01-01", Currency: "USD", Body: []Node{tb}}
	b := buildPDF(t, doc, PDFOptions{})
	pages := pdfText(t, b)
	if len(pages) < 3 {
		t.Fatalf("200 rows on %d pages", len(pages))
	}
	withHeader := 0
	for _, p := range pages {
		if strings.Contains(p, "Discounted") && strings.Contains(p, "Cumulative") {
			withHeader++
		}
	}
	if withHeader != len(pages) {
		t.Errorf("the header row is on %d of %d pages", withHeader, len(pages))
	}
	if !strings.Contains(pages[1], "(continued)") {
		t.Errorf("the second page does not say the table continues")
	}
	for _, y := range []string{"199", "100", "−$8,363"} {
		if !strings.Contains(strings.Join(pages, ""), y) {
			t.Errorf("row %q missing", y)
		}
	}
}

// A table far wider than the page is set smaller and wrapped, never cut.
func TestPDFWideTable(t *testing.T) {
	tb := Table{Caption: "Wide", Align: []byte{'l'}}
	for c := 0; c < 14; c++ {
		tb.Header = append(tb.Header, fmt.Sprintf("Alternative number %d with a long name", c))
		tb.Align = append(tb.Align, 'r')
	}
	for r := 0; r < 5; r++ {
		var row []string
		for c := 0; c < 14; c++ {
			row = append(row, fmt.Sprintf("−$%d,%03d,%03d", r+1, c*37, c*91%1000))
		}
		tb.Rows = append(tb.Rows, row)
	}
	doc := &Doc{Title: "Wide", Body: []Node{tb}}
	w := newPDFWriter(doc)
	avail := w.righ - w.left
	m := pdfMeasureTable(&tb, 14)
	if _, ok := m.layout(avail); ok {
		t.Fatalf("14 wide columns said to pdfFit")
	}
	groups := m.groups(avail)
	if len(groups) < 2 {
		t.Fatalf("groups: %v", groups)
	}
	for _, g := range groups {
		sub := pdfSubTable(&tb, g, 14)
		lay, ok := pdfMeasureTable(sub, len(g)).layout(avail)
		if !ok {
			t.Fatalf("group %v does not pdfFit", g)
		}
		var total float64
		for _, x := range lay.widths {
			total += x
		}
		if total > avail+0.01 {
			t.Errorf("group %v is %.1f pt wide in a %.1f pt column", g, total, avail)
		}
	}
	all := strings.Join(pdfText(t, buildPDF(t, doc, PDFOptions{})), "")
	for _, want := range []string{"−$5,481,183", "−$1,000,000", "columns 2–", "of 14)"} {
		if !strings.Contains(all, want) {
			t.Errorf("the wide table: %q not found whole", want)
		}
	}
}

func TestPDFLogo(t *testing.T) {
	dir := t.TempDir()
	img := image.NewNRGBA(image.Rect(0, 0, 40, 20))
	for y := 0; y < 20; y++ {
		for x := 0; x < 40; x++ {
			img.Set(x, y, color.NRGBA{20, 80, 120, 255})
		}
	}
	var buf bytes.Buffer
	if err := png.Encode(&buf, img); err != nil {
		t.Fatal(err)
	}
	must := func(err error) {
		t.Helper()
		if err != nil {
			t.Fatal(err)
		}
	}
	memo := filepath.Join(dir, "memo")
	must(os.MkdirAll(filepath.Join(memo, "img"), 0o755))
	must(os.WriteFile(filepath.Join(memo, "img", "logo.png"), buf.Bytes(), 0o644))
	var jb bytes.Buffer
	must(jpeg.Encode(&jb, img, nil))
	must(os.WriteFile(filepath.Join(memo, "img", "logo.jpg"), jb.Bytes(), 0o644))
	must(os.WriteFile(filepath.Join(dir, "outside.png"), buf.Bytes(), 0o644))
	must(os.WriteFile(filepath.Join(memo, "notes.txt"), []byte("not an image"), 0o644))
	must(os.WriteFile(filepath.Join(memo, "fake.png"), []byte("\x89PNG\r\n\x1a\nnot really"), 0o644))
	big := make([]byte, MaxLogoBytes+1)
	copy(big, buf.Bytes())
	must(os.WriteFile(filepath.Join(memo, "big.png"), big, 0o644))
	must(os.Symlink(filepath.Join(memo, "img", "logo.png"), filepath.Join(memo, "link.png")))
	must(os.Symlink(filepath.Join(memo, "img"), filepath.Join(memo, "linkdir")))

	doc := testDoc("USD")
	doc.Logo = "img/logo.png"
	b, err := PDF(doc, PDFOptions{BaseDir: memo})
	if err != nil {
		t.Fatalf("a logo inside the folder: %v", err)
	}
	if !bytes.Contains(b, []byte("/Subtype /Image")) {
		t.Errorf("the logo is not in the PDF")
	}
	b2, _ := PDF(doc, PDFOptions{BaseDir: memo})
	if !bytes.Equal(b, b2) {
		t.Errorf("two builds with a logo differ")
	}
	doc.Logo = "img/logo.jpg"
	if b, err := PDF(doc, PDFOptions{BaseDir: memo}); err != nil || !bytes.Contains(b, []byte("/DCTDecode")) {
		t.Errorf("a JPEG logo: %v", err)
	}
	for _, bad := range []string{"../outside.png", "img/../../outside.png", filepath.Join(dir, "outside.png"), "notes.txt", "fake.png", "big.png", "link.png", "linkdir/logo.png", "missing.png", ""} {
		if bad == "" {
			continue
		}
		doc.Logo = bad
		if _, err := PDF(doc, PDFOptions{BaseDir: memo}); err == nil {
			t.Errorf("logo %q was accepted", bad)
		} else if !strings.Contains(err.Error(), "logo") {
			t.Errorf("logo %q: error does not name the logo: %v", bad, err)
		}
	}
}

// Every sign the memo prints is in the embedded fonts, or has a stand-in.
func TestPDFGlyphs(t *testing.T) {
	for _, fc := range []pdfFace{fRegular, fBold, fItalic, fBoldItalic, fMono, fMonoBold} {
		for _, r := range "€£¥−≥≤∞Σ↑↓₀₁₂₃₄₅₆₇₈₉×ΔÅé±·—–“”‘’…•" {
			if pdfFaceOf(fc).width(r) < 0 {
				t.Errorf("face %d lacks %q", fc, r)
			}
		}
	}
	if got := pdfClean("₹1,000 ✓ 中", fRegular); got != "INR 1,000 ✓ ?" {
		t.Errorf("clean: %q", got)
	}
}

func TestHardWrap(t *testing.T) {
	got := pdfHardWrap("PW = 1 + 2 + 3 + 4 + 5", 10, "  ")
	for _, l := range got {
		if len([]rune(l)) > 10 {
			t.Errorf("line %q longer than 10", l)
		}
	}
	if strings.Join(got, "") == "" || !strings.HasPrefix(got[0], "PW =") {
		t.Errorf("hardWrap: %q", got)
	}
}

// A cash-flow diagram of a long horizon stays readable: labels are
// thinned, and the document still builds quickly.
func TestPDFLongHorizon(t *testing.T) {
	f := testFormat("USD")
	a := screenAlt{id: "x", name: "Long", life: 120, first: 900000, annual: 8000, every: 5, overhaulCost: 30000, salv: 10000}
	doc := &Doc{Title: "Long horizon", Currency: "USD", Body: []Node{Chart{Kind: "cashflow", Title: "120 years", Arrows: a.arrows(f)}}}
	all := strings.Join(pdfText(t, buildPDF(t, doc, PDFOptions{})), "")
	if !strings.Contains(all, "first cost 900,000") {
		t.Errorf("the first cost label is missing")
	}
	if n := strings.Count(all, "overhaul 30,000"); n < 1 || n > 20 {
		t.Errorf("%d overhaul labels on a 120-year diagram", n)
	}
}

// BenchmarkPDF draws an example memo (the document built once, outside
// the loop); BenchmarkPDFHandBuilt the hand-built test memo.
func BenchmarkPDF(b *testing.B) {
	path := "../examples/digester-gas.md"
	if _, err := os.Stat(path); err != nil {
		b.Skip("no example memo")
	}
	benchPDF(b, BuildDoc(loadReport(b, path), DocOptions{}))
}

func BenchmarkPDFHandBuilt(b *testing.B) { benchPDF(b, testDoc("USD")) }

func benchPDF(b *testing.B, doc *Doc) {
	b.ReportAllocs()
	var n int
	for b.Loop() {
		out, err := PDF(doc, PDFOptions{})
		if err != nil {
			b.Fatal(err)
		}
		n = len(out)
	}
	b.ReportMetric(float64(n), "bytes")
}

// pdfOf builds a memo file into a PDF.
func pdfOf(t testing.TB, path string, opt DocOptions) []byte {
	t.Helper()
	doc := BuildDoc(loadReport(t, path), opt)
	out, err := PDF(doc, PDFOptions{BaseDir: filepath.Dir(path)})
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return out
}

// TestPDFMemos builds every test memo and example and reads the PDF back
// with pdftotext: the key figures of each comparison, formatted, the
// factor notation with the comparison's rate, the minus sign, the page
// numbers; and pdfinfo's page count.
func TestPDFMemos(t *testing.T) {
	for _, p := range memoFiles(t) {
		t.Run(filepath.Base(p), func(t *testing.T) {
			rep := loadReport(t, p)
			doc := BuildDoc(rep, DocOptions{})
			b, err := PDF(doc, PDFOptions{BaseDir: filepath.Dir(p)})
			if err != nil {
				t.Fatal(err)
			}
			c, err := PDF(BuildDoc(rep, DocOptions{}), PDFOptions{BaseDir: filepath.Dir(p)})
			if err != nil || !bytes.Equal(b, c) {
				t.Fatalf("two builds differ (%v)", err)
			}
			pages := pdfText(t, b)
			// pdftotext -layout may break a long line; join words split
			// by layout spacing for the searches below.
			all := strings.Join(pages, "\n")
			flat := strings.Join(strings.Fields(all), " ")
			f := NewFormat(rep, true)
			if !strings.Contains(flat, strings.Join(strings.Fields(doc.Title), " ")) {
				t.Errorf("title %q not found", doc.Title)
			}
			for _, cmp := range rep.Comparisons {
				for _, r := range cmp.Results {
					pw, cost := f.Money(r.PW), f.Money(-r.PW)
					if !strings.Contains(flat, pw) && !strings.Contains(flat, cost) {
						t.Errorf("comparison %s: present worth of %s (%s) not found", cmp.ID, r.Alt.ID, pw)
					}
				}
				rate := f.Rate(cmp.Rate.Effective)
				if !regexp.MustCompile(`\((P/F|P/A|A/P|F/P|P/G|A/F|F/A|A/G), ` + regexp.QuoteMeta(rate) + `, (\d+|∞)\)`).MatchString(flat) {
					t.Errorf("comparison %s: no factor in notation at %s", cmp.ID, rate)
				}
			}
			if !strings.Contains(all, "−") {
				t.Errorf("no minus sign (U+2212)")
			}
			if sym := rep.Currency.Symbol; !strings.Contains(all, sym) {
				t.Errorf("currency sign %q not found", sym)
			}
			n := pdfPages(t, b)
			if n < 3 || n > 40 {
				t.Errorf("pdfinfo: %d pages", n)
			}
			if len(pages) != n {
				t.Errorf("pdftotext found %d pages, pdfinfo %d", len(pages), n)
			} else if last := pages[n-1]; !strings.Contains(last, fmt.Sprintf("page %d of %d", n, n)) {
				t.Errorf("last page does not say page %d of %d", n, n)
			}
			if !strings.Contains(flat, "Appendix") {
				t.Errorf("no appendix")
			}
			if strings.Contains(all, "\ufffd") {
				t.Errorf("a replacement character in the text")
			}
			// The appendix alone, to attach to a proposal.
			app, err := PDF(BuildDoc(rep, DocOptions{AppendixOnly: true}), PDFOptions{BaseDir: filepath.Dir(p)})
			if err != nil {
				t.Fatal(err)
			}
			if m := pdfPages(t, app); m >= n {
				t.Errorf("appendix only: %d pages, the whole memo %d", m, n)
			}
		})
	}
}

// The EUR test memo prints euro amounts.
func TestPDFEuroMemo(t *testing.T) {
	p := "testdata/conveyor.md"
	if _, err := os.Stat(p); err != nil {
		t.Skip("no EUR test memo")
	}
	all := strings.Join(pdfText(t, pdfOf(t, p, DocOptions{})), "\n")
	if !regexp.MustCompile(`−?€\d{1,3}(,\d{3})+`).MatchString(all) {
		t.Errorf("no euro amount like €1,234 in the EUR memo")
	}
	if strings.Contains(all, "$") {
		t.Errorf("a dollar sign in the EUR memo")
	}
}

// TestPDFWriteExamples writes every memo's PDF to WORTH_PDF_DIR, to look
// at: WORTH_PDF_DIR=/tmp/pdf go test ./render -run Write, then
// pdftoppm -png -r 60 /tmp/pdf/NAME.pdf /tmp/pdf/NAME.
func TestPDFWriteExamples(t *testing.T) {
	dir := os.Getenv("WORTH_PDF_DIR")
	if dir == "" {
		t.Skip("set WORTH_PDF_DIR to write the memos' PDFs there")
	}
	for _, p := range memoFiles(t) {
		b := pdfOf(t, p, DocOptions{})
		if err := os.WriteFile(filepath.Join(dir, strings.TrimSuffix(filepath.Base(p), ".md")+".pdf"), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	for _, code := range []string{"USD", "EUR"} {
		b := buildPDF(t, testDoc(code), PDFOptions{})
		if err := os.WriteFile(filepath.Join(dir, "hand-built-"+code+".pdf"), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

// A hostile memo: its script-like text prints as text, and no link with a
// script or data scheme becomes clickable.
func TestPDFHostile(t *testing.T) {
	p := "testdata/hostile.md"
	if _, err := os.Stat(p); err != nil {
		t.Skip("no hostile test memo")
	}
	b := pdfOf(t, p, DocOptions{})
	for _, m := range regexp.MustCompile(`/URI \(([^)]*)\)`).FindAllSubmatch(b, -1) {
		u := strings.ToLower(string(m[1]))
		if !strings.HasPrefix(u, "http://") && !strings.HasPrefix(u, "https://") && !strings.HasPrefix(u, "mailto:") {
			t.Errorf("a clickable link to %q", m[1])
		}
	}
	for _, want := range []string{"/JavaScript", "/JS ", "/Launch", "/SubmitForm"} {
		if bytes.Contains(b, []byte(want)) {
			t.Errorf("the PDF holds %s", want)
		}
	}
	all := strings.Join(pdfText(t, b), "\n")
	if !strings.Contains(all, "Evil memo") {
		t.Errorf("the title is missing")
	}
}

// Documents drawn at the same time (the preview server may) come out the
// same as one drawn alone.
func TestPDFConcurrent(t *testing.T) {
	want := buildPDF(t, testDoc("EUR"), PDFOptions{})
	errs := make(chan error, 4)
	for k := 0; k < 4; k++ {
		go func() {
			b, err := PDF(testDoc("EUR"), PDFOptions{})
			if err == nil && !bytes.Equal(b, want) {
				err = fmt.Errorf("a concurrent build differs")
			}
			errs <- err
		}()
	}
	for k := 0; k < 4; k++ {
		if err := <-errs; err != nil {
			t.Error(err)
		}
	}
}
