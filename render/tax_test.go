package render

import (
	"encoding/json"
	"strings"
	"testing"
)

// TestAfterTaxInEveryWriter: the after-tax example carries its depreciation
// tables, after-tax cash-flow tables, loan schedule and the tax caution in
// the document model and the Markdown, and the JSON names the contract
// gives (a schedule of {year, before_tax, depreciation, taxable_income,
// tax, after_tax} per after-tax result), with each year's after-tax flow
// its before-tax flow less its tax.
func TestAfterTaxInEveryWriter(t *testing.T) {
	rep := loadReport(t, "../examples/laser-cutter.md")
	doc := BuildDoc(rep, DocOptions{})
	want := map[string]bool{"Depreciation: 6 kW fiber laser": false, "After-tax cash flows: 6 kW fiber laser": false,
		"Loan schedule: 6 kW fiber laser": false, "Depreciation: Rebuilt CO2 laser": false}
	caution := false
	walk(doc.Body, func(n Node) {
		switch x := n.(type) {
		case Table:
			if _, ok := want[x.Caption]; ok {
				want[x.Caption] = true
			}
		case Callout:
			if x.Text == TaxCaution {
				caution = true
			}
		}
	})
	for c, seen := range want {
		if !seen {
			t.Errorf("the document has no table %q", c)
		}
	}
	if !caution {
		t.Error("the document has no caution on tax figures")
	}
	md := string(Markdown(rep))
	for _, s := range []string{"**After-tax cash flows: 6 kW fiber laser**", "| Year | Before tax | Depreciation | Interest | Taxable income | Tax | After tax |", TaxCaution, "After tax, at a tax rate of 26%"} {
		if !strings.Contains(md, s) {
			t.Errorf("the Markdown lacks %q", s)
		}
	}
	b, err := JSON(rep)
	if err != nil {
		t.Fatal(err)
	}
	var out struct {
		Amounts     string `json:"amounts"`
		Comparisons []struct {
			ID      string `json:"id"`
			Results []struct {
				Schedule []map[string]any `json:"schedule"`
			} `json:"results"`
		} `json:"comparisons"`
	}
	if err := json.Unmarshal(b, &out); err != nil {
		t.Fatal(err)
	}
	if out.Amounts != "then-current" {
		t.Errorf("amounts: %q", out.Amounts)
	}
	for _, c := range out.Comparisons {
		for _, r := range c.Results {
			if (c.ID == "laser") != (len(r.Schedule) > 0) {
				t.Errorf("comparison %s: %d schedule rows", c.ID, len(r.Schedule))
			}
			for _, y := range r.Schedule {
				for _, k := range []string{"year", "before_tax", "depreciation", "taxable_income", "tax", "after_tax"} {
					if _, ok := y[k]; !ok {
						t.Errorf("a schedule row lacks %q: %v", k, y)
					}
				}
				bt, tax, at := y["before_tax"].(float64), y["tax"].(float64), y["after_tax"].(float64)
				if d := bt - tax - at; d > 1e-6 || d < -1e-6 {
					t.Errorf("year %v: before tax %v less tax %v is not after tax %v", y["year"], bt, tax, at)
				}
			}
		}
	}
}

// TestReplacementInEveryWriter: the replacement example states the
// defender's first cost as its market value today, tabulates every life,
// charts both assets with their economic lives marked, and gives the JSON
// the contract names.
func TestReplacementInEveryWriter(t *testing.T) {
	rep := loadReport(t, "../examples/dump-truck.md")
	doc := BuildDoc(rep, DocOptions{})
	var chart *Chart
	stated, rec := false, false
	walk(doc.Body, func(n Node) {
		switch x := n.(type) {
		case Chart:
			if strings.HasPrefix(x.Title, "Equivalent annual cost") {
				chart = &x
			}
		case Paragraph:
			if strings.Contains(plain(x.Text), "first cost in this study is its market value today") {
				stated = true
			}
		case Callout:
			if x.Kind == "recommendation" && strings.HasPrefix(x.Text, "Keep ") {
				rec = true
			}
		}
	})
	if chart == nil || len(chart.Series) != 2 {
		t.Fatalf("the EAC chart: %+v", chart)
	}
	rp := rep.Replacements[0]
	// Each economic life is marked on its own curve, and the year to
	// replace on the defender's where it is another.
	marked := map[[2]float64]bool{}
	for _, m := range chart.Marks {
		marked[[2]float64{float64(m.Series), m.X}] = true
	}
	for k, want := range [][2]float64{{0, float64(rp.Defender.Economic)}, {1, float64(rp.Challenger.Economic)}, {0, float64(rp.ReplaceAfter)}} {
		if !marked[want] {
			t.Errorf("mark %d: no mark at %v on series %v", k, want[1], want[0])
		}
	}
	if len(chart.Series[0].X) != len(rp.Defender.Lives) || len(chart.Series[1].X) != len(rp.Challenger.Lives) {
		t.Errorf("the chart has %d and %d points for %d and %d lives", len(chart.Series[0].X), len(chart.Series[1].X), len(rp.Defender.Lives), len(rp.Challenger.Lives))
	}
	if !stated || !rec {
		t.Errorf("the market value today stated: %v; a keep recommendation: %v", stated, rec)
	}
	if md := string(Markdown(rep)); !strings.Contains(md, "**Equivalent annual cost by years kept**") || !strings.Contains(md, "**Recommendation:** Keep") {
		t.Error("the Markdown lacks the replacement study")
	}
	b, err := JSON(rep)
	if err != nil {
		t.Fatal(err)
	}
	var out struct {
		Amounts      string `json:"amounts"`
		Replacements []struct {
			Recommendation string `json:"recommendation"`
			ReplaceAfter   int    `json:"replace_after_years"`
			Defender       struct {
				EconomicLife int     `json:"economic_life"`
				AnnualWorth  float64 `json:"annual_worth"`
			} `json:"defender"`
			Challenger struct {
				EconomicLife int     `json:"economic_life"`
				AnnualWorth  float64 `json:"annual_worth"`
			} `json:"challenger"`
		} `json:"replacements"`
	}
	if err := json.Unmarshal(b, &out); err != nil {
		t.Fatal(err)
	}
	if out.Amounts != "constant" || len(out.Replacements) != 1 {
		t.Fatalf("amounts %q, %d replacements", out.Amounts, len(out.Replacements))
	}
	r := out.Replacements[0]
	if r.Recommendation != "keep" || r.ReplaceAfter != rp.ReplaceAfter || r.Defender.EconomicLife != rp.Defender.Economic ||
		r.Challenger.AnnualWorth != rp.Challenger.AW || r.Defender.AnnualWorth >= 0 {
		t.Errorf("replacements JSON: %+v", r)
	}
}
