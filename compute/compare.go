package compute

import (
	"fmt"
	"math"
	"sort"
	"strings"

	"worth/expr"
	"worth/parse"
)

// DoNothing is the id of the choice of doing nothing.
const DoNothing = "do-nothing"

// MaxRepeatYears is the longest least common multiple of lives that
// "repeat lives" accepts; beyond it a study period is the honest choice.
const MaxRepeatYears = 1000

// MaxStudyYears bounds a study period.
const MaxStudyYears = 10000

// tieTolerance: present or annual worths closer than one currency unit are
// a tie.
const tieTolerance = 1.0

// comparison evaluates one compare block.
func (e *env) comparison(src *parse.Compare, alts []*Alternative, byID map[string]*Alternative, front *Rate, inflation *Rate, failed map[string]bool) *Comparison {
	c := &Comparison{ID: src.ID, Line: src.Pos.Line, Source: src, DecideBy: "present worth", Basis: "before tax"}
	ok := true
	// Alternatives.
	var members []*Alternative
	if src.Alternatives == nil {
		members = alts
		if len(members) == 0 && len(failed) == 0 {
			e.errs.Add(src.Pos, "compare %s has no alternatives to compare; add an alternative block", src.ID)
			return nil
		}
	} else {
		seen := map[string]bool{}
		for _, r := range src.Alternatives {
			if seen[r.ID] {
				e.errs.Add(r.Pos, "%s is listed twice", r.ID)
				ok = false
				continue
			}
			seen[r.ID] = true
			a, found := byID[r.ID]
			switch {
			case found:
				members = append(members, a)
			case failed[r.ID]:
				ok = false // its own error is reported already
			default:
				ids := make([]string, 0, len(byID))
				for id := range byID {
					ids = append(ids, id)
				}
				sort.Strings(ids)
				msg := fmt.Sprintf("unknown alternative %q", r.ID)
				if s := expr.Closest(r.ID, ids); s != "" {
					msg += fmt.Sprintf("; did you mean %q?", s)
				}
				e.errs.Add(r.Pos, "%s", msg)
				ok = false
			}
		}
	}
	// Rate.
	switch {
	case e.overrides != nil && e.overrides.Rate != nil:
		v := *e.overrides.Rate
		c.Rate = Rate{Text: pct(v), Stated: v, Effective: v}
	case src.Rate != nil:
		r, good := e.rate(src.Rate, "rate", inflation)
		if !good {
			ok = false
		} else {
			c.Rate = *r
		}
	case front != nil:
		c.Rate = *front
	case e.frontRateFailed:
		ok = false // the front matter's rate is reported already
	default:
		e.errs.Add(src.Pos, "compare %s has no interest rate; give \"rate: 7%%\" in the front matter or in the block", src.ID)
		ok = false
	}
	if src.Rate != nil {
		c.Rate = e.moneyRate(c.Rate) // the front matter's is converted already
	}
	if src.DecideBy.Value.Src != "" {
		c.DecideBy = src.DecideBy.Value.Src
	}
	if src.Basis.Value.Src != "" {
		c.Basis = src.Basis.Value.Src
		if c.Basis == "after tax" && !e.afterTaxReady(src) {
			ok = false
		}
	}
	if src.Base != nil {
		if _, found := byID[src.Base.ID]; !found && !failed[src.Base.ID] {
			e.errs.Add(src.Base.Pos, "base %q is not an alternative of this memo", src.Base.ID)
			ok = false
		} else if !inList(members, src.Base.ID) && hasAlt(byID, src.Base.ID) {
			e.errs.Add(src.Base.Pos, "base %q is not among the alternatives of compare %s", src.Base.ID, src.ID)
			ok = false
		}
		c.Base = src.Base.ID
	}
	// Horizon.
	hz, good := e.horizon(src, members)
	ok = ok && good
	c.Horizon = hz
	if !ok || len(members) == 0 {
		return nil
	}
	i := c.Rate.Effective
	if hz.Perpetual() {
		if i <= 0 {
			e.errs.Add(rateOrFencePos(src), "a perpetual horizon needs a positive rate; present worth forever does not converge at %s", pct(i))
			return nil
		}
		for _, a := range members {
			if a.Life > 0 {
				continue
			}
			for _, it := range a.Items {
				if it.Kind == parse.Annual && it.HasEscalation && it.lastYear(0) < 0 && it.Escalation >= i {
					e.errs.Add(escalationPos(a, it), "%s escalates at %s forever, at or above the rate of %s, so its present worth on a perpetual horizon has no finite value; give the series an end (\"to year N\"), a life, or a study period", it.Label, pct(it.Escalation), pct(i))
					ok = false
				}
			}
		}
		if !ok {
			return nil
		}
	}
	if !e.checkWork(src, members, hz) {
		return nil // past a limit (limits.go)
	}
	c.Show = showList(src, members, hz, c.Base != "")
	for _, a := range members {
		c.Results = append(c.Results, e.evaluateOn(c, a, i, hz))
	}
	c.CostOnly = true
	for _, a := range members {
		if a.HasBenefits {
			c.CostOnly = false
		}
	}
	if c.Base != "" {
		savings(c)
	}
	decide(c)
	if !e.checkFinite(c, src) {
		return nil // an overflow (limits.go)
	}
	return c
}

func hasAlt(m map[string]*Alternative, id string) bool { _, ok := m[id]; return ok }

func inList(as []*Alternative, id string) bool {
	for _, a := range as {
		if a.ID == id {
			return true
		}
	}
	return false
}

func rateOrFencePos(src *parse.Compare) parse.Pos {
	if src.Rate != nil {
		return src.Rate.Text.Pos
	}
	if src.Horizon != nil {
		return src.Horizon.Pos
	}
	return src.Pos
}

func escalationPos(a *Alternative, it *Item) parse.Pos {
	for _, l := range a.Source.Lines {
		if l.Line == it.Line && l.Escalating != nil {
			return l.Escalating.Pos
		}
	}
	return parse.Pos{File: a.Source.Pos.File, Line: it.Line, Col: 1}
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	return a
}

// horizon works out a comparison's horizon: the one named, or repeat lives
// when every alternative has a life, else perpetual.
func (e *env) horizon(src *parse.Compare, members []*Alternative) (Horizon, bool) {
	kind := ""
	pos := src.Pos
	if src.Horizon != nil {
		kind, pos = src.Horizon.Kind, src.Horizon.Pos
	}
	h := Horizon{Kind: kind}
	if kind == "" {
		h.Default = true
		h.Kind = "repeat lives"
		for _, a := range members {
			if a.Life == 0 {
				h.Kind = "perpetual"
			}
		}
	}
	switch h.Kind {
	case "study period":
		n, ok := e.year(*src.Horizon.Years, "the study period", 1)
		if !ok {
			return h, false
		}
		if n > MaxStudyYears {
			e.errs.Add(src.Horizon.Years.Pos, "a study period of %d years is longer than the %d this tool accepts; use \"horizon: perpetual\" for services that go on forever", n, MaxStudyYears)
			return h, false
		}
		h.Years = n
	case "repeat lives":
		l := 1
		for _, a := range members {
			if a.Life == 0 {
				e.errs.Add(pos, "repeat lives needs a life for every alternative, and %s has none (line %d); use \"horizon: perpetual\" or \"horizon: study period N\"", a.ID, a.Line)
				return h, false
			}
			l = l / gcd(l, a.Life) * a.Life
			if l > MaxRepeatYears {
				e.errs.Add(pos, "the lives of the alternatives repeat together only after more than %d years; name a study period instead (\"horizon: study period N\")", MaxRepeatYears)
				return h, false
			}
		}
		h.Years = l
	}
	return h, true
}

// showList is the measures to show: the ones asked for, or present and
// annual worth, future worth on a finite horizon, and the rate of return,
// benefit-cost ratio and payback when any alternative has benefits.
func showList(src *parse.Compare, members []*Alternative, hz Horizon, base bool) []string {
	if len(src.Show) > 0 {
		var out []string
		for _, f := range src.Show {
			out = append(out, f.Value.Src)
		}
		return out
	}
	out := []string{"present worth", "annual worth"}
	if !hz.Perpetual() {
		out = append(out, "future worth")
	}
	benefits := false
	for _, a := range members {
		benefits = benefits || a.HasBenefits
	}
	if benefits {
		out = append(out, "irr", "benefit-cost", "payback")
	}
	if base {
		out = append(out, "net savings", "sir")
		if !hz.Perpetual() {
			out = append(out, "airr")
		}
	}
	return out
}

// evaluate computes every measure of one alternative over a horizon at
// rate i.
func evaluate(a *Alternative, i float64, hz Horizon) *Result {
	r := &Result{Alt: a}
	if hz.Perpetual() {
		evalPerpetual(r, a, i)
	} else {
		evalFinite(r, a, i, hz.Years)
	}
	// Ratios from the category present worths.
	b, d := r.ByCategory[Benefits], r.ByCategory[Disbenefits]
	inv, op, rec := r.ByCategory[Investment], r.ByCategory[Operating], r.ByCategory[Recovery]
	if a.HasBenefits || d > 0 {
		if den := inv + op - rec; den > 0 {
			v := (b - d) / den
			r.BC = &v
		}
		if den := inv - rec; den > 0 {
			v := (b - d - op) / den
			r.ModifiedBC = &v
		}
	}
	return r
}

func evalFinite(r *Result, a *Alternative, i float64, n int) {
	r.Flows = a.Flows(n, true)
	discount(r.Flows, i)
	net := netFlows(r.Flows)
	r.PW = NPV(i, net)
	N := float64(n)
	r.AW = r.PW * AP(i, N)
	fw := r.PW * FP(i, N)
	r.FW = &fw
	for c := Category(0); c < numCategories; c++ {
		s := 0.0
		for _, y := range r.Flows {
			s += y.ByCategory[c] * PF(i, float64(y.Year))
		}
		r.ByCategory[c] = s
	}
	r.Work = finiteWork(a, i, n, r.PW)
	// Over whole repeated cycles the horizon's present worth is one cycle's
	// times sum_j (1+r)^(-jL) > 0, so it has the cycle's rates of return;
	// searching the one cycle's flows is the same and far shorter.
	var cycle []float64
	if a.Life > 0 && n > a.Life && n%a.Life == 0 {
		cycle = netFlows(a.Flows(a.Life, false))
	}
	rateOfReturn(r, net, cycle, nil)
	if a.HasBenefits {
		r.Payback, r.DiscPayback = payback(r.Flows, i)
	}
}

func evalPerpetual(r *Result, a *Alternative, i float64) {
	cycle := a.cycleTerms(i, -1)
	pw1 := sumTerms(cycle)
	scale := 1.0
	if a.Life > 0 {
		scale = AP(i, float64(a.Life)) / i
		aw := pw1 * AP(i, float64(a.Life))
		r.Work = []*Equation{
			{LHS: "PW₁", Label: fmt.Sprintf("present worth of one life cycle (years 0 to %d)", a.Life), Terms: cycle, Value: pw1},
			{LHS: "AW", Label: "the same cycle as an equal annual amount, repeated forever", Terms: []Term{symbolTerm("PW₁", pw1, factor("A/P", i, 0, float64(a.Life)))}, Value: aw},
			{LHS: "PW", Label: "capitalized worth: the annual amount forever", Terms: []Term{symbolTerm("AW", aw, factor("P/A", i, 0, math.Inf(1)))}, Value: aw / i},
		}
		r.PW = aw / i
		r.AW = aw
	} else {
		r.PW = pw1
		r.AW = pw1 * i
		r.Work = []*Equation{
			{LHS: "PW", Label: "capitalized worth of the flows as written, forever", Terms: cycle, Value: pw1},
			{LHS: "AW", Label: "equal annual amount forever", Terms: []Term{symbolTerm("PW", pw1, factor("A/P", i, 0, math.Inf(1)))}, Value: r.AW},
		}
	}
	for _, t := range cycle {
		// Fix (tests): the category's amount is the term's value times the
		// category's sign, not its absolute value, so that a negative
		// gradient term reduces its category instead of adding to it.
		r.ByCategory[t.Cat] += t.Cat.sign() * t.Value * scale
	}
	// Year-by-year: the first cycle, or the first years of a service with
	// no life; payback over up to 1,000 years of repeated cycles.
	show := a.Life
	if show == 0 {
		show = displayYears(a)
		r.FlowsNote = fmt.Sprintf("the first %d years; the flows go on forever as written", show)
	} else {
		r.FlowsNote = fmt.Sprintf("one life cycle of %d years; on the perpetual horizon it repeats forever", a.Life)
	}
	r.Flows = a.Flows(show, false)
	discount(r.Flows, i)
	signs := a.Flows(2*show, false)
	// With a life, the capitalized worth PW₁(x) (A/P, x, L) / x has the
	// roots of one cycle's present worth PW₁(x), since (A/P, x, L) / x > 0
	// for x > 0: the cycle's flows (r.Flows) are searched above zero.
	var cycleFlows []float64
	if a.Life > 0 {
		cycleFlows = netFlows(r.Flows)
	}
	rateOfReturn(r, netFlows(signs), cycleFlows, a.perpetualPW)
	if a.HasBenefits {
		// Payback only means something where benefits pay back a cost.
		long := a.Flows(MaxRepeatYears, false)
		discount(long, i)
		r.Payback, r.DiscPayback = payback(long, i)
	}
}

// displayYears is how many years of a service with no life to tabulate:
// enough to show every one-time and periodic amount at least twice.
func displayYears(a *Alternative) int {
	n := 30
	for _, it := range a.Items {
		for _, y := range []int{it.At + 1, it.From + 2*it.Every, it.To + 1} {
			if y > n {
				n = y
			}
		}
	}
	if n > 200 {
		n = 200
	}
	return n
}

func symbolTerm(sym string, v float64, f Factor) Term {
	return Term{Symbol: sym, Coef: v, Factors: []Factor{f}, Value: v * f.Value}
}

// finiteWork is the worked solution over a finite horizon of n years.
func finiteWork(a *Alternative, i float64, n int, pw float64) []*Equation {
	var eqs []*Equation
	N := float64(n)
	if a.Life == 0 {
		terms := a.cycleTerms(i, n)
		eqs = append(eqs, &Equation{LHS: "PW", Label: fmt.Sprintf("present worth of the flows over years 0 to %d", n), Terms: terms, Value: sumTerms(terms)})
	} else {
		L := a.Life
		full, rem := n/L, n%L
		switch {
		case full == 1 && rem == 0:
			terms := a.cycleTerms(i, -1)
			eqs = append(eqs, &Equation{LHS: "PW", Label: fmt.Sprintf("present worth of one life cycle (years 0 to %d)", L), Terms: terms, Value: sumTerms(terms)})
		case full == 0:
			terms := a.cycleTerms(i, rem)
			eqs = append(eqs, &Equation{LHS: "PW", Label: fmt.Sprintf("present worth of years 0 to %d, the life cut by the study period and ended with its residual value", n), Terms: terms, Value: sumTerms(terms)})
		default:
			c1 := a.cycleTerms(i, -1)
			pw1 := sumTerms(c1)
			eqs = append(eqs, &Equation{LHS: "PW₁", Label: fmt.Sprintf("present worth of one life cycle (years 0 to %d)", L), Terms: c1, Value: pw1})
			aw1 := pw1 * AP(i, float64(L))
			eqs = append(eqs, &Equation{LHS: "AW₁", Label: "the cycle as an equal annual amount", Terms: []Term{symbolTerm("PW₁", pw1, factor("A/P", i, 0, float64(L)))}, Value: aw1})
			final := []Term{symbolTerm("AW₁", aw1, factor("P/A", i, 0, float64(full*L)))}
			label := fmt.Sprintf("%d cycles of %d years", full, L)
			if full == 1 {
				label = fmt.Sprintf("one cycle of %d years", L)
			}
			if rem > 0 {
				c2 := a.cycleTerms(i, rem)
				pw2 := sumTerms(c2)
				eqs = append(eqs, &Equation{LHS: "PW₂", Label: fmt.Sprintf("the last cycle, from year %d cut at year %d (age %d) and ended with its residual value, valued at its start", full*L, n, rem), Terms: c2, Value: pw2})
				final = append(final, symbolTerm("PW₂", pw2, factor("P/F", i, 0, float64(full*L))))
				label += fmt.Sprintf(", then a cycle cut at year %d", n)
			}
			eqs = append(eqs, &Equation{LHS: "PW", Label: label, Terms: final, Value: sumTerms(final)})
		}
	}
	eqs = append(eqs,
		&Equation{LHS: "AW", Label: fmt.Sprintf("equal annual amount over %d years", n), Terms: []Term{symbolTerm("PW", pw, factor("A/P", i, 0, N))}, Value: pw * AP(i, N)},
		&Equation{LHS: "FW", Label: fmt.Sprintf("worth at year %d", n), Terms: []Term{symbolTerm("PW", pw, factor("F/P", i, 0, N))}, Value: pw * FP(i, N)},
	)
	return eqs
}

// rateOfReturn finds every rate of return. Over a finite horizon it is the
// rate that zeroes the net flows' present worth; on a perpetual horizon
// f gives the capitalized worth at a rate.
//
// cycle, when not nil, holds flows with the same rates as net (one of the
// repeated cycles that make up the horizon), searched instead of net.
func rateOfReturn(r *Result, net, cycle []float64, f func(float64) float64) {
	r.SignChanges = SignChanges(net)
	if r.SignChanges == 0 || !r.Alt.HasBenefits {
		// A cost-only alternative (salvage aside) earns no rate of return.
		return
	}
	switch {
	case f != nil && cycle != nil:
		// A perpetual horizon: the cycle's rates above zero.
		r.IRRRoots = FlowRatesIn(cycle, 0, FlowRateHigh)
	case f == nil && cycle != nil:
		r.IRRRoots = FlowRates(cycle)
	case f == nil:
		r.IRRRoots = FlowRates(net)
	default:
		r.IRRRoots = RatesOfReturn(f, 0, 10)
	}
	if len(r.IRRRoots) == 1 {
		v := r.IRRRoots[0]
		r.IRR = &v
	}
	name := r.Alt.Name
	switch {
	case r.SignChanges > 1 && len(r.IRRRoots) > 1:
		r.Warnings = append(r.Warnings, fmt.Sprintf("The net cash flows of %s change sign %d times and have %d rates of return (%s); no single rate describes them, so judge it by present worth.", name, r.SignChanges, len(r.IRRRoots), pctList(r.IRRRoots)))
	case r.SignChanges > 1 && len(r.IRRRoots) == 1:
		r.Warnings = append(r.Warnings, fmt.Sprintf("The net cash flows of %s change sign %d times; only one rate of return (%s) was found between -99%% and 1000%%.", name, r.SignChanges, pct(r.IRRRoots[0])))
	case len(r.IRRRoots) == 0:
		r.Warnings = append(r.Warnings, fmt.Sprintf("%s has no rate of return between -99%% and 1000%%.", name))
	}
}

func pctList(xs []float64) string {
	s := make([]string, len(xs))
	for i, x := range xs {
		s[i] = pct(x)
	}
	return strings.Join(s, ", ")
}

// payback is the first time the cumulative net flow, undiscounted and
// discounted, reaches zero, interpolated linearly within the year; nil when
// it never does or there is nothing to pay back.
func payback(ys []YearFlow, i float64) (*float64, *float64) {
	find := func(cum func(YearFlow) float64, flow func(YearFlow) float64) *float64 {
		if len(ys) == 0 || cum(ys[0]) >= 0 {
			return nil
		}
		for t := 1; t < len(ys); t++ {
			if c := cum(ys[t]); c >= 0 {
				prev := cum(ys[t-1])
				v := float64(ys[t-1].Year) + (-prev)/flow(ys[t])
				return &v
			}
		}
		return nil
	}
	p := find(func(y YearFlow) float64 { return y.Cumulative }, func(y YearFlow) float64 { return y.Net })
	d := find(func(y YearFlow) float64 { return y.CumDiscounted }, func(y YearFlow) float64 { return y.Discounted })
	return p, d
}

// savings fills net savings, the savings-to-investment ratio and the
// adjusted internal rate of return of each alternative against the base.
// Investment-related worth is first costs less salvage and residual value;
// savings are the change in everything else (other costs, benefits and
// disbenefits). AIRR = (1 + i) SIR^(1/N) - 1.
func savings(c *Comparison) {
	var base *Result
	for _, r := range c.Results {
		if r.Alt.ID == c.Base {
			base = r
		}
	}
	inv := func(r *Result) float64 { return r.ByCategory[Investment] - r.ByCategory[Recovery] }
	ops := func(r *Result) float64 {
		return r.ByCategory[Benefits] - r.ByCategory[Disbenefits] - r.ByCategory[Operating]
	}
	for _, r := range c.Results {
		ns := r.PW - base.PW
		r.NetSavings = &ns
		if r == base {
			continue
		}
		dI := inv(r) - inv(base)
		s := ops(r) - ops(base)
		if dI > 0 {
			sir := s / dI
			r.SIR = &sir
			if !c.Horizon.Perpetual() && sir > 0 {
				airr := (1+c.Rate.Effective)*math.Pow(sir, 1/float64(c.Horizon.Years)) - 1
				r.AIRR = &airr
			}
		}
	}
}
