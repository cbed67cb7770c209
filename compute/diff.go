package compute

import (
	"bytes"
	"math"
	"sort"
	"strings"

	"worth/parse"
)

// Revision is what changed between two versions of a memo: the inputs as
// written, block by block and line by line, and how every result moved.
// It is what a reviewer needs when a memo comes back with new estimates.
type Revision struct {
	Old, New string // the two versions' names, e.g. "HEAD~1:memo.md" and "memo.md"
	// Inputs are the lines whose text changed, or that were added or
	// removed, in the new memo's order (removed ones where they stood).
	Inputs []InputChange
	// Follows are the lines whose text is the same but whose value moved,
	// because an input they use changed.
	Follows []InputChange
	// Comparisons hold every comparison of either version.
	Comparisons []*ComparisonChange
	// Expectations whose outcome changed (held, now fails, or the other
	// way), or that were added or removed.
	Expectations []ExpectationChange
}

// Change kinds of an input line.
const (
	RevChanged = "changed"
	RevAdded   = "added"
	RevRemoved = "removed"
)

// InputChange is one input line that changed.
type InputChange struct {
	Block string // "front matter", "assume", "alternative steel", "compare screens", ...
	Name  string // the assumption's name, the line's label or key
	// Where the line stands in each version ("" where absent): a memo line
	// number, or FILE:LINE for a row of a CSV file.
	OldAt, NewAt string
	Old, New     string // as written ("" where absent)
	// OldValue and NewValue are the evaluated values, where the line has
	// one; Kind says how to format them.
	OldValue, NewValue *float64
	Kind               ValueKind
	Change             string // RevChanged, RevAdded or RevRemoved
}

// ComparisonChange is how one comparison's results moved.
type ComparisonChange struct {
	ID       string
	Change   string // RevChanged (present in both), RevAdded or RevRemoved
	CostOnly bool   // of the new version (the old one where removed)
	// The recommended alternative's id and display name in each version.
	OldBest, NewBest         string
	OldBestName, NewBestName string
	// RecommendationChanged flags a different recommendation.
	RecommendationChanged bool
	OldMargin, NewMargin  *float64
	// Measures are every measure of every alternative in either version:
	// those the comparison shows, present and annual worth always.
	Measures []MeasureChange
}

// MeasureChange is one measure of one alternative in both versions.
type MeasureChange struct {
	Alt, AltName string
	Measure      string // as in a compare block's show line: "present worth", "irr", ...
	Kind         ValueKind
	Old, New     *float64 // nil where the measure does not apply or the alternative is absent
	// Delta is New - Old where both exist.
	Delta *float64
}

// ExpectationChange is one expect condition whose outcome changed.
type ExpectationChange struct {
	Text     string
	Line     int    // in the new memo (the old one where removed)
	Old, New string // "holds", "fails" or "" where absent
}

// Diff compares two computed versions of a memo. It is pure: the names
// of the versions are set by the caller.
func Diff(old, new *Report) *Revision {
	rev := &Revision{}
	oi, ni := revInputs(old), revInputs(new)
	rev.Inputs, rev.Follows = revMatch(oi, ni)
	rev.Comparisons = revResults(old, new)
	rev.Expectations = revExpectations(old, new)
	return rev
}

// revInput is one line of a memo's inputs, keyed for matching.
type revInput struct {
	block, name, text string
	at                string
	order             int // position in the memo, for sorting
	value             *float64
	kind              ValueKind
}

func revPtr(x float64) *float64 { return &x }

// revOrderStep spaces the memo's lines in the sort order of inputs, leaving
// room after a block's last line for the rows of its CSV files.
const revOrderStep = 1 << 24

// revInputs lists a memo's inputs: the front matter's keys, then every
// line of every worth block, with the values compute gave them.
func revInputs(rep *Report) []revInput {
	m := rep.Memo
	var out []revInput
	for _, f := range m.Front.Fields {
		l := revInput{block: "front matter", name: f.Key, text: f.Value.Src, at: revItoa(f.KeyPos.Line), order: f.KeyPos.Line * revOrderStep}
		switch {
		case f.Key == "rate" && rep.Rate != nil:
			l.value, l.kind = revPtr(rep.Rate.Effective), Percent
		case f.Key == "tax rate" && rep.TaxRate != nil:
			l.value, l.kind = revPtr(rep.TaxRate.Effective), Percent
		case f.Key == "inflation" && rep.Inflation != nil:
			l.value, l.kind = revPtr(rep.Inflation.Effective), Percent
		}
		out = append(out, l)
	}
	assumed := map[string]*Assumption{}
	for _, a := range rep.Assumptions {
		assumed[a.Name] = a
	}
	alts := map[string]*Alternative{}
	for _, a := range rep.Alternatives {
		alts[a.ID] = a
	}
	comps := map[string]*Comparison{}
	for _, c := range rep.Comparisons {
		comps[c.ID] = c
	}
	lines := bytes.Split(m.Source, []byte("\n"))
	for _, b := range m.Blocks {
		h := b.Head()
		block := h.Kind
		if h.ID != "" {
			block += " " + h.ID
		}
		// Values of an alternative's lines by source line, and its rows
		// read from CSV files (listed after the block's own lines).
		byLine := map[int]*Item{}
		var alt *Alternative
		var rows []revInput
		if x, ok := b.(*parse.Alternative); ok {
			alt = alts[x.ID]
			for k, fl := range x.Lines {
				if alt == nil || k >= len(alt.Items) {
					break
				}
				if fl.Pos.File == x.Pos.File {
					byLine[fl.Line] = alt.Items[k]
					continue
				}
				rows = append(rows, revInput{block: block, name: fl.Label, text: fl.Amount.Src,
					at: revBase(fl.Pos.File) + ":" + revItoa(fl.Line), order: (h.EndLine-1)*revOrderStep + 1 + len(rows),
					value: revPtr(alt.Items[k].Amount), kind: Money})
			}
		}
		for n := h.Pos.Line + 1; n < h.EndLine && n-1 < len(lines); n++ {
			raw := strings.TrimSpace(revCutComment(strings.TrimRight(string(lines[n-1]), "\r")))
			if raw == "" {
				continue
			}
			l := revInput{block: block, at: revItoa(n), order: n * revOrderStep}
			switch h.Kind {
			case "assume":
				name, rest, _ := strings.Cut(raw, "=")
				l.name, l.text = strings.TrimSpace(name), strings.TrimSpace(rest)
				if a := assumed[l.name]; a != nil {
					l.value, l.kind = revPtr(a.Value), Number
				}
			case "expect":
				l.name, l.text = raw, ""
			default:
				name, rest, ok := strings.Cut(raw, ":")
				if i := strings.IndexByte(raw, '='); i >= 0 && (!ok || i < len(name)) {
					name, rest, ok = raw[:i], raw[i+1:], true
				}
				if !ok {
					name, rest = raw, ""
				}
				l.name, l.text = strings.ToLower(strings.Join(strings.Fields(name), " ")), strings.TrimSpace(rest)
				if it := byLine[n]; it != nil {
					l.value, l.kind = revPtr(it.Amount), Money
				}
				switch {
				case alt != nil && l.name == "life" && alt.Life > 0:
					l.value, l.kind = revPtr(float64(alt.Life)), Number
				case alt != nil && l.name == "residual" && alt.Residual != nil:
					l.value, l.kind = revPtr(*alt.Residual), Money
				case h.Kind == "compare" && l.name == "rate" && comps[h.ID] != nil:
					l.value, l.kind = revPtr(comps[h.ID].Rate.Effective), Percent
				}
			}
			out = append(out, l)
		}
		out = append(out, rows...)
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].order < out[j].order })
	return out
}

func revItoa(n int) string {
	if n <= 0 {
		return ""
	}
	var b [20]byte
	i := len(b)
	for n > 0 {
		i--
		b[i] = byte('0' + n%10)
		n /= 10
	}
	return string(b[i:])
}

func revBase(p string) string {
	if i := strings.LastIndexAny(p, `/\`); i >= 0 {
		return p[i+1:]
	}
	return p
}

// revCutComment removes a # comment outside quotes.
func revCutComment(s string) string {
	var quote rune
	for i, r := range s {
		switch {
		case quote != 0:
			if r == quote {
				quote = 0
			}
		case r == '"' || r == '\'':
			quote = r
		case r == '#':
			return s[:i]
		}
	}
	return s
}

// revMatch pairs the lines of two versions: first the lines whose block,
// name and text agree (unchanged, though the value may follow another
// input), then the remaining lines of a block and name in order (changed),
// and what is left over is added or removed.
func revMatch(old, new []revInput) (changes, follows []InputChange) {
	type key struct{ block, name string }
	used := make([]bool, len(old))
	pair := make([]int, len(new))
	for i := range pair {
		pair[i] = -1
	}
	for pass := 0; pass < 2; pass++ {
		for i, n := range new {
			if pair[i] >= 0 {
				continue
			}
			for j, o := range old {
				if used[j] || o.block != n.block || o.name != n.name || (pass == 0 && o.text != n.text) {
					continue
				}
				used[j], pair[i] = true, j
				break
			}
		}
	}
	// RevRemoved lines go where they stood: before the new line that followed
	// them, in the order of the old memo.
	var removedBefore = map[int][]int{} // index in new -> old indexes
	next := len(new)
	for j := len(old) - 1; j >= 0; j-- {
		if !used[j] {
			removedBefore[next] = append([]int{j}, removedBefore[next]...)
			continue
		}
		for i := range new {
			if pair[i] == j {
				next = i
			}
		}
	}
	removed := func(j int) InputChange {
		o := old[j]
		return InputChange{Block: o.block, Name: o.name, OldAt: o.at, Old: o.text, OldValue: o.value, Kind: o.kind, Change: RevRemoved}
	}
	for i, n := range new {
		for _, j := range removedBefore[i] {
			changes = append(changes, removed(j))
		}
		if pair[i] < 0 {
			changes = append(changes, InputChange{Block: n.block, Name: n.name, NewAt: n.at, New: n.text, NewValue: n.value, Kind: n.kind, Change: RevAdded})
			continue
		}
		o := old[pair[i]]
		c := InputChange{Block: n.block, Name: n.name, OldAt: o.at, NewAt: n.at, Old: o.text, New: n.text,
			OldValue: o.value, NewValue: n.value, Kind: n.kind, Change: RevChanged}
		switch {
		case o.text != n.text:
			changes = append(changes, c)
		case !revSame(o.value, n.value):
			follows = append(follows, c)
		}
	}
	for _, j := range removedBefore[len(new)] {
		changes = append(changes, removed(j))
	}
	return changes, follows
}

func revSame(a, b *float64) bool {
	if a == nil || b == nil {
		return a == nil && b == nil
	}
	return *a == *b || math.IsNaN(*a) && math.IsNaN(*b)
}

// revMeasure reads one measure of a result.
func revMeasure(r *Result, m string) (*float64, ValueKind) {
	switch m {
	case "present worth":
		return revPtr(r.PW), Money
	case "annual worth":
		return revPtr(r.AW), Money
	case "future worth":
		return r.FW, Money
	case "irr":
		return r.IRR, Percent
	case "benefit-cost":
		return r.BC, Ratio
	case "modified benefit-cost":
		return r.ModifiedBC, Ratio
	case "payback":
		return r.Payback, Years
	case "discounted payback":
		return r.DiscPayback, Years
	case "net savings":
		return r.NetSavings, Money
	case "sir":
		return r.SIR, Ratio
	case "airr":
		return r.AIRR, Percent
	}
	return nil, Number
}

// revResults pairs the comparisons of two versions by id and every
// result by alternative id.
func revResults(old, new *Report) []*ComparisonChange {
	oldByID := map[string]*Comparison{}
	for _, c := range old.Comparisons {
		oldByID[c.ID] = c
	}
	seen := map[string]bool{}
	var out []*ComparisonChange
	for _, n := range new.Comparisons {
		seen[n.ID] = true
		out = append(out, revComparison(oldByID[n.ID], n))
	}
	for _, o := range old.Comparisons {
		if !seen[o.ID] {
			out = append(out, revComparison(o, nil))
		}
	}
	return out
}

func revBestName(c *Comparison) string {
	if c.Recommended == "do-nothing" {
		return "doing nothing"
	}
	for _, r := range c.Results {
		if r.Alt.ID == c.Recommended {
			return r.Alt.Name
		}
	}
	return c.Recommended
}

func revComparison(o, n *Comparison) *ComparisonChange {
	cc := &ComparisonChange{Change: RevChanged}
	var show []string
	add := func(ms []string) {
		for _, m := range ms {
			if !revContains(show, m) {
				show = append(show, m)
			}
		}
	}
	add([]string{"present worth", "annual worth"})
	if n != nil {
		cc.ID, cc.CostOnly = n.ID, n.CostOnly
		cc.NewBest, cc.NewBestName = n.Recommended, revBestName(n)
		cc.NewMargin = revPtr(n.Margin)
		add(n.Show)
	}
	if o != nil {
		cc.ID = o.ID
		cc.OldBest, cc.OldBestName = o.Recommended, revBestName(o)
		cc.OldMargin = revPtr(o.Margin)
		add(o.Show)
	}
	switch {
	case o == nil:
		cc.Change = RevAdded
	case n == nil:
		cc.Change, cc.CostOnly = RevRemoved, o.CostOnly
	default:
		cc.RecommendationChanged = o.Recommended != n.Recommended
	}
	// Alternatives: the new version's order, then any the old one had.
	type pair struct {
		id, name string
		o, n     *Result
	}
	var alts []*pair
	byID := map[string]*pair{}
	if n != nil {
		for _, r := range n.Results {
			p := &pair{id: r.Alt.ID, name: r.Alt.Name, n: r}
			alts = append(alts, p)
			byID[p.id] = p
		}
	}
	if o != nil {
		for _, r := range o.Results {
			if p := byID[r.Alt.ID]; p != nil {
				p.o = r
				continue
			}
			alts = append(alts, &pair{id: r.Alt.ID, name: r.Alt.Name, o: r})
		}
	}
	for _, p := range alts {
		for _, m := range show {
			mc := MeasureChange{Alt: p.id, AltName: p.name, Measure: m}
			if p.o != nil {
				mc.Old, mc.Kind = revMeasure(p.o, m)
			}
			if p.n != nil {
				mc.New, mc.Kind = revMeasure(p.n, m)
			}
			if mc.Old == nil && mc.New == nil {
				continue
			}
			if mc.Old != nil && mc.New != nil {
				mc.Delta = revPtr(*mc.New - *mc.Old)
			}
			cc.Measures = append(cc.Measures, mc)
		}
	}
	return cc
}

func revContains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// revExpectations lists the expectations whose outcome changed, or
// that one version has and the other not, matched by their text.
func revExpectations(old, new *Report) []ExpectationChange {
	outcome := func(x *Expectation) string {
		if x.Passed {
			return "holds"
		}
		return "fails"
	}
	oldBy := map[string][]*Expectation{}
	for _, x := range old.Expectations {
		oldBy[x.Text] = append(oldBy[x.Text], x)
	}
	var out []ExpectationChange
	for _, x := range new.Expectations {
		ec := ExpectationChange{Text: x.Text, Line: x.Line, New: outcome(x)}
		if list := oldBy[x.Text]; len(list) > 0 {
			ec.Old = outcome(list[0])
			oldBy[x.Text] = list[1:]
		}
		if ec.Old != ec.New {
			out = append(out, ec)
		}
	}
	for _, x := range old.Expectations {
		if list := oldBy[x.Text]; len(list) > 0 && list[0] == x {
			oldBy[x.Text] = list[1:]
			out = append(out, ExpectationChange{Text: x.Text, Line: x.Line, Old: outcome(x)})
		}
	}
	return out
}
