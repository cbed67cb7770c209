package render

import (
	"encoding/json"
	"strings"
	"testing"

	"worth/compute"
	"worth/parse"
)

const riskTestMemo = "---\ntitle: R\nrate: 5%\n---\n\n```assume\nx = 8 ~ uniform(2, 16)\n```\n\n" +
	"```alternative a\nname: Pump A\nlife: 10\nfirst cost: 100k\nannual benefit: 30000 - 1000 * x\n```\n\n" +
	"```alternative b\nname: Pump B\nlife: 10\nfirst cost: 150k\nannual benefit: 28000\n```\n\n" +
	"```compare c\n```\n\n```risk r\ntrials: 2000\nseed: 5\n```\n"

func riskReport(t *testing.T) *compute.Report {
	t.Helper()
	m, err := parse.Parse("r.md", []byte(riskTestMemo))
	if err != nil {
		t.Fatal(err)
	}
	rep, err := compute.Compute(m)
	if err != nil {
		t.Fatal(err)
	}
	return rep
}

// TestRiskJSON: the "risks" array has the contract's names: trials, seed,
// probability_best per alternative (and doing nothing, a choice here) and
// percentiles per alternative with p10, p50 and p90, as the report has them.
func TestRiskJSON(t *testing.T) {
	rep := riskReport(t)
	out, err := JSON(rep)
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Risks []struct {
			Trials          int                           `json:"trials"`
			Seed            uint64                        `json:"seed"`
			ProbabilityBest map[string]float64            `json:"probability_best"`
			Percentiles     map[string]map[string]float64 `json:"percentiles"`
		} `json:"risks"`
	}
	if err := json.Unmarshal(out, &doc); err != nil {
		t.Fatal(err)
	}
	if len(doc.Risks) != 1 {
		t.Fatalf("%d risks", len(doc.Risks))
	}
	jr, r := doc.Risks[0], rep.Risks[0]
	if jr.Trials != 2000 || jr.Seed != 5 {
		t.Errorf("trials %d seed %d", jr.Trials, jr.Seed)
	}
	sum := 0.0
	for _, o := range r.Outcomes {
		id := o.Alt.ID
		if jr.ProbabilityBest[id] != o.PBest.Value {
			t.Errorf("probability_best[%s] = %v, want %v", id, jr.ProbabilityBest[id], o.PBest.Value)
		}
		p := jr.Percentiles[id]
		if p["p10"] != o.P10.Value || p["p50"] != o.P50.Value || p["p90"] != o.P90.Value {
			t.Errorf("percentiles[%s] = %v", id, p)
		}
		sum += jr.ProbabilityBest[id]
	}
	sum += jr.ProbabilityBest[compute.DoNothing]
	if _, ok := jr.ProbabilityBest[compute.DoNothing]; !ok || sum < 0.999999 || sum > 1.000001 {
		t.Errorf("probability_best %v sums to %v", jr.ProbabilityBest, sum)
	}
}

// TestRiskWriters: the Markdown and the document model show the block's
// tables, the finding and (in the document) the two cumulative charts.
func TestRiskWriters(t *testing.T) {
	rep := riskReport(t)
	md := string(Markdown(rep))
	for _, want := range []string{"**Risk r: inputs drawn**", "**Risk r: present worth over 2,000 trials**", "**Risk r: standard errors of the figures above**", "> **Risk:** The choice most often best is", "| Doing nothing |"} {
		if !strings.Contains(md, want) {
			t.Errorf("Markdown lacks %q", want)
		}
	}
	doc := BuildDoc(rep, DocOptions{})
	charts := 0
	walk(doc.Body, func(n Node) {
		if c, ok := n.(Chart); ok && strings.Contains(c.Source, "risk r") {
			charts++
			if c.Kind != "lines" || len(c.Series) == 0 || c.YMax != 1 || c.Alt == "" {
				t.Errorf("chart %q: kind %s, %d series, y to %v", c.Title, c.Kind, len(c.Series), c.YMax)
			}
		}
	})
	if charts != 2 {
		t.Errorf("%d risk charts, want 2", charts)
	}
}
