package render

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"worth/compute"
	"worth/parse"
)

// The risk block in every writer: the same paragraphs, tables and callout
// (riskBody) for the document model and Markdown, two cumulative charts
// (S-curves) in the document model, and the "risks" array of the JSON.

// findRisk is the evaluated risk block with an id.
func findRisk(rep *compute.Report, id string) *compute.Risk {
	for _, r := range rep.Risks {
		if r.ID == id {
			return r
		}
	}
	return nil
}

// pm writes an estimate with its standard error: "62.3% ± 0.3%".
func (f Format) pm(v, se float64, money bool) string {
	if money {
		return f.Money(v) + " ± " + f.Money(se)
	}
	return f.Percent(v) + " ± " + f.Percent(se)
}

// riskDistText writes a distribution as the memo does, with its numbers
// formatted.
func riskDistText(f Format, in *compute.RiskInput) string {
	return in.Dist.Kind + "(" + joinNums(f, in.Dist.Params) + ")"
}

// riskNames is an alternative's display name, or "doing nothing".
func riskName(c *compute.Comparison, id string) string {
	if id == compute.DoNothing {
		return "doing nothing"
	}
	return name(c, id)
}

// riskLeader is the choice most often best.
func riskLeader(r *compute.Risk) (id string, p compute.Estimate) {
	for _, o := range r.Outcomes {
		if id == "" || o.PBest.Value > p.Value {
			id, p = o.Alt.ID, o.PBest
		}
	}
	if r.DoNothing != nil && r.DoNothing.Value > p.Value {
		id, p = compute.DoNothing, *r.DoNothing
	}
	return id, p
}

// riskBody is what a risk block shows, charts aside.
func riskBody(r *compute.Risk, f Format) []Node {
	c := r.Comparison
	var out []Node
	src := fmt.Sprintf("risk %s, line %d", r.ID, r.Line)
	seed := strconv.FormatUint(r.Seed, 10)
	if !r.SeedGiven {
		seed += " (the default)"
	}
	var drawn []string
	for _, in := range r.Inputs {
		drawn = append(drawn, in.Name)
	}
	intro := fmt.Sprintf("Monte Carlo simulation of comparison %s: %s trials, seed %s. Each trial draws %s independently from %s, keeps every other input at its stated value, recomputes each alternative's %s (%s at %s) and picks the best by the comparison's rule (%s).",
		c.ID, number(float64(r.Trials), 0), seed, joinAnd(drawn), map[bool]string{true: "its distribution", false: "their distributions"}[len(drawn) == 1],
		pwWord(c), horizonShort(c), f.Rate(c.Rate.Effective), RuleText(c))
	if r.RateVaries {
		intro += " The rate itself is drawn, so the discount factors are recomputed in each trial."
	}
	out = append(out, Paragraph{Text: []Inline{{Text: intro}}})

	in := Table{
		Caption: fmt.Sprintf("Risk %s: inputs drawn", r.ID),
		Header:  []string{"Input", "Distribution", "Base value", "Mean", "Standard deviation", "Line"},
		Align:   []byte{'l', 'l', 'r', 'r', 'r', 'r'},
		Source:  src,
	}
	for _, x := range r.Inputs {
		in.Rows = append(in.Rows, []string{x.Name, riskDistText(f, x), f.Num(x.Base), f.Num(x.Mean), f.Num(x.SD), strconv.Itoa(x.Line)})
	}
	out = append(out, in)

	lead, _ := riskLeader(r)
	t := Table{
		Caption:  fmt.Sprintf("Risk %s: %s over %s trials", r.ID, pwWord(c), number(float64(r.Trials), 0)),
		Header:   []string{""},
		Align:    []byte{'l'},
		Source:   src,
		BoldCols: []bool{false},
		Note:     "Percentiles interpolate between order statistics; P10 is the value that 10% of the trials fall below.",
	}
	if c.CostOnly {
		t.Note = "Present worths are signed: costs are negative, so P10 is the costly end. " + t.Note
	}
	se := Table{
		Caption:  fmt.Sprintf("Risk %s: standard errors of the figures above", r.ID),
		Header:   []string{""},
		Align:    []byte{'l'},
		Source:   src,
		BoldCols: []bool{false},
		Note:     "A standard error is the simulation's own uncertainty, which more trials reduce: binomial, √(p(1 − p)/N), for a probability; s/√N for a mean; for a percentile, half the spread between the order statistics √(Np(1 − p)) ranks either side of it (distribution-free).",
	}
	rows := [][]string{{"Probability best"}, {"Mean"}, {"P10"}, {"P50 (median)"}, {"P90"}, {"Standard deviation"}, {"Base case"}}
	ses := [][]string{{"Probability best"}, {"Mean"}, {"P10"}, {"P50 (median)"}, {"P90"}}
	for _, o := range r.Outcomes {
		for _, x := range []*Table{&t, &se} {
			x.Header = append(x.Header, o.Alt.Name)
			x.Align = append(x.Align, 'r')
			x.BoldCols = append(x.BoldCols, o.Alt.ID == lead)
		}
		for k, e := range []compute.Estimate{o.PBest, o.Mean, o.P10, o.P50, o.P90} {
			if k == 0 {
				rows[k] = append(rows[k], f.Percent(e.Value))
				ses[k] = append(ses[k], f.Percent(e.SE))
			} else {
				rows[k] = append(rows[k], f.Money(e.Value))
				ses[k] = append(ses[k], f.Money(e.SE))
			}
		}
		rows[5] = append(rows[5], f.Money(o.SD))
		rows[6] = append(rows[6], f.Money(o.Base))
	}
	if r.DoNothing != nil {
		for _, x := range []*Table{&t, &se} {
			x.Header = append(x.Header, "Doing nothing")
			x.Align = append(x.Align, 'r')
			x.BoldCols = append(x.BoldCols, lead == compute.DoNothing)
		}
		rows[0] = append(rows[0], f.Percent(r.DoNothing.Value))
		ses[0] = append(ses[0], f.Percent(r.DoNothing.SE))
		for k := 1; k < len(rows); k++ {
			rows[k] = append(rows[k], f.Money(0))
		}
		for k := 1; k < len(ses); k++ {
			ses[k] = append(ses[k], f.Money(0))
		}
	}
	t.Rows, se.Rows = rows, ses
	out = append(out, t, se)

	// The finding in words.
	leadID, lp := riskLeader(r)
	call := Callout{Kind: "note", Title: "Risk"}
	text := fmt.Sprintf("The choice most often best is %s, in %s of the trials", riskName(c, leadID), f.pm(lp.Value, lp.SE, false))
	if leadID == c.Recommended {
		text += "; it is the base case's recommendation too."
	} else {
		text += fmt.Sprintf("; the base case's recommendation, %s, is best in %s.", riskName(c, c.Recommended), f.pm(r.Holds.Value, r.Holds.SE, false))
	}
	call.Text = text
	if d := r.Difference; d != nil {
		a, b := name(c, d.A), name(c, d.B)
		call.Facts = append(call.Facts,
			KV{"Difference", fmt.Sprintf("%s less %s, trial by trial", a, b)},
			KV{"Mean", f.pm(d.Mean.Value, d.Mean.SE, true)},
			KV{"P10 to P90", fmt.Sprintf("%s to %s (median %s)", f.Money(d.P10.Value), f.Money(d.P90.Value), f.Money(d.P50.Value))},
			KV{fmt.Sprintf("%s ahead", a), fmt.Sprintf("in %s of the trials", f.pm(d.Positive.Value, d.Positive.SE, false))},
		)
	}
	call.Items = append(call.Items, r.Warnings...)
	out = append(out, call)
	return out
}

// pwWord is "present worth", or "capitalized worth" on a perpetual horizon.
func pwWord(c *compute.Comparison) string {
	if c.Horizon.Perpetual() {
		return "capitalized worth"
	}
	return "present worth"
}

func joinAnd(xs []string) string {
	switch len(xs) {
	case 0:
		return ""
	case 1:
		return xs[0]
	}
	return strings.Join(xs[:len(xs)-1], ", ") + " and " + xs[len(xs)-1]
}

// risk is the risk block in the document model: riskBody with the two
// cumulative charts after the results table.
func (b *builder) risk(x *parse.Risk) []Node {
	r := findRisk(b.rep, x.ID)
	if r == nil {
		return nil
	}
	body := riskBody(r, b.f)
	var out []Node
	for k, n := range body {
		out = append(out, n)
		if k == len(body)-1 {
			out = append(out, b.riskCurves(r))
			if ch, ok := b.riskDifference(r); ok {
				out = append(out, ch)
			}
		}
	}
	return out
}

// riskCurves is the cumulative distribution (S-curve) of each
// alternative's present worth: the share of trials at or below each value.
func (b *builder) riskCurves(r *compute.Risk) Chart {
	c := r.Comparison
	word := capital(pwWord(c))
	ch := Chart{
		Kind:    "lines",
		Title:   fmt.Sprintf("%s: cumulative distribution over %s trials", word, number(float64(r.Trials), 0)),
		XLabel:  word,
		YLabel:  "Share of trials at or below",
		XFormat: "money",
		YFormat: "percent",
		Source:  fmt.Sprintf("risk %s, line %d", r.ID, r.Line),
	}
	top := map[string]bool{}
	if r.Difference != nil {
		top[r.Difference.A], top[r.Difference.B] = true, true
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	var alt []string
	for _, o := range r.Outcomes {
		s := Series{Name: o.Alt.Name, X: o.Curve, Y: r.Levels, Emphasis: top[o.Alt.ID] || len(r.Outcomes) == 1}
		ch.Series = append(ch.Series, s)
		lo, hi = math.Min(lo, o.Curve[0]), math.Max(hi, o.Curve[len(o.Curve)-1])
		alt = append(alt, fmt.Sprintf("%s from %s (P10) through %s (P50) to %s (P90)", o.Alt.Name, b.f.Money(o.P10.Value), b.f.Money(o.P50.Value), b.f.Money(o.P90.Value)))
	}
	if !(hi > lo) {
		lo, hi = lo-1, hi+1
	}
	ch.XMin, ch.XMax, ch.XTicks = b.axis(lo, hi, 7, "money", false)
	ch.YMin, ch.YMax, ch.YTicks = 0, 1, riskProbabilityTicks(b.f)
	ch.Alt = fmt.Sprintf("For each alternative, the share of the %s trials in which its %s is at or below a value, from the 1st to the 99th percentile: %s. A curve further right is better; where two curves cross, which is better depends on the draw.", number(float64(r.Trials), 0), pwWord(c), strings.Join(alt, "; "))
	return ch
}

// riskDifference is the cumulative distribution of the difference between
// the two leading alternatives, with zero marked: the share of trials left
// of it are those the second one wins.
func (b *builder) riskDifference(r *compute.Risk) (Chart, bool) {
	d := r.Difference
	if d == nil {
		return Chart{}, false
	}
	c := r.Comparison
	a, bn := name(c, d.A), name(c, d.B)
	ch := Chart{
		Kind:    "lines",
		Title:   fmt.Sprintf("%s less %s: cumulative distribution of the difference", a, bn),
		XLabel:  fmt.Sprintf("%s of %s less that of %s", capital(pwWord(c)), a, bn),
		YLabel:  "Share of trials at or below",
		XFormat: "money",
		YFormat: "percent",
		Source:  fmt.Sprintf("risk %s, line %d", r.ID, r.Line),
		Series:  []Series{{Name: a + " − " + bn, X: d.Curve, Y: r.Levels, Emphasis: true}},
	}
	lo, hi := d.Curve[0], d.Curve[len(d.Curve)-1]
	if lo > 0 {
		lo = 0
	}
	if hi < 0 {
		hi = 0
	}
	if !(hi > lo) {
		lo, hi = lo-1, hi+1
	}
	ch.Marks = append(ch.Marks,
		Mark{X: 0, HasX: true, Label: fmt.Sprintf("%s ahead right of zero", a), Series: -1, Kind: "rate"},
		Mark{X: d.P10.Value, Y: 0.1, HasX: true, HasY: true, Label: "P10 " + b.f.Money(d.P10.Value), Series: 0, Kind: "percentile"},
		Mark{X: d.P50.Value, Y: 0.5, HasX: true, HasY: true, Label: "P50 " + b.f.Money(d.P50.Value), Series: 0, Kind: "percentile"},
		Mark{X: d.P90.Value, Y: 0.9, HasX: true, HasY: true, Label: "P90 " + b.f.Money(d.P90.Value), Series: 0, Kind: "percentile"},
	)
	ch.XMin, ch.XMax, ch.XTicks = b.axis(lo, hi, 7, "money", false)
	ch.YMin, ch.YMax, ch.YTicks = 0, 1, riskProbabilityTicks(b.f)
	ch.Alt = fmt.Sprintf("The share of trials in which the %s of %s less that of %s is at or below a value, from the 1st to the 99th percentile: P10 %s, median %s, P90 %s. %s is ahead in %s of the trials.",
		pwWord(c), a, bn, b.f.Money(d.P10.Value), b.f.Money(d.P50.Value), b.f.Money(d.P90.Value), a, b.f.Percent(d.Positive.Value))
	return ch, true
}

// riskProbabilityTicks label a cumulative axis from 0% to 100%.
func riskProbabilityTicks(f Format) []Tick {
	var ts []Tick
	for k := 0; k <= 4; k++ {
		v := float64(k) / 4
		ts = append(ts, Tick{At: v, Label: strconv.Itoa(k*25) + "%"})
	}
	return ts
}

// mdRisk is the risk block in Markdown.
func mdRisk(rep *compute.Report, f Format, x *parse.Risk) string {
	r := findRisk(rep, x.ID)
	if r == nil {
		return ""
	}
	var b strings.Builder
	for _, n := range riskBody(r, f) {
		switch n := n.(type) {
		case Paragraph:
			b.WriteString(escapeMD(plain(n.Text)) + "\n\n")
		case Table:
			fmt.Fprintf(&b, "**%s**\n\n", escapeMD(n.Caption))
			right := make([]bool, len(n.Align))
			for k, a := range n.Align {
				right[k] = a == 'r'
			}
			table(&b, n.Header, n.Rows, right)
			if n.Note != "" {
				fmt.Fprintf(&b, "\n%s\n", escapeMD(n.Note))
			}
			b.WriteString("\n")
		case Callout:
			fmt.Fprintf(&b, "> **%s:** %s\n", n.Title, escapeMD(n.Text))
			for _, kv := range n.Facts {
				fmt.Fprintf(&b, ">\n> %s: %s\n", escapeMD(kv.Key), escapeMD(kv.Value))
			}
			for _, it := range n.Items {
				fmt.Fprintf(&b, ">\n> **Note:** %s\n", escapeMD(it))
			}
			b.WriteString("\n")
		}
	}
	return b.String()
}

// ---- JSON ----

type jsonRisks struct {
	Risks []jsonRisk `json:"risks,omitempty"`
}

type jsonRisk struct {
	ID      string `json:"id"`
	Compare string `json:"compare"`
	Trials  int    `json:"trials"`
	Seed    uint64 `json:"seed"`
	// probability_best and percentiles are keyed by alternative id;
	// probability_best holds "do-nothing" too where doing nothing is a
	// choice.
	ProbabilityBest     map[string]float64         `json:"probability_best"`
	Percentiles         map[string]jsonPercentiles `json:"percentiles"`
	Inputs              []jsonRiskInput            `json:"inputs"`
	Outcomes            []jsonRiskOutcome          `json:"outcomes"`
	RecommendationHolds jsonEstimate               `json:"recommendation_holds"`
	Difference          *jsonRiskDifference        `json:"difference"`
	RateDrawn           bool                       `json:"rate_drawn"`
	Warnings            []string                   `json:"warnings"`
}

type jsonPercentiles struct {
	P10 float64 `json:"p10"`
	P50 float64 `json:"p50"`
	P90 float64 `json:"p90"`
}

type jsonEstimate struct {
	Value         float64 `json:"value"`
	StandardError float64 `json:"standard_error"`
}

type jsonRiskInput struct {
	Name         string    `json:"name"`
	Distribution string    `json:"distribution"`
	Parameters   []float64 `json:"parameters"`
	Base         float64   `json:"base"`
	Mean         float64   `json:"mean"`
	SD           float64   `json:"standard_deviation"`
	Line         int       `json:"line"`
}

type jsonRiskOutcome struct {
	Alternative      string       `json:"alternative"`
	BasePresentWorth float64      `json:"base_present_worth"`
	ProbabilityBest  jsonEstimate `json:"probability_best"`
	Mean             jsonEstimate `json:"mean"`
	SD               float64      `json:"standard_deviation"`
	P10              jsonEstimate `json:"p10"`
	P50              jsonEstimate `json:"p50"`
	P90              jsonEstimate `json:"p90"`
	Min              float64      `json:"min"`
	Max              float64      `json:"max"`
}

type jsonRiskDifference struct {
	A        string       `json:"a"`
	B        string       `json:"b"`
	Mean     jsonEstimate `json:"mean"`
	SD       float64      `json:"standard_deviation"`
	P10      jsonEstimate `json:"p10"`
	P50      jsonEstimate `json:"p50"`
	P90      jsonEstimate `json:"p90"`
	Positive jsonEstimate `json:"probability_a_ahead"`
}

func je(e compute.Estimate) jsonEstimate { return jsonEstimate{e.Value, e.SE} }

// risksJSON is the "risks" array of the JSON output.
func risksJSON(rep *compute.Report) jsonRisks {
	var out jsonRisks
	for _, r := range rep.Risks {
		jr := jsonRisk{ID: r.ID, Compare: r.Comparison.ID, Trials: r.Trials, Seed: r.Seed,
			ProbabilityBest: map[string]float64{}, Percentiles: map[string]jsonPercentiles{},
			RecommendationHolds: je(r.Holds), RateDrawn: r.RateVaries, Warnings: r.Warnings}
		if jr.Warnings == nil {
			jr.Warnings = []string{}
		}
		for _, in := range r.Inputs {
			jr.Inputs = append(jr.Inputs, jsonRiskInput{Name: in.Name, Distribution: in.Dist.Kind, Parameters: in.Dist.Params,
				Base: in.Base, Mean: in.Mean, SD: in.SD, Line: in.Line})
		}
		for _, o := range r.Outcomes {
			id := o.Alt.ID
			jr.ProbabilityBest[id] = o.PBest.Value
			jr.Percentiles[id] = jsonPercentiles{o.P10.Value, o.P50.Value, o.P90.Value}
			jr.Outcomes = append(jr.Outcomes, jsonRiskOutcome{Alternative: id, BasePresentWorth: o.Base,
				ProbabilityBest: je(o.PBest), Mean: je(o.Mean), SD: o.SD, P10: je(o.P10), P50: je(o.P50), P90: je(o.P90),
				Min: o.Min, Max: o.Max})
		}
		if r.DoNothing != nil {
			jr.ProbabilityBest[compute.DoNothing] = r.DoNothing.Value
		}
		if d := r.Difference; d != nil {
			jr.Difference = &jsonRiskDifference{A: d.A, B: d.B, Mean: je(d.Mean), SD: d.SD,
				P10: je(d.P10), P50: je(d.P50), P90: je(d.P90), Positive: je(d.Positive)}
		}
		out.Risks = append(out.Risks, jr)
	}
	return out
}
