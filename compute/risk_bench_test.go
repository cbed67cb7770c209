package compute

import (
	"math"
	"math/rand/v2"
	"testing"

	"worth/parse"
)

// benchMemo: five alternatives over a 50-year study period, five drawn
// inputs (one of each distribution), amounts affine and multilinear in them.
const benchMemo = "---\nrate: 7%\n---\n\n```assume\n" +
	"price = 0.11 ~ triangular(0.09, 0.11, 0.15)\n" +
	"kwh = 400k ~ pert(350k, 400k, 480k)\n" +
	"labor = 68 ~ normal(68, 6)\n" +
	"overhaul = 65k ~ lognormal(65000, 12000)\n" +
	"steel = 1 ~ uniform(0.9, 1.25)\n" +
	"energy = kwh * price\n```\n\n" +
	"```alternative a\nlife: 25\nfirst cost: 480k * steel\nannual cost: energy\nannual cost: 2000 * labor\ncost every 8 years: overhaul\nsalvage: 40k\n```\n\n" +
	"```alternative b\nlife: 50\nfirst cost: 900k * steel\nannual cost: 0.7 * energy\nannual cost: 1200 * labor\ncost every 10 years: overhaul * 1.5\n```\n\n" +
	"```alternative c\nlife: 20\nfirst cost: 350k * steel\nannual cost: 1.2 * energy escalating 2%\nannual cost: 2500 * labor\n```\n\n" +
	"```alternative d\nlife: 10\nfirst cost: 200k * steel\nannual cost: 1.4 * energy\ncost at year 5: overhaul / 2\n```\n\n" +
	"```alternative e\nlife: 50\nfirst cost: 1.2M * steel\nannual cost: 0.5 * energy\nannual cost: 900 * labor\nsalvage: 100k\n```\n\n" +
	"```compare c\nhorizon: study period 50\n```\n\n```risk r\ntrials: 100000\nseed: 1\n```\n"

// BenchmarkRisk100k: the whole computation of the memo, 100,000 trials of
// five alternatives over a 50-year horizon, on all cores.
func BenchmarkRisk100k(b *testing.B) {
	memo, err := parse.Parse("bench.md", []byte(benchMemo))
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		rep, err := Compute(memo)
		if err != nil || len(rep.Risks) != 1 {
			b.Fatal(err)
		}
	}
}

// handLoop is the same present worths written out by hand: coefficients of
// each amount over the 50 years worked out on paper from the alternatives'
// lives (cycles starting at 0, 25; 0; 0, 20, 40 cut at 50; 0, 10, ...,
// 40; 0), the draws taken as the engine takes them.
type handLoop struct {
	v                                  []float64 // (P/F, 7%, t)
	aFC, aAnn, aOv, aSal               float64
	bFC, bAnn, bOv                     float64
	cFC, cEsc, cAnn                    float64
	dFC, dAnn, dOv                     float64
	eFC, eAnn, eSal                    float64
	price, kwh, labor, overhaul, steel sampler
}

func newHandLoop() *handLoop {
	h := &handLoop{v: make([]float64, 51)}
	for t := range h.v {
		h.v[t] = math.Pow(1.07, -float64(t))
	}
	v := h.v
	sum := func(ts ...int) float64 {
		s := 0.0
		for _, t := range ts {
			s += v[t]
		}
		return s
	}
	pa := (1 - v[50]) / 0.07
	h.aFC, h.aAnn, h.aOv, h.aSal = sum(0, 25), pa, sum(8, 16, 24, 33, 41, 49), sum(25, 50)
	h.bFC, h.bAnn, h.bOv = 1, pa, sum(10, 20, 30, 40)
	// c: first costs at 0, 20, 40; at 50 the cycle from 40 is cut at age
	// 10 of 20, and half its first cost comes back as residual value.
	h.cFC, h.cAnn = sum(0, 20, 40)-0.5*v[50], pa
	for _, s := range []int{0, 20, 40} {
		for t := 1; t <= 20 && s+t <= 50; t++ {
			h.cEsc += math.Pow(1.02, float64(t-1)) * v[s+t]
		}
	}
	h.dFC, h.dAnn, h.dOv = sum(0, 10, 20, 30, 40), pa, sum(5, 15, 25, 35, 45)
	h.eFC, h.eAnn, h.eSal = 1, pa, v[50]
	mk := func(kind string, p ...float64) sampler { return newSampler(&Distribution{Kind: kind, Params: p}) }
	h.price, h.kwh = mk("triangular", 0.09, 0.11, 0.15), mk("pert", 350000, 400000, 480000)
	h.labor, h.overhaul, h.steel = mk("normal", 68, 6), mk("lognormal", 65000, 12000), mk("uniform", 0.9, 1.25)
	return h
}

// trial draws the inputs and returns the five present worths and the best.
func (h *handLoop) trial(r *rand.Rand, pw *[5]float64) int {
	price, kwh, labor := h.price.draw(r), h.kwh.draw(r), h.labor.draw(r)
	ov, steel := h.overhaul.draw(r), h.steel.draw(r)
	e := kwh * price
	pw[0] = -480000*steel*h.aFC - (e+2000*labor)*h.aAnn - ov*h.aOv + 40000*h.aSal
	pw[1] = -900000*steel*h.bFC - (0.7*e+1200*labor)*h.bAnn - 1.5*ov*h.bOv
	pw[2] = -350000*steel*h.cFC - 1.2*e*h.cEsc - 2500*labor*h.cAnn
	pw[3] = -200000*steel*h.dFC - 1.4*e*h.dAnn - ov/2*h.dOv
	pw[4] = -1200000*steel*h.eFC - (0.5*e+900*labor)*h.eAnn + 100000*h.eSal
	best := 0
	for k := 1; k < 5; k++ {
		if pw[k] > pw[best] {
			best = k
		}
	}
	return best
}

// TestHandLoopIsTheSame: the hand-written loop and the engine draw the same
// inputs and compute the same present worths, trial by trial.
func TestHandLoopIsTheSame(t *testing.T) {
	_, _, models := testModels(t, benchMemo)
	m := models[0]
	h := newHandLoop()
	s := m.newScratch(m.base)
	x := make([]float64, len(m.inputs))
	pw := make([]float64, 5)
	r1, r2 := blockRand(1, 0), blockRand(1, 0)
	for trial := 0; trial < 200; trial++ {
		var hp [5]float64
		hb := h.trial(r1, &hp)
		for k, in := range m.inputs {
			x[k] = in.s.draw(r2)
		}
		i, err := m.presentWorths(x, s, pw)
		if err != nil {
			t.Fatal(err)
		}
		for a := range pw {
			if math.Abs(pw[a]-hp[a]) > 1e-9*math.Abs(hp[a]) {
				t.Fatalf("trial %d, alternative %d: engine %v, by hand %v", trial, a, pw[a], hp[a])
			}
		}
		if b := m.best(pw, i, x, s); b != hb {
			t.Fatalf("trial %d: best %d, by hand %d", trial, b, hb)
		}
	}
}

// BenchmarkRiskTrialEngine and BenchmarkRiskTrialByHand time one trial on
// one core, draws included: the engine's compiled evaluator and the
// hand-written loop. The ratio of the two is the cost of generality.
func BenchmarkRiskTrialEngine(b *testing.B) {
	_, _, models := testModels(b, benchMemo)
	m := models[0]
	s := m.newScratch(m.base)
	x := make([]float64, len(m.inputs))
	pw := make([]float64, 5)
	r := blockRand(1, 0)
	n := 0
	for b.Loop() {
		for k, in := range m.inputs {
			x[k] = in.s.draw(r)
		}
		i, _ := m.presentWorths(x, s, pw)
		n += m.best(pw, i, x, s)
	}
	if n < 0 {
		b.Fatal(n)
	}
}

func BenchmarkRiskTrialByHand(b *testing.B) {
	h := newHandLoop()
	r := blockRand(1, 0)
	var pw [5]float64
	n := 0
	for b.Loop() {
		n += h.trial(r, &pw)
	}
	if n < 0 {
		b.Fatal(n)
	}
}

// BenchmarkRiskDrawsOnly times the draws alone, the part of a trial that
// both loops share.
func BenchmarkRiskDrawsOnly(b *testing.B) {
	h := newHandLoop()
	r := blockRand(1, 0)
	s := 0.0
	for b.Loop() {
		s += h.price.draw(r) + h.kwh.draw(r) + h.labor.draw(r) + h.overhaul.draw(r) + h.steel.draw(r)
	}
	if s == 0 {
		b.Fatal(s)
	}
}
