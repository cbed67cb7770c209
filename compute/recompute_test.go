package compute_test

import (
	"math"
	"testing"

	"worth/compute"
	"worth/parse"
)

// TestRecompute: overriding an assumption gives the same results as typing
// the value into the memo; every expression that uses it follows; a rate
// override applies to every comparison.
func TestRecompute(t *testing.T) {
	src := func(price string) string {
		return "---\nrate: 6%\n---\n\n```assume\nprice = " + price + "\nenergy = 50,000 * price\n```\n\n" +
			"```alternative a\nlife: 10\nfirst cost: 100k\nannual cost: energy\n```\n\n" +
			"```alternative b\nlife: 10\nfirst cost: 140k\nannual cost: energy / 2\n```\n\n```compare c\n```\n"
	}
	build := func(s string) *compute.Report {
		m, err := parse.Parse("r.md", []byte(s))
		if err != nil {
			t.Fatal(err)
		}
		rep, err := compute.Compute(m)
		if err != nil {
			t.Fatal(err)
		}
		return rep
	}
	base := build(src("0.10"))
	typed := build(src("0.16"))
	m, _ := parse.Parse("r.md", []byte(src("0.10")))
	over, err := compute.Recompute(m, compute.Overrides{Values: map[string]float64{"price": 0.16}})
	if err != nil {
		t.Fatal(err)
	}
	for k := range typed.Comparisons[0].Results {
		want, got := typed.Comparisons[0].Results[k].PW, over.Comparisons[0].Results[k].PW
		if math.Abs(want-got) > 1e-9*math.Abs(want) {
			t.Errorf("result %d: override gives %v, the memo typed with the value %v", k, got, want)
		}
	}
	if base.Comparisons[0].Results[0].PW == over.Comparisons[0].Results[0].PW {
		t.Errorf("the override changed nothing")
	}
	r := 0.09
	atRate, err := compute.Recompute(m, compute.Overrides{Rate: &r})
	if err != nil {
		t.Fatal(err)
	}
	c := atRate.Comparisons[0]
	if c.Rate.Effective != 0.09 {
		t.Fatalf("rate override: %v", c.Rate.Effective)
	}
	// Independent check (common practice): PW = -FC - A (P/A, i, n).
	want := -100000 - 5000*(1-math.Pow(1.09, -10))/0.09
	if math.Abs(c.Results[0].PW-want) > 1e-6 {
		t.Errorf("PW at 9%%: %v, want %v", c.Results[0].PW, want)
	}
}
