package render

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"worth/compute"
	"worth/parse"
)

const analysisExample = "../examples/capital-program.md"

// TestAnalysisJSON: the analysis arrays carry the contract's field names
// (sensitivities with swings and breakevens, scenarios, budgets with
// chosen, total_first_cost and total_present_worth), and their values are
// the report's.
func TestAnalysisJSON(t *testing.T) {
	rep := loadReport(t, analysisExample)
	out, err := JSON(rep)
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Sensitivities []struct {
			Swings     []map[string]any `json:"swings"`
			Breakevens []map[string]any `json:"breakevens"`
		} `json:"sensitivities"`
		Scenarios []map[string]any `json:"scenarios"`
		Budgets   []map[string]any `json:"budgets"`
	}
	if err := json.Unmarshal(out, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Sensitivities) != 1 || len(doc.Scenarios) != 2 || len(doc.Budgets) != 1 {
		t.Fatalf("arrays: %d sensitivities, %d scenarios, %d budgets", len(doc.Sensitivities), len(doc.Scenarios), len(doc.Budgets))
	}
	s := rep.Sensitivities[0]
	for k, sw := range doc.Sensitivities[0].Swings {
		for _, key := range []string{"name", "low_value", "high_value", "low_margin", "high_margin"} {
			if _, ok := sw[key]; !ok {
				t.Errorf("swing %d lacks %q", k, key)
			}
		}
		if sw["name"] != s.Swings[k].Name || sw["low_margin"] != s.Swings[k].Low.Margin {
			t.Errorf("swing %d: %v, report %s %v", k, sw, s.Swings[k].Name, s.Swings[k].Low.Margin)
		}
	}
	for k, be := range doc.Sensitivities[0].Breakevens {
		if be["name"] != s.Breakevens[k].Name || be["value"] != *s.Breakevens[k].Value {
			t.Errorf("breakeven %d: %v", k, be)
		}
	}
	b := doc.Budgets[0]
	if b["total_present_worth"] != rep.Budgets[0].TotalPW || b["total_first_cost"] != rep.Budgets[0].TotalFirstCost {
		t.Errorf("budget totals: %v", b)
	}
	chosen, _ := b["chosen"].([]any)
	if len(chosen) != len(rep.Budgets[0].Chosen) {
		t.Errorf("budget chosen: %v", b["chosen"])
	}
}

// TestAnalysisJSONInvalid: a swing end that makes the memo invalid is null
// in JSON, with the reason beside it, and the output stays valid JSON.
func TestAnalysisJSONInvalid(t *testing.T) {
	src := "---\nrate: 6%\n---\n\n```assume\nesc = 4%\n```\n\n" +
		"```alternative a\nfirst cost: 1000\nannual cost: 100 escalating esc\n```\n\n" +
		"```alternative b\nfirst cost: 2500\nannual cost: 40 escalating esc\n```\n\n```compare c\nhorizon: perpetual\n```\n\n" +
		"```sensitivity s\nvary: esc by ±60%\nrange rate: 1% to 9%\n```\n"
	m, err := parse.Parse("i.md", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	rep, err := compute.Compute(m)
	if err != nil {
		t.Fatal(err)
	}
	out, err := JSON(rep)
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Sensitivities []struct {
			Swings []map[string]any `json:"swings"`
		} `json:"sensitivities"`
	}
	if err := json.Unmarshal(out, &doc); err != nil {
		t.Fatal(err)
	}
	for _, sw := range doc.Sensitivities[0].Swings {
		if sw["name"] == "esc" && (sw["high_margin"] != nil || sw["high_invalid"] == nil) {
			t.Errorf("esc swing: %v", sw)
		}
	}
	// Every writer takes the invalid values in its stride.
	md := string(Markdown(rep))
	if !strings.Contains(md, "invalid") {
		t.Errorf("Markdown does not say a swing is invalid")
	}
	doc2 := BuildDoc(rep, DocOptions{})
	if _, err := HTML(doc2, HTMLOptions{}); err != nil {
		t.Fatal(err)
	}
	if _, err := PDF(doc2, PDFOptions{}); err != nil {
		t.Fatal(err)
	}
}

// TestAnalysisDoc: the document holds the tornado (a bar per swing, in
// the report's order, widest first), the spider and the sweep charts, and
// the writers draw them.
func TestAnalysisDoc(t *testing.T) {
	rep := loadReport(t, analysisExample)
	doc := BuildDoc(rep, DocOptions{})
	var tornado, spider, sweep *Chart
	walk(doc.Body, func(n Node) {
		if c, ok := n.(Chart); ok {
			switch {
			case c.Kind == "tornado":
				tornado = &c
			case strings.HasPrefix(c.Title, "Margin of"):
				spider = &c
			case strings.Contains(c.Title, "across"):
				sweep = &c
			}
		}
	})
	if tornado == nil || spider == nil || sweep == nil {
		t.Fatalf("charts: tornado %v, spider %v, sweep %v", tornado != nil, spider != nil, sweep != nil)
	}
	s := rep.Sensitivities[0]
	if len(tornado.Bars) != len(s.Swings) {
		t.Fatalf("%d bars for %d swings", len(tornado.Bars), len(s.Swings))
	}
	for k, b := range tornado.Bars {
		if b.Low != s.Swings[k].Low.Margin || b.Base != s.Margin {
			t.Errorf("bar %d: %+v", k, b)
		}
		if k > 0 && math.Abs(b.High-b.Low) > math.Abs(tornado.Bars[k-1].High-tornado.Bars[k-1].Low)+1e-9 {
			t.Errorf("bar %d is wider than the one above it", k)
		}
	}
	if len(spider.Series) != len(s.Spider) || len(sweep.Series) != len(s.Compare.Results) {
		t.Errorf("spider %d series, sweep %d series", len(spider.Series), len(sweep.Series))
	}
	changes := 0
	for _, m := range sweep.Marks {
		if m.Kind == "crossover" {
			changes++
		}
	}
	if changes != len(s.Ranges[0].Changes) {
		t.Errorf("sweep marks %d changes, report %d", changes, len(s.Ranges[0].Changes))
	}
	html, err := HTML(doc, HTMLOptions{})
	if err != nil {
		t.Fatal(err)
	}
	h := string(html)
	if !strings.Contains(h, `<figure class="chart tornado">`) || !strings.Contains(h, tornadoLegend[0]) {
		t.Errorf("the HTML lacks the tornado")
	}
	for _, sw := range s.Swings {
		if !strings.Contains(h, ">"+inputName(sw.Name, sw.Rate)+"</text>") {
			t.Errorf("the tornado lacks the label of %s", sw.Name)
		}
	}
	if _, err := PDF(doc, PDFOptions{}); err != nil {
		t.Fatal(err)
	}
}
