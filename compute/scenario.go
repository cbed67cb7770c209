package compute

import (
	"errors"
	"fmt"
	"math"

	"worth/parse"
)

// Scenario is an evaluated scenario block: every comparison recomputed
// with the scenario's overrides.
type Scenario struct {
	ID   string
	Name string
	Line int
	// Values are the overrides, in the order written; the rate (if
	// overridden) last.
	Values []ScenarioValue
	// Comparisons are every comparison of the memo, base and under the
	// scenario, in memo order.
	Comparisons []*ScenarioResult
	Source      *parse.Scenario
}

// ScenarioValue is one override: the value the scenario gives a name, and
// its value in the base case (NaN for a rate the memo does not state in its
// front matter).
type ScenarioValue struct {
	Name        string
	Rate        bool
	Value, Base float64
	Line        int
	Text        string // as written
}

// ScenarioResult is one comparison in the base case and under a scenario.
type ScenarioResult struct {
	Base, Under *Comparison
}

// Changed reports whether the scenario changes the recommendation.
func (r *ScenarioResult) Changed() bool { return r.Base.Recommended != r.Under.Recommended }

// scenario checks a scenario block and returns the work that evaluates
// it. Override values are expressions evaluated with the base case's values
// of the names they use ("overhaul = overhaul * 1.25" is 25% above the
// base); every assumption that uses an overridden name follows it.
func (e *env) scenario(memo *parse.Memo, src *parse.Scenario, rep *Report, comps map[string]*Comparison) func() {
	s := &Scenario{ID: src.ID, Name: src.DisplayName(), Line: src.Pos.Line, Source: src}
	ov := Overrides{Values: map[string]float64{}}
	ok := true
	for _, o := range src.Overrides {
		known := false
		var base float64
		for _, a := range rep.Assumptions {
			if a.Name == o.Name {
				known, base = true, a.Value
			}
		}
		if !known {
			failed := false
			for _, n := range e.names {
				failed = failed || n == o.Name
			}
			if !failed {
				e.unknownInput(parse.Ref{ID: o.Name, Pos: o.NamePos}, "a scenario", rep)
			}
			ok = false
			continue
		}
		v, good := e.number(o.Expr, o.Name)
		if !good {
			ok = false
			continue
		}
		ov.Values[o.Name] = v
		s.Values = append(s.Values, ScenarioValue{Name: o.Name, Value: v, Base: base, Line: o.Line, Text: o.Expr.Src})
	}
	if src.Rate != nil {
		r, good := e.rate(src.Rate, "rate", rep.Inflation)
		if !good {
			ok = false
		} else {
			v := r.Effective
			ov.Rate = &v
			base := math.NaN()
			if rep.Rate != nil {
				base = rep.Rate.Effective
			}
			s.Values = append(s.Values, ScenarioValue{Name: "rate", Rate: true, Value: v, Base: base, Line: src.RatePos.Line, Text: src.Rate.Text.Src})
		}
	}
	if !ok {
		return nil
	}
	rep.Scenarios = append(rep.Scenarios, s)
	return func() {
		under, err := Recompute(memo, ov)
		if err != nil {
			// The scenario's values make the memo invalid: an error of the
			// memo, at the scenario, quoting why.
			var list parse.ErrorList
			if errors.As(err, &list) {
				for _, x := range list {
					e.errs.Add(src.Pos, "under scenario %s, %s", src.ID, lineNote(x))
				}
			} else {
				e.errs.Add(src.Pos, "under scenario %s, %s", src.ID, err)
			}
			return
		}
		for _, c := range rep.Comparisons {
			for _, u := range under.Comparisons {
				if u.ID == c.ID {
					s.Comparisons = append(s.Comparisons, &ScenarioResult{Base: c, Under: u})
				}
			}
		}
	}
}

// lineNote is an error's message with its line.
func lineNote(x *parse.Error) string {
	if x.Pos.Line > 0 {
		return fmt.Sprintf("%s (line %d)", x.Msg, x.Pos.Line)
	}
	return x.Msg
}
