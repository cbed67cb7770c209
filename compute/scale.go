package compute

import (
	"math"

	"worth/parse"
)

// Speed at scale (issue 7): evaluations that run thousands of times per
// alternative, done without building the worked equations.

// cycleValue is sumTerms(a.cycleTerms(i, -1)), the present worth at age 0
// of one whole life cycle (or, with no life, of the flows forever), without
// building the terms: the same factors multiplied in the same order and
// summed in the same order, so the value is the same to the last bit
// (TestCycleValueIsTermSum). perpetualPW calls it at every rate of a root
// search (an incremental rate of return on a perpetual horizon evaluates
// it about 8,000 times a step), where building the terms cost most of the
// time. A line form added to cycleTerms must be added here too.
func (a *Alternative) cycleValue(i float64) float64 {
	end := math.Inf(1)
	if a.Life > 0 {
		end = float64(a.Life)
	}
	// shifted is v (P/F, i, shift) where cycleTerms appends that factor.
	shifted := func(v float64, shift int) float64 {
		if shift > 0 {
			v = float64(v * PF(i, float64(shift)))
		}
		return v
	}
	// Each term is rounded on its own (the explicit conversions forbid a
	// fused multiply-add), as when it is stored in Term.Value.
	s := 0.0
	add := func(v float64) { s += v }
	for _, it := range a.Items {
		cat := it.category()
		coef := cat.sign() * it.Amount
		switch it.Kind {
		case parse.FirstCost:
			add(coef)
		case parse.Once:
			if float64(it.At) <= end {
				add(shifted(coef, it.At))
			}
		case parse.Salvage:
			if a.Life > 0 {
				add(float64(coef * PF(i, float64(a.Life))))
			}
		case parse.Annual:
			last := math.Inf(1)
			if l := it.lastYear(a.Life); l >= 0 {
				last = float64(l)
			}
			last = math.Min(last, end)
			if last < float64(it.From) {
				continue
			}
			m := last - float64(it.From) + 1
			switch {
			case it.HasEscalation:
				add(shifted(float64(coef*PGeo(it.Escalation, i, m)), it.From-1))
			default:
				add(shifted(float64(coef*PA(i, m)), it.From-1))
				if it.HasGradient && it.Gradient != 0 && m >= 2 {
					add(shifted(float64(float64(cat.sign()*it.Gradient)*PG(i, m)), it.From-1))
				}
			}
		case parse.Periodic:
			last := math.Inf(1)
			if l := it.lastYear(a.Life); l >= 0 {
				last = float64(l)
			}
			last = math.Min(last, end)
			if math.IsInf(last, 1) {
				v := float64(float64(coef*AF(i, float64(it.Every))) * PA(i, math.Inf(1)))
				switch {
				case it.From > it.Every:
					v *= PF(i, float64(it.From-it.Every))
				case it.From < it.Every:
					v *= FP(i, float64(it.Every-it.From))
				}
				add(v)
				continue
			}
			n, sum := 0, 0.0
			first := 0
			for t := it.From; float64(t) <= last; t += it.Every {
				if n == 0 {
					first = t
				}
				n++
				sum += PF(i, float64(t))
			}
			switch n {
			case 0:
			case 1:
				add(float64(coef * PF(i, float64(first))))
			default:
				add(float64(coef * sum))
			}
		}
	}
	return s
}

// CurvesOf is Curves for some of the comparison's alternatives, named by
// id, in that order: the chart's span of rates and the crossovers are
// those of these alternatives alone. The writers draw the leaders of a
// comparison of many alternatives this way, and the curves of the others,
// which no chart shows, are not computed.
func (c *Comparison) CurvesOf(ids []string) ([]Curve, []Crossover) {
	sub := *c
	sub.Results = nil
	for _, id := range ids {
		for _, r := range c.Results {
			if r.Alt.ID == id {
				sub.Results = append(sub.Results, r)
				break
			}
		}
	}
	return sub.Curves()
}
