package compute_test

// Benchmarks of the engine (issue "Core", Speed). Targets: parse and
// compute one realistic memo under 2 ms; parse, compute and write as JSON a
// memo of 1,000 alternatives over a 100-year study period under 2 s; the
// cost growing linearly in alternatives and in years. Run with
//
//	go test ./compute/ -run XXX -bench . -benchtime 3x

import (
	"fmt"
	"math/rand"
	"strings"
	"testing"

	"worth/compute"
	"worth/parse"
	"worth/render"
)

// benchMemo is a realistic memo in a setting of our own: a hill town's
// water utility choosing how to keep its reservoir outlet valves working.
const benchMemo = "---\n" +
	"title: Reservoir outlet valves\n" +
	"to: Board of the Upper Marl Water District\n" +
	"from: Asset Planning\n" +
	"date: 2027-03-15\n" +
	"currency: USD\n" +
	"rate: 6% nominal monthly\n" +
	"---\n\n" +
	"# Reservoir outlet valves\n\n" +
	"The three outlet valves of the upper reservoir leak and stick. We compare\n" +
	"rebuilding them, replacing them with stainless gates, and a sleeve-valve\n" +
	"retrofit that also cuts pumping.\n\n" +
	"```assume\n" +
	"diver_day = 3,400        # dive crew, per day\n" +
	"power_price = 0.14       # per kWh\n" +
	"pumping_kwh = 62000      # a year, saved by the sleeve valve\n" +
	"```\n\n" +
	"```alternative rebuild\n" +
	"name: Rebuild the gate valves\n" +
	"life: 12\n" +
	"first cost: 185k\n" +
	"annual cost: 9,200 escalating 3%\n" +
	"cost every 4 years: 6 * diver_day\n" +
	"cost at year 8: 22,500\n" +
	"annual benefit: 4,000\n" +
	"salvage: 5,000\n" +
	"```\n\n" +
	"```alternative stainless\n" +
	"name: Stainless slide gates\n" +
	"life: 30\n" +
	"first cost: $412,000\n" +
	"annual cost: 3,100 gradient 60\n" +
	"cost every 10 years from year 10 to year 20: 4 * diver_day\n" +
	"annual benefit: 11,500\n" +
	"salvage: 30k\n" +
	"residual: 150k\n" +
	"```\n\n" +
	"```alternative sleeve\n" +
	"name: Sleeve-valve retrofit\n" +
	"life: 20\n" +
	"first cost: 528k\n" +
	"annual cost from year 1 to year 5: 7,800\n" +
	"annual cost from year 6: 4,200 escalating 2.5%\n" +
	"annual benefit: pumping_kwh * power_price escalating 2%\n" +
	"annual benefit: 9,000\n" +
	"annual disbenefit from year 1 to year 2: 2,500\n" +
	"cost every 5 years: 3 * diver_day\n" +
	"salvage: 40,000\n" +
	"```\n\n" +
	"```compare forever\n" +
	"horizon: perpetual\n" +
	"show: present worth, annual worth, irr, benefit-cost, payback\n" +
	"```\n\n" +
	"```compare decade\n" +
	"alternatives: rebuild, stainless, sleeve\n" +
	"horizon: study period 25\n" +
	"rate: 5%\n" +
	"decide by: incremental rate of return\n" +
	"base: rebuild\n" +
	"```\n\n" +
	"The sleeve retrofit is worth `= pw(sleeve, forever)` forever against\n" +
	"`= pw(rebuild, forever)` for a rebuild.\n\n" +
	"```expect\n" +
	"pw(sleeve, forever) < 0\n" +
	"best(decade) != \"\"\n" +
	"```\n"

// BenchmarkParseCompute parses and computes the realistic memo. Target:
// under 2 ms an operation.
func BenchmarkParseCompute(b *testing.B) {
	src := []byte(benchMemo)
	b.ReportAllocs()
	for b.Loop() {
		memo, err := parse.Parse("valves.md", src)
		if err != nil {
			b.Fatal(err)
		}
		if _, err := compute.Compute(memo); err != nil {
			b.Fatal(err)
		}
	}
}

// largeMemo writes a memo of n alternatives compared over a study period of
// years, every alternative with benefits (so that each gets a rate of
// return, payback and ratios) and an assortment of line forms.
func largeMemo(n, years int) []byte {
	rng := rand.New(rand.NewSource(int64(7*n + years)))
	var b strings.Builder
	b.WriteString("---\ntitle: Fleet of pumping stations\nrate: 7%\n---\n\n")
	for k := 0; k < n; k++ {
		life := 5 + rng.Intn(36)
		fmt.Fprintf(&b, "```alternative s%d\nname: Station option %d\nlife: %d\n", k, k, life)
		fmt.Fprintf(&b, "first cost: %dk\n", 50+rng.Intn(900))
		fmt.Fprintf(&b, "annual cost: %d escalating %.1f%%\n", 2000+rng.Intn(20000), rng.Float64()*5)
		fmt.Fprintf(&b, "annual benefit: %d gradient %d\n", 10000+rng.Intn(90000), rng.Intn(400)-100)
		fmt.Fprintf(&b, "cost every %d years: %d\n", 1+rng.Intn(life-1), 1000+rng.Intn(30000))
		if rng.Intn(2) == 0 {
			fmt.Fprintf(&b, "cost at year %d: %d\n", rng.Intn(life+1), 1000+rng.Intn(50000))
		}
		if rng.Intn(3) == 0 {
			fmt.Fprintf(&b, "annual disbenefit from year %d: %d\n", 1+rng.Intn(life), 500+rng.Intn(5000))
		}
		fmt.Fprintf(&b, "salvage: %d\n```\n\n", rng.Intn(40000))
	}
	fmt.Fprintf(&b, "```compare fleet\nhorizon: study period %d\n```\n", years)
	return []byte(b.String())
}

// runLarge parses, computes and writes the memo as JSON.
func runLarge(b *testing.B, src []byte) {
	b.Helper()
	memo, err := parse.Parse("fleet.md", src)
	if err != nil {
		b.Fatal(err)
	}
	rep, err := compute.Compute(memo)
	if err != nil {
		b.Fatal(err)
	}
	out, err := render.JSON(rep)
	if err != nil {
		b.Fatal(err)
	}
	if len(out) == 0 {
		b.Fatal("empty JSON")
	}
}

// BenchmarkLarge: 1,000 alternatives over a 100-year study period, parse +
// compute + render.JSON. Target: under 2 s an operation.
func BenchmarkLarge(b *testing.B) {
	src := largeMemo(1000, 100)
	b.ReportAllocs()
	for b.Loop() {
		runLarge(b, src)
	}
}

// BenchmarkLargeScaling shows the cost growing linearly: in the number of
// alternatives at a 100-year study period, and in the years at 1,000
// alternatives. The ns/alt-year metric should stay about level.
func BenchmarkLargeScaling(b *testing.B) {
	cases := []struct{ alts, years int }{
		{250, 100}, {500, 100}, {1000, 100},
		{1000, 50}, {1000, 200},
	}
	for _, c := range cases {
		src := largeMemo(c.alts, c.years)
		b.Run(fmt.Sprintf("alts=%d/years=%d", c.alts, c.years), func(b *testing.B) {
			for b.Loop() {
				runLarge(b, src)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(c.alts*c.years), "ns/alt-year")
		})
	}
}

// TestBenchMemos makes sure the benchmarks' memos are valid and mean what
// they say: every expectation of the realistic memo holds, and the large
// memo has its alternatives and horizon.
func TestBenchMemos(t *testing.T) {
	rep := computeMemo(t, benchMemo)
	if len(rep.Alternatives) != 3 || len(rep.Comparisons) != 2 {
		t.Fatalf("realistic memo: %d alternatives, %d comparisons", len(rep.Alternatives), len(rep.Comparisons))
	}
	for _, e := range rep.Expectations {
		if !e.Passed {
			t.Errorf("realistic memo: expectation %q failed (%s)", e.Text, e.Detail)
		}
	}
	if len(rep.Inline) != 2 {
		t.Errorf("realistic memo: %d inline values, want 2", len(rep.Inline))
	}
	big := computeMemo(t, string(largeMemo(250, 100)))
	c := big.Comparisons[0]
	if len(c.Results) != 250 || c.Horizon.Years != 100 {
		t.Fatalf("large memo: %d results over %d years", len(c.Results), c.Horizon.Years)
	}
}
