package compute

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"worth/parse"
)

// fastMemo has every line form, amounts that are constant, affine,
// multilinear (kwh * price) and neither (a power of a drawn value), drawn
// escalation, a drawn gradient, a stated and a default residual, and one
// comparison per horizon kind.
const fastMemo = `---
rate: 6%
inflation: infl
---

` + "```assume" + `
price    = 0.12 ~ triangular(0.08, 0.12, 0.2)
kwh      = 40000 ~ pert(30000, 40000, 60000)
energy   = kwh * price
overhaul = 65k ~ normal(65000, 8000)
esc      = 2% ~ uniform(0.01, 0.04)
big      = 100000 ~ lognormal(100000, 20000)
sq       = big ^ 1.1 / 10
grad     = 150 ~ uniform(100, 200)
disc     = 6% ~ triangular(4%, 6%, 8%)
rbase    = 3.5% ~ pert(2%, 3.5%, 4%)
infl     = 2% ~ uniform(1%, 3%)
` + "```" + `

` + "```alternative a" + `
life: 12
first cost: 480k
annual cost: energy escalating esc
annual cost from year 3 to year 10: 800 gradient grad
cost at year 5: overhaul
cost every 4 years: overhaul / 2
annual benefit: sq
salvage: 40000
` + "```" + `

` + "```alternative b" + `
life: 8
first cost: big * 3
annual cost: 9000 + price * 10000
benefit every 3 years from year 2: 5000
annual benefit: 60000
residual: big / 10
salvage: 20k
` + "```" + `

` + "```alternative c" + `
first cost: 300k
annual cost: energy * 1.5
cost every 10 years: overhaul * 2
annual cost from year 1 to year 20: 1000 escalating esc
annual benefit from year 2: 40000 gradient 100
cost at year 7: 12000
` + "```" + `

` + "```compare p" + `
horizon: perpetual
` + "```" + `

` + "```compare s" + `
horizon: study period 30
` + "```" + `

` + "```compare r" + `
alternatives: a, b
` + "```" + `

` + "```compare short" + `
horizon: study period 5
` + "```" + `

` + "```compare drawnrate" + `
horizon: study period 30
rate: disc
` + "```" + `

` + "```compare drawnperp" + `
alternatives: a, b
horizon: perpetual
rate: disc nominal monthly
decide by: annual worth
` + "```" + `

` + "```compare realrate" + `
horizon: study period 40
rate: rbase real
` + "```" + `
`

// testModels compiles every comparison of a memo over all its
// distributions.
func testModels(t testing.TB, src string) (*parse.Memo, *Report, []*fastModel) {
	t.Helper()
	memo, err := parse.Parse("fast.md", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Compute(memo)
	if err != nil {
		t.Fatal(err)
	}
	var errs parse.ErrorList
	e := newEnv(memo.File, &errs)
	e.assumptions(memo)
	var inputs []*riskInput
	for _, a := range rep.Assumptions {
		if a.Dist != nil {
			inputs = append(inputs, &riskInput{Name: a.Name, Base: a.Value, Dist: a.Dist, s: newSampler(a.Dist)})
		}
	}
	var models []*fastModel
	for _, c := range rep.Comparisons {
		m, merrs := compileModel(newRiskCompiler(e, memo, inputs), memo, c)
		if len(merrs) > 0 {
			t.Fatalf("compare %s: %v", c.ID, merrs)
		}
		models = append(models, m)
	}
	return memo, rep, models
}

// close enough: relative to the size of the flows (present worths of
// costs and benefits), so that a present worth near zero is not held to
// an impossible relative precision.
func closeTo(got, want, size float64) bool {
	return math.Abs(got-want) <= 1e-9*math.Max(math.Abs(want), size)
}

func size(r *Result) float64 {
	s := 0.0
	for _, v := range r.ByCategory {
		s += math.Abs(v)
	}
	return s
}

// TestFastAtBase: at the base values, the compiled evaluator gives
// Compute's present worths, for every horizon kind.
func TestFastAtBase(t *testing.T) {
	_, rep, models := testModels(t, fastMemo)
	for _, m := range models {
		x := make([]float64, len(m.inputs))
		for k, in := range m.inputs {
			x[k] = in.Base
		}
		s := m.newScratch(m.base)
		pw := make([]float64, len(m.alts))
		i, err := m.presentWorths(x, s, pw)
		if err != nil {
			t.Fatalf("compare %s: %v", m.comp.ID, err)
		}
		if math.Abs(i-m.comp.Rate.Effective) > 1e-15 {
			t.Errorf("compare %s: rate %v, want %v", m.comp.ID, i, m.comp.Rate.Effective)
		}
		for a, r := range m.comp.Results {
			if !closeTo(pw[a], r.PW, size(r)) {
				t.Errorf("compare %s (%s), %s: fast %v, Compute %v", m.comp.ID, m.comp.Horizon.Kind, r.Alt.ID, pw[a], r.PW)
			}
		}
		if got, want := bestID(m, m.best(pw, i, x, s)), m.comp.Recommended; got != want {
			t.Errorf("compare %s: best %s, Compute recommends %s", m.comp.ID, got, want)
		}
	}
	if len(rep.Comparisons) != 7 {
		t.Fatalf("%d comparisons", len(rep.Comparisons))
	}
}

// TestFastAtRandomValues: at drawn values, the compiled evaluator gives
// what Recompute gives with those values typed in as overrides.
func TestFastAtRandomValues(t *testing.T) {
	memo, _, models := testModels(t, fastMemo)
	r := rand.New(rand.NewPCG(7, 11))
	for trial := 0; trial < 25; trial++ {
		x := make([]float64, len(models[0].inputs))
		values := map[string]float64{}
		for k, in := range models[0].inputs {
			x[k] = in.s.draw(r)
			values[in.Name] = x[k]
		}
		again, err := Recompute(memo, Overrides{Values: values})
		if err != nil {
			t.Fatalf("trial %d: %v (%v)", trial, err, values)
		}
		for ci, m := range models {
			c := again.Comparisons[ci]
			s := m.newScratch(m.base)
			pw := make([]float64, len(m.alts))
			i, err := m.presentWorths(x, s, pw)
			if err != nil {
				t.Fatalf("compare %s: %v", m.comp.ID, err)
			}
			if math.Abs(i-c.Rate.Effective) > 1e-14 {
				t.Errorf("trial %d, compare %s: rate %v, Recompute %v", trial, c.ID, i, c.Rate.Effective)
			}
			for a, res := range c.Results {
				if !closeTo(pw[a], res.PW, size(res)) {
					t.Errorf("trial %d, compare %s (%s), %s: fast %v, Recompute %v", trial, c.ID, c.Horizon.Kind, res.Alt.ID, pw[a], res.PW)
				}
			}
			if got := bestID(m, m.best(pw, i, x, s)); got != c.Recommended {
				t.Errorf("trial %d, compare %s: best %s, Recompute recommends %s", trial, c.ID, got, c.Recommended)
			}
		}
	}
}

func bestID(m *fastModel, b int) string {
	if b < 0 {
		return DoNothing
	}
	return m.alts[b].alt.ID
}

// TestFastKinds: the compiled forms are what the memo's expressions are:
// constants, affine, multilinear (a product of two drawn values) and
// evaluated from the expression (a power of a drawn value).
func TestFastKinds(t *testing.T) {
	_, _, models := testModels(t, fastMemo)
	m := models[1] // compare s
	kinds := map[string]qKind{}
	for _, fa := range m.alts {
		for _, fi := range fa.items {
			kinds[fmt.Sprintf("%s line %d", fa.alt.ID, fi.it.Line)] = fi.amount.kind
			if fi.esc != nil {
				kinds[fmt.Sprintf("%s line %d escalation", fa.alt.ID, fi.it.Line)] = fi.esc.kind
			}
		}
	}
	want := map[string]qKind{
		"a line 22": qConst, "a line 23": qMulti, "a line 23 escalation": qAffine, "a line 24": qConst,
		"a line 25": qAffine, "a line 26": qAffine, "a line 27": qGeneral, "b line 33": qAffine, "b line 34": qAffine,
	}
	for k, w := range want {
		if kinds[k] != w {
			t.Errorf("%s: kind %d, want %d (all: %v)", k, kinds[k], w, kinds)
		}
	}
	if !models[4].rateVaries || models[1].rateVaries || !models[6].rateVaries {
		t.Errorf("rate varies: %v %v %v", models[4].rateVaries, models[1].rateVaries, models[6].rateVaries)
	}
}
