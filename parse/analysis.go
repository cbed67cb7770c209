package parse

import (
	"regexp"
	"strings"
)

// The analysis blocks: sensitivity, scenario and budget. Their readers keep
// every name and value as text with its position; compute resolves the
// names and evaluates the values.

// Sensitivity is a `sensitivity ID` block: one-at-a-time swings of inputs,
// sweeps over ranges, and breakeven values, for one comparison.
type Sensitivity struct {
	BlockHead
	// Compare names the comparison; nil means the memo's only one.
	Compare    *Ref
	Vary       []*Vary
	Ranges     []*Range
	Breakevens []Ref
}

// Vary is one `vary: a, b, rate by ±20%` line. By is the percentage as
// written after the sign (zero when the line gives none).
type Vary struct {
	Names []Ref
	By    Text
	Pos   Pos
}

// Range is one `range NAME: a to b` line.
type Range struct {
	Name     Ref
	From, To Text
	Pos      Pos
}

// Scenario is a `scenario ID` block: named overrides of assumptions and of
// the rate.
type Scenario struct {
	BlockHead
	Name      Field
	Overrides []*Override
	// Rate is a `rate = 5%` line, nil when the scenario keeps the rates.
	Rate    *RateSpec
	RatePos Pos
}

// DisplayName is the scenario's name, or its id where none is given.
func (s *Scenario) DisplayName() string {
	if s.Name.Value.Src != "" {
		return s.Name.Value.Src
	}
	return s.ID
}

// Override is one `NAME = expression` line of a scenario.
type Override struct {
	Name    string
	NamePos Pos
	Expr    Text
	Line    int
}

// Budget is a `budget ID` block: capital rationing across the comparisons
// it lists as projects.
type Budget struct {
	BlockHead
	Projects []Ref
	Limit    Text
	// Required lists projects that must contribute an alternative (an
	// extension: without it, a project may always contribute nothing).
	Required []Ref
}

var (
	sensitivityKeys = []string{"compare", "vary", "range", "breakeven"}
	budgetKeys      = []string{"projects", "limit", "required"}
	// reBy splits "names by ±20%" at the last "by".
	reBy = regexp.MustCompile(`(?i)(?:^|\s)by(?:\s+|$)`)
	// reTo splits "a to b".
	reTo = regexp.MustCompile(`(?i)\s+to\s+`)
)

func (p *parser) sensitivity(h BlockHead, lines []srcLine) Block {
	s := &Sensitivity{BlockHead: h}
	for _, l := range lines {
		key, keyText, val, ok := l.splitKV()
		if !ok {
			p.errorf(l.pos, "expected \"key: value\" in sensitivity %s, e.g. \"vary: overhaul, rate by ±20%%\"; got %q", h.ID, l.text)
			continue
		}
		if val.Src == "" {
			p.errorf(val.Pos, "%s has no value after the colon", keyText.Src)
			continue
		}
		switch {
		case key == "compare":
			if s.Compare != nil {
				p.errorf(keyText.Pos, "compare is given twice in sensitivity %s (first at line %d)", h.ID, s.Compare.Pos.Line)
				continue
			}
			s.Compare = &Ref{ID: val.Src, Pos: val.Pos}
		case key == "vary":
			if v := p.vary(val, l.pos); v != nil {
				s.Vary = append(s.Vary, v)
			}
		case key == "range" || strings.HasPrefix(key, "range "):
			if r := p.rangeLine(keyText, val, l.pos); r != nil {
				s.Ranges = append(s.Ranges, r)
			}
		case key == "breakeven" || key == "breakevens":
			s.Breakevens = append(s.Breakevens, p.nameList(val, "breakeven")...)
		default:
			msg := "unknown line %q in sensitivity %s; expected \"compare: ID\", \"vary: NAMES by ±P%%\", \"range NAME: A to B\" or \"breakeven: NAMES\""
			if sg := suggestKey(key, sensitivityKeys); sg != "" {
				p.errorf(keyText.Pos, msg+"; did you mean %q?", keyText.Src, h.ID, sg)
			} else {
				p.errorf(keyText.Pos, msg, keyText.Src, h.ID)
			}
		}
	}
	if len(lines) == 0 && h.ID != "" {
		p.errorf(h.Pos, "sensitivity %s asks for nothing; add \"vary: NAMES by ±20%%\", \"range NAME: A to B\" or \"breakeven: NAMES\"", h.ID)
	}
	return s
}

// vary reads "a, b, rate by ±20%" (also "+-20%", "+/-20%", "20%").
func (p *parser) vary(val Text, linePos Pos) *Vary {
	v := &Vary{Pos: linePos}
	list := val
	if ms := reBy.FindAllStringIndex(val.Src, -1); ms != nil {
		m := ms[len(ms)-1]
		list = Text{Src: strings.TrimSpace(val.Src[:m[0]]), Pos: val.Pos}
		rest := val.Src[m[1]:]
		off := m[1]
		byPos := val.Pos.Shift(len([]rune(val.Src[:m[0]])) + 1)
		if m[0] == 0 {
			byPos = val.Pos
		}
		for _, sign := range []string{"±", "+/-", "+-"} {
			if strings.HasPrefix(rest, sign) {
				rest, off = rest[len(sign):], off+len(sign)
				break
			}
		}
		lead := len(rest) - len(strings.TrimLeft(rest, " "))
		rest = strings.TrimSpace(rest)
		if rest == "" {
			p.errorf(byPos, "\"by\" needs a percentage after it, e.g. by ±20%%")
			return nil
		}
		if strings.HasPrefix(rest, "-") || strings.HasPrefix(rest, "+") {
			p.errorf(val.Pos.Shift(len([]rune(val.Src[:off+lead]))), "a swing is the same both ways: write by ±%s (or +-%s)", strings.TrimLeft(rest, "+-"), strings.TrimLeft(rest, "+-"))
			return nil
		}
		v.By = Text{Src: rest, Pos: val.Pos.Shift(len([]rune(val.Src[:off+lead])))}
	}
	if list.Src == "" {
		p.errorf(val.Pos, "vary needs the inputs to swing before \"by\", e.g. vary: overhaul, rate by ±20%%")
		return nil
	}
	v.Names = p.nameList(list, "vary")
	if len(v.Names) == 0 {
		return nil
	}
	return v
}

// rangeLine reads "range NAME: a to b".
func (p *parser) rangeLine(keyText, val Text, linePos Pos) *Range {
	words := strings.Fields(keyText.Src)
	if len(words) != 2 {
		if len(words) < 2 {
			p.errorf(keyText.Pos, "range needs the input it sweeps: \"range NAME: A to B\", e.g. range rate: 3%% to 10%%")
		} else {
			p.errorf(keyText.Pos, "range sweeps one input at a time: \"range NAME: A to B\"; got %q", keyText.Src)
		}
		return nil
	}
	at := strings.Index(keyText.Src, words[1])
	r := &Range{Name: Ref{ID: words[1], Pos: keyText.Pos.Shift(len([]rune(keyText.Src[:at])))}, Pos: linePos}
	if !namePattern.MatchString(r.Name.ID) {
		p.errorf(r.Name.Pos, "%q is not a name of an input: range takes an assumption's name or rate", r.Name.ID)
		return nil
	}
	m := reTo.FindStringIndex(val.Src)
	if m == nil {
		p.errorf(val.Pos, "expected \"A to B\" after range %s:, e.g. 3%% to 10%%; got %q", r.Name.ID, val.Src)
		return nil
	}
	from := strings.TrimSpace(val.Src[:m[0]])
	to := strings.TrimSpace(val.Src[m[1]:])
	if from == "" || to == "" {
		p.errorf(val.Pos, "expected \"A to B\" after range %s:, with a value on each side of \"to\"; got %q", r.Name.ID, val.Src)
		return nil
	}
	r.From = Text{Src: from, Pos: val.Pos}
	r.To = Text{Src: to, Pos: val.Pos.Shift(len([]rune(val.Src[:m[1]])))}
	return r
}

// nameList reads a comma-separated list of names of inputs.
func (p *parser) nameList(val Text, what string) []Ref {
	var out []Ref
	for _, a := range SplitArgs(val.Src) {
		n := strings.TrimSpace(a.S)
		lead := len(a.S) - len(strings.TrimLeft(a.S, " \t"))
		pos := val.Pos.Shift(len([]rune(val.Src[:a.Off+lead])))
		switch {
		case n == "":
			p.errorf(pos, "empty name in the list of %s", what)
		case !namePattern.MatchString(n):
			p.errorf(pos, "%q is not a name of an input: %s takes assumptions' names and rate", n, what)
		default:
			out = append(out, Ref{ID: n, Pos: pos})
		}
	}
	return out
}

func (p *parser) scenario(h BlockHead, lines []srcLine) Block {
	s := &Scenario{BlockHead: h}
	seen := map[string]int{}
	for _, l := range lines {
		eq := strings.IndexByte(l.text, '=')
		colon := strings.IndexByte(l.text, ':')
		if colon >= 0 && (eq < 0 || colon < eq) {
			key, keyText, val, _ := l.splitKV()
			if key == "name" {
				if s.Name.Value.Src != "" {
					p.errorf(keyText.Pos, "name is given twice in scenario %s", h.ID)
					continue
				}
				if val.Src == "" {
					p.errorf(val.Pos, "name has no value after the colon")
					continue
				}
				s.Name = Field{Key: key, KeyPos: keyText.Pos, Value: val}
				continue
			}
			p.errorf(l.pos, "in scenario %s, write an override as \"NAME = value\" (e.g. %s = %s) and the title as \"name: TEXT\"; got %q", h.ID, keyText.Src, orExample(val.Src), l.text)
			continue
		}
		if eq < 0 || (eq+1 < len(l.text) && l.text[eq+1] == '=') {
			p.errorf(l.pos, "expected \"NAME = value\" or \"name: TEXT\" in scenario %s, got %q", h.ID, l.text)
			continue
		}
		name := strings.TrimSpace(l.text[:eq])
		if !namePattern.MatchString(name) {
			p.errorf(l.pos, "%q is not a name: a scenario overrides assumptions (and rate) by name", name)
			continue
		}
		rest := l.text[eq+1:]
		lead := len(rest) - len(strings.TrimLeft(rest, " \t"))
		v := strings.TrimSpace(rest)
		if v == "" {
			p.errorf(l.pos.Shift(len([]rune(l.text[:eq+1]))), "%s has no value after =", name)
			continue
		}
		if prev, dup := seen[name]; dup {
			p.errorf(l.pos, "%s is overridden twice in scenario %s (first at line %d)", name, h.ID, prev)
			continue
		}
		seen[name] = l.pos.Line
		val := l.at(eq+1+lead, v)
		if name == "rate" {
			s.Rate = p.rateSpec(val)
			s.RatePos = l.pos
			continue
		}
		s.Overrides = append(s.Overrides, &Override{Name: name, NamePos: l.pos, Expr: val, Line: l.pos.Line})
	}
	if len(lines) == 0 && h.ID != "" {
		p.errorf(h.Pos, "scenario %s overrides nothing; add lines such as \"power_price = 0.16\" or \"rate = 5%%\"", h.ID)
	}
	return s
}

func orExample(v string) string {
	if v == "" {
		return "0.16"
	}
	return v
}

func (p *parser) budget(h BlockHead, lines []srcLine) Block {
	b := &Budget{BlockHead: h}
	seen := map[string]int{}
	for _, l := range lines {
		key, keyText, val, ok := l.splitKV()
		if !ok {
			p.errorf(l.pos, "expected \"key: value\" in budget %s, e.g. \"limit: 2.5M\"; got %q", h.ID, l.text)
			continue
		}
		if prev, dup := seen[key]; dup && contains(budgetKeys, key) {
			p.errorf(keyText.Pos, "%s is given twice in budget %s (first at line %d)", key, h.ID, prev)
			continue
		}
		seen[key] = l.pos.Line
		if val.Src == "" {
			p.errorf(val.Pos, "%s has no value after the colon", keyText.Src)
			continue
		}
		switch key {
		case "projects", "required":
			var refs []Ref
			for _, a := range SplitArgs(val.Src) {
				id := strings.TrimSpace(a.S)
				lead := len(a.S) - len(strings.TrimLeft(a.S, " \t"))
				pos := val.Pos.Shift(len([]rune(val.Src[:a.Off+lead])))
				if id == "" {
					p.errorf(pos, "empty name in the list of %s", key)
					continue
				}
				refs = append(refs, Ref{ID: id, Pos: pos})
			}
			if key == "projects" {
				b.Projects = refs
			} else {
				b.Required = refs
			}
		case "limit":
			b.Limit = val
		default:
			msg := "unknown line %q in budget %s; expected one of %s"
			if sg := suggestKey(key, budgetKeys); sg != "" {
				p.errorf(keyText.Pos, msg+"; did you mean %q?", keyText.Src, h.ID, quoteList(budgetKeys), sg)
			} else {
				p.errorf(keyText.Pos, msg, keyText.Src, h.ID, quoteList(budgetKeys))
			}
		}
	}
	if h.ID != "" {
		if _, ok := seen["projects"]; !ok {
			p.errorf(h.Pos, "budget %s needs a \"projects:\" line naming the comparisons to fund, e.g. projects: intake, depot-roof", h.ID)
		}
		if _, ok := seen["limit"]; !ok {
			p.errorf(h.Pos, "budget %s needs a \"limit:\" line with the total first cost allowed, e.g. limit: 2.5M", h.ID)
		}
	}
	return b
}
