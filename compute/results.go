package compute

import (
	"fmt"
	"sort"
	"strings"

	"worth/expr"
)

// notApplicable is returned by a result function whose measure does not
// apply (no single rate of return, no future worth forever, ...). An
// expectation that meets one fails; an inline value shows "n/a".
type notApplicable struct{ msg string }

func (n notApplicable) Error() string { return n.msg }

// resultFuncs answers pw(alt[, comparison]) and the other result functions.
type resultFuncs struct {
	rep   *Report
	byID  map[string]*Alternative
	comps map[string]*Comparison
}

func (f *resultFuncs) displayName(id string) string {
	if id == DoNothing {
		return "do nothing"
	}
	if a, ok := f.byID[id]; ok {
		return a.Name
	}
	return id
}

// comparison finds the comparison named, or the only one, or the only one
// that holds alt.
func (f *resultFuncs) comparison(name string, args []any, alt string) (*Comparison, error) {
	if len(args) > 0 {
		id, ok := args[0].(string)
		if !ok {
			return nil, fmt.Errorf("%s: the comparison is named by its id, e.g. %s(steel, screens)", name, name)
		}
		c, ok := f.comps[id]
		if !ok || c == nil {
			ids := make([]string, 0, len(f.comps))
			for k := range f.comps {
				ids = append(ids, k)
			}
			sort.Strings(ids)
			if s := expr.Closest(id, ids); s != "" {
				return nil, fmt.Errorf("%s: unknown comparison %q; did you mean %q?", name, id, s)
			}
			return nil, fmt.Errorf("%s: unknown comparison %q (comparisons: %s)", name, id, strings.Join(ids, ", "))
		}
		return c, nil
	}
	var holding []*Comparison
	for _, c := range f.rep.Comparisons {
		if alt == "" {
			holding = append(holding, c)
			continue
		}
		for _, r := range c.Results {
			if r.Alt.ID == alt {
				holding = append(holding, c)
			}
		}
	}
	switch len(holding) {
	case 1:
		return holding[0], nil
	case 0:
		if alt == "" {
			return nil, fmt.Errorf("%s: the memo has no compare block", name)
		}
		return nil, fmt.Errorf("%s: %s is in no comparison", name, alt)
	}
	ids := make([]string, len(holding))
	for i, c := range holding {
		ids[i] = c.ID
	}
	return nil, fmt.Errorf("%s: several comparisons could be meant (%s); name one as the second argument, e.g. %s(%s, %s)", name, strings.Join(ids, ", "), name, orDefault(alt, "x"), ids[0])
}

func orDefault(s, d string) string {
	if s == "" {
		return d
	}
	return s
}

func (f *resultFuncs) call(name string, args []any) (any, error) {
	if name == "best" {
		if len(args) > 1 {
			return nil, fmt.Errorf("best takes at most one value, the comparison's id")
		}
		c, err := f.comparison(name, args, "")
		if err != nil {
			return nil, err
		}
		return c.Recommended, nil
	}
	if len(args) < 1 || len(args) > 2 {
		return nil, fmt.Errorf("%s takes an alternative and, with several comparisons, the comparison: %s(steel) or %s(steel, screens)", name, name, name)
	}
	alt, ok := args[0].(string)
	if !ok {
		return nil, fmt.Errorf("%s: the alternative is named by its id, e.g. %s(steel)", name, name)
	}
	if _, ok := f.byID[alt]; !ok {
		ids := make([]string, 0, len(f.byID))
		for k := range f.byID {
			ids = append(ids, k)
		}
		sort.Strings(ids)
		if s := expr.Closest(alt, ids); s != "" {
			return nil, fmt.Errorf("%s: unknown alternative %q; did you mean %q?", name, alt, s)
		}
		return nil, fmt.Errorf("%s: unknown alternative %q", name, alt)
	}
	c, err := f.comparison(name, args[1:], alt)
	if err != nil {
		return nil, err
	}
	var r *Result
	for _, x := range c.Results {
		if x.Alt.ID == alt {
			r = x
		}
	}
	if r == nil {
		return nil, fmt.Errorf("%s: %s is not among the alternatives of compare %s", name, alt, c.ID)
	}
	na := func(why string) error {
		return notApplicable{fmt.Sprintf("%s(%s) does not apply: %s", name, alt, why)}
	}
	switch name {
	case "pw":
		return r.PW, nil
	case "aw":
		return r.AW, nil
	case "fw":
		if r.FW == nil {
			return nil, na("there is no future worth on a perpetual horizon")
		}
		return *r.FW, nil
	case "irr":
		if r.IRR == nil {
			if len(r.IRRRoots) > 1 {
				return nil, na(fmt.Sprintf("its flows have %d rates of return", len(r.IRRRoots)))
			}
			return nil, na("its flows have no rate of return")
		}
		return *r.IRR, nil
	case "bc":
		if r.BC == nil {
			return nil, na("it has no benefits or no net costs")
		}
		return *r.BC, nil
	case "payback":
		if r.Payback == nil {
			return nil, na("its cumulative cash flow never reaches zero")
		}
		return *r.Payback, nil
	}
	return nil, fmt.Errorf("unknown result function %s", name)
}
