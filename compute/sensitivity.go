package compute

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"sort"
	"strings"
	"sync"
	"sync/atomic"

	"worth/expr"
	"worth/parse"
)

// Sensitivity is an evaluated sensitivity block: how the decision of one
// comparison responds to its inputs, one at a time.
//
// The margin throughout is the decision measure (present worth, or annual
// worth where the comparison decides by annual worth) of the base case's
// recommended alternative less that of the best other alternative (doing
// nothing, worth zero, counts as one where every alternative earns
// benefits). It is positive while the base recommendation holds and
// crosses zero where the decision changes, so a breakeven is a root of it.
type Sensitivity struct {
	ID      string
	Line    int
	Compare *Comparison // the comparison in the base case
	// Measure is "present worth" or "annual worth".
	Measure string
	// Recommended is the base case's choice; Margin its margin over the
	// best other alternative, RunnerUp.
	Recommended, RunnerUp string
	Margin                float64
	// Swings holds one swing per input, the widest first (the order of a
	// tornado chart).
	Swings []*Swing
	// Spider holds the margin against the percentage change of each input
	// swung by a percentage.
	Spider []*SpiderLine
	Ranges []*Sweep
	// Breakevens are in the order the block names them.
	Breakevens []*Breakeven
	// Evaluations counts the recomputations the block took.
	Evaluations int
	Source      *parse.Sensitivity
}

// WhatIf is the comparison recomputed with one input at one value.
type WhatIf struct {
	Value float64
	// Margin is NaN where the value makes the memo invalid; Invalid then
	// says why.
	Margin      float64
	Recommended string
	// Worths holds each alternative's decision measure, in the order of
	// the base comparison's results (NaN where invalid).
	Worths  []float64
	Invalid string
}

// Valid reports whether the memo could be computed at this value.
func (w WhatIf) Valid() bool { return w.Invalid == "" }

// Swing is one input moved to a low and a high value, the others held at
// their base values.
type Swing struct {
	Name string
	Rate bool // the input is the comparison's interest rate
	Base float64
	// Percent is the swing as a fraction of the base value (±), 0 for a
	// swing over an explicit range.
	Percent   float64
	Low, High WhatIf
	// Spread is the width of the margin's swing (over valid ends), the
	// tornado's sort key.
	Spread float64
}

// Changes reports whether the swing changes the recommendation at either
// end.
func (s *Swing) Changes(rec string) bool {
	return s.Low.Valid() && s.Low.Recommended != rec || s.High.Valid() && s.High.Recommended != rec
}

// SpiderLine is the margin at several percentage changes of one input.
type SpiderLine struct {
	Name    string
	Rate    bool
	Base    float64
	Percent []float64 // changes as fractions: -0.2 ... 0.2
	Points  []WhatIf
}

// Sweep is one input swept over an explicit range.
type Sweep struct {
	Name     string
	Rate     bool
	Base     float64
	From, To float64
	Points   []WhatIf
	// Changes are the values at which the recommendation changes, found
	// by a root finder between the sweep's points.
	Changes []Change
	// Discrete is set for an input that takes whole numbers only.
	Discrete bool
}

// Change is a value of an input at which the recommendation changes.
type Change struct {
	At       float64
	From, To string // recommendations below and above the value
	// Exact is false where the root finder could not close in (the value
	// is then the midpoint between the points that differ).
	Exact bool
	// Worth is the decision measure of From (and of To) at the value.
	Worth float64
	// Lo and Hi are the swept values on either side of the change; for a
	// whole-number input the change lies between them, and At is Hi.
	Lo, Hi float64
}

// Breakeven is the value of an input at which the decision changes.
type Breakeven struct {
	Name string
	Rate bool
	Base float64
	// Value is the breakeven nearest the base value, nil when none was
	// found between SearchedLow and SearchedHigh.
	Value *float64
	// To is the recommendation past the breakeven (away from the base).
	To string
	// Verified: substituted back, the margin is within MarginAt of zero
	// and the recommendation differs on the two sides of the value.
	Verified bool
	MarginAt float64
	// Other is a breakeven on the other side of the base value, if any.
	Other   *float64
	OtherTo string
	// SearchedLow and SearchedHigh bound the search: the widest values
	// tried at which the memo could still be computed.
	SearchedLow, SearchedHigh float64
	// Limits says why the search stopped short of its span, where a value
	// made the memo invalid.
	Limits []string
	// NoEffect is set when the input does not change the comparison.
	NoEffect bool
	// Tied is set when the base case is already a tie: the base value is
	// itself the breakeven.
	Tied bool
	// Discrete is set for an input that takes whole numbers only (a life,
	// a year): Value is then the first whole number at which the
	// recommendation changes, and Holds the last at which it does not.
	Discrete bool
	Holds    float64
}

// DefaultSwing is the swing of a vary line that gives no percentage.
const DefaultSwing = 0.20

// sweepSteps is about the number of steps a range is swept in.
const sweepSteps = 30

// NiceStep rounds a step up to 1, 2, 2.5 or 5 times a power of ten.
func NiceStep(raw float64) float64 {
	if raw <= 0 || math.IsNaN(raw) || math.IsInf(raw, 0) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		if m*p >= raw*(1-1e-9) {
			return m * p
		}
	}
	return 10 * p
}

// WholeValues are the whole numbers a range of a whole-number input is
// swept at: every one from the first to the last, or every k-th where
// there are more than 60.
func WholeValues(from, to float64) []float64 {
	a, b := math.Ceil(from), math.Floor(to)
	step := math.Max(1, math.Ceil((b-a)/sweepSteps))
	if (b-a)/1 <= 60 {
		step = 1
	}
	var xs []float64
	for x := a; x <= b; x += step {
		xs = append(xs, x)
	}
	if len(xs) > 0 && xs[len(xs)-1] != b {
		xs = append(xs, b)
	}
	return xs
}

// SweepValues are the values a range is swept at: its ends and the
// multiples of a round step between them (about 30 steps), so that the
// values read plainly (2%, 2.5%, 3% ...).
func SweepValues(from, to float64) []float64 {
	step := NiceStep((to - from) / sweepSteps)
	xs := []float64{from}
	for k := math.Floor(from/step) + 1; ; k++ {
		x := k * step
		if x >= to-step*1e-6 {
			break
		}
		if x > from+step*1e-6 {
			xs = append(xs, x)
		}
	}
	return append(xs, to)
}

// spiderSteps are the percentage changes charted on a spider line, as
// fractions of the swing.
var spiderSteps = []float64{-1, -0.75, -0.5, -0.25, 0, 0.25, 0.5, 0.75, 1}

// analyses evaluates the analysis blocks (sensitivity, scenario, budget)
// in memo order: names and values are checked always, so that their
// errors are reported with the memo's others; the what-ifs run only when
// the memo has no error.
func (e *env) analyses(memo *parse.Memo, rep *Report, comps map[string]*Comparison) {
	var runs []func()
	for _, b := range memo.Blocks {
		switch x := b.(type) {
		case *parse.Sensitivity:
			if run := e.sensitivity(memo, x, rep, comps); run != nil {
				runs = append(runs, run)
			}
		case *parse.Scenario:
			if run := e.scenario(memo, x, rep, comps); run != nil {
				runs = append(runs, run)
			}
		case *parse.Budget:
			if run := e.budget(x, rep, comps); run != nil {
				runs = append(runs, run)
			}
		}
	}
	if len(*e.errs) > 0 || !e.checkWhatIfs(memo) { // limits.go
		return
	}
	for _, run := range runs {
		run()
	}
}

// input is a name an analysis may vary: an assumption, or the rate.
type input struct {
	name string
	rate bool
	base float64
}

// resolveInput checks a name given to vary, range or breakeven.
func (e *env) resolveInput(r parse.Ref, what string, rep *Report, c *Comparison) (input, bool) {
	for _, a := range rep.Assumptions {
		if a.Name == r.ID {
			return input{name: a.Name, base: a.Value}, true
		}
	}
	for _, n := range e.names {
		if n == r.ID {
			return input{}, false // defined but failed: reported already
		}
	}
	if r.ID == "rate" {
		if c == nil {
			return input{}, false
		}
		return input{name: "rate", rate: true, base: c.Rate.Effective}, true
	}
	e.unknownInput(r, what, rep)
	return input{}, false
}

// unknownInput reports a name that is not an input, saying what it is if
// it names something else of the memo.
func (e *env) unknownInput(r parse.Ref, what string, rep *Report) {
	for _, a := range rep.Alternatives {
		if a.ID == r.ID {
			e.errs.Add(r.Pos, "%s is an alternative, not an input; %s takes assumptions (names from assume blocks) or rate", r.ID, what)
			return
		}
	}
	for _, k := range []string{"inflation", "tax_rate", "tax", "life", "salvage"} {
		if r.ID == k {
			e.errs.Add(r.Pos, "%s cannot be varied directly; %s takes assumptions (names from assume blocks) or rate: name the value in an assume block and use the name where it is needed", r.ID, what)
			return
		}
	}
	msg := fmt.Sprintf("unknown input %q; %s takes assumptions (names from assume blocks) or rate", r.ID, what)
	if s := expr.Closest(r.ID, append(append([]string(nil), e.names...), "rate")); s != "" {
		msg += fmt.Sprintf("; did you mean %q?", s)
	}
	e.errs.Add(r.Pos, "%s", msg)
}

// analysisComparison finds the comparison a block names, or the memo's
// only one. ok is false when it is unknown (reported) or failed.
func (e *env) analysisComparison(ref *parse.Ref, kind, id string, pos parse.Pos, rep *Report, comps map[string]*Comparison) (*Comparison, bool) {
	if ref == nil {
		switch len(comps) {
		case 0:
			e.errs.Add(pos, "%s %s needs a comparison to work on, and the memo has no compare block", kind, id)
			return nil, false
		case 1:
			for _, c := range comps {
				return c, c != nil
			}
		}
		ids := make([]string, 0, len(comps))
		for k := range comps {
			ids = append(ids, k)
		}
		sort.Strings(ids)
		e.errs.Add(pos, "%s %s: the memo has several comparisons (%s); name one with \"compare: ID\"", kind, id, strings.Join(ids, ", "))
		return nil, false
	}
	c, found := comps[ref.ID]
	if !found {
		ids := make([]string, 0, len(comps))
		for k := range comps {
			ids = append(ids, k)
		}
		sort.Strings(ids)
		msg := fmt.Sprintf("unknown comparison %q", ref.ID)
		if s := expr.Closest(ref.ID, ids); s != "" {
			msg += fmt.Sprintf("; did you mean %q?", s)
		}
		e.errs.Add(ref.Pos, "%s", msg)
		return nil, false
	}
	return c, c != nil
}

// sensitivity checks a sensitivity block and returns the work that
// evaluates it, or nil when it cannot be evaluated.
func (e *env) sensitivity(memo *parse.Memo, src *parse.Sensitivity, rep *Report, comps map[string]*Comparison) func() {
	c, ok := e.analysisComparison(src.Compare, "sensitivity", src.ID, src.Pos, rep, comps)
	if ok && len(c.Results) == 1 && !c.Results[0].Alt.HasBenefits {
		e.errs.Add(src.Pos, "compare %s has one alternative, which earns nothing, so there is no decision to test; add an alternative", c.ID)
		ok = false
	}
	type swingPlan struct {
		in  input
		pct float64
		pos parse.Pos
	}
	type rangePlan struct {
		in       input
		from, to float64
	}
	var swings []swingPlan
	var ranges []rangePlan
	var bes []input
	seen := map[string]parse.Pos{}
	dup := func(r parse.Ref, what string) bool {
		key := what + " " + r.ID
		if prev, d := seen[key]; d {
			e.errs.Add(r.Pos, "%s is named twice in the %s of sensitivity %s (first at line %d)", r.ID, what, src.ID, prev.Line)
			return true
		}
		seen[key] = r.Pos
		return false
	}
	for _, v := range src.Vary {
		pct := DefaultSwing
		good := true
		if !v.By.IsZero() {
			p, g := e.number(v.By, "the swing")
			good = g
			if g && (p <= 0 || p > 1) {
				hint := ""
				if p > 1 && p <= 100 {
					hint = fmt.Sprintf("; write the percentage with %%, e.g. ±%s%%", trimFloat(p))
				}
				e.errs.Add(v.By.Pos, "a swing must be more than 0%% and at most 100%% of the value, got %s%s", pct100(p), hint)
				good = false
			}
			pct = p
		}
		for _, r := range v.Names {
			if dup(r, "vary lines") {
				continue
			}
			in, g := e.resolveInput(r, "vary", rep, c)
			if !g || !good {
				continue
			}
			if in.base == 0 {
				e.errs.Add(r.Pos, "%s is 0, so a swing of ±%s leaves it at 0; sweep it over values instead: range %s: A to B", r.ID, pct100(pct), r.ID)
				continue
			}
			swings = append(swings, swingPlan{in, pct, r.Pos})
		}
	}
	for _, rg := range src.Ranges {
		if dup(rg.Name, "ranges") {
			continue
		}
		in, g := e.resolveInput(rg.Name, "range", rep, c)
		from, g1 := e.number(rg.From, "the range's first value")
		to, g2 := e.number(rg.To, "the range's last value")
		if !(g1 && g2) {
			continue
		}
		switch {
		case from >= to:
			e.errs.Add(rg.From.Pos, "range %s: the first value (%s) must be below the last (%s)", rg.Name.ID, rg.From.Src, rg.To.Src)
			continue
		case rg.Name.ID == "rate" && from <= -1:
			e.errs.Add(rg.From.Pos, "range rate: a rate must be above -100%%, got %s", pct100(from))
			continue
		case !g:
			continue
		}
		ranges = append(ranges, rangePlan{in, from, to})
	}
	for _, r := range src.Breakevens {
		if dup(r, "breakevens") {
			continue
		}
		if in, g := e.resolveInput(r, "breakeven", rep, c); g {
			bes = append(bes, in)
		}
	}
	if !ok {
		return nil
	}
	s := &Sensitivity{ID: src.ID, Line: src.Pos.Line, Compare: c, Source: src, Measure: "present worth"}
	if c.DecideBy == "annual worth" {
		s.Measure = "annual worth"
	}
	rep.Sensitivities = append(rep.Sensitivities, s)
	return func() {
		w := newWhatIfs(memo, c)
		s.Recommended, s.RunnerUp, s.Margin = w.rec, w.runnerUp, w.baseMargin
		inRange := map[string]bool{}
		for _, p := range swings {
			inRange[p.in.name] = true
		}
		// The values of the swings, spider lines and sweeps are known
		// beforehand: compute them on every core first.
		inputs := map[string]input{}
		var keys []whatIfKey
		for _, p := range swings {
			inputs[p.in.name] = p.in
			xs, _ := spiderValues(p.in, p.pct, w.discrete(p.in))
			for _, x := range xs {
				if x != p.in.base {
					keys = append(keys, whatIfKey{p.in.name, x})
				}
			}
		}
		for _, p := range ranges {
			inputs[p.in.name] = p.in
			for _, x := range w.sweepValues(p.in, p.from, p.to) {
				keys = append(keys, whatIfKey{p.in.name, x})
			}
		}
		for _, in := range bes {
			w.discrete(in)
		}
		w.prefetch(keys, inputs)
		for _, p := range swings {
			sw := &Swing{Name: p.in.name, Rate: p.in.rate, Base: p.in.base, Percent: p.pct}
			line := &SpiderLine{Name: p.in.name, Rate: p.in.rate, Base: p.in.base}
			xs, pcts := spiderValues(p.in, p.pct, w.discrete(p.in))
			for k, x := range xs {
				line.Percent = append(line.Percent, pcts[k])
				pt := w.base(p.in.base)
				if x != p.in.base {
					pt = w.at(p.in, x)
				}
				line.Points = append(line.Points, pt)
			}
			sw.Low, sw.High = line.Points[0], line.Points[len(line.Points)-1]
			if sw.Low.Value > sw.High.Value {
				sw.Low, sw.High = sw.High, sw.Low
			}
			s.Swings = append(s.Swings, sw)
			s.Spider = append(s.Spider, line)
		}
		for _, p := range ranges {
			sw := w.sweep(p.in, p.from, p.to)
			s.Ranges = append(s.Ranges, sw)
			if !inRange[p.in.name] {
				inRange[p.in.name] = true
				s.Swings = append(s.Swings, &Swing{Name: p.in.name, Rate: p.in.rate, Base: p.in.base,
					Low: sw.Points[0], High: sw.Points[len(sw.Points)-1]})
			}
		}
		for _, sw := range s.Swings {
			sw.Spread = spread(s.Margin, sw.Low, sw.High)
		}
		sort.SliceStable(s.Swings, func(i, j int) bool { return s.Swings[i].Spread > s.Swings[j].Spread })
		// Each breakeven search on a core of its own.
		s.Breakevens = make([]*Breakeven, len(bes))
		parallel(len(bes), func(k int) { s.Breakevens[k] = w.breakeven(bes[k]) })
		s.Evaluations = int(w.evals.Load())
	}
}

// spread is the width of a swing: from the lowest to the highest margin
// among the base and the valid ends.
func spread(base float64, lo, hi WhatIf) float64 {
	a, b := base, base
	for _, p := range []WhatIf{lo, hi} {
		if p.Valid() {
			a, b = math.Min(a, p.Margin), math.Max(b, p.Margin)
		}
	}
	return b - a
}

// pct100 formats a fraction as a percentage for messages.
func pct100(x float64) string { return trimFloat(x*100) + "%" }

// whatIfs recomputes one comparison with one input changed at a time.
type whatIfs struct {
	memo       *parse.Memo
	comp       *Comparison // the base comparison
	rec        string      // the base recommendation
	runnerUp   string
	baseMargin float64
	evals      atomic.Int64
	mu         sync.Mutex
	disc       map[string]bool
	// cache holds what-ifs computed ahead, in parallel (prefetch); it is
	// only read while the analyses run.
	cache map[whatIfKey]WhatIf
}

type whatIfKey struct {
	name string
	x    float64
}

// prefetch computes the what-ifs at the given values on every core, so
// that the analyses that follow find them ready. The results do not
// depend on the number of cores.
func (w *whatIfs) prefetch(keys []whatIfKey, inputs map[string]input) {
	out := make([]WhatIf, len(keys))
	parallel(len(keys), func(k int) { out[k] = w.eval(inputs[keys[k].name], keys[k].x) })
	for k, key := range keys {
		w.cache[key] = out[k]
	}
}

// parallel runs f(0) ... f(n-1) on as many goroutines as there are cores.
func parallel(n int, f func(k int)) {
	workers := min(runtime.GOMAXPROCS(0), n)
	var next atomic.Int64
	var wg sync.WaitGroup
	for g := 0; g < workers; g++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := int(next.Add(1) - 1); k < n; k = int(next.Add(1) - 1) {
				f(k)
			}
		}()
	}
	wg.Wait()
}

func newWhatIfs(memo *parse.Memo, c *Comparison) *whatIfs {
	w := &whatIfs{memo: memo, comp: c, rec: c.Recommended, disc: map[string]bool{}, cache: map[whatIfKey]WhatIf{}}
	w.baseMargin, w.runnerUp = w.margin(c)
	return w
}

// measure is the comparison's decision measure of a result.
func measureOf(c *Comparison, r *Result) float64 {
	if c.DecideBy == "annual worth" {
		return r.AW
	}
	return r.PW
}

// margin is the base recommendation's measure less the best other
// alternative's (doing nothing, at zero, where every alternative earns
// benefits), and that other alternative.
func (w *whatIfs) margin(c *Comparison) (float64, string) {
	mine, other, otherID := 0.0, math.Inf(-1), ""
	allBenefits := true
	for _, r := range c.Results {
		allBenefits = allBenefits && r.Alt.HasBenefits
		v := measureOf(c, r)
		if r.Alt.ID == w.rec {
			mine = v
		} else if v > other {
			other, otherID = v, r.Alt.ID
		}
	}
	if allBenefits && w.rec != DoNothing && other < 0 {
		other, otherID = 0, DoNothing
	}
	return mine - other, otherID
}

// base is the what-if at the input's base value: the base comparison.
func (w *whatIfs) base(v float64) WhatIf {
	p := WhatIf{Value: v, Margin: w.baseMargin, Recommended: w.comp.Recommended}
	for _, r := range w.comp.Results {
		p.Worths = append(p.Worths, measureOf(w.comp, r))
	}
	return p
}

// at is the what-if with the input at x.
func (w *whatIfs) at(in input, x float64) WhatIf {
	if p, ok := w.cache[whatIfKey{in.name, x}]; ok {
		return p
	}
	return w.eval(in, x)
}

// eval recomputes the memo with the input at x.
func (w *whatIfs) eval(in input, x float64) WhatIf {
	ov := Overrides{}
	if in.rate {
		ov.Rate = &x
	} else {
		ov.Values = map[string]float64{in.name: x}
	}
	w.evals.Add(1)
	p := WhatIf{Value: x, Margin: math.NaN()}
	rep, err := Recompute(w.memo, ov)
	if err != nil {
		p.Invalid = firstError(err)
		return p
	}
	var c *Comparison
	for _, k := range rep.Comparisons {
		if k.ID == w.comp.ID {
			c = k
		}
	}
	if c == nil {
		p.Invalid = "the comparison could not be computed"
		return p
	}
	p.Margin, _ = w.margin(c)
	p.Recommended = c.Recommended
	for _, r := range c.Results {
		p.Worths = append(p.Worths, measureOf(c, r))
	}
	return p
}

// discrete reports whether an input takes whole numbers only (a life, a
// year of a line): its base value is whole, and half a unit off it the memo
// is invalid for want of a whole number. Swings, sweeps and breakeven
// searches of such an input keep to whole numbers.
func (w *whatIfs) discrete(in input) bool {
	if in.rate || in.base != math.Trunc(in.base) {
		return false
	}
	w.mu.Lock()
	d, ok := w.disc[in.name]
	w.mu.Unlock()
	if !ok {
		p := w.eval(in, in.base+0.5)
		d = !p.Valid() && strings.Contains(p.Invalid, "whole number")
		w.mu.Lock()
		w.disc[in.name] = d
		w.mu.Unlock()
	}
	return d
}

// wholeNear rounds x to a whole number other than base, on x's side of it.
func wholeNear(x, base float64) float64 {
	r := math.Round(x)
	if r == base {
		if x < base {
			return base - 1
		}
		return base + 1
	}
	return r
}

// firstError is the first message of a recomputation's errors, with its
// line, for a report that says why a value is invalid.
func firstError(err error) string {
	var list parse.ErrorList
	if errors.As(err, &list) && len(list) > 0 {
		e := list[0]
		if e.Pos.Line > 0 {
			return fmt.Sprintf("%s (line %d)", e.Msg, e.Pos.Line)
		}
		return e.Msg
	}
	return err.Error()
}

// marginFunc is the margin as a function of the input, NaN where invalid,
// for the root finder.
func (w *whatIfs) marginFunc(in input) func(float64) float64 {
	return func(x float64) float64 { return w.at(in, x).Margin }
}

// sweep evaluates an input at evenly spaced values over [from, to] and
// finds where the recommendation changes between them.
func (w *whatIfs) sweep(in input, from, to float64) *Sweep {
	s := &Sweep{Name: in.name, Rate: in.rate, Base: in.base, From: from, To: to}
	whole := w.discrete(in)
	s.Discrete = whole
	for _, x := range w.sweepValues(in, from, to) {
		s.Points = append(s.Points, w.at(in, x))
	}
	for k := 1; k < len(s.Points); k++ {
		a, b := s.Points[k-1], s.Points[k]
		if !a.Valid() || !b.Valid() || a.Recommended == b.Recommended {
			continue
		}
		// The margin of the left point's choice over the best other
		// changes sign between them.
		left := &whatIfs{memo: w.memo, comp: w.comp, rec: a.Recommended}
		f := func(x float64) float64 {
			p := w.at(in, x)
			if !p.Valid() {
				return math.NaN()
			}
			return left.marginOfPoint(p)
		}
		ch := Change{From: a.Recommended, To: b.Recommended, Lo: a.Value, Hi: b.Value}
		if whole {
			ch.At, ch.Exact, ch.Worth = b.Value, true, math.NaN()
			for j, r := range w.comp.Results {
				if r.Alt.ID == b.Recommended {
					ch.Worth = b.Worths[j]
				}
			}
			if b.Recommended == DoNothing {
				ch.Worth = 0
			}
			s.Changes = append(s.Changes, ch)
			continue
		}
		if x, ok := Root(f, a.Value, b.Value); ok {
			ch.At, ch.Exact = x, true
		} else {
			ch.At = (a.Value + b.Value) / 2
		}
		ch.Worth = math.NaN()
		if p := w.at(in, ch.At); p.Valid() {
			for k, r := range w.comp.Results {
				if r.Alt.ID == a.Recommended {
					ch.Worth = p.Worths[k]
				}
			}
			if a.Recommended == DoNothing {
				ch.Worth = 0
			}
		}
		s.Changes = append(s.Changes, ch)
	}
	return s
}

// sweepValues are the values a range of the input is swept at.
func (w *whatIfs) sweepValues(in input, from, to float64) []float64 {
	if w.discrete(in) {
		return WholeValues(from, to)
	}
	return SweepValues(from, to)
}

// spiderValues are the values of a spider line (the swing's ends among
// them) and their changes from the base value as fractions: the base
// value moved by each of spiderSteps times the swing, or for a
// whole-number input the nearest whole numbers, at their true changes.
func spiderValues(in input, pct float64, whole bool) (xs, changes []float64) {
	for _, k := range spiderSteps {
		ch := k * pct
		x := in.base * (1 + ch)
		if k == 0 {
			x = in.base
		} else if whole {
			x = wholeNear(x, in.base)
			if n := len(xs); n > 0 && xs[n-1] == x {
				continue
			}
			ch = (x - in.base) / math.Abs(in.base)
		}
		xs = append(xs, x)
		changes = append(changes, ch)
	}
	return xs, changes
}

// marginOfPoint is the margin of w.rec at a what-if, from its worths.
func (w *whatIfs) marginOfPoint(p WhatIf) float64 {
	mine, other := 0.0, math.Inf(-1)
	allBenefits := true
	for k, r := range w.comp.Results {
		allBenefits = allBenefits && r.Alt.HasBenefits
		if r.Alt.ID == w.rec {
			mine = p.Worths[k]
		} else {
			other = math.Max(other, p.Worths[k])
		}
	}
	if allBenefits && w.rec != DoNothing {
		other = math.Max(other, 0)
	}
	return mine - other
}

// breakevenFactors are the multiples of the base value a breakeven search
// tries, outward from the base: upward to 100 times, downward to zero.
var (
	breakevenUp   = []float64{1.05, 1.1, 1.2, 1.35, 1.5, 1.75, 2, 2.5, 3, 4, 5, 7, 10, 20, 50, 100}
	breakevenDown = []float64{0.95, 0.9, 0.8, 0.65, 0.5, 0.35, 0.2, 0.1, 0}
)

// MaxBreakevenRate is the highest rate a breakeven search on the rate
// tries.
const MaxBreakevenRate = 1.0

// breakevenScan lists the values to try on each side of the base value:
// multiples of it (the same sign only: a price or a cost does not turn
// negative), or powers of ten both ways from a base of zero; rates from
// zero to 100%.
func breakevenScan(in input) (up, down []float64) {
	v := in.base
	if v == 0 {
		for k := -2; k <= 9; k++ {
			x := math.Pow(10, float64(k))
			if in.rate && x > MaxBreakevenRate {
				break
			}
			up = append(up, x)
			if !in.rate {
				down = append(down, -x)
			}
		}
		return up, down
	}
	for _, f := range breakevenUp {
		x := v * f
		if in.rate && x > MaxBreakevenRate {
			if len(up) == 0 || up[len(up)-1] < MaxBreakevenRate {
				up = append(up, MaxBreakevenRate)
			}
			break
		}
		up = append(up, x)
	}
	for _, f := range breakevenDown {
		down = append(down, v*f)
	}
	if v < 0 {
		up, down = down, up
	}
	return up, down
}

// breakeven finds the value of an input at which the recommendation
// changes: it scans outward from the base value on both sides until the
// margin changes sign, closes in on the root with a bracketing root finder
// (Brent's method), and substitutes the value back to verify it.
func (w *whatIfs) breakeven(in input) *Breakeven {
	b := &Breakeven{Name: in.name, Rate: in.rate, Base: in.base, SearchedLow: in.base, SearchedHigh: in.base}
	if math.Abs(w.baseMargin) < tieTolerance {
		v := in.base
		b.Value, b.Tied, b.Verified, b.MarginAt, b.To = &v, true, true, w.baseMargin, w.runnerUp
		return b
	}
	up, down := breakevenScan(in)
	whole := w.discrete(in)
	if whole {
		up, down = wholeScan(up, in.base), wholeScan(down, in.base)
	}
	type found = bracket
	effect := false
	scan := func(xs []float64) *found {
		prev := w.base(in.base)
		for _, x := range xs {
			p := w.at(in, x)
			if !p.Valid() {
				b.Limits = append(b.Limits, fmt.Sprintf("at %s the memo is invalid: %s", inputText(in, x), p.Invalid))
				return nil
			}
			if x < b.SearchedLow {
				b.SearchedLow = x
			}
			if x > b.SearchedHigh {
				b.SearchedHigh = x
			}
			if math.Abs(p.Margin-w.baseMargin) > 1e-9*math.Max(1, math.Abs(w.baseMargin)) {
				effect = true
			}
			if (p.Margin > 0) != (prev.Margin > 0) {
				return &found{prev, p}
			}
			prev = p
		}
		return nil
	}
	fUp, fDown := scan(up), scan(down)
	if !effect && fUp == nil && fDown == nil {
		b.NoEffect = true
		return b
	}
	if whole {
		return w.wholeBreakeven(in, b, fUp, fDown)
	}
	solve := func(f *found) (float64, string, bool, float64) {
		root, ok := Root(w.marginFunc(in), f.lo.Value, f.hi.Value)
		if !ok {
			// The margin jumps (a recommendation that turns on a tie rule,
			// or a value where the memo is invalid): report the bracket's
			// far end, unverified.
			return f.hi.Value, f.hi.Recommended, false, math.NaN()
		}
		at := w.at(in, root)
		// Verify: the margin is about zero at the root, and the
		// recommendation differs just on either side, a step chosen to
		// take the margin clear of the tie tolerance.
		slope := math.Abs((f.hi.Margin - f.lo.Margin) / (f.hi.Value - f.lo.Value))
		step := math.Abs(root) * 1e-9
		if slope > 0 {
			step = math.Max(step, 4*tieTolerance/slope)
		}
		nearSide := math.Min(step, math.Abs(root-f.lo.Value)/2)
		farSide := math.Min(step, math.Abs(f.hi.Value-root)/2)
		dir := 1.0
		if f.hi.Value < f.lo.Value {
			dir = -1
		}
		near := w.at(in, root-dir*nearSide)
		far := w.at(in, root+dir*farSide)
		tol := math.Max(0.01, 1e-9*math.Max(math.Abs(f.lo.Margin), math.Abs(f.hi.Margin)))
		verified := at.Valid() && math.Abs(at.Margin) <= tol && near.Valid() && far.Valid() &&
			near.Recommended == w.rec && far.Recommended != w.rec
		to := far.Recommended
		if !far.Valid() {
			to = f.hi.Recommended
		}
		return root, to, verified, at.Margin
	}
	var roots []struct {
		x, m   float64
		to     string
		verify bool
	}
	for _, f := range []*found{fUp, fDown} {
		if f == nil {
			continue
		}
		x, to, v, m := solve(f)
		roots = append(roots, struct {
			x, m   float64
			to     string
			verify bool
		}{x, m, to, v})
	}
	if len(roots) == 0 {
		return b
	}
	sort.SliceStable(roots, func(i, j int) bool {
		return math.Abs(roots[i].x-in.base) < math.Abs(roots[j].x-in.base)
	})
	r := roots[0]
	b.Value, b.To, b.Verified, b.MarginAt = &r.x, r.to, r.verify, r.m
	if len(roots) > 1 {
		o := roots[1]
		b.Other, b.OtherTo = &o.x, o.to
	}
	return b
}

// wholeScan rounds scan values to whole numbers, dropping the base and
// repeats.
func wholeScan(xs []float64, base float64) []float64 {
	var out []float64
	for _, x := range xs {
		r := math.Round(x)
		if r == base || len(out) > 0 && out[len(out)-1] == r {
			continue
		}
		out = append(out, r)
	}
	return out
}

// wholeBreakeven closes in on the change of recommendation of a
// whole-number input by bisection over whole numbers: the last value at
// which the base recommendation holds and the first at which it does not,
// nearest the base on either side.
func (w *whatIfs) wholeBreakeven(in input, b *Breakeven, sides ...*bracket) *Breakeven {
	b.Discrete = true
	var rs []bracket
	for _, f := range sides {
		if f == nil {
			continue
		}
		lo, hi := f.lo, f.hi
		for math.Abs(hi.Value-lo.Value) > 1 {
			p := w.at(in, math.Round((lo.Value+hi.Value)/2))
			if !p.Valid() {
				break
			}
			if (p.Margin > 0) == (lo.Margin > 0) {
				lo = p
			} else {
				hi = p
			}
		}
		rs = append(rs, bracket{lo, hi})
	}
	if len(rs) == 0 {
		return b
	}
	sort.SliceStable(rs, func(i, j int) bool {
		return math.Abs(rs[i].hi.Value-in.base) < math.Abs(rs[j].hi.Value-in.base)
	})
	r := rs[0]
	v := r.hi.Value
	b.Value, b.Holds, b.To, b.MarginAt = &v, r.lo.Value, r.hi.Recommended, r.hi.Margin
	b.Verified = math.Abs(r.hi.Value-r.lo.Value) == 1 && r.lo.Recommended == w.rec && r.hi.Recommended != w.rec
	if len(rs) > 1 {
		o := rs[1].hi.Value
		b.Other, b.OtherTo = &o, rs[1].hi.Recommended
	}
	return b
}

// bracket is a pair of what-ifs on either side of a change of sign of the
// margin, lo on the base side.
type bracket struct{ lo, hi WhatIf }

// inputText shows an input's value in a message.
func inputText(in input, x float64) string {
	if in.rate {
		return "rate " + pct(x)
	}
	return in.name + " = " + trimFloat(x)
}
