package compute

import (
	"fmt"
	"math"
	"strings"

	"worth/parse"
)

// Bounds that keep a hostile or runaway memo from eating the machine, and
// the guards that keep every figure of a report finite (see README.md,
// "Limits").

// MaxYear bounds every year written in a memo (a life, a year of a line, a
// study period before its own bound).
const MaxYear = 100000

// maxYearNotes bounds the labels listed for one year of a schedule. Fix
// (hostile input): an alternative with thousands of one-time lines over a
// long study period listed every label in every year, and a 40 KB memo
// grew a 1.3 GB HTML report; past this many labels a year reads "and other
// amounts".
const maxYearNotes = 12

// moreNotes ends a year's list of labels that was cut at maxYearNotes.
const moreNotes = "and other amounts"

// addNote appends label to a year's notes, at most maxYearNotes of them.
func addNote(notes []string, label string) []string {
	switch {
	case len(notes) < maxYearNotes:
		return append(notes, label)
	case len(notes) == maxYearNotes:
		return append(notes, moreNotes)
	}
	return notes
}

// finite reports whether x is neither NaN nor infinite.
func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// checkWork reports a comparison whose year-by-year schedules (every
// comparison of the memo together) or whose work would pass the memo's
// limits (parse.Limits: schedule-years, line-years), before any of it is
// done.
func (e *env) checkWork(src *parse.Compare, members []*Alternative, hz Horizon) bool {
	lim := e.limits.WithDefaults()
	pos := src.Pos
	if src.Horizon != nil {
		pos = src.Horizon.Pos
	}
	rows, work := 0, 0
	for _, a := range members {
		n := hz.Years + 1
		w := n
		if hz.Perpetual() {
			// The first cycle (or the first years of a service with no
			// life) is tabulated; twice it, and 1,000 years for payback,
			// are worked through.
			n = a.Life + 1
			if a.Life == 0 {
				n = displayYears(a) + 1
			}
			w = max(2*n, MaxRepeatYears+1)
		}
		rows += n
		work += w * max(len(a.Items), 1)
	}
	e.scheduleYears += rows
	if e.scheduleYears > lim.ScheduleYears {
		e.errs.Add(pos, "the year-by-year schedules of this memo would have %s rows (alternatives × years, every comparison so far), more than the %s worth makes for one memo %s; use a shorter study period or compare fewer alternatives",
			parse.Thousands(e.scheduleYears), parse.Thousands(lim.ScheduleYears), parse.LimitHint("schedule-years", lim.ScheduleYears))
		return false
	}
	if work > lim.LineYears {
		e.errs.Add(pos, "compare %s would work through %s money lines × years, more than the %s worth does for one comparison %s; use a shorter study period or add up amounts of the same year",
			src.ID, parse.Thousands(work), parse.Thousands(lim.LineYears), parse.LimitHint("line-years", lim.LineYears))
		return false
	}
	return true
}

// checkFinite keeps every figure of a comparison finite. A present or
// annual worth that overflows (a negative rate over thousands of years:
// (P/F, -10%, 10000) = 0.9^-10000 is past 10^308) is an error at the
// horizon; a measure that overflows on its own (the future worth of a
// long study period at a high rate: (F/P, 1000%, 10000) = 11^10000) is
// dropped (null in JSON, "n/a" in the reports) with a warning that says
// why. It returns false after reporting an error.
func (e *env) checkFinite(c *Comparison, src *parse.Compare) bool {
	ok := true
	for _, r := range c.Results {
		bad := !finite(r.PW) || !finite(r.AW)
		for _, v := range r.ByCategory {
			bad = bad || !finite(v)
		}
		if !bad {
			continue
		}
		if c.Rate.Effective >= 0 {
			// Discounting only shrinks amounts: the amounts themselves
			// grow past any number (an escalation of 1,000,000%).
			e.errs.Add(r.Alt.Source.Pos, "the present worth of %s over %s at %s is beyond the largest number worth can hold (about 1.8 × 10^308): its amounts grow too large; check its escalation, gradients and amounts",
				r.Alt.ID, horizonWords(c.Horizon), pct(c.Rate.Effective))
			ok = false
			continue
		}
		pos := rateOrFencePos(src)
		if src.Horizon != nil {
			pos = src.Horizon.Pos
		}
		e.errs.Add(pos, "the present worth of %s over %s at %s is beyond the largest number worth can hold (about 1.8 × 10^308), since (1 + i)^n overflows; use a shorter study period or a rate nearer zero",
			r.Alt.ID, horizonWords(c.Horizon), pct(c.Rate.Effective))
		ok = false
	}
	if !ok {
		return false
	}
	for _, r := range c.Results {
		var dropped []string
		drop := func(p **float64, what string) {
			if *p != nil && !finite(**p) {
				*p = nil
				dropped = append(dropped, what)
			}
		}
		drop(&r.FW, "future worth")
		drop(&r.IRR, "rate of return")
		drop(&r.BC, "benefit-cost ratio")
		drop(&r.ModifiedBC, "modified benefit-cost ratio")
		drop(&r.Payback, "payback")
		drop(&r.DiscPayback, "discounted payback")
		drop(&r.NetSavings, "net savings")
		drop(&r.SIR, "savings-to-investment ratio")
		drop(&r.AIRR, "adjusted internal rate of return")
		var roots []float64
		for _, x := range r.IRRRoots {
			if finite(x) {
				roots = append(roots, x)
			}
		}
		if len(roots) < len(r.IRRRoots) {
			r.IRRRoots = roots
		}
		// The worked solution loses the steps whose value overflows
		// (FW = PW (F/P, i, N)).
		work := r.Work[:0]
		for _, w := range r.Work {
			if finite(w.Value) {
				work = append(work, w)
			}
		}
		r.Work = work
		if len(dropped) > 0 {
			r.Warnings = append(r.Warnings, fmt.Sprintf("The %s of %s over %s at %s is beyond the largest number worth can hold (about 1.8 × 10^308), so it is not shown.",
				strings.Join(dropped, ", "), r.Alt.Name, horizonWords(c.Horizon), pct(c.Rate.Effective)))
		}
	}
	for _, s := range c.Steps {
		if s.DeltaIRR != nil && !finite(*s.DeltaIRR) {
			s.DeltaIRR = nil
		}
		if s.DeltaBC != nil && !finite(*s.DeltaBC) {
			s.DeltaBC = nil
		}
	}
	return true
}

// horizonWords names a horizon in a message: "10,000 years", "a perpetual
// horizon".
func horizonWords(h Horizon) string {
	if h.Perpetual() {
		return "a perpetual horizon"
	}
	return parse.Thousands(h.Years) + " years"
}

// checkRisk reports a risk block whose trials would keep more present
// worths, or evaluate more amounts, than the memo's limits allow
// (parse.Limits: risk-values, risk-work). quantities is the number of
// amounts (and coefficients) evaluated in each trial. Found by hostile
// input: 1,000,000 trials of 500 alternatives took 66 s and 6.8 GB.
func (e *env) checkRisk(src *parse.Risk, c *Comparison, quantities int) bool {
	lim := e.limits.WithDefaults()
	pos := src.Pos
	if src.TrialsPos.IsValid() {
		pos = src.TrialsPos
	}
	values := src.Trials * len(c.Results)
	if values > lim.RiskValues {
		e.errs.Add(pos, "risk %s would keep %s present worths (%s trials × %d alternatives), more than the %s worth keeps for one risk block %s; use fewer trials or compare fewer alternatives",
			src.ID, parse.Thousands(values), parse.Thousands(src.Trials), len(c.Results), parse.Thousands(lim.RiskValues), parse.LimitHint("risk-values", lim.RiskValues))
		return false
	}
	if work := src.Trials * max(quantities, 1); work > lim.RiskWork {
		e.errs.Add(pos, "risk %s would evaluate %s amounts (%s trials × %d amounts that depend on a draw), more than the %s worth evaluates for one risk block %s; use fewer trials",
			src.ID, parse.Thousands(work), parse.Thousands(src.Trials), quantities, parse.Thousands(lim.RiskWork), parse.LimitHint("risk-work", lim.RiskWork))
		return false
	}
	return true
}

// Recomputations a what-if block takes, about: a swing recomputes the memo
// at both ends; a range is swept at about 30 points and closed in on; a
// breakeven search steps out both ways and closes in with Brent's method.
const (
	recomputeSwing     = 2
	recomputeRange     = 50
	recomputeBreakeven = 100
)

// checkWhatIfs reports the first scenario or sensitivity block past which
// the memo's what-ifs would recompute its schedules more than the limit
// allows (parse.Limits: what-if-rows). Found by hostile input: 5,000
// scenarios of a 2,000-alternative memo would have taken 40 minutes.
func (e *env) checkWhatIfs(memo *parse.Memo) bool {
	lim := e.limits.WithDefaults()
	rows := max(e.scheduleYears, 1)
	total := 0
	for _, b := range memo.Blocks {
		n := 0
		switch x := b.(type) {
		case *parse.Scenario:
			n = 1
		case *parse.Sensitivity:
			for _, v := range x.Vary {
				n += recomputeSwing * len(v.Names)
			}
			n += recomputeRange*len(x.Ranges) + recomputeBreakeven*len(x.Breakevens)
		default:
			continue
		}
		total += n * rows
		if total > lim.WhatIfRows {
			h := b.Head()
			k := total / rows
			recomputations := "recomputations"
			if k == 1 {
				recomputations = "recomputation"
			}
			e.errs.Add(h.Pos, "the scenarios and sensitivities up to this %s block take about %s %s of the memo's %s schedule rows, more than the %s rows of what-ifs worth computes for one memo %s; use fewer what-ifs or compare fewer alternatives",
				h.Kind, parse.Thousands(k), recomputations, parse.Thousands(rows), parse.Thousands(lim.WhatIfRows), parse.LimitHint("what-if-rows", lim.WhatIfRows))
			return false
		}
	}
	return true
}
