package compute_test

import (
	"math"
	"os"
	"strings"
	"testing"

	"worth/compute"
	"worth/parse"
)

func mustReport(t testing.TB, src string) *compute.Report {
	t.Helper()
	m, err := parse.Parse("s.md", []byte(src))
	if err != nil {
		t.Fatalf("parse: %v", err)
	}
	rep, err := compute.Compute(m)
	if err != nil {
		t.Fatalf("compute: %v", err)
	}
	return rep
}

func mustRecompute(t *testing.T, rep *compute.Report, ov compute.Overrides) *compute.Comparison {
	t.Helper()
	r, err := compute.Recompute(rep.Memo, ov)
	if err != nil {
		t.Fatalf("recompute: %v", err)
	}
	return r.Comparisons[0]
}

// pa is (P/A, i, n) = ((1+i)^n - 1) / (i (1+i)^n) (common practice).
func pa(i float64, n int) float64 { return (1 - math.Pow(1+i, -float64(n))) / i }

// lightsMemo: an invented street-lighting choice where the energy price
// enters linearly, so its breakeven has a closed form.
const lightsMemo = `---
title: Lights
rate: 7%
---

` + "```assume" + `
power_price = 0.12
kwh = 400,000
crew = 55k
unused = 3
` + "```" + `

` + "```alternative sodium" + `
name: Keep sodium lamps
life: 15
first cost: 20k
annual cost: kwh * power_price
annual cost: crew
` + "```" + `

` + "```alternative led" + `
name: LED retrofit
life: 15
first cost: 420k
annual cost: kwh * 0.45 * power_price
annual cost: crew * 0.5
` + "```" + `

` + "```compare lights" + `
horizon: study period 15
` + "```" + `

` + "```sensitivity lights-sens" + `
vary: power_price, crew, rate by ±20%
vary: unused by +-50%
range power_price: 0.02 to 0.20
breakeven: power_price, crew, unused
` + "```" + `
`

// TestBreakevenLinear: the energy price at which LED and sodium are worth
// the same, against its closed form, and substituted back.
func TestBreakevenLinear(t *testing.T) {
	rep := mustReport(t, lightsMemo)
	if len(rep.Sensitivities) != 1 {
		t.Fatalf("%d sensitivities", len(rep.Sensitivities))
	}
	s := rep.Sensitivities[0]
	if s.Recommended != "led" || s.RunnerUp != "sodium" {
		t.Fatalf("base: %s over %s", s.Recommended, s.RunnerUp)
	}
	// PW(led) - PW(sodium) = -400k + (kwh (1 - 0.45) p + crew/2) (P/A, 7%, 15)
	// = 0 at p = (400k / (P/A) - crew/2) / (0.55 kwh) (common practice:
	// a uniform series' present worth is A (P/A, i, n)).
	want := (400000/pa(0.07, 15) - 27500) / (0.55 * 400000)
	var be *compute.Breakeven
	for _, b := range s.Breakevens {
		if b.Name == "power_price" {
			be = b
		}
	}
	if be == nil || be.Value == nil {
		t.Fatalf("no breakeven for power_price: %+v", be)
	}
	if math.Abs(*be.Value-want) > 1e-9*want {
		t.Errorf("breakeven %.12g, closed form %.12g", *be.Value, want)
	}
	if !be.Verified || be.To != "sodium" {
		t.Errorf("verified %v, to %q", be.Verified, be.To)
	}
	// Substituted back by the test itself: margin zero at the value, and
	// the recommendation differs on either side.
	at := func(p float64) *compute.Comparison {
		return mustRecompute(t, rep, compute.Overrides{Values: map[string]float64{"power_price": p}})
	}
	c := at(*be.Value)
	if d := c.Results[1].PW - c.Results[0].PW; math.Abs(d) > 1e-4 {
		t.Errorf("margin at the breakeven: %g", d)
	}
	if lo, hi := at(*be.Value*0.99), at(*be.Value*1.01); lo.Recommended != "sodium" || hi.Recommended != "led" {
		t.Errorf("either side: %s below, %s above", lo.Recommended, hi.Recommended)
	}
	// The sweep over the price finds the same change.
	if len(s.Ranges) != 1 || len(s.Ranges[0].Changes) != 1 {
		t.Fatalf("sweep changes: %+v", s.Ranges)
	}
	ch := s.Ranges[0].Changes[0]
	if !ch.Exact || math.Abs(ch.At-want) > 1e-9*want || ch.From != "sodium" || ch.To != "led" {
		t.Errorf("sweep change %+v, want at %g from sodium to led", ch, want)
	}
	// An input the comparison does not use has no effect and no breakeven.
	for _, b := range s.Breakevens {
		if b.Name == "unused" && (!b.NoEffect || b.Value != nil) {
			t.Errorf("unused: %+v", b)
		}
		if b.Name == "crew" && b.Value == nil {
			t.Errorf("crew: no breakeven")
		}
	}
	// The search needs tens of evaluations, not thousands.
	if s.Evaluations > 250 {
		t.Errorf("%d evaluations", s.Evaluations)
	}
}

// TestSwings: each swing's margins are those of the memo recomputed with
// the value typed in; the swings are sorted widest first; the rate swing
// is a percentage of the rate.
func TestSwings(t *testing.T) {
	rep := mustReport(t, lightsMemo)
	s := rep.Sensitivities[0]
	if len(s.Swings) != 4 {
		t.Fatalf("%d swings", len(s.Swings))
	}
	for k := 1; k < len(s.Swings); k++ {
		if s.Swings[k].Spread > s.Swings[k-1].Spread {
			t.Errorf("swings not sorted by spread: %s after %s", s.Swings[k].Name, s.Swings[k-1].Name)
		}
	}
	for _, sw := range s.Swings {
		switch sw.Name {
		case "power_price":
			if sw.Low.Value != 0.12*0.8 || sw.High.Value != 0.12*1.2 {
				t.Errorf("power_price swing %v to %v", sw.Low.Value, sw.High.Value)
			}
			typed := strings.Replace(lightsMemo, "power_price = 0.12", "power_price = 0.096", 1)
			c := mustReport(t, typed).Comparisons[0]
			want := c.Results[1].PW - c.Results[0].PW
			if math.Abs(sw.Low.Margin-want) > 1e-6 {
				t.Errorf("low margin %v, typed-in memo %v", sw.Low.Margin, want)
			}
		case "rate":
			if math.Abs(sw.Low.Value-0.056) > 1e-12 || math.Abs(sw.High.Value-0.084) > 1e-12 {
				t.Errorf("rate swing %v to %v", sw.Low.Value, sw.High.Value)
			}
		case "unused":
			if sw.Spread != 0 || sw.Percent != 0.5 {
				t.Errorf("unused: spread %v, percent %v", sw.Spread, sw.Percent)
			}
		}
	}
	if len(s.Spider) != 4 || len(s.Spider[0].Points) != 9 {
		t.Fatalf("spider: %d lines", len(s.Spider))
	}
	if mid := s.Spider[0].Points[4]; mid.Margin != s.Margin {
		t.Errorf("spider at 0%%: %v, base %v", mid.Margin, s.Margin)
	}
}

// TestBreakevenRate: the rate at which two alternatives cross is the rate
// of return of their increment. Increment -1000, +550, +605 has the rate
// 10% exactly: 550/1.1 + 605/1.21 = 500 + 500 (common practice).
func TestBreakevenRate(t *testing.T) {
	src := "---\nrate: 7%\n---\n\n```alternative a\nlife: 2\nfirst cost: 2000\ncost at year 1: 800\ncost at year 2: 900\n```\n\n" +
		"```alternative b\nlife: 2\nfirst cost: 3000\ncost at year 1: 250\ncost at year 2: 295\n```\n\n```compare c\n```\n\n" +
		"```sensitivity s\nbreakeven: rate\nrange rate: 2% to 20%\n```\n"
	rep := mustReport(t, src)
	s := rep.Sensitivities[0]
	be := s.Breakevens[0]
	if be.Value == nil || math.Abs(*be.Value-0.10) > 1e-10 || !be.Verified || be.To != "a" {
		t.Fatalf("rate breakeven %+v (value %v)", be, be.Value)
	}
	if len(s.Ranges[0].Changes) != 1 || math.Abs(s.Ranges[0].Changes[0].At-0.10) > 1e-10 {
		t.Errorf("sweep changes %+v", s.Ranges[0].Changes)
	}
}

// TestInvalidSwing: a swing that makes the memo invalid (escalation at or
// above the rate on a perpetual horizon) is reported at that end, and the
// breakeven search stops there, saying why.
func TestInvalidSwing(t *testing.T) {
	src := "---\nrate: 6%\n---\n\n```assume\nesc = 4%\n```\n\n" +
		"```alternative a\nfirst cost: 1000\nannual cost: 100 escalating esc\n```\n\n" +
		"```alternative b\nfirst cost: 2500\nannual cost: 40 escalating esc\n```\n\n```compare c\nhorizon: perpetual\n```\n\n" +
		"```sensitivity s\nvary: esc by ±60%\nbreakeven: esc\nrange rate: 1% to 9%\n```\n"
	rep := mustReport(t, src)
	s := rep.Sensitivities[0]
	var sw *compute.Swing
	for _, x := range s.Swings {
		if x.Name == "esc" {
			sw = x
		}
	}
	if sw == nil || sw.Low.Invalid != "" || sw.High.Invalid == "" || !math.IsNaN(sw.High.Margin) {
		t.Fatalf("esc swing: %+v", sw)
	}
	if !strings.Contains(sw.High.Invalid, "perpetual") {
		t.Errorf("invalid reason: %q", sw.High.Invalid)
	}
	be := s.Breakevens[0]
	if be.SearchedHigh >= 0.06 {
		t.Errorf("search went to %v, at or past the rate", be.SearchedHigh)
	}
	// The rate sweep has invalid points below the escalation, and valid
	// ones above it.
	bad, good := 0, 0
	for _, p := range s.Ranges[0].Points {
		if p.Valid() {
			good++
		} else {
			bad++
		}
	}
	if bad == 0 || good == 0 {
		t.Errorf("rate sweep: %d invalid, %d valid points", bad, good)
	}
}

// TestSensitivityEvaluationsExample: a sensitivity block on the example
// memo stays within tens of recomputations per input.
func TestSensitivityEvaluationsExample(t *testing.T) {
	src, err := os.ReadFile("../examples/capital-program.md")
	if err != nil {
		t.Skip("no example with a sensitivity block")
	}
	rep := mustReport(t, string(src))
	for _, s := range rep.Sensitivities {
		inputs := len(s.Swings) + len(s.Ranges) + len(s.Breakevens)
		if s.Evaluations > 60*inputs {
			t.Errorf("%s: %d evaluations for %d inputs", s.ID, s.Evaluations, inputs)
		}
	}
}

// BenchmarkSensitivityExample: the example memo's analysis blocks (a
// sensitivity block with four swings, a sweep and three breakevens, two
// scenarios and a budget), against the same memo without them, and one
// recomputation. Target (issue "Analysis"): a sensitivity block on an
// example under about 50 ms.
//
//	go test ./compute -run XXX -bench Sensitivity -benchtime 20x
func BenchmarkSensitivityExample(b *testing.B) {
	src, err := os.ReadFile("../examples/capital-program.md")
	if err != nil {
		b.Skip("no example")
	}
	full, err := parse.Parse("capital-program.md", src)
	if err != nil {
		b.Fatal(err)
	}
	cut := string(src)
	cut = cut[:strings.Index(cut, "```sensitivity")] + cut[strings.Index(cut, "## Two other futures"):]
	noSens, err := parse.Parse("capital-program.md", []byte(cut))
	if err != nil {
		b.Fatal(err)
	}
	b.Run("memo", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			if _, err := compute.Compute(full); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("memo-without-sensitivity", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			if _, err := compute.Compute(noSens); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("recompute", func(b *testing.B) {
		for i := 0; i < b.N; i++ {
			if _, err := compute.Recompute(full, compute.Overrides{}); err != nil {
				b.Fatal(err)
			}
		}
	})
	rep, _ := compute.Compute(full)
	b.Logf("sensitivity block: %d recomputations", rep.Sensitivities[0].Evaluations)
}

// TestBreakevenWholeNumbers: an input that must be a whole number (a life)
// is searched over whole numbers; the breakeven is the first life at
// which the recommendation changes, next to the last at which it holds,
// as an enumeration of every life from 1 to the base finds.
func TestBreakevenWholeNumbers(t *testing.T) {
	src := "---\nrate: 6%\n---\n\n```assume\nshort_life = 14\n```\n\n" +
		"```alternative cheap\nlife: short_life\nfirst cost: 100k\nannual cost: 2k\n```\n\n" +
		"```alternative dear\nlife: 30\nfirst cost: 190k\nannual cost: 1k\n```\n\n" +
		"```compare c\nhorizon: perpetual\n```\n\n```sensitivity s\nvary: short_life by ±30%\nrange short_life: 4 to 25\nbreakeven: short_life\n```\n"
	rep := mustReport(t, src)
	s := rep.Sensitivities[0]
	be := s.Breakevens[0]
	if be.Value == nil || !be.Discrete || !be.Verified || math.Abs(*be.Value-be.Holds) != 1 {
		t.Fatalf("breakeven %+v", be)
	}
	// Enumeration: the longest life below the base at which the base
	// recommendation no longer holds.
	want := math.NaN()
	for life := 1.0; life < 14; life++ {
		c := mustRecompute(t, rep, compute.Overrides{Values: map[string]float64{"short_life": life}})
		if c.Recommended != s.Recommended {
			want = life
		}
	}
	if *be.Value != want {
		t.Errorf("breakeven life %v, enumeration %v", *be.Value, want)
	}
	for _, sw := range s.Swings {
		if sw.Low.Value != math.Trunc(sw.Low.Value) || sw.High.Value != math.Trunc(sw.High.Value) || !sw.Low.Valid() || !sw.High.Valid() {
			t.Errorf("swing of a life to %v and %v", sw.Low.Value, sw.High.Value)
		}
	}
	sw := s.Ranges[0]
	if !sw.Discrete || len(sw.Points) != 22 || len(sw.Changes) != 1 || sw.Changes[0].Hi-sw.Changes[0].Lo != 1 {
		t.Errorf("sweep: discrete %v, %d points, changes %+v", sw.Discrete, len(sw.Points), sw.Changes)
	}
}
