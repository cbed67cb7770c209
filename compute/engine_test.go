package compute_test

// Engine tests against outside values (shared/references.md), facts of the
// trade, and hand-computed cases, each through a memo: parse.Parse, then
// compute.Compute. Every expected number is derived here, from the source
// named beside it or from the formula written out, not from the program's
// output. The helpers (computeMemo, discSum, capRecovery, findResult, ...)
// are in properties_test.go.

import (
	"encoding/json"
	"fmt"
	"math"
	"strings"
	"testing"

	"worth/compute"
	"worth/parse"
	"worth/render"
)

// roundsTo reports whether x, rounded to the number of decimals printed,
// is the printed value.
func roundsTo(x float64, printed string) bool {
	dec := 0
	if _, frac, ok := strings.Cut(printed, "."); ok {
		dec = len(frac)
	}
	return fmt.Sprintf("%.*f", dec, x) == printed
}

// uniformPW is (P/A, i, n) summed year by year: sum_{t=1..n} (1+i)^-t.
func uniformPW(i float64, n int) float64 {
	s := 0.0
	for t := 1; t <= n; t++ {
		s += math.Pow(1+i, -float64(t))
	}
	return s
}

// oneCompare returns the memo's only comparison.
func oneCompare(t *testing.T, rep *compute.Report) *compute.Comparison {
	t.Helper()
	if len(rep.Comparisons) != 1 {
		t.Fatalf("%d comparisons, want 1", len(rep.Comparisons))
	}
	return rep.Comparisons[0]
}

// TestRateConversions: rates written in the front matter (or a compare
// block) convert to the effective annual rate the comparison discounts at,
// in the Report and in the JSON output.
func TestRateConversions(t *testing.T) {
	cases := []struct {
		name      string
		front     string // front-matter lines
		compare   string // a rate line in the compare block, or ""
		printed   string // the effective rate in percent, as the source prints it
		effective float64
	}{
		// Source: references.md, interest-rate conversions (textbook
		// identities): (1 + r/m)^m - 1; 12% monthly gives 12.6825%.
		{"nominal monthly", "rate: 12% nominal monthly", "", "12.6825", math.Pow(1+0.12/12, 12) - 1},
		// Source: references.md, interest-rate conversions: continuous
		// compounding e^r - 1; 8% gives 8.3287%.
		{"continuous", "rate: 8% continuous", "", "8.3287", math.Exp(0.08) - 1},
		// Source: references.md, interest-rate conversions: Fisher equation
		// (1 + market) = (1 + real)(1 + inflation); 3% real at 2.5%
		// inflation: 1.03 x 1.025 - 1 = 5.575% (worked by hand).
		{"real (Fisher)", "rate: 3% real\ninflation: 2.5%", "", "5.5750", 1.03*1.025 - 1},
		// The same nominal conversion given in the compare block.
		{"compare block", "rate: 5%", "rate: 12% nominal monthly", "12.6825", math.Pow(1+0.12/12, 12) - 1},
		// A plain effective rate needs no conversion.
		{"effective", "rate: 7%", "", "7.0000", 0.07},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			src := "---\ntitle: Rates\n" + tc.front + "\n---\n\n" +
				"```alternative bill\ncost at year 1: 1000\n```\n\n" +
				"```compare c\nhorizon: study period 1\n" + tc.compare
			if tc.compare != "" {
				src += "\n"
			}
			src += "```\n"
			rep := computeMemo(t, src)
			c := oneCompare(t, rep)
			got := c.Rate.Effective
			if !roundsTo(got*100, tc.printed) {
				t.Errorf("effective rate %.6f%%, the source prints %s%%", got*100, tc.printed)
			}
			if math.Abs(got-tc.effective) > 1e-12 {
				t.Errorf("effective rate %v, the formula gives %v", got, tc.effective)
			}
			if tc.compare == "" && (rep.Rate == nil || rep.Rate.Effective != got) {
				t.Errorf("Report.Rate = %+v, want the comparison's %v", rep.Rate, got)
			}
			if got != 0.07 && c.Rate.Conversion == "" {
				t.Errorf("no conversion shown for %q", c.Rate.Text)
			}
			// The comparison discounts at the effective rate.
			pw := findResult(c, "bill").PW
			if want := -1000 / (1 + tc.effective); math.Abs(pw-want) > 1e-9 {
				t.Errorf("PW of 1,000 at year 1 is %v, want %v", pw, want)
			}
			// And the JSON output carries it.
			out, err := render.JSON(rep)
			if err != nil {
				t.Fatal(err)
			}
			var doc struct {
				Rate struct {
					Effective float64 `json:"effective"`
				} `json:"rate"`
				Comparisons []struct {
					Rate float64 `json:"rate"`
				} `json:"comparisons"`
			}
			if err := json.Unmarshal(out, &doc); err != nil {
				t.Fatal(err)
			}
			if len(doc.Comparisons) != 1 || math.Abs(doc.Comparisons[0].Rate-tc.effective) > 1e-12 {
				t.Errorf("JSON comparison rate %+v, want %v", doc.Comparisons, tc.effective)
			}
			if tc.compare == "" && math.Abs(doc.Rate.Effective-tc.effective) > 1e-12 {
				t.Errorf("JSON rate.effective %v, want %v", doc.Rate.Effective, tc.effective)
			}
		})
	}
}

// TestPerpetuities: capitalized worths of series that run forever, through
// no-life alternatives on a perpetual horizon.
//
// Common practice (references.md, facts of the trade): a perpetuity's
// present worth is A / i; an arithmetic gradient perpetuity's G / i^2 (for
// A, A+G, A+2G, ...: A / i + G / i^2); a geometric one's A1 / (i - g) for
// g < i; and a cost X every k years forever has the same present worth
// whether first turned into an equivalent annual amount, X (A/F, i, k) / i,
// or discounted at the effective k-year rate, X / ((1 + i)^k - 1).
func TestPerpetuities(t *testing.T) {
	cases := []struct {
		name string
		rate string
		i    float64
		line string
		want float64 // signed present worth
	}{
		{"perpetuity A/i", "6%", 0.06, "annual cost: 12,000", -12000 / 0.06},
		{"perpetuity of a benefit", "4.5%", 0.045, "annual benefit: 900", 900 / 0.045},
		{"gradient perpetuity", "8%", 0.08, "annual cost: 5000 gradient 250", -(5000/0.08 + 250/(0.08*0.08))},
		{"gradient alone", "10%", 0.10, "annual cost: 0 gradient 40", -40 / (0.10 * 0.10)},
		{"geometric perpetuity", "7%", 0.07, "annual cost: 3000 escalating 2.5%", -3000 / (0.07 - 0.025)},
		{"falling geometric", "5%", 0.05, "annual benefit: 8000 escalating -3%", 8000 / (0.05 + 0.03)},
	}
	// Periodic costs forever, both ways; the two ways must agree first.
	for _, p := range []struct {
		rate string
		i    float64
		k    int
		x    float64
	}{{"7%", 0.07, 8, 65000}, {"5%", 0.05, 1, 1000}, {"12%", 0.12, 25, 250000}, {"3.5%", 0.035, 10, 40000}} {
		viaAnnual := p.x * (p.i / (math.Pow(1+p.i, float64(p.k)) - 1)) / p.i // X (A/F, i, k) / i
		viaKYear := p.x / (math.Pow(1+p.i, float64(p.k)) - 1)                // X / ((1+i)^k - 1)
		if math.Abs(viaAnnual-viaKYear) > 1e-9*viaKYear {
			t.Fatalf("the two ways of valuing %v every %d years disagree: %v, %v", p.x, p.k, viaAnnual, viaKYear)
		}
		cases = append(cases, struct {
			name string
			rate string
			i    float64
			line string
			want float64
		}{fmt.Sprintf("cost every %d years at %s", p.k, p.rate), p.rate, p.i, fmt.Sprintf("cost every %d years: %v", p.k, p.x), -viaKYear})
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			src := fmt.Sprintf("---\nrate: %s\n---\n\n```alternative service\n%s\n```\n\n```compare c\nhorizon: perpetual\n```\n", tc.rate, tc.line)
			c := oneCompare(t, computeMemo(t, src))
			r := findResult(c, "service")
			if math.Abs(r.PW-tc.want) > 1e-9*math.Abs(tc.want) {
				t.Errorf("PW %v, want %v", r.PW, tc.want)
			}
			if math.Abs(r.AW-tc.want*tc.i) > 1e-9*math.Abs(tc.want*tc.i) {
				t.Errorf("AW %v, want PW i = %v", r.AW, tc.want*tc.i)
			}
		})
	}
}

// TestPerpetualEscalationAtRate: escalation forever at or above the rate
// has no finite capitalized worth; the memo is an error, pointing at it.
func TestPerpetualEscalationAtRate(t *testing.T) {
	src := "---\nrate: 4%\n---\n\n```alternative s\nannual cost: 1000 escalating 4%\n```\n\n```compare c\nhorizon: perpetual\n```\n"
	memo, err := parse.Parse("escalation.md", []byte(src))
	if err != nil {
		t.Fatalf("parse: %v", err)
	}
	_, err = compute.Compute(memo)
	if err == nil || !strings.Contains(err.Error(), "escalat") {
		t.Fatalf("want an error about escalation at the rate, got %v", err)
	}
}

// TestAIRR: net savings, the savings-to-investment ratio and the adjusted
// internal rate of return against a base.
//
// Source: ASTM E1057 (adjusted internal rate of return), in the family of
// standards listed with NIST Handbook 135 in references.md; from memory:
// AIRR = (1 + r) SIR^(1/N) - 1, and r = 3%, SIR = 1.5, N = 20 gives
// AIRR = 5.109%. Beside it, the formula evaluated here.
//
// The code's definitions (compute/compare.go, savings): investment-related
// worth is first costs less salvage and residual values; savings are the
// change in everything else (other costs, benefits and disbenefits); SIR =
// savings / added investment. The memo below is built so that the upgrade
// adds 10,000 of first cost and saves A a year for 20 years at 3% with
// A (P/A, 3%, 20) = 15,000: SIR = 15,000 / 10,000 = 1.5 and net savings =
// 15,000 - 10,000 = 5,000.
func TestAIRR(t *testing.T) {
	const i, n = 0.03, 20
	pa := uniformPW(i, n)
	a := 15000 / pa
	src := fmt.Sprintf(`---
title: Boiler controls
rate: 3%%
---

`+"```alternative current\nname: Keep the current controls\nlife: 20\nannual cost: 5000\n```\n\n"+
		"```alternative upgrade\nname: Upgrade the controls\nlife: 20\nfirst cost: 10000\nannual cost: %.10f\n```\n\n"+
		"```compare c\nhorizon: study period 20\nbase: current\n```\n", 5000-a)
	c := oneCompare(t, computeMemo(t, src))
	base, up := findResult(c, "current"), findResult(c, "upgrade")
	// Net savings = PW(alt) - PW(base), both summed here.
	pwBase := -5000 * pa
	pwUp := -10000 - (5000-a)*pa
	if up.NetSavings == nil || math.Abs(*up.NetSavings-(pwUp-pwBase)) > 1e-6 || math.Abs(*up.NetSavings-5000) > 1e-6 {
		t.Errorf("net savings %v, want PW(upgrade) - PW(current) = %v = 5,000", up.NetSavings, pwUp-pwBase)
	}
	if base.NetSavings == nil || *base.NetSavings != 0 || base.SIR != nil || base.AIRR != nil {
		t.Errorf("the base itself: net savings %v, SIR %v, AIRR %v; want 0 and none", base.NetSavings, base.SIR, base.AIRR)
	}
	if up.SIR == nil || math.Abs(*up.SIR-1.5) > 1e-9 {
		t.Fatalf("SIR %v, want 1.5", up.SIR)
	}
	if up.AIRR == nil {
		t.Fatal("no AIRR")
	}
	want := (1+i)*math.Pow(1.5, 1.0/n) - 1
	if math.Abs(*up.AIRR-want) > 1e-9 {
		t.Errorf("AIRR %v, the formula gives %v", *up.AIRR, want)
	}
	// ASTM E1057, from memory: 5.109%.
	if !roundsTo(*up.AIRR*100, "5.109") {
		t.Errorf("AIRR %.5f%%, the standard's example gives 5.109%%", *up.AIRR*100)
	}
}

// TestNISTDiscountFactors: the single and uniform present value factors
// through the engine, from one alternative with an amount at year 10 (an
// other cost) and an annual amount over 25 years (a benefit), whose present
// worths the report keeps apart by category.
//
// Source: NIST Handbook 135 and its annual supplement (NISTIR 85-3273),
// discount factor tables; from memory: single present value factor at 3%
// for 10 years 0.744; uniform present value factor at 3% for 25 years
// 17.41. Beside them, the sums year by year.
func TestNISTDiscountFactors(t *testing.T) {
	src := "---\nrate: 3%\n---\n\n```alternative retrofit\nlife: 25\ncost at year 10: 1000\nannual benefit: 1000\n```\n\n```compare c\nhorizon: study period 25\n```\n"
	c := oneCompare(t, computeMemo(t, src))
	r := findResult(c, "retrofit")
	spv := r.ByCategory[compute.Operating] / 1000
	upv := r.ByCategory[compute.Benefits] / 1000
	if !roundsTo(spv, "0.744") { // NIST Handbook 135, from memory
		t.Errorf("single present value factor %v, NIST prints 0.744", spv)
	}
	if !roundsTo(upv, "17.41") { // NIST Handbook 135, from memory
		t.Errorf("uniform present value factor %v, NIST prints 17.41", upv)
	}
	if want := math.Pow(1.03, -10); math.Abs(spv-want) > 1e-12 {
		t.Errorf("single present value factor %v, 1.03^-10 = %v", spv, want)
	}
	if want := uniformPW(0.03, 25); math.Abs(upv-want) > 1e-12 {
		t.Errorf("uniform present value factor %v, the sum gives %v", upv, want)
	}
	// The worked equation names them in factor notation.
	var pf, pa bool
	for _, term := range equation(r, "PW").Terms {
		for _, f := range term.Factors {
			pf = pf || f.Name == "P/F" && f.N == 10 && roundsTo(f.Value, "0.744")
			pa = pa || f.Name == "P/A" && f.N == 25 && roundsTo(f.Value, "17.41")
		}
	}
	if !pf || !pa {
		t.Errorf("the worked PW lacks (P/F, 3%%, 10) = 0.744 or (P/A, 3%%, 25) = 17.41: %+v", equation(r, "PW").Terms)
	}
}

// TestResidualRule: a study period that cuts a life ends it with the
// residual value: by default straight line between first cost and salvage
// over the life (contract, `residual:` line), worked by hand here.
func TestResidualRule(t *testing.T) {
	cases := []struct {
		name   string
		alt    string
		study  int
		year   int     // the cut year
		value  float64 // residual at the cut
		pwWant float64
	}{
		{
			// 1,000 - (1,000 - 200) x 4/10 = 680 at year 4.
			name: "straight line", alt: "life: 10\nfirst cost: 1000\nannual cost: 50\nsalvage: 200",
			study: 4, year: 4, value: 680,
			pwWant: -1000 - 50*uniformPW(0.1, 4) + 680/math.Pow(1.1, 4),
		},
		{
			// Second cycle cut at age 1: 1,000 - 800/3.
			name: "second cycle", alt: "life: 3\nfirst cost: 1000\nsalvage: 200",
			study: 4, year: 4, value: 1000 - 800.0/3,
			pwWant: -1000 + (200-1000)/math.Pow(1.1, 3) + (1000-800.0/3)/math.Pow(1.1, 4),
		},
		{
			name: "stated residual", alt: "life: 10\nfirst cost: 1000\nsalvage: 200\nresidual: 300",
			study: 4, year: 4, value: 300,
			pwWant: -1000 + 300/math.Pow(1.1, 4),
		},
		{
			name: "no life, none by default", alt: "annual cost: 100",
			study: 3, year: 3, value: 0,
			pwWant: -100 * uniformPW(0.1, 3),
		},
		{
			name: "no life, stated", alt: "annual cost: 100\nresidual: 250",
			study: 3, year: 3, value: 250,
			pwWant: -100*uniformPW(0.1, 3) + 250/math.Pow(1.1, 3),
		},
		{
			// A study period that ends with a whole life: salvage, no residual.
			name: "whole life", alt: "life: 4\nfirst cost: 1000\nsalvage: 200\nresidual: 999",
			study: 4, year: 4, value: 200,
			pwWant: -1000 + 200/math.Pow(1.1, 4),
		},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			src := fmt.Sprintf("---\nrate: 10%%\n---\n\n```alternative x\n%s\n```\n\n```compare c\nhorizon: study period %d\n```\n", tc.alt, tc.study)
			r := findResult(oneCompare(t, computeMemo(t, src)), "x")
			if got := r.Flows[tc.year].ByCategory[compute.Recovery]; math.Abs(got-tc.value) > 1e-9 {
				t.Errorf("salvage and residual at year %d: %v, want %v", tc.year, got, tc.value)
			}
			if math.Abs(r.PW-tc.pwWant) > 1e-9*math.Abs(tc.pwWant) {
				t.Errorf("PW %v, want %v", r.PW, tc.pwWant)
			}
		})
	}
}

// decideMemo writes a memo with the given alternatives (id and body) and
// one compare block decided by rule over horizon.
func decideMemo(rate, horizon, rule string, alts ...[2]string) string {
	var b strings.Builder
	fmt.Fprintf(&b, "---\nrate: %s\n---\n\n", rate)
	for _, a := range alts {
		fmt.Fprintf(&b, "```alternative %s\n%s\n```\n\n", a[0], a[1])
	}
	fmt.Fprintf(&b, "```compare c\nhorizon: %s\ndecide by: %s\n```\n", horizon, rule)
	return b.String()
}

// TestDecisionDoNothing: where every alternative has benefits and none has
// a positive present worth, the recommendation is to do nothing, by every
// rule (contract, decision rules).
func TestDecisionDoNothing(t *testing.T) {
	// At 10%: -10,000 + 1,500 (P/A, 10%, 5) = -4,313.8 and
	// -5,000 + 1,200 (P/A, 10%, 4) = -1,196.2, both negative.
	for _, pw := range []float64{-10000 + 1500*uniformPW(0.1, 5), -5000 + 1200*uniformPW(0.1, 4)} {
		if pw >= 0 {
			t.Fatalf("the case is wrong: PW %v is not negative", pw)
		}
	}
	for _, rule := range decisionRules {
		src := decideMemo("10%", "study period 20", rule,
			[2]string{"kiln", "life: 5\nfirst cost: 10000\nannual benefit: 1500"},
			[2]string{"dryer", "life: 4\nfirst cost: 5000\nannual benefit: 1200"})
		c := oneCompare(t, computeMemo(t, src))
		if c.Recommended != compute.DoNothing {
			t.Errorf("decide by %s: recommends %s, want %s", rule, c.Recommended, compute.DoNothing)
		}
	}
}

// TestDecisionTie: present worths within one currency unit are a tie, said
// so, and the alternative with the lower first cost is named; 5 units
// apart is no tie (contract: "Ties within one currency unit say so").
func TestDecisionTie(t *testing.T) {
	pa := uniformPW(0.1, 5)
	pwA := -1000 + 300*pa // 137.24
	for _, tc := range []struct {
		gap  float64
		tie  bool
		best string
	}{{0.5, true, "lean"}, {5, false, "rich"}} {
		for _, rule := range []string{"present worth", "incremental rate of return"} {
			// rich: first cost 2,000 and X a year with PW = PW(lean) + gap.
			x := (pwA + tc.gap + 2000) / pa
			src := decideMemo("10%", "repeat lives", rule,
				[2]string{"lean", "life: 5\nfirst cost: 1000\nannual benefit: 300"},
				[2]string{"rich", fmt.Sprintf("life: 5\nfirst cost: 2000\nannual benefit: %.8f", x)})
			c := oneCompare(t, computeMemo(t, src))
			if c.Tie != tc.tie || c.Recommended != tc.best {
				t.Errorf("gap %v, decide by %s: tie %v, recommends %s; want tie %v, %s", tc.gap, rule, c.Tie, c.Recommended, tc.tie, tc.best)
			}
			if d := findResult(c, "rich").PW - findResult(c, "lean").PW; math.Abs(d-tc.gap) > 1e-5 {
				t.Errorf("the case is off: PW difference %v, want %v", d, tc.gap)
			}
		}
	}
}

// TestDecisionCostOnly: alternatives with costs only are ranked by least
// cost (the highest, least negative, present worth), by every rule.
func TestDecisionCostOnly(t *testing.T) {
	i := 0.08
	pa, pf := uniformPW(i, 10), math.Pow(1+i, -10)
	pws := map[string]float64{
		"patch":   -20000 - 4000*pa + 2000*pf, // -45,913.9
		"reline":  -35000 - 1500*pa,           // -45,065.1
		"replace": -10000 - 6500*pa + 500*pf,  // -53,383.9
	}
	want := ""
	for id, pw := range pws {
		if want == "" || pw > pws[want] {
			want = id
		}
	}
	for _, rule := range decisionRules {
		src := decideMemo("8%", "study period 10", rule,
			[2]string{"patch", "life: 10\nfirst cost: 20000\nannual cost: 4000\nsalvage: 2000"},
			[2]string{"reline", "life: 10\nfirst cost: 35000\nannual cost: 1500"},
			[2]string{"replace", "life: 10\nfirst cost: 10000\nannual cost: 6500\nsalvage: 500"})
		c := oneCompare(t, computeMemo(t, src))
		if !c.CostOnly || c.Recommended != want {
			t.Errorf("decide by %s: cost only %v, recommends %s; want the least cost, %s", rule, c.CostOnly, c.Recommended, want)
		}
		for id, pw := range pws {
			if got := findResult(c, id).PW; math.Abs(got-pw) > 1e-6 {
				t.Errorf("PW(%s) = %v, want %v", id, got, pw)
			}
		}
	}
}

// TestPayback: simple and discounted payback, interpolated linearly within
// the year, on a case worked by hand. Flows: -1,000 now, then 400, 300 and
// 500 at years 1 to 3, at 5%.
//
// Simple: cumulative -1,000, -600, -300, +200: 2 + 300/500 = 2.6 years.
// Discounted: 400/1.05 = 380.95, 300/1.05^2 = 272.11, 500/1.05^3 = 431.92;
// cumulative -619.05, -346.94, +84.98: 2 + 346.94/431.92 years, which is
// exactly 2 + 401.625/500 = 2.80325 (multiply through by 1.05^3 =
// 1.157625: 1,157.625 - 441 - 315 = 401.625 left after year 2).
func TestPayback(t *testing.T) {
	src := "---\nrate: 5%\n---\n\n```alternative press\nlife: 3\nfirst cost: 1000\nbenefit at year 1: 400\nbenefit at year 2: 300\nbenefit at year 3: 500\n```\n\n```compare c\nhorizon: study period 3\n```\n"
	r := findResult(oneCompare(t, computeMemo(t, src)), "press")
	d1, d2, d3 := 400/1.05, 300/(1.05*1.05), 500/(1.05*1.05*1.05)
	wantDisc := 2 + (1000-d1-d2)/d3
	if r.Payback == nil || math.Abs(*r.Payback-2.6) > 1e-12 {
		t.Errorf("payback %v, want 2.6", r.Payback)
	}
	if r.DiscPayback == nil || math.Abs(*r.DiscPayback-wantDisc) > 1e-12 {
		t.Errorf("discounted payback %v, want %v", r.DiscPayback, wantDisc)
	}
	if math.Abs(wantDisc-2.80325) > 1e-12 {
		t.Fatalf("the hand computation is off: %v", wantDisc)
	}
	// At 25% the discounted flows never pay back within the three years:
	// 320 + 192 + 256 = 768 < 1,000.
	src = strings.Replace(src, "rate: 5%", "rate: 25%", 1)
	r = findResult(oneCompare(t, computeMemo(t, src)), "press")
	if r.DiscPayback != nil || r.Payback == nil {
		t.Errorf("at 25%%: discounted payback %v (want none), payback %v", r.DiscPayback, r.Payback)
	}
}

// TestMultipleRatesOfReturn: flows -100, +230, -132 change sign twice and
// have two rates of return, 10% and 20% (-100 + 230/1.1 - 132/1.21 = 0 and
// -100 + 230/1.2 - 132/1.44 = 0, worked by hand): no single IRR, every
// root listed, a warning, and irr() in an expectation does not apply.
func TestMultipleRatesOfReturn(t *testing.T) {
	src := "---\nrate: 15%\n---\n\n```alternative twin\nlife: 2\nfirst cost: 100\nbenefit at year 1: 230\ncost at year 2: 132\n```\n\n```compare c\nhorizon: study period 2\n```\n\n```expect\nirr(twin) > 0\n```\n"
	rep := computeMemo(t, src)
	r := findResult(oneCompare(t, rep), "twin")
	if r.IRR != nil {
		t.Errorf("IRR %v, want none", *r.IRR)
	}
	if r.SignChanges != 2 {
		t.Errorf("%d sign changes, want 2", r.SignChanges)
	}
	if len(r.IRRRoots) != 2 || math.Abs(r.IRRRoots[0]-0.10) > 1e-9 || math.Abs(r.IRRRoots[1]-0.20) > 1e-9 {
		t.Errorf("rates of return %v, want [0.1 0.2]", r.IRRRoots)
	}
	w := strings.Join(r.Warnings, " ")
	if !strings.Contains(w, "10%") || !strings.Contains(w, "20%") {
		t.Errorf("warnings %q should name both rates", r.Warnings)
	}
	if len(rep.Expectations) != 1 || rep.Expectations[0].Passed || !strings.Contains(rep.Expectations[0].Detail, "2 rates") {
		t.Errorf("expectation on irr(): %+v; want a failure saying it has 2 rates", rep.Expectations)
	}
}

// TestConventionalIRR: a conventional project's rate of return makes its
// present worth zero. -1,000, then 300 a year for 5 years: 300 (P/A, r, 5)
// = 1,000 between 15% (1,005.6) and 16% (982.3).
func TestConventionalIRR(t *testing.T) {
	src := "---\nrate: 10%\n---\n\n```alternative lathe\nlife: 5\nfirst cost: 1000\nannual benefit: 300\n```\n\n```compare c\nhorizon: repeat lives\n```\n"
	r := findResult(oneCompare(t, computeMemo(t, src)), "lathe")
	if r.IRR == nil {
		t.Fatal("no IRR")
	}
	irr := *r.IRR
	if irr <= 0.15 || irr >= 0.16 {
		t.Errorf("IRR %v, want between 15%% and 16%%", irr)
	}
	if pw := discSum(irr, []float64{-1000, 300, 300, 300, 300, 300}); math.Abs(pw) > 1e-9 {
		t.Errorf("PW at the IRR %v is %v, want 0", irr, pw)
	}
}
