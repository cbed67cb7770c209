package compute

import (
	"math"
	"reflect"
	"runtime"
	"strings"
	"testing"

	"worth/parse"
)

func computeMemo(t testing.TB, src string) *Report {
	t.Helper()
	memo, err := parse.Parse("risk.md", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	rep, err := Compute(memo)
	if err != nil {
		t.Fatal(err)
	}
	return rep
}

// linearMemo: the present worth of a is linear in one uniform input x,
// that of b is fixed; PW_a = -100,000 - 1,000 x (P/A, 5%, 10), and a is
// best when x is below (150,000 - 100,000) / (1,000 (P/A, 5%, 10)).
const linearMemo = "---\nrate: 5%\n---\n\n```assume\nx = 8 ~ uniform(2, 16)\ny = 3 ~ normal(3, 0.5)\n```\n\n" +
	"```alternative a\nlife: 10\nfirst cost: 100k\nannual cost: 1000 * x\n```\n\n" +
	"```alternative b\nlife: 10\nfirst cost: 150k\n```\n\n" +
	"```alternative c\nlife: 10\nfirst cost: 90k\nannual cost: 2000 * y + 5000\n```\n\n" +
	"```compare c1\nalternatives: a, b\nhorizon: study period 10\n```\n\n" +
	"```compare c2\nalternatives: c, b\nhorizon: study period 10\n```\n\n" +
	"```risk r1\ncompare: c1\ntrials: 40000\nseed: 42\n```\n\n" +
	"```risk r2\ncompare: c2\ntrials: 40000\nseed: 7\n```\n"

// TestRiskLinearUniform: the simulated probability of being best, the
// percentiles and the mean match the analytic values within four standard
// errors of the simulation.
func TestRiskLinearUniform(t *testing.T) {
	rep := computeMemo(t, linearMemo)
	if len(rep.Risks) != 2 {
		t.Fatalf("%d risks", len(rep.Risks))
	}
	// (P/A, 5%, 10) = (1 - 1.05^-10) / 0.05, common practice.
	pa := (1 - math.Pow(1.05, -10)) / 0.05
	within := func(what string, e Estimate, want float64) {
		t.Helper()
		if e.SE <= 0 || math.Abs(e.Value-want) > 4*e.SE {
			t.Errorf("%s: %v ± %v, want %v (%.1f standard errors)", what, e.Value, e.SE, want, math.Abs(e.Value-want)/e.SE)
		}
	}
	r := rep.Risks[0]
	if r.Trials != 40000 || r.Seed != 42 || r.Comparison.ID != "c1" {
		t.Fatalf("risk r1: %d trials, seed %d, compare %s", r.Trials, r.Seed, r.Comparison.ID)
	}
	if len(r.Inputs) != 2 || r.Inputs[0].Name != "x" {
		t.Fatalf("inputs %v", r.Inputs)
	}
	threshold := 50000 / (1000 * pa)
	within("P(a best)", r.Outcomes[0].PBest, (threshold-2)/14)
	within("P(b best)", r.Outcomes[1].PBest, 1-(threshold-2)/14)
	pwA := func(x float64) float64 { return -100000 - 1000*x*pa }
	// x uniform on [2, 16]: PW_a is uniform and decreasing in x, so its
	// P10 is at x's 90th percentile.
	o := r.Outcomes[0]
	within("P10 of a", o.P10, pwA(2+0.9*14))
	within("P50 of a", o.P50, pwA(9))
	within("P90 of a", o.P90, pwA(2+0.1*14))
	within("mean of a", o.Mean, pwA(9))
	if o.SD <= 0 || math.Abs(o.SD-1000*pa*14/math.Sqrt(12)) > 0.02*o.SD {
		t.Errorf("sd of a: %v, want %v", o.SD, 1000*pa*14/math.Sqrt(12))
	}
	if b := r.Outcomes[1]; b.P10.Value != -150000 || b.P90.Value != -150000 || b.Mean.SE != 0 {
		t.Errorf("b is fixed: %+v", b)
	}
	if r.Difference == nil {
		t.Fatal("no difference")
	}
	d := r.Difference
	// The difference is between the two most often best, a - b or b - a.
	sign := 1.0
	if d.A == "b" {
		sign = -1
	}
	within("P10 of the difference", d.P10, sign*(pwA(map[bool]float64{true: 2 + 0.9*14, false: 2 + 0.1*14}[sign > 0])+150000))
	within("P(difference > 0)", d.Positive, map[bool]float64{true: (threshold - 2) / 14, false: 1 - (threshold-2)/14}[sign > 0])
	if r.DoNothing != nil {
		t.Errorf("cost-only: doing nothing is no choice")
	}
	holds := r.Outcomes[0].PBest
	if r.Comparison.Recommended == "b" {
		holds = r.Outcomes[1].PBest
	}
	if r.Holds != holds {
		t.Errorf("holds %v, want %v", r.Holds, holds)
	}

	// A normal input with a linear effect: PW_c = -90,000 - (2,000 y +
	// 5,000) (P/A, 5%, 10) is normal; its P10 and P90 are the mean ∓
	// 1.2815516 sd (z at 90%, standard normal tables, from memory).
	r2 := rep.Risks[1]
	c := r2.Outcomes[0]
	mean := -90000 - (2000*3+5000)*pa
	sd := 2000 * 0.5 * pa
	within("P10 of c", c.P10, mean-1.2815516*sd)
	within("P50 of c", c.P50, mean)
	within("P90 of c", c.P90, mean+1.2815516*sd)
	within("mean of c", c.Mean, mean)
	// c is best where PW_c > -150,000: y below a threshold.
	yStar := ((150000-90000)/pa - 5000) / 2000
	within("P(c best)", c.PBest, 0.5*math.Erfc(-(yStar-3)/0.5/math.Sqrt2))
	if len(c.Curve) != 99 || c.Curve[49] != c.P50.Value || c.Curve[0] > c.Curve[98] {
		t.Errorf("S-curve: %d points, P50 %v vs %v", len(c.Curve), c.Curve[49], c.P50.Value)
	}
}

// TestRiskSameOnAnyCores: the same seed gives identical results with one
// core and with two; another seed gives others.
func TestRiskSameOnAnyCores(t *testing.T) {
	prev := runtime.GOMAXPROCS(1)
	defer runtime.GOMAXPROCS(prev)
	one := computeMemo(t, linearMemo).Risks
	runtime.GOMAXPROCS(2)
	two := computeMemo(t, linearMemo).Risks
	for k := range one {
		if !reflect.DeepEqual(one[k].Outcomes, two[k].Outcomes) || !reflect.DeepEqual(one[k].Difference, two[k].Difference) {
			t.Errorf("risk %s differs between one and two cores", one[k].ID)
		}
	}
	other := computeMemo(t, strings.Replace(linearMemo, "seed: 42", "seed: 43", 1)).Risks
	if reflect.DeepEqual(one[0].Outcomes[0].P50, other[0].Outcomes[0].P50) {
		t.Errorf("seeds 42 and 43 give the same P50")
	}
	// The first trials of a longer run are those of a shorter one: the
	// streams belong to blocks of trials, not to the run.
	if riskBlockSize > 40000 {
		t.Fatal("block size")
	}
}

// TestRiskDoNothing: where every alternative earns benefits, doing nothing
// is a choice, best when no present worth is positive.
func TestRiskDoNothing(t *testing.T) {
	src := "---\nrate: 5%\n---\n\n```assume\nb = 12k ~ uniform(8000, 16000)\n```\n\n" +
		"```alternative p\nlife: 10\nfirst cost: 100k\nannual benefit: b\n```\n\n" +
		"```compare c\n```\n\n```risk r\ntrials: 20000\n```\n"
	rep := computeMemo(t, src)
	r := rep.Risks[0]
	if r.DoNothing == nil {
		t.Fatal("doing nothing is a choice here")
	}
	// PW = -100,000 + b (P/A, 5%, 10) > 0 when b > 100,000 / (P/A, 5%, 10).
	pa := (1 - math.Pow(1.05, -10)) / 0.05
	want := (16000 - 100000/pa) / 8000
	if d := math.Abs(r.Outcomes[0].PBest.Value - want); d > 4*r.Outcomes[0].PBest.SE {
		t.Errorf("P(p best) %v, want %v", r.Outcomes[0].PBest, want)
	}
	if s := r.Outcomes[0].PBest.Value + r.DoNothing.Value; math.Abs(s-1) > 1e-12 {
		t.Errorf("probabilities sum to %v", s)
	}
	if r.Seed != parse.DefaultSeed || r.SeedGiven || r.Trials != 20000 || r.Difference != nil {
		t.Errorf("seed %d given %v trials %d difference %v", r.Seed, r.SeedGiven, r.Trials, r.Difference)
	}
}

// TestRiskProgress: the progress callback sees every trial, in order.
func TestRiskProgress(t *testing.T) {
	memo, err := parse.Parse("risk.md", []byte(linearMemo))
	if err != nil {
		t.Fatal(err)
	}
	var seen []RiskProgress
	if _, err := ComputeWith(memo, Options{Progress: func(p RiskProgress) { seen = append(seen, p) }}); err != nil {
		t.Fatal(err)
	}
	if len(seen) < 4 || seen[0].Done != 0 {
		t.Fatalf("progress: %v", seen)
	}
	last := seen[len(seen)-1]
	if last.Done != last.Total || last.Risk != "r2" || last.SE <= 0 || last.Leader == "" {
		t.Errorf("last progress %+v", last)
	}
	for k := 1; k < len(seen); k++ {
		if seen[k].Risk == seen[k-1].Risk && seen[k].Done < seen[k-1].Done {
			t.Errorf("progress goes back: %v then %v", seen[k-1], seen[k])
		}
	}
}

// TestRiskErrors: what a risk block cannot simulate is an error at its
// place, with a suggestion for a misspelt name.
func TestRiskErrors(t *testing.T) {
	head := "---\nrate: 5%\n---\n\n"
	alts := "```alternative a\nlife: 10\nfirst cost: 100k\nannual cost: 1000 * x\n```\n\n" +
		"```alternative b\nlife: 10\nfirst cost: 150k\n```\n\n```compare c1\n```\n\n"
	cases := []struct{ name, src, want string }{
		{"no distribution", head + "```assume\nx = 8\n```\n\n" + alts + "```risk r\n```\n", "nothing to draw"},
		{"unknown compare", head + "```assume\nx = 8 ~ uniform(2, 16)\n```\n\n" + alts + "```risk r\ncompare: c2\n```\n", `unknown comparison "c2"; did you mean "c1"?`},
		{"vary unknown", head + "```assume\nx = 8 ~ uniform(2, 16)\n```\n\n" + alts + "```risk r\nvary: xx\n```\n", `unknown assumption "xx"; did you mean "x"?`},
		{"vary no distribution", head + "```assume\nx = 8 ~ uniform(2, 16)\nz = 3\n```\n\n" + alts + "```risk r\nvary: z\n```\n", "z has no distribution"},
		{"unrelated", head + "```assume\nx = 8\nz = 3 ~ uniform(1, 4)\n```\n\n" + alts + "```risk r\n```\n", "no present worth in compare c1 depends on z"},
		{"drawn life", head + "```assume\nx = 8 ~ uniform(2, 16)\nn = 10 ~ uniform(8, 12)\n```\n\n" +
			"```alternative a\nlife: n\nfirst cost: 100k\nannual cost: 1000 * x\n```\n\n```compare c1\n```\n\n```risk r\n```\n", "the life of a depends on n"},
		{"drawn parameter", head + "```assume\nx = 8 ~ uniform(2, 16)\nz = 3 ~ uniform(x, 20)\n```\n\n" + alts + "```risk r\n```\n", "depend on x"},
		{"invalid trials", "---\nrate: r\n---\n\n```assume\nx = 8 ~ uniform(2, 16)\nr = 3% ~ normal(3%, 2%)\n```\n\n" +
			"```alternative a\nfirst cost: 100k\nannual cost: 1000 * x\n```\n\n```compare c1\n```\n\n```risk r\n```\n", "have no valid present worth"},
	}
	for _, tc := range cases {
		memo, err := parse.Parse("risk.md", []byte(tc.src))
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		_, err = Compute(memo)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one saying %q", tc.name, err, tc.want)
		}
	}
}

// TestRiskVary: with a vary line only the named inputs are drawn; every
// other one keeps its stated value, so an alternative that depends only on
// those has the same present worth in every trial.
func TestRiskVary(t *testing.T) {
	src := strings.Replace(linearMemo, "```risk r2\ncompare: c2\n", "```risk r2\ncompare: c2\nvary: x\n", 1)
	src = strings.Replace(src, "first cost: 150k\n```", "first cost: 150k\nannual cost: 1000 * x\n```", 1)
	rep := computeMemo(t, src)
	r := rep.Risks[1]
	if len(r.Inputs) != 1 || r.Inputs[0].Name != "x" {
		t.Fatalf("inputs %v", r.Inputs)
	}
	c := r.Outcomes[0] // c depends on y alone, which is not drawn
	if c.Min != c.Max || c.Min != c.Base {
		t.Errorf("c varies: %v to %v, base %v", c.Min, c.Max, c.Base)
	}
	if b := r.Outcomes[1]; !(b.Min < b.Max) {
		t.Errorf("b does not vary: %v to %v", b.Min, b.Max)
	}
}
