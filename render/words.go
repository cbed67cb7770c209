package render

import (
	"fmt"
	"strings"

	"worth/compute"
)

// Caution is the usual caution every report carries.
const Caution = "Results depend on the assumptions stated in this memo. Discount rates, tax treatment and depreciation must follow the organization's policy and local law; decisions that turn on taxes need review by a qualified professional."

// HorizonText describes a comparison's horizon in words.
func HorizonText(c *compute.Comparison) string {
	h := c.Horizon
	var s string
	switch h.Kind {
	case "perpetual":
		s = "perpetual (each life cycle repeats forever; present worth is the capitalized worth)"
	case "study period":
		s = fmt.Sprintf("study period of %d years (cycles repeat and are cut at year %d with their residual values)", h.Years, h.Years)
	case "repeat lives":
		s = fmt.Sprintf("repeated lives: %d years, the least common multiple of the lives", h.Years)
	}
	if h.Default {
		s += ", the default for these alternatives"
	}
	return s
}

// RateText describes the rate a comparison uses, with its conversion.
func (f Format) RateText(r compute.Rate) string {
	s := f.Rate(r.Effective) + " a year"
	if r.Conversion != "" {
		s = fmt.Sprintf("%s, from %s: %s", f.Rate(r.Effective), r.Text, r.Conversion)
	}
	return s
}

// RuleText names a decision rule in words.
func RuleText(c *compute.Comparison) string {
	switch c.DecideBy {
	case "annual worth":
		return "highest annual worth"
	case "incremental rate of return":
		return "incremental rate of return, in order of first cost"
	case "benefit-cost":
		return "incremental benefit-cost ratio, in order of first cost"
	}
	return "highest present worth"
}

// name returns an alternative's display name in a comparison.
func name(c *compute.Comparison, id string) string {
	if id == compute.DoNothing {
		return "doing nothing"
	}
	for _, r := range c.Results {
		if r.Alt.ID == id {
			return r.Alt.Name
		}
	}
	return id
}

func result(c *compute.Comparison, id string) *compute.Result {
	for _, r := range c.Results {
		if r.Alt.ID == id {
			return r
		}
	}
	return nil
}

// measureWord is "present worth" or "annual worth", whichever the margin
// is in.
func measureWord(c *compute.Comparison) string {
	if c.DecideBy == "annual worth" {
		return "annual worth"
	}
	return "present worth"
}

// Recommendation states the decision in words: the choice, the rule and the
// margin over the runner-up.
func (f Format) Recommendation(c *compute.Comparison) string {
	var b strings.Builder
	rate := f.Rate(c.Rate.Effective)
	if c.Recommended == compute.DoNothing {
		best := result(c, c.RunnerUp)
		fmt.Fprintf(&b, "Do nothing. Every alternative earns benefits, but none has a positive present worth at %s: the best, %s, has %s.", rate, best.Alt.Name, f.Money(best.PW))
		return b.String()
	}
	rec := result(c, c.Recommended)
	word := measureWord(c)
	val := rec.PW
	if word == "annual worth" {
		val = rec.AW
	}
	if c.CostOnly {
		cost := "present cost"
		if word == "annual worth" {
			cost = "equivalent annual cost"
		}
		fmt.Fprintf(&b, "Choose %s, the least-cost alternative: its %s is %s at %s", rec.Alt.Name, cost, f.Money(-val), rate)
	} else {
		fmt.Fprintf(&b, "Choose %s: its %s is %s at %s", rec.Alt.Name, word, f.Money(val), rate)
	}
	switch {
	case c.Tie && c.RunnerUp != "":
		fmt.Fprintf(&b, ", tied within one currency unit with %s; %s is named because it has the lower first cost.", name(c, c.RunnerUp), rec.Alt.Name)
	case c.RunnerUp == compute.DoNothing:
		fmt.Fprintf(&b, ", %s better than doing nothing.", f.Money(c.Margin))
	case c.RunnerUp != "":
		if c.CostOnly {
			fmt.Fprintf(&b, ", %s less than %s.", f.Money(c.Margin), name(c, c.RunnerUp))
		} else {
			fmt.Fprintf(&b, ", %s more than %s.", f.Money(c.Margin), name(c, c.RunnerUp))
		}
	default:
		b.WriteString(".")
	}
	switch c.DecideBy {
	case "incremental rate of return":
		fmt.Fprintf(&b, " Each increment of investment, in order of first cost, was kept only where it earns at least %s; the result agrees with present worth.", rate)
	case "benefit-cost":
		b.WriteString(" Each increment of investment, in order of first cost, was kept only where its benefit-cost ratio is at least 1; the result agrees with present worth.")
	}
	return b.String()
}

// Warnings collects a comparison's warnings and its alternatives'.
func Warnings(c *compute.Comparison) []string {
	out := append([]string(nil), c.Warnings...)
	for _, r := range c.Results {
		out = append(out, r.Warnings...)
	}
	return out
}

// MeasureRow is one row of a results table: a label and a cell for each
// alternative.
type MeasureRow struct {
	Label string
	Cells []string
}

// ResultsTable lays out the measures a comparison shows, one row a measure,
// one column an alternative. In a cost-only comparison worths are shown as
// costs (positive), labelled so.
func (f Format) ResultsTable(c *compute.Comparison) (header []string, rows []MeasureRow) {
	header = []string{"Measure"}
	for _, r := range c.Results {
		header = append(header, r.Alt.Name)
	}
	opt := func(p *float64, g func(float64) string) string {
		if p == nil {
			return "n/a"
		}
		return g(*p)
	}
	cost := c.CostOnly
	for _, m := range c.Show {
		row := MeasureRow{}
		for _, r := range c.Results {
			var cell string
			switch m {
			case "present worth":
				row.Label = "Present worth"
				if c.Horizon.Perpetual() {
					row.Label = "Capitalized worth"
				}
				cell = f.Money(r.PW)
				if cost {
					row.Label = "Present cost"
					if c.Horizon.Perpetual() {
						row.Label = "Capitalized cost"
					}
					cell = f.Money(-r.PW)
				}
			case "annual worth":
				row.Label = "Annual worth"
				cell = f.Money(r.AW)
				if cost {
					row.Label = "Equivalent annual cost"
					cell = f.Money(-r.AW)
				}
			case "future worth":
				row.Label = "Future worth"
				if cost {
					row.Label = "Future cost"
					cell = opt(r.FW, func(x float64) string { return f.Money(-x) })
				} else {
					cell = opt(r.FW, f.Money)
				}
			case "irr":
				row.Label = "Rate of return"
				cell = opt(r.IRR, f.Percent)
				if r.IRR == nil && len(r.IRRRoots) > 1 {
					cell = "several"
				}
			case "benefit-cost":
				row.Label = "Benefit-cost ratio"
				cell = opt(r.BC, f.Ratio)
			case "modified benefit-cost":
				row.Label = "Modified benefit-cost ratio"
				cell = opt(r.ModifiedBC, f.Ratio)
			case "payback":
				row.Label = "Payback"
				cell = opt(r.Payback, f.Years)
			case "discounted payback":
				row.Label = "Discounted payback"
				cell = opt(r.DiscPayback, f.Years)
			case "net savings":
				row.Label = "Net savings over " + name(c, c.Base)
				cell = opt(r.NetSavings, f.Money)
			case "sir":
				row.Label = "Savings-to-investment ratio"
				cell = opt(r.SIR, f.Ratio)
			case "airr":
				row.Label = "Adjusted internal rate of return"
				cell = opt(r.AIRR, f.Percent)
			}
			row.Cells = append(row.Cells, cell)
		}
		rows = append(rows, row)
	}
	return header, rows
}

// StepText describes one step of an incremental analysis.
func (f Format) StepText(c *compute.Comparison, s *compute.Step) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%s against %s: ", name(c, s.Challenger), name(c, s.Defender))
	switch c.DecideBy {
	case "benefit-cost":
		if s.DeltaBC != nil {
			fmt.Fprintf(&b, "ΔB/ΔC = %s / %s = %s", f.Money(s.DeltaBenefits), f.Money(s.DeltaCosts), f.Ratio(*s.DeltaBC))
		} else {
			fmt.Fprintf(&b, "ΔB = %s, ΔC = %s", f.Money(s.DeltaBenefits), f.Money(s.DeltaCosts))
		}
	default:
		if s.DeltaIRR != nil {
			fmt.Fprintf(&b, "incremental rate of return %s", f.Percent(*s.DeltaIRR))
		} else {
			b.WriteString("no single incremental rate of return")
		}
	}
	fmt.Fprintf(&b, ", ΔPW = %s", f.Money(s.DeltaPW))
	if s.Accepted {
		fmt.Fprintf(&b, "; %s is kept", name(c, s.Challenger))
	} else {
		fmt.Fprintf(&b, "; %s stays", name(c, s.Defender))
	}
	if s.Note != "" {
		fmt.Fprintf(&b, " (%s)", s.Note)
	}
	return b.String() + "."
}
