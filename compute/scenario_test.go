package compute_test

import (
	"math"
	"strings"
	"testing"
)

// scenarioMemo is an invented pumping choice. The scenario block is added
// by the tests.
const scenarioMemo = "---\nrate: 6%\n---\n\n" +
	"```assume\nprice = 0.10\nenergy = 50,000 * price\nrebuild = 30k\n```\n\n" +
	"```alternative a\nlife: 10\nfirst cost: 100k\nannual cost: energy\ncost every 4 years: rebuild\n```\n\n" +
	"```alternative b\nlife: 15\nfirst cost: 140k\nannual cost: energy / 2\n```\n\n" +
	"```compare short\nalternatives: a, b\nhorizon: study period 12\n```\n\n" +
	"```compare long\nhorizon: perpetual\n```\n"

// TestScenarioEqualsTypedIn: every comparison under a scenario equals the
// memo rebuilt with the scenario's values typed in (rate included), and an
// assumption that uses an overridden one follows it.
func TestScenarioEqualsTypedIn(t *testing.T) {
	cases := []struct {
		name, block string
		edits       [][2]string // the same values typed into the memo
	}{
		{"price", "price = 0.16", [][2]string{{"price = 0.10", "price = 0.16"}}},
		{"rate", "rate = 4.5%", [][2]string{{"rate: 6%", "rate: 4.5%"}}},
		{"both", "name: Dear power, cheap money\nprice = 0.16\nrebuild = rebuild * 1.5\nrate = 3%",
			[][2]string{{"price = 0.10", "price = 0.16"}, {"rebuild = 30k", "rebuild = 45k"}, {"rate: 6%", "rate: 3%"}}},
		{"nominal rate", "rate = 6% nominal monthly", [][2]string{{"rate: 6%", "rate: 6% nominal monthly"}}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			rep := mustReport(t, scenarioMemo+"\n```scenario s\n"+tc.block+"\n```\n")
			typed := scenarioMemo
			for _, e := range tc.edits {
				if !strings.Contains(typed, e[0]) {
					t.Fatalf("memo lacks %q", e[0])
				}
				typed = strings.Replace(typed, e[0], e[1], 1)
			}
			want := mustReport(t, typed)
			if len(rep.Scenarios) != 1 {
				t.Fatalf("%d scenarios", len(rep.Scenarios))
			}
			s := rep.Scenarios[0]
			if len(s.Comparisons) != len(want.Comparisons) {
				t.Fatalf("%d comparisons under the scenario, %d in the memo", len(s.Comparisons), len(want.Comparisons))
			}
			for k, r := range s.Comparisons {
				w := want.Comparisons[k]
				if r.Under.ID != w.ID || r.Under.Recommended != w.Recommended {
					t.Errorf("%s: recommends %s, typed-in memo %s", w.ID, r.Under.Recommended, w.Recommended)
				}
				if math.Abs(r.Under.Rate.Effective-w.Rate.Effective) > 1e-15 {
					t.Errorf("%s: rate %v, typed-in %v", w.ID, r.Under.Rate.Effective, w.Rate.Effective)
				}
				for j, res := range r.Under.Results {
					if d := math.Abs(res.PW - w.Results[j].PW); d > 1e-9*math.Abs(w.Results[j].PW) {
						t.Errorf("%s/%s: PW %v, typed-in %v", w.ID, res.Alt.ID, res.PW, w.Results[j].PW)
					}
					if d := math.Abs(res.AW - w.Results[j].AW); d > 1e-9*math.Abs(w.Results[j].AW) {
						t.Errorf("%s/%s: AW %v, typed-in %v", w.ID, res.Alt.ID, res.AW, w.Results[j].AW)
					}
				}
				// The base side is the memo as written.
				if r.Base != rep.Comparisons[k] {
					t.Errorf("%s: base is not the memo's comparison", w.ID)
				}
			}
		})
	}
}

// TestScenarioChangesRecommendation: a scenario that flips a decision is
// marked as such.
func TestScenarioChangesRecommendation(t *testing.T) {
	rep := mustReport(t, scenarioMemo+"\n```scenario cheap\nprice = 0.01\nrebuild = 1k\n```\n\n```scenario dear\nprice = 0.5\n```\n")
	if len(rep.Scenarios) != 2 {
		t.Fatalf("%d scenarios", len(rep.Scenarios))
	}
	base := rep.Comparisons[0].Recommended
	changed := map[string]bool{}
	for _, s := range rep.Scenarios {
		for _, r := range s.Comparisons {
			if r.Changed() != (r.Under.Recommended != r.Base.Recommended) {
				t.Errorf("Changed() disagrees with the recommendations")
			}
			if r.Base.ID == "short" {
				changed[s.ID] = r.Changed()
			}
		}
	}
	if !(changed["cheap"] || changed["dear"]) {
		t.Errorf("neither scenario changes %s's recommendation of %s", rep.Comparisons[0].ID, base)
	}
}
