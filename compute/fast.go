package compute

import (
	"fmt"
	"math"
	"math/bits"
	"math/rand/v2"
	"slices"
	"strings"

	"worth/expr"
	"worth/parse"
)

// The compiled per-trial evaluator of a risk analysis.
//
// A comparison's present worths are linear in the amounts of its
// alternatives: each alternative's present worth is
//
//	PW = Σ_j amount_j × C_j(i, g_j) + Σ_j gradient_j × G_j(i) + residual × R(i)
//
// where the coefficient C_j is what one unit of line j is worth over the
// comparison's horizon (its years, cycles, cut and residual rule are fixed;
// only the rate i and, for an escalating series, its escalation g_j enter),
// and the default residual value (straight line between first cost and
// salvage) is folded into the coefficients of the first cost and salvage.
// The model compiles this once: the coefficients are computed at the
// comparison's rate, and recomputed in a trial only where the rate or an
// escalation is itself drawn.
//
// Each amount, gradient, escalation, residual and the rate is a quantity:
// a function of the drawn assumptions through whatever derived assumptions
// lie between. A quantity that depends on no drawn assumption is a
// constant; one that is multilinear in the drawn ones it depends on (as
// `power_kwh * power_price` is) is found by evaluating it at the corners of
// a box and checked at points across the distributions' ranges, then
// evaluated as a sum of products; and an affine one collapses, with its
// coefficient, into one affine form per alternative. Only a quantity that is
// neither (a power of a drawn value, a factor function of a drawn rate, a
// conditional) is evaluated per trial with its compiled expression. No
// string is read or parsed during the trials.

// maxMulti is the most drawn assumptions a quantity may depend on to be
// evaluated as a multilinear form (2^maxMulti corner coefficients).
const maxMulti = 6

// riskInput is an assumption whose value is drawn in the trials.
type riskInput struct {
	Name string
	Line int
	Base float64
	Dist *Distribution
	s    sampler
}

type qKind uint8

const (
	qConst   qKind = iota // no drawn assumption reaches it
	qAffine               // c0 + Σ w_k x_k
	qMulti                // Σ_S d_S Π_{k∈S} t_k, t_k = (x_k - lo_k) / (hi_k - lo_k)
	qGeneral              // its compiled expression, evaluated per trial
)

// quantity is one value of the memo as a function of the drawn inputs.
type quantity struct {
	kind qKind
	base float64 // at the base case
	vars []int   // indices of the drawn inputs it depends on
	c0   float64
	w    []float64
	lo   []float64
	inv  []float64
	d    []float64
	x    *expr.Expr
	text parse.Text
	what string
}

// value evaluates the quantity at the drawn values x; vars holds the
// assumptions' values for this trial (used by general quantities only).
func (q *quantity) value(x []float64, vars map[string]any) (float64, error) {
	switch q.kind {
	case qConst:
		return q.base, nil
	case qAffine:
		v := q.c0
		for k, j := range q.vars {
			v += q.w[k] * x[j]
		}
		return v, nil
	case qMulti:
		var t [maxMulti]float64
		var prod [1 << maxMulti]float64
		for k, j := range q.vars {
			t[k] = (x[j] - q.lo[k]) * q.inv[k]
		}
		prod[0] = 1
		v := q.d[0]
		for m := 1; m < len(q.d); m++ {
			prod[m] = prod[m&(m-1)] * t[bits.TrailingZeros(uint(m))]
			v += q.d[m] * prod[m]
		}
		return v, nil
	}
	v, err := q.x.Number(vars)
	if err != nil {
		return 0, fmt.Errorf("%s (%s): %v", q.what, q.text.Src, err)
	}
	return v, nil
}

// riskCompiler knows how the memo's assumptions depend on each other and
// turns expressions into quantities.
type riskCompiler struct {
	e        *env
	inputs   []*riskInput
	index    map[string]int
	compiled map[string]*expr.Expr // every assumption's expression
	reach    map[string][]int      // the drawn inputs each assumption depends on
	order    []string              // every assumption, dependencies first
	probes   [][]float64
	mid      []float64
	// derived are the assumptions that general quantities need
	// re-evaluated in each trial.
	derived map[string]bool
}

func newRiskCompiler(e *env, memo *parse.Memo, inputs []*riskInput) *riskCompiler {
	c := &riskCompiler{e: e, inputs: inputs, index: map[string]int{}, compiled: map[string]*expr.Expr{},
		reach: map[string][]int{}, derived: map[string]bool{}}
	for k, in := range inputs {
		c.index[in.Name] = k
	}
	var names []string
	for _, b := range memo.Blocks {
		if a, ok := b.(*parse.Assume); ok {
			for _, it := range a.Items {
				if _, dup := c.compiled[it.Name]; dup {
					continue
				}
				c.compiled[it.Name] = c.exprOf(it.Expr)
				names = append(names, it.Name)
			}
		}
	}
	done := map[string]bool{}
	var visit func(name string) []int
	visit = func(name string) []int {
		if done[name] {
			return c.reach[name]
		}
		done[name] = true
		var r []int
		if k, drawn := c.index[name]; drawn {
			r = []int{k}
		} else if x := c.compiled[name]; x != nil {
			for _, v := range x.Vars() {
				if _, known := c.compiled[v.Name]; known {
					r = union(r, visit(v.Name))
				}
			}
		}
		c.reach[name] = r
		c.order = append(c.order, name)
		return r
	}
	for _, n := range names {
		visit(n)
	}
	// Points across the distributions' ranges where every compiled form is
	// checked: both ends of every range, then draws from an internal stream
	// (fixed, so that the compiled forms never depend on the memo's seed).
	lo := make([]float64, len(inputs))
	hi := make([]float64, len(inputs))
	c.mid = make([]float64, len(inputs))
	for k, in := range inputs {
		lo[k], hi[k] = in.s.bounds()
		c.mid[k] = in.s.quantile(0.5)
	}
	c.probes = append(c.probes, lo, hi)
	r := rand.New(rand.NewPCG(0x9e3779b97f4a7c15, 0x5eed))
	for p := 0; p < 6; p++ {
		pt := make([]float64, len(inputs))
		for k, in := range inputs {
			pt[k] = in.s.draw(r)
		}
		c.probes = append(c.probes, pt)
	}
	return c
}

// union merges two sorted index lists.
func union(a, b []int) []int {
	out := append([]int(nil), a...)
	for _, x := range b {
		if !slices.Contains(out, x) {
			out = append(out, x)
		}
	}
	slices.Sort(out)
	return out
}

// exprOf compiles t (the memo was computed, so it compiles).
func (c *riskCompiler) exprOf(t parse.Text) *expr.Expr {
	if x, ok := c.e.cache[t.Src]; ok {
		return x
	}
	x, err := expr.Compile(t.Src, c.e.opts)
	if err != nil {
		return nil
	}
	c.e.cache[t.Src] = x
	return x
}

// depsOf lists the drawn inputs that an expression depends on.
func (c *riskCompiler) depsOf(x *expr.Expr) []int {
	var out []int
	for _, v := range x.Vars() {
		out = union(out, c.reach[v.Name])
	}
	return out
}

// closure lists the assumptions that an expression reads, directly or
// through others, stopping at drawn ones.
func (c *riskCompiler) closure(x *expr.Expr) []string {
	seen := map[string]bool{}
	var walk func(x *expr.Expr)
	walk = func(x *expr.Expr) {
		for _, v := range x.Vars() {
			if seen[v.Name] {
				continue
			}
			seen[v.Name] = true
			if _, drawn := c.index[v.Name]; !drawn && c.compiled[v.Name] != nil {
				walk(c.compiled[v.Name])
			}
		}
	}
	walk(x)
	var out []string
	for _, n := range c.order {
		if seen[n] {
			out = append(out, n)
		}
	}
	return out
}

// evalAt evaluates x with the drawn inputs at pt and every assumption that
// depends on them recomputed.
func (c *riskCompiler) evalAt(pt []float64, x *expr.Expr) (float64, error) {
	vars := make(map[string]any, len(c.e.vars))
	for k, v := range c.e.vars {
		vars[k] = v
	}
	for k, in := range c.inputs {
		vars[in.Name] = pt[k]
	}
	for _, name := range c.order {
		if _, drawn := c.index[name]; drawn || len(c.reach[name]) == 0 {
			continue
		}
		v, err := c.compiled[name].Number(vars)
		if err != nil {
			return 0, err
		}
		vars[name] = v
	}
	return x.Number(vars)
}

// piecewise reports whether an expression (or an assumption it reads)
// holds a conditional or a remainder, whose value can jump: such a
// quantity is always evaluated from its expression.
func (c *riskCompiler) piecewise(x *expr.Expr) bool {
	srcs := []string{x.Source()}
	for _, n := range c.closure(x) {
		if c.compiled[n] != nil {
			srcs = append(srcs, c.compiled[n].Source())
		}
	}
	for _, s := range srcs {
		if strings.ContainsRune(s, '?') {
			return true
		}
		for i := 0; i < len(s); i++ {
			// "7%" is a percentage; any other % is the remainder operator.
			if s[i] == '%' && (i == 0 || !(s[i-1] >= '0' && s[i-1] <= '9' || s[i-1] == '.')) {
				return true
			}
		}
	}
	return false
}

// quantity compiles t, the value of `what`.
func (c *riskCompiler) quantity(t parse.Text, what string) *quantity {
	x := c.exprOf(t)
	q := &quantity{x: x, text: t, what: what}
	if x == nil {
		q.kind = qConst
		return q
	}
	q.base, _ = x.Number(c.e.vars)
	deps := c.depsOf(x)
	if len(deps) == 0 {
		q.kind = qConst
		return q
	}
	q.vars = deps
	if len(deps) > maxMulti || c.piecewise(x) || !c.multilinear(q) {
		c.general(q)
	}
	return q
}

// multilinear fits q as a multilinear (or affine) form in its drawn
// inputs and checks the fit at the probe points.
func (c *riskCompiler) multilinear(q *quantity) bool {
	k := len(q.vars)
	q.lo = make([]float64, k)
	q.inv = make([]float64, k)
	hi := make([]float64, k)
	for j, v := range q.vars {
		s := &c.inputs[v].s
		q.lo[j], hi[j] = s.quantile(0.3), s.quantile(0.7)
		if !(hi[j] > q.lo[j]) {
			return false
		}
		q.inv[j] = 1 / (hi[j] - q.lo[j])
	}
	f := make([]float64, 1<<k)
	pt := slices.Clone(c.mid)
	for m := range f {
		for j, v := range q.vars {
			if m&(1<<j) != 0 {
				pt[v] = hi[j]
			} else {
				pt[v] = q.lo[j]
			}
		}
		y, err := c.evalAt(pt, q.x)
		if err != nil {
			return false
		}
		f[m] = y
	}
	// Möbius inversion: the coefficient of Π_{j∈S} t_j.
	for j := 0; j < k; j++ {
		for m := range f {
			if m&(1<<j) != 0 {
				f[m] -= f[m^(1<<j)]
			}
		}
	}
	q.d = f
	// Affine when the fit without the products holds.
	q.w = make([]float64, k)
	q.c0 = f[0]
	for j := range q.vars {
		q.w[j] = f[1<<j] * q.inv[j]
		q.c0 -= q.w[j] * q.lo[j]
	}
	q.kind = qAffine
	if c.fits(q) {
		return true
	}
	q.kind = qMulti
	return c.fits(q)
}

// fits checks a compiled form against the expression at the probe points.
func (c *riskCompiler) fits(q *quantity) bool {
	scale := 0.0
	for _, d := range q.d {
		scale += math.Abs(d)
	}
	for _, pt := range c.probes {
		want, err := c.evalAt(pt, q.x)
		if err != nil {
			return false
		}
		got, _ := q.value(pt, nil)
		if !(math.Abs(got-want) <= 1e-10*(math.Abs(want)+scale)) {
			return false
		}
	}
	return true
}

// general makes q a quantity evaluated from its expression in each trial,
// with the derived assumptions it reads refreshed first.
func (c *riskCompiler) general(q *quantity) {
	q.kind = qGeneral
	for _, n := range c.closure(q.x) {
		if _, drawn := c.index[n]; !drawn && len(c.reach[n]) > 0 {
			c.derived[n] = true
		}
	}
}

// lowest is the least value of q within the ranges of its inputs (exact
// for affine and multilinear forms, which take their extremes at corners;
// sampled at the probe points otherwise).
func (c *riskCompiler) lowest(q *quantity) float64 {
	switch q.kind {
	case qConst:
		return q.base
	case qGeneral:
		low := q.base
		for _, pt := range c.probes {
			if v, err := c.evalAt(pt, q.x); err == nil {
				low = math.Min(low, v)
			}
		}
		return low
	}
	low := math.Inf(1)
	pt := slices.Clone(c.mid)
	for m := 0; m < 1<<len(q.vars); m++ {
		for j, v := range q.vars {
			lo, hi := c.inputs[v].s.bounds()
			if m&(1<<j) != 0 {
				pt[v] = hi
			} else {
				pt[v] = lo
			}
		}
		v, _ := q.value(pt, nil)
		low = math.Min(low, v)
	}
	return low
}

// ---- the model ----

// fastItem is one money line of an alternative, compiled.
type fastItem struct {
	it     *Item
	sign   float64
	amount *quantity
	grad   *quantity // nil unless the line has a gradient
	esc    *quantity // nil unless it escalates
	ca, cg float64   // coefficients at the base rate and escalation
	varies bool      // coefficients recomputed in each trial
}

// restTerm is a quantity that is not affine, times its fixed coefficient.
type restTerm struct {
	q    *quantity
	coef float64
}

// fastAlt is one alternative of the comparison, compiled.
type fastAlt struct {
	alt      *Alternative
	items    []fastItem
	residual *quantity // a stated residual; nil for the default rule
	cr       float64
	varies   bool // some coefficient is recomputed in each trial
	// With fixed coefficients: PW = c0 + Σ w_k x[wi_k] + Σ pc_j P[pi_j]
	// + Σ rest, where P are the model's products of drawn inputs.
	c0         float64
	wi         []int
	w          []float64
	pi         []int
	pc         []float64
	rest       []restTerm
	firstCosts []*quantity
}

// fastModel is a comparison compiled for trials.
type fastModel struct {
	comp      *Comparison
	inputs    []*riskInput
	alts      []*fastAlt
	n         int // horizon years; 0 when perpetual
	perpetual bool
	maxYear   int
	// The rate: fixed (rate, disc), or drawn (rateQ and/or inflQ).
	rate        float64
	disc        []float64
	rateVaries  bool
	rateQ       *quantity
	inflQ       *quantity
	rateSpec    *parse.RateSpec
	inflSpec    *parse.RateSpec
	stated      float64 // the rate as written, when rateQ is nil
	inflStated  float64 // the inflation as written, when inflQ is nil
	allBenefits bool
	awRule      bool
	// Derived assumptions re-evaluated in each trial for general
	// quantities, in dependency order.
	refresh  []string
	refreshX []*expr.Expr
	general  bool
	// prods are the products of two or more drawn inputs that multilinear
	// amounts hold, each Π t_k with t_k = (x_k - tlo_k) tinv_k; tNeed are
	// the inputs they use.
	prods     [][]int
	tlo, tinv []float64
	tNeed     []int
	// base holds the base case's values of the assumptions.
	base     map[string]any
	warnings []string
}

// modelError is a reason the comparison cannot be simulated, at a
// position of the memo.
type modelError struct {
	pos parse.Pos
	msg string
}

// compileModel compiles comparison c for trials over the given inputs.
func compileModel(rc *riskCompiler, memo *parse.Memo, c *Comparison) (*fastModel, []modelError) {
	inputs := rc.inputs
	m := &fastModel{comp: c, inputs: inputs, base: rc.e.vars, perpetual: c.Horizon.Perpetual(), n: c.Horizon.Years,
		awRule: c.DecideBy == "annual worth", allBenefits: true}
	m.tlo = make([]float64, len(inputs))
	m.tinv = make([]float64, len(inputs))
	for k, in := range inputs {
		m.tlo[k] = in.s.quantile(0.3)
		m.tinv[k] = 1 / (in.s.quantile(0.7) - m.tlo[k])
	}
	var errs []modelError
	names := func(deps []int) string {
		var s []string
		for _, k := range deps {
			s = append(s, inputs[k].Name)
		}
		return strings.Join(s, ", ")
	}
	// Years are structure: they may not be drawn.
	fixed := func(t *parse.Text, what, alt string) {
		if t == nil {
			return
		}
		x := rc.exprOf(*t)
		if x == nil {
			return
		}
		if deps := rc.depsOf(x); len(deps) > 0 {
			errs = append(errs, modelError{t.Pos, fmt.Sprintf("%s of %s depends on %s, which the risk analysis draws; it draws amounts and rates, not years: give %s a fixed value (a scenario can compare other years)", what, alt, names(deps), what)})
		}
	}
	if c.Source.Horizon != nil {
		fixed(c.Source.Horizon.Years, "the study period", "compare "+c.ID)
	}
	// The rate, as the comparison takes it.
	m.rateSpec = c.Source.Rate
	if m.rateSpec == nil {
		m.rateSpec = memo.Front.Rate
	}
	m.rate = c.Rate.Effective
	m.stated = c.Rate.Stated
	m.inflStated = c.Rate.Inflation
	if m.rateSpec != nil {
		if q := rc.quantity(m.rateSpec.Value, "the rate"); q.kind != qConst {
			m.rateQ = q
		}
		if m.rateSpec.Mode == "real" && memo.Front.Inflation != nil {
			m.inflSpec = memo.Front.Inflation
			if q := rc.quantity(m.inflSpec.Value, "inflation"); q.kind != qConst {
				m.inflQ = q
			}
		}
	}
	m.rateVaries = m.rateQ != nil || m.inflQ != nil
	for _, r := range c.Results {
		a := r.Alt
		fa := &fastAlt{alt: a}
		m.allBenefits = m.allBenefits && a.HasBenefits
		src := a.Source
		fixed(src.Life, "the life", a.ID)
		if len(src.Lines) != len(a.Items) {
			errs = append(errs, modelError{src.Pos, fmt.Sprintf("alternative %s cannot be compiled for a risk analysis", a.ID)})
			continue
		}
		if src.Residual != nil {
			fa.residual = rc.quantity(*src.Residual, "residual of "+a.ID)
		}
		for k, l := range src.Lines {
			it := a.Items[k]
			for _, y := range []struct {
				t    *parse.Text
				what string
			}{{l.At, "the year of " + l.Label}, {l.Every, "the interval of " + l.Label}, {l.From, "the first year of " + l.Label}, {l.To, "the last year of " + l.Label}} {
				fixed(y.t, y.what, a.ID)
			}
			fi := fastItem{it: it, sign: it.category().sign()}
			fi.amount = rc.quantity(l.Amount, l.Label+" of "+a.ID)
			if it.HasGradient && l.Gradient != nil {
				fi.grad = rc.quantity(*l.Gradient, "the gradient of "+l.Label+" of "+a.ID)
			}
			if it.HasEscalation && l.Escalating != nil {
				fi.esc = rc.quantity(*l.Escalating, "the escalation of "+l.Label+" of "+a.ID)
			}
			fi.varies = m.rateVaries || (fi.esc != nil && fi.esc.kind != qConst)
			fa.varies = fa.varies || fi.varies
			if it.Kind == parse.FirstCost {
				fa.firstCosts = append(fa.firstCosts, fi.amount)
			}
			fa.items = append(fa.items, fi)
			// An amount drawn below zero turns a cost into money received.
			if low := rc.lowest(fi.amount); low < 0 && fi.amount.kind != qConst {
				m.warnings = append(m.warnings, fmt.Sprintf("%s (line %d) can fall below zero within the ranges of %s (to about %s); in trials where it does, the amount counts the other way.", capitalFirst(fi.amount.what), it.Line, names(fi.amount.vars), trimFloat(math.Round(low))))
			}
		}
		m.alts = append(m.alts, fa)
	}
	if len(errs) > 0 {
		return nil, errs
	}
	// The discount factors.
	m.maxYear = m.n
	if m.perpetual {
		for _, fa := range m.alts {
			m.maxYear = max(m.maxYear, fa.alt.Life)
			if fa.alt.Life == 0 {
				for _, fi := range fa.items {
					m.maxYear = max(m.maxYear, fi.it.At, fi.it.To, fi.it.From)
				}
			}
		}
	}
	m.disc = make([]float64, m.maxYear+1)
	for t := range m.disc {
		m.disc[t] = PF(m.rate, float64(t))
	}
	// Coefficients at the base rate and escalations, and the affine forms.
	for _, fa := range m.alts {
		for k := range fa.items {
			fi := &fa.items[k]
			g := 0.0
			if fi.esc != nil {
				g = fi.esc.base
			}
			fi.ca, fi.cg = m.coef(fa.alt, fi, m.disc, m.rate, g)
		}
		fa.cr = m.residualCoef(fa, m.disc)
		if fa.varies {
			continue
		}
		w := make([]float64, len(inputs))
		pc := map[int]float64{}
		add := func(q *quantity, coef float64) {
			if q == nil || coef == 0 {
				return
			}
			switch q.kind {
			case qConst:
				fa.c0 += coef * q.base
			case qAffine:
				fa.c0 += coef * q.c0
				for j, v := range q.vars {
					w[v] += coef * q.w[j]
				}
			case qMulti:
				// Σ_S d_S Π_{j∈S} t_j: the constant and the terms of one
				// input join the affine form, products the model's list.
				for mask, d := range q.d {
					if d == 0 {
						continue
					}
					switch bits.OnesCount(uint(mask)) {
					case 0:
						fa.c0 += coef * d
					case 1:
						j := bits.TrailingZeros(uint(mask))
						w[q.vars[j]] += coef * d * q.inv[j]
						fa.c0 -= coef * d * q.inv[j] * q.lo[j]
					default:
						var vs []int
						for j, v := range q.vars {
							if mask&(1<<j) != 0 {
								vs = append(vs, v)
							}
						}
						pc[m.product(vs)] += coef * d
					}
				}
			default:
				fa.rest = append(fa.rest, restTerm{q, coef})
			}
		}
		for _, fi := range fa.items {
			add(fi.amount, fi.ca)
			add(fi.grad, fi.cg)
		}
		add(fa.residual, fa.cr)
		for v, x := range w {
			if x != 0 {
				fa.wi = append(fa.wi, v)
				fa.w = append(fa.w, x)
			}
		}
		for p := range m.prods {
			if x, ok := pc[p]; ok && x != 0 {
				fa.pi = append(fa.pi, p)
				fa.pc = append(fa.pc, x)
			}
		}
	}
	for _, q := range m.quantities() {
		if q.kind == qGeneral {
			m.general = true
		}
	}
	for _, n := range rc.order {
		if rc.derived[n] {
			m.refresh = append(m.refresh, n)
			m.refreshX = append(m.refreshX, rc.compiled[n])
		}
	}
	return m, nil
}

// product returns the index of the product of the inputs vs (sorted),
// adding it to the model's list.
func (m *fastModel) product(vs []int) int {
	for p, ws := range m.prods {
		if slices.Equal(ws, vs) {
			return p
		}
	}
	m.prods = append(m.prods, vs)
	for _, v := range vs {
		if !slices.Contains(m.tNeed, v) {
			m.tNeed = append(m.tNeed, v)
		}
	}
	return len(m.prods) - 1
}

// quantities lists every quantity of the model.
func (m *fastModel) quantities() []*quantity {
	var out []*quantity
	if m.rateQ != nil {
		out = append(out, m.rateQ)
	}
	if m.inflQ != nil {
		out = append(out, m.inflQ)
	}
	for _, fa := range m.alts {
		if fa.residual != nil {
			out = append(out, fa.residual)
		}
		for _, fi := range fa.items {
			for _, q := range []*quantity{fi.amount, fi.grad, fi.esc} {
				if q != nil {
					out = append(out, q)
				}
			}
		}
	}
	return out
}

func capitalFirst(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}

// cycleSum is the present worth at age 0 of one unit of an item (and of
// one unit of its gradient) over the ages of a cycle up to end, with the
// discount factors d and escalation g: Σ w(t) d[t] over the ages t when the
// item falls, w(t) = (1+g)^(t-From) for an escalating series, else 1.
func cycleSum(it *Item, life, end int, d []float64, g float64) (sa, sg float64) {
	switch it.Kind {
	case parse.FirstCost:
		return d[0], 0
	case parse.Once:
		if it.At <= end {
			return d[it.At], 0
		}
	case parse.Salvage:
		if life > 0 && end >= life {
			return d[life], 0
		}
	case parse.Annual:
		last := it.lastYear(life)
		if last < 0 || last > end {
			last = end
		}
		w, growth := 1.0, 1+g
		for t := it.From; t <= last; t++ {
			sa += w * d[t]
			if it.HasGradient {
				sg += float64(t-it.From) * d[t]
			}
			if it.HasEscalation {
				w *= growth
			}
		}
	case parse.Periodic:
		last := it.lastYear(life)
		if last < 0 || last > end {
			last = end
		}
		for t := it.From; t <= last; t += it.Every {
			sa += d[t]
		}
	}
	return sa, sg
}

// coef is the present worth over the comparison's horizon of one unit of
// an item's amount (ca) and of its gradient (cg), signed by the item's
// direction, at rate i with discount factors d = (P/F, i, t) and the item's
// escalation g. It follows the horizon rules of Alternative.Flows (finite
// horizons: whole cycles, then a cycle cut at the horizon and ended with its
// residual value) and of evalPerpetual and cycleTerms (perpetual horizons).
func (m *fastModel) coef(a *Alternative, fi *fastItem, d []float64, i, g float64) (ca, cg float64) {
	it := fi.it
	L := a.Life
	if m.perpetual {
		if L > 0 {
			sa, sg := cycleSum(it, L, L, d, g)
			k := AP(i, float64(L)) / i
			return fi.sign * sa * k, fi.sign * sg * k
		}
		if (it.Kind == parse.Annual || it.Kind == parse.Periodic) && it.lastYear(0) < 0 {
			// A series that runs forever: its closed form, as cycleTerms.
			shift := 1.0
			if it.From > 1 {
				shift = PF(i, float64(it.From-1))
			}
			if it.Kind == parse.Annual {
				if it.HasEscalation {
					return fi.sign * PGeo(g, i, math.Inf(1)) * shift, 0
				}
				ca = fi.sign * PA(i, math.Inf(1)) * shift
				if it.HasGradient {
					cg = fi.sign * PG(i, math.Inf(1)) * shift
				}
				return ca, cg
			}
			f := AF(i, float64(it.Every)) * PA(i, math.Inf(1))
			switch {
			case it.From > it.Every:
				f *= PF(i, float64(it.From-it.Every))
			case it.From < it.Every:
				f *= FP(i, float64(it.Every-it.From))
			}
			return fi.sign * f, 0
		}
		sa, sg := cycleSum(it, 0, m.maxYear, d, g)
		return fi.sign * sa, fi.sign * sg
	}
	n := m.n
	if L == 0 {
		sa, sg := cycleSum(it, 0, n, d, g)
		return fi.sign * sa, fi.sign * sg
	}
	full, rem := n/L, n%L
	cycles := 0.0
	for k := 0; k < full; k++ {
		cycles += d[k*L]
	}
	if full > 0 {
		sa, sg := cycleSum(it, L, L, d, g)
		ca, cg = sa*cycles, sg*cycles
	}
	if rem > 0 {
		pa, pg := cycleSum(it, L, rem, d, g)
		ca += d[full*L] * pa
		cg += d[full*L] * pg
	}
	ca, cg = fi.sign*ca, fi.sign*cg
	if rem > 0 && a.Residual == nil {
		// The default residual value at the cut, FirstCost (1 - t/L) +
		// salvage t/L (Alternative.ResidualAt), received at year n.
		switch it.Kind {
		case parse.FirstCost:
			ca += (1 - float64(rem)/float64(L)) * d[n]
		case parse.Salvage:
			ca += float64(rem) / float64(L) * d[n]
		}
	}
	return ca, cg
}

// residualCoef is what one unit of a stated residual value is worth: it is
// received at the end of a finite horizon that cuts a cycle.
func (m *fastModel) residualCoef(fa *fastAlt, d []float64) float64 {
	if m.perpetual || fa.residual == nil {
		return 0
	}
	if L := fa.alt.Life; L == 0 || m.n%L != 0 {
		return d[m.n]
	}
	return 0
}

// scratch is one worker's room: the assumptions' values of its trial and
// the discount factors at a drawn rate.
type scratch struct {
	vars map[string]any
	disc []float64
	fc   []float64
	t    []float64 // (x_k - tlo_k) tinv_k
	pv   []float64 // the products' values
}

func (m *fastModel) newScratch(base map[string]any) *scratch {
	s := &scratch{disc: make([]float64, m.maxYear+1), fc: make([]float64, len(m.alts)),
		t: make([]float64, len(m.inputs)), pv: make([]float64, len(m.prods))}
	if m.general {
		s.vars = make(map[string]any, len(base))
		for k, v := range base {
			s.vars[k] = v
		}
	}
	return s
}

// trialError is why a trial has no valid present worth.
type trialError struct{ msg string }

func (t *trialError) Error() string { return t.msg }

// presentWorths fills pw with each alternative's present worth at the drawn
// values x, and returns the effective rate used.
func (m *fastModel) presentWorths(x []float64, s *scratch, pw []float64) (float64, error) {
	if m.general {
		for k, in := range m.inputs {
			s.vars[in.Name] = x[k]
		}
		for j, name := range m.refresh {
			v, err := m.refreshX[j].Number(s.vars)
			if err != nil {
				return 0, &trialError{fmt.Sprintf("%s cannot be evaluated: %v", name, err)}
			}
			s.vars[name] = v
		}
	}
	i, d := m.rate, m.disc
	if m.rateVaries {
		var err error
		if i, err = m.rateAt(x, s.vars); err != nil {
			return 0, err
		}
		if m.perpetual && i <= 0 {
			return 0, &trialError{fmt.Sprintf("the rate drawn, %s, is not above zero, and a perpetual horizon needs a positive rate", pct(i))}
		}
		d = s.disc
		v := 1 / (1 + i)
		d[0] = 1
		for t := 1; t < len(d); t++ {
			d[t] = d[t-1] * v
		}
	}
	if len(m.prods) > 0 {
		for _, k := range m.tNeed {
			s.t[k] = (x[k] - m.tlo[k]) * m.tinv[k]
		}
		for p, vs := range m.prods {
			v := s.t[vs[0]]
			for _, k := range vs[1:] {
				v *= s.t[k]
			}
			s.pv[p] = v
		}
	}
	for a, fa := range m.alts {
		if !fa.varies {
			v := fa.c0
			for j, k := range fa.wi {
				v += fa.w[j] * x[k]
			}
			for j, p := range fa.pi {
				v += fa.pc[j] * s.pv[p]
			}
			for _, r := range fa.rest {
				q, err := r.q.value(x, s.vars)
				if err != nil {
					return 0, &trialError{err.Error()}
				}
				v += r.coef * q
			}
			pw[a] = v
			continue
		}
		v := 0.0
		for k := range fa.items {
			fi := &fa.items[k]
			amt, err := fi.amount.value(x, s.vars)
			if err != nil {
				return 0, &trialError{err.Error()}
			}
			ca, cg := fi.ca, fi.cg
			if fi.varies {
				g := 0.0
				if fi.esc != nil {
					if g, err = fi.esc.value(x, s.vars); err != nil {
						return 0, &trialError{err.Error()}
					}
					if g <= -1 {
						return 0, &trialError{fmt.Sprintf("%s drawn at %s, not above -100%%", fi.esc.what, pct(g))}
					}
				}
				ca, cg = m.coef(fa.alt, fi, d, i, g)
			}
			v += amt * ca
			if fi.grad != nil && cg != 0 {
				gv, err := fi.grad.value(x, s.vars)
				if err != nil {
					return 0, &trialError{err.Error()}
				}
				v += gv * cg
			}
		}
		if fa.residual != nil {
			r, err := fa.residual.value(x, s.vars)
			if err != nil {
				return 0, &trialError{err.Error()}
			}
			cr := fa.cr
			if m.rateVaries {
				cr = m.residualCoef(fa, d)
			}
			v += r * cr
		}
		pw[a] = v
	}
	for a, v := range pw {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, &trialError{fmt.Sprintf("the present worth of %s has no finite value at the rate %s", m.alts[a].alt.ID, pct(i))}
		}
	}
	return i, nil
}

// rateAt is the effective rate of a trial, converted as the memo states it
// (Comparison.Rate, env.rate).
func (m *fastModel) rateAt(x []float64, vars map[string]any) (float64, error) {
	v := m.stated
	if m.rateQ != nil {
		var err error
		if v, err = m.rateQ.value(x, vars); err != nil {
			return 0, &trialError{err.Error()}
		}
	}
	if v <= -1 || v > 10 {
		return 0, &trialError{fmt.Sprintf("the rate drawn, %s, is outside the range this tool accepts (above -100%% and at most 1000%%)", pct(v))}
	}
	switch m.rateSpec.Mode {
	case "nominal":
		return NominalToEffective(v, m.rateSpec.PerYear), nil
	case "continuous":
		return ContinuousToEffective(v), nil
	case "real":
		f := m.inflStated
		if m.inflQ != nil {
			w, err := m.inflQ.value(x, vars)
			if err != nil {
				return 0, &trialError{err.Error()}
			}
			if w <= -1 || w > 10 {
				return 0, &trialError{fmt.Sprintf("the inflation drawn, %s, is outside the range this tool accepts", pct(w))}
			}
			switch m.inflSpec.Mode {
			case "nominal":
				w = NominalToEffective(w, m.inflSpec.PerYear)
			case "continuous":
				w = ContinuousToEffective(w)
			}
			f = w
		}
		return Fisher(v, f), nil
	}
	return v, nil
}

// best is the index of the best alternative of a trial by the comparison's
// rule (decide): the highest present worth (annual worth ranks alike over
// one horizon at one rate, and the incremental methods agree with it);
// within one currency unit of the measure, the lowest first cost; -1 for
// doing nothing where every alternative earns benefits and the best
// present worth is not positive.
func (m *fastModel) best(pw []float64, i float64, x []float64, s *scratch) int {
	top, second := 0, -1
	for a := 1; a < len(pw); a++ {
		switch {
		case pw[a] > pw[top]:
			top, second = a, top
		case second < 0 || pw[a] > pw[second]:
			second = a
		}
	}
	scale := 1.0
	if m.awRule {
		if m.perpetual {
			scale = i
		} else {
			scale = AP(i, float64(m.n))
		}
	}
	b := top
	if second >= 0 && (pw[top]-pw[second])*scale < tieTolerance {
		b = m.tieBreak(pw, scale, x, s)
	}
	if m.allBenefits && pw[b] <= 0 {
		return -1
	}
	return b
}

// tieBreak follows decide where measures lie within a currency unit: in
// order of the measure, a later alternative within a unit of the one held
// replaces it when its first cost is lower.
func (m *fastModel) tieBreak(pw []float64, scale float64, x []float64, s *scratch) int {
	order := make([]int, len(pw))
	for a := range order {
		order[a] = a
		fc := 0.0
		for _, q := range m.alts[a].firstCosts {
			v, _ := q.value(x, s.vars)
			fc += v
		}
		s.fc[a] = fc
	}
	slices.SortStableFunc(order, func(a, b int) int {
		switch {
		case pw[a] > pw[b]:
			return -1
		case pw[a] < pw[b]:
			return 1
		}
		return 0
	})
	b := order[0]
	for _, a := range order[1:] {
		if (pw[b]-pw[a])*scale < tieTolerance && s.fc[a] < s.fc[b] {
			b = a
		}
	}
	return b
}
