package compute

import (
	"fmt"
	"sort"
	"strings"

	"worth/expr"
	"worth/parse"
)

// Compute evaluates a parsed memo. It returns the report and, when anything
// is wrong, a parse.ErrorList with every error found.
func Compute(memo *parse.Memo) (*Report, error) {
	return compute(memo, nil, Options{})
}

// ComputeWith is Compute with options (a progress callback for risk
// analyses); the results are the same.
func ComputeWith(memo *parse.Memo, opt Options) (*Report, error) {
	return compute(memo, nil, opt)
}

// Overrides replace named assumptions' values, and optionally the interest
// rate of every comparison, for a recomputation of a memo (a scenario, a
// sensitivity swing). Values holds final values: the expressions of the
// overridden assumptions are not evaluated, and every expression that uses
// them follows.
type Overrides struct {
	Values map[string]float64
	// Rate, when set, is the effective annual rate every comparison uses.
	Rate *float64
}

// Recompute evaluates the memo again with overrides: the base results
// (alternatives, comparisons, placements) only, without expectations,
// inline values or analysis blocks. It is what a scenario or a sensitivity
// swing needs; it returns an error when the overrides make the memo
// invalid (e.g. a rate at which a perpetual sum diverges).
func Recompute(memo *parse.Memo, ov Overrides) (*Report, error) {
	return compute(memo, &ov, Options{})
}

func compute(memo *parse.Memo, ov *Overrides, opt Options) (*Report, error) {
	var errs parse.ErrorList
	e := newEnv(memo.File, &errs)
	e.overrides = ov
	e.limits = memo.Limits
	rep := &Report{Memo: memo, Inline: map[int]Value{}, Places: map[*parse.Place]*Placement{}}
	fm := memo.Front
	rep.Title = fm.Title.Value.Src
	rep.Currency = currencies["USD"]
	if fm.Currency.Value.Src != "" {
		cur, ok := CurrencyOf(fm.Currency.Value.Src)
		if !ok {
			errs.Add(fm.Currency.Value.Pos, "currency %q is not an ISO 4217 code (three capital letters, e.g. USD, EUR, JPY)", fm.Currency.Value.Src)
		}
		rep.Currency = cur
	}
	rep.Assumptions = e.assumptions(memo)
	if fm.Inflation != nil {
		rep.Inflation, _ = e.rate(fm.Inflation, "inflation", nil)
	}
	if fm.Rate != nil {
		rep.Rate, _ = e.rate(fm.Rate, "rate", rep.Inflation)
		e.frontRateFailed = rep.Rate == nil
	}
	if fm.TaxRate != nil {
		if r, ok := e.rate(fm.TaxRate, "tax rate", nil); ok {
			if r.Effective < 0 || r.Effective >= 1 {
				errs.Add(fm.TaxRate.Text.Pos, "tax rate must be from 0%% to below 100%%, got %s", pct(r.Effective))
			}
			rep.TaxRate = r
		}
	}
	e.readTaxSettings(memo, rep)
	// Alternatives.
	byID := map[string]*Alternative{}
	failed := map[string]bool{}
	for _, b := range memo.Blocks {
		if src, ok := b.(*parse.Alternative); ok && src.ID != "" {
			a := e.alternative(src)
			if a == nil || !e.taxLines(a, src) {
				failed[src.ID] = true
				continue
			}
			if _, dup := byID[a.ID]; dup {
				continue // reported by parse
			}
			byID[a.ID] = a
			rep.Alternatives = append(rep.Alternatives, a)
		}
	}
	// Comparisons.
	compByID := map[string]*Comparison{}
	for _, b := range memo.Blocks {
		if src, ok := b.(*parse.Compare); ok && src.ID != "" {
			if _, dup := compByID[src.ID]; dup {
				continue
			}
			c := e.comparison(src, rep.Alternatives, byID, rep.Rate, rep.Inflation, failed)
			if c != nil {
				compByID[c.ID] = c
				rep.Comparisons = append(rep.Comparisons, c)
			} else {
				compByID[src.ID] = nil
			}
		}
	}
	// Replacement decisions (replacement.go).
	for _, b := range memo.Blocks {
		if src, ok := b.(*parse.Replacement); ok && src.ID != "" {
			if r := e.replacement(src, byID, failed, rep.Rate); r != nil {
				rep.Replacements = append(rep.Replacements, r)
			}
		}
	}
	// Placements.
	for _, b := range memo.Blocks {
		if pl, ok := b.(*parse.Place); ok {
			if p := placement(&errs, pl, byID, failed, compByID, rep); p != nil {
				rep.Places[pl] = p
			}
		}
	}
	if ov == nil {
		e.analyses(memo, rep, compByID)
	}
	if ov == nil {
		rep.Risks = e.risks(memo, rep, compByID, opt)
	}
	if len(errs) > 0 {
		return rep, errs.Err()
	}
	if ov != nil {
		return rep, nil
	}
	// Results are known: expectations and inline values.
	e.results = &resultFuncs{rep: rep, byID: byID, comps: compByID}
	for _, b := range memo.Blocks {
		if x, ok := b.(*parse.Expect); ok {
			for _, cond := range x.Conditions {
				if ex := e.expectation(cond); ex != nil {
					rep.Expectations = append(rep.Expectations, ex)
				}
			}
		}
	}
	for _, in := range memo.Inline {
		if v, ok := e.inline(in.Expr); ok {
			rep.Inline[in.Offset] = v
		}
	}
	return rep, errs.Err()
}

// placement resolves a schedule or diagram block: the alternative, and the
// comparison whose horizon to use (the one named, else the first that holds
// the alternative).
func placement(errs *parse.ErrorList, pl *parse.Place, byID map[string]*Alternative, failed map[string]bool, comps map[string]*Comparison, rep *Report) *Placement {
	a, ok := byID[pl.Alt.ID]
	if !ok {
		if !failed[pl.Alt.ID] {
			ids := make([]string, 0, len(byID))
			for id := range byID {
				ids = append(ids, id)
			}
			sort.Strings(ids)
			msg := fmt.Sprintf("unknown alternative %q", pl.Alt.ID)
			if s := expr.Closest(pl.Alt.ID, ids); s != "" {
				msg += fmt.Sprintf("; did you mean %q?", s)
			}
			errs.Add(pl.Alt.Pos, "%s", msg)
		}
		return nil
	}
	p := &Placement{Alt: a}
	if pl.Compare != nil {
		c, ok := comps[pl.Compare.ID]
		if !ok {
			errs.Add(pl.Compare.Pos, "unknown comparison %q", pl.Compare.ID)
			return nil
		}
		if c == nil {
			return nil
		}
		p.Comp = c
	} else {
		for _, c := range rep.Comparisons {
			for _, r := range c.Results {
				if r.Alt.ID == a.ID && p.Comp == nil {
					p.Comp = c
				}
			}
		}
		if p.Comp == nil {
			errs.Add(pl.Pos, "%s %s: the alternative is in no comparison, so no horizon or rate is set for its flows; add it to a compare block", pl.Kind, pl.Alt.ID)
			return nil
		}
	}
	for _, r := range p.Comp.Results {
		if r.Alt.ID == a.ID {
			p.Result = r
		}
	}
	if p.Result == nil {
		errs.Add(pl.Alt.Pos, "%s is not among the alternatives of compare %s", a.ID, p.Comp.ID)
		return nil
	}
	return p
}

// expectation evaluates one condition of an expect block.
func (e *env) expectation(cond parse.Text) *Expectation {
	ex := &Expectation{Line: cond.Pos.Line, Col: cond.Pos.Col, Text: cond.Src}
	x := e.compile(cond, true)
	if x == nil {
		return nil
	}
	e.na = nil
	v, err := x.Eval(e.vars)
	if err != nil {
		if na := e.notApplicableIn(err); na != nil {
			ex.Detail = na.Error()
			return ex
		}
		e.exprError(cond, err)
		return nil
	}
	b, ok := v.(bool)
	if !ok {
		e.errs.Add(cond.Pos, "an expectation must be a condition that holds or fails (e.g. pw(steel) > -1.5M), but this gives a value (%s); compare it with something", valueText(v))
		return nil
	}
	ex.Passed = b
	return ex
}

// valueText shows an expression's value in a message.
func valueText(v any) string {
	if f, ok := v.(float64); ok {
		return trimFloat(f)
	}
	return fmt.Sprint(v)
}

// inlineKinds are the format hints an inline value may end with:
// `= overhaul * 2 as money`.
var inlineKinds = map[string]ValueKind{
	"money": Money, "percent": Percent, "ratio": Ratio, "years": Years, "number": Number,
}

// inline evaluates an inline value and decides how to format it: from a
// trailing hint ("as money", "as percent", "as ratio", "as years",
// "as number"), else from the functions it calls.
func (e *env) inline(t parse.Text) (Value, bool) {
	hint, hinted := Number, false
	if i := strings.LastIndex(t.Src, " as "); i >= 0 {
		if k, ok := inlineKinds[strings.TrimSpace(t.Src[i+4:])]; ok {
			hint, hinted = k, true
			t.Src = strings.TrimSpace(t.Src[:i])
		}
	}
	x := e.compile(t, true)
	if x == nil {
		return Value{}, false
	}
	e.na = nil
	v, err := x.Eval(e.vars)
	if err != nil {
		if na := e.notApplicableIn(err); na != nil {
			return Value{Null: true, Str: na.Error()}, true
		}
		e.exprError(t, err)
		return Value{}, false
	}
	switch v := v.(type) {
	case bool:
		return Value{Kind: Bool, Str: fmt.Sprint(v)}, true
	case string:
		if strings.HasPrefix(strings.TrimSpace(t.Src), "best") {
			return Value{Kind: Text, Str: e.results.displayName(v)}, true
		}
		return Value{Kind: Text, Str: v}, true
	case float64:
		if hinted {
			return Value{Kind: hint, Num: v}, true
		}
		return Value{Kind: kindOf(x), Num: v}, true
	}
	return Value{Kind: Text, Str: fmt.Sprint(v)}, true
}

// kindOf infers the kind of a numeric inline value from the result
// functions it calls: money for pw, aw and fw; a percentage for irr; a
// ratio for bc; years for payback; else a plain number.
func kindOf(x *expr.Expr) ValueKind {
	kinds := map[ValueKind]bool{}
	for _, c := range x.Calls() {
		switch c.Name {
		case "pw", "aw", "fw":
			kinds[Money] = true
		case "irr":
			kinds[Percent] = true
		case "bc":
			kinds[Ratio] = true
		case "payback":
			kinds[Years] = true
		}
	}
	if len(kinds) == 1 {
		for k := range kinds {
			return k
		}
	}
	return Number
}
