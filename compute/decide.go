package compute

import (
	"fmt"
	"math"
	"sort"
)

// decide ranks the alternatives and makes the recommendation by the
// comparison's rule. Present worth and annual worth pick the highest; the
// incremental methods compare in order of first cost, challenger against
// defender, and by construction agree with present worth. Where every
// alternative earns benefits and none has a positive present worth, the
// recommendation is to do nothing.
func decide(c *Comparison) {
	rs := append([]*Result(nil), c.Results...)
	sort.SliceStable(rs, func(a, b int) bool { return rs[a].PW > rs[b].PW })
	for _, r := range rs {
		c.Ranking = append(c.Ranking, r.Alt.ID)
	}
	allBenefits := true
	for _, r := range c.Results {
		allBenefits = allBenefits && r.Alt.HasBenefits
	}
	measure := func(r *Result) float64 { return r.PW }
	if c.DecideBy == "annual worth" {
		measure = func(r *Result) float64 { return r.AW }
	}
	switch c.DecideBy {
	case "incremental rate of return", "benefit-cost":
		incremental(c, allBenefits)
	default:
		best := rs[0]
		// Ties: the lowest first cost among those within a unit of the best.
		for _, r := range rs[1:] {
			if measure(best)-measure(r) < tieTolerance {
				c.Tie = true
				if r.Alt.FirstCost < best.Alt.FirstCost {
					best = r
				}
			}
		}
		c.Recommended = best.Alt.ID
		if allBenefits && best.PW <= 0 {
			c.Recommended = DoNothing
		}
	}
	// Runner-up and margin by the decision's measure (present worth for the
	// incremental methods, which must agree with it).
	if c.Recommended == DoNothing {
		c.RunnerUp = rs[0].Alt.ID
		c.Margin = -measure(rs[0])
		c.Tie = math.Abs(measure(rs[0])) < tieTolerance
		return
	}
	var rec *Result
	for _, r := range c.Results {
		if r.Alt.ID == c.Recommended {
			rec = r
		}
	}
	for _, r := range rs {
		if r != rec {
			c.RunnerUp = r.Alt.ID
			c.Margin = measure(rec) - measure(r)
			break
		}
	}
	if c.RunnerUp == "" && allBenefits {
		c.RunnerUp = DoNothing
		c.Margin = measure(rec)
	}
}

// incremental runs the challenger-against-defender analysis in order of
// first cost. The defender starts as doing nothing when every alternative
// earns benefits, else as the alternative with the lowest first cost. A
// challenger replaces the defender when its increment pays at the rate: the
// incremental rate of return is at least the rate (incremental rate of
// return), or the incremental benefit-cost ratio is at least 1
// (benefit-cost); both are decided on the increment's present worth, which
// is what the rate and ratio test when the increment is an investment.
func incremental(c *Comparison, allBenefits bool) {
	order := append([]*Result(nil), c.Results...)
	sort.SliceStable(order, func(a, b int) bool { return order[a].Alt.FirstCost < order[b].Alt.FirstCost })
	var def *Result
	if !allBenefits {
		def, order = order[0], order[1:]
	}
	for _, ch := range order {
		s := &Step{Challenger: ch.Alt.ID, Defender: DoNothing}
		var defPW float64
		var defCat [numCategories]float64
		if def != nil {
			s.Defender = def.Alt.ID
			defPW = def.PW
			defCat = def.ByCategory
		}
		s.DeltaPW = ch.PW - defPW
		// Incremental rate of return.
		if c.Horizon.Perpetual() {
			a := ch.Alt
			var b func(float64) float64
			if def != nil {
				d := def.Alt
				b = d.perpetualPW
			}
			s.DeltaRoots = RatesOfReturn(func(x float64) float64 {
				v := a.perpetualPW(x)
				if b != nil {
					v -= b(x)
				}
				return v
			}, 0, 10)
		} else {
			delta := netFlows(ch.Flows)
			if def != nil {
				for t, y := range def.Flows {
					delta[t] -= y.Net
				}
			}
			if SignChanges(delta) > 0 {
				s.DeltaRoots = FlowRates(delta)
			}
		}
		if len(s.DeltaRoots) == 1 {
			v := s.DeltaRoots[0]
			s.DeltaIRR = &v
		}
		// Incremental benefit-cost.
		s.DeltaBenefits = (ch.ByCategory[Benefits] - ch.ByCategory[Disbenefits]) - (defCat[Benefits] - defCat[Disbenefits])
		s.DeltaCosts = (ch.ByCategory[Investment] + ch.ByCategory[Operating] - ch.ByCategory[Recovery]) - (defCat[Investment] + defCat[Operating] - defCat[Recovery])
		if s.DeltaCosts > 0 {
			v := s.DeltaBenefits / s.DeltaCosts
			s.DeltaBC = &v
		}
		s.Accepted = s.DeltaPW >= 0
		switch {
		case c.DecideBy == "benefit-cost" && s.DeltaCosts <= 0 && s.DeltaBenefits >= 0:
			s.Note = "the challenger costs no more and yields no less: accepted"
		case c.DecideBy == "benefit-cost" && s.DeltaCosts <= 0:
			s.Note = "the challenger costs less but yields less"
		case c.DecideBy == "incremental rate of return" && len(s.DeltaRoots) > 1:
			s.Note = fmt.Sprintf("the increment has %d rates of return (%s); decided on its present worth", len(s.DeltaRoots), pctList(s.DeltaRoots))
		case c.DecideBy == "incremental rate of return" && len(s.DeltaRoots) == 0:
			s.Note = "the increment has no rate of return; decided on its present worth"
		}
		if math.Abs(s.DeltaPW) < tieTolerance {
			c.Tie = true
			s.Accepted = false
			if s.Note == "" {
				s.Note = "the increment is worth nothing at the rate; the defender, with the lower first cost, stays"
			}
		}
		c.Steps = append(c.Steps, s)
		if s.Accepted {
			def = ch
		}
	}
	if def == nil {
		c.Recommended = DoNothing
	} else {
		c.Recommended = def.Alt.ID
	}
}
