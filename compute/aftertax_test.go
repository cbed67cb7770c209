package compute_test

// After-tax present worth against an independent year-by-year computation
// written here from the contract's definitions (shared/memo-language.md,
// "After tax"): taxable income = benefits - costs other than first costs -
// depreciation (- loan interest); tax = rate x taxable income, negative
// being a saving; a disposal (salvage, or residual at a study period's
// end) is taxed on its gain over book value; each life cycle depreciates
// afresh; MACRS takes half of the year's deduction in a year of disposal
// before its recovery period ends. The random alternatives and their
// before-tax model come from properties_test.go.

import (
	"fmt"
	"math"
	"math/rand"
	"os"
	"strings"
	"testing"

	"worth/compute"
	"worth/parse"
)

// depSpec is a depreciation line of a generated alternative.
type depSpec struct {
	method  string // "straight line", "declining balance", "sum of years", "macrs"
	years   int
	rate    float64 // declining balance: share of book value a year
	salvage float64
	text    string
}

// modelDeductions is the schedule of deductions of ages 1, 2, ... for a
// basis, from the methods' definitions; end > 0 disposes of the asset at
// that age (the schedule then has end entries).
func modelDeductions(d depSpec, basis float64, end int) []float64 {
	var full []float64
	n := float64(d.years)
	switch d.method {
	case "macrs":
		for _, p := range tableA1[d.years] {
			full = append(full, basis*p/100)
		}
	case "straight line":
		for k := 0; k < d.years; k++ {
			full = append(full, (basis-d.salvage)/n)
		}
	case "sum of years":
		digits := n * (n + 1) / 2
		for k := 1; k <= d.years; k++ {
			full = append(full, (basis-d.salvage)*(n-float64(k)+1)/digits)
		}
	case "declining balance":
		bv := basis
		for k := 1; k <= d.years; k++ {
			x := d.rate * bv
			if sl := (bv - d.salvage) / (n - float64(k) + 1); sl > x {
				x = sl // the switch to straight line
			}
			if x > bv-d.salvage {
				x = bv - d.salvage
			}
			full = append(full, x)
			bv -= x
		}
	}
	if end <= 0 {
		return full
	}
	out := make([]float64, end)
	copy(out, full)
	if d.method == "macrs" && end <= d.years {
		out[end-1] /= 2
	}
	return out
}

// loanSpec is a loan line: amount, rate, term, and its amortization
// computed here: payment = amount (A/P, r, n), interest on the balance.
type loanSpec struct {
	amount, rate float64
	years        int
	payment      float64
	interest     []float64 // year t at [t-1]
	balance      []float64 // after t payments at [t], balance[0] = amount
}

func newLoan(amount, rate float64, years int) *loanSpec {
	l := &loanSpec{amount: amount, rate: rate, years: years}
	if rate == 0 {
		l.payment = amount / float64(years)
	} else {
		l.payment = amount * capRecovery(rate, years)
	}
	b := amount
	l.balance = append(l.balance, b)
	for t := 1; t <= years; t++ {
		in := rate * b
		l.interest = append(l.interest, in)
		b -= l.payment - in
		l.balance = append(l.balance, b)
	}
	return l
}

// taxCase is an alternative with a depreciation line and a loan, valued
// after tax at rate T.
type taxCase struct {
	alt  *propAlt
	dep  *depSpec
	loan *loanSpec
	T    float64
}

// addCycle adds the after-tax flows of one life cycle that starts at year
// start, over ages 0..end, to out. With disp the cycle ends with a
// disposal at end: its salvage when it runs its whole life, its residual
// value when cut.
func (tc *taxCase) addCycle(out []float64, start, end int, disp, cut bool) {
	a := tc.alt
	fc := a.firstCost()
	var deps []float64
	if tc.dep != nil {
		e := 0
		if disp {
			e = end
		}
		deps = modelDeductions(*tc.dep, fc, e)
	}
	for t := 0; t <= end && start+t < len(out); t++ {
		before, taxable := 0.0, 0.0
		for _, l := range a.lines {
			if l.kind == "salvage" {
				continue // the disposal below
			}
			v := a.amountAt(l, t)
			before += v
			if l.kind != "first" && l.word != "disbenefit" {
				taxable += v
			}
		}
		if t >= 1 && t <= len(deps) {
			taxable -= deps[t-1]
		}
		if l := tc.loan; l != nil {
			if t == 0 {
				before += l.amount
			}
			if t >= 1 && t <= l.years {
				before -= l.payment
				taxable -= l.interest[t-1]
			}
			if disp && t == end && t < l.years {
				before -= l.balance[t]
			}
		}
		if disp && t == end {
			value := a.salvage()
			if cut {
				value = a.residualAt(t)
			}
			bv := fc
			for _, d := range deps {
				bv -= d
			}
			before += value
			taxable += value - bv
		}
		out[start+t] += before - tc.T*taxable
	}
}

// finite is the after-tax flows over a study period of n years.
func (tc *taxCase) finite(n int) []float64 {
	out := make([]float64, n+1)
	L := tc.alt.life
	if L == 0 {
		tc.addCycle(out, 0, n, true, true)
		return out
	}
	for start := 0; start < n; start += L {
		end := min(L, n-start)
		tc.addCycle(out, start, end, true, end < L)
	}
	return out
}

// perpetual is the capitalized worth at rate i: one life cycle's present
// worth times (A/P, i, L) / i, or, with no life, the flows as written over
// 3,000 years.
func (tc *taxCase) perpetual(i float64) float64 {
	L := tc.alt.life
	if L == 0 {
		out := make([]float64, 3001)
		tc.addCycle(out, 0, 3000, false, false)
		return discSum(i, out)
	}
	out := make([]float64, L+1)
	tc.addCycle(out, 0, L, true, false)
	return discSum(i, out) * capRecovery(i, L) / i
}

// randomTaxCase draws an alternative (properties_test.go), a depreciation
// line, maybe a loan, and a tax rate.
func randomTaxCase(rng *rand.Rand, rate float64) *taxCase {
	tc := &taxCase{alt: randomAlt(rng, "a", rate), T: float64(5+rng.Intn(41)) / 100}
	fc := tc.alt.firstCost()
	n := 1 + rng.Intn(20)
	switch rng.Intn(4) {
	case 0:
		classes := []int{3, 5, 7, 10, 15, 20}
		c := classes[rng.Intn(len(classes))]
		tc.dep = &depSpec{method: "macrs", years: c, text: fmt.Sprintf("macrs %d", c)}
	case 1:
		s := math.Round(rng.Float64() * fc * 0.3)
		tc.dep = &depSpec{method: "straight line", years: n, salvage: s, text: fmt.Sprintf("straight line %d to %v", n, s)}
	case 2:
		tc.dep = &depSpec{method: "sum of years", years: n, text: fmt.Sprintf("sum of years %d", n)}
	case 3:
		mult := []float64{1.5, 2}[rng.Intn(2)]
		if mult/float64(n) >= 1 {
			mult = 1
		}
		s := 0.0
		if rng.Intn(2) == 0 {
			s = math.Round(rng.Float64() * fc * 0.2)
		}
		tc.dep = &depSpec{method: "declining balance", years: n, rate: mult / float64(n), salvage: s,
			text: fmt.Sprintf("declining balance %v%% %d to %v", mult*100, n, s)}
	}
	if fc > 0 && rng.Intn(2) == 0 {
		amount := math.Round(fc * (0.2 + 0.8*rng.Float64()))
		r := float64(rng.Intn(121)) / 1000
		tc.loan = newLoan(amount, r, 1+rng.Intn(15))
	}
	return tc
}

// memoText writes the alternative with its depreciation and loan lines.
func (tc *taxCase) memoText() string {
	s := tc.alt.memoText()
	var extra strings.Builder
	if tc.dep != nil {
		extra.WriteString("depreciation: " + tc.dep.text + "\n")
	}
	if l := tc.loan; l != nil {
		fmt.Fprintf(&extra, "loan: %v at %v%% over %d years\n", l.amount, l.rate*100, l.years)
	}
	k := strings.LastIndex(s, "```")
	return s[:k] + extra.String() + s[k:]
}

// taxMemo writes a memo of one tax case with after-tax comparisons over a
// study period, repeated lives (with a life) and a perpetual horizon.
func taxMemo(tc *taxCase, rateText string, study int) string {
	var b strings.Builder
	fmt.Fprintf(&b, "---\ntitle: Generated after-tax memo\nrate: %s\ntax rate: %v%%\n---\n\n", rateText, tc.T*100)
	b.WriteString(tc.memoText())
	fmt.Fprintf(&b, "```compare sp\nbasis: after tax\nhorizon: study period %d\n```\n\n", study)
	fmt.Fprintf(&b, "```compare perp\nbasis: after tax\nhorizon: perpetual\n```\n\n")
	if tc.alt.life > 0 {
		fmt.Fprintf(&b, "```compare rl\nbasis: after tax\nhorizon: repeat lives\n```\n\n")
		fmt.Fprintf(&b, "```compare twice\nbasis: after tax\nhorizon: study period %d\n```\n\n", 2*tc.alt.life)
	}
	return b.String()
}

// TestAfterTaxAgainstModel values random alternatives after tax, with
// every depreciation method, loans, cut and repeated life cycles, and
// checks the present worth, the year-by-year flows and the after-tax table
// against the model above.
func TestAfterTaxAgainstModel(t *testing.T) {
	for seed := int64(1); seed <= 200; seed++ {
		rng := rand.New(rand.NewSource(seed))
		bp := 400 + rng.Intn(1101)
		rate := float64(bp) / 10000
		rateText := fmt.Sprintf("%d.%02d%%", bp/100, bp%100)
		tc := randomTaxCase(rng, rate)
		study := 1 + rng.Intn(60)
		src := taxMemo(tc, rateText, study)
		rep := computeMemo(t, src)
		check := func(id string, n int) {
			c := findComparison(rep, id)
			if c == nil {
				t.Fatalf("seed %d: no comparison %s\n%s", seed, id, src)
			}
			r := c.Results[0]
			var want float64
			var flows []float64
			if n < 0 {
				want = tc.perpetual(rate)
			} else {
				flows = tc.finite(n)
				want = discSum(rate, flows)
			}
			scale := 1e3 * (1 + tc.alt.firstCost())
			if !closeTo(r.PW, want, scale) {
				t.Errorf("seed %d, %s: after-tax present worth %.6f, the model gives %.6f\n%s", seed, id, r.PW, want, src)
				return
			}
			if r.AfterTax == nil || len(r.AfterTax.Years) != len(r.Flows) {
				t.Errorf("seed %d, %s: no after-tax table for the %d years of flows", seed, id, len(r.Flows))
				return
			}
			for k, y := range r.AfterTax.Years {
				// The table (from the definitions) and the flows (from the
				// after-tax line items) agree year by year.
				if !closeTo(y.AfterTax, r.Flows[k].Net, scale) || !closeTo(y.BeforeTax-y.Tax, y.AfterTax, scale) {
					t.Errorf("seed %d, %s, year %d: table %.6f, flows %.6f\n%s", seed, id, k, y.AfterTax, r.Flows[k].Net, src)
					return
				}
				if flows != nil && !closeTo(y.AfterTax, flows[k], scale) {
					t.Errorf("seed %d, %s, year %d: after tax %.6f, the model gives %.6f\n%s", seed, id, k, y.AfterTax, flows[k], src)
					return
				}
				if math.Abs(y.Tax-tc.T*y.TaxableIncome) > 1e-9*scale {
					t.Errorf("seed %d, %s, year %d: tax %.6f is not %v x taxable income %.6f", seed, id, k, y.Tax, tc.T, y.TaxableIncome)
				}
			}
			// The worked equations end in the after-tax present worth, and
			// each term's factors, summed year by year, give its value.
			pw := equation(r, "PW")
			if pw == nil || !closeTo(pw.Value, r.PW, scale) {
				t.Errorf("seed %d, %s: the worked solution does not end in the present worth", seed, id)
				return
			}
			for _, eq := range r.Work {
				sum := 0.0
				for _, term := range eq.Terms {
					v := term.Coef
					for _, f := range term.Factors {
						v *= bruteFactor(f)
					}
					sum += v
				}
				if !closeTo(sum, eq.Value, scale) {
					t.Errorf("seed %d, %s: equation %s sums to %.6f by brute force, shows %.6f\n%s", seed, id, eq.LHS, sum, eq.Value, src)
				}
			}
		}
		check("sp", study)
		check("perp", -1)
		if tc.alt.life > 0 {
			check("rl", tc.alt.life)
			check("twice", 2*tc.alt.life)
		}
	}
}

// TestAfterTaxByHand: a machine bought for 100,000, earning 40,000 and
// costing 10,000 a year for 5 years, sold for 20,000, depreciated straight
// line over 5 years to nothing, tax 30%, rate 10%. Worked by hand: the
// deduction is 20,000 a year; taxable income 30,000 - 20,000 = 10,000, tax
// 3,000, after tax 27,000 a year; at year 5 the sale is all gain over a
// book value of nothing, taxed 6,000, so it brings 14,000 after tax.
func TestAfterTaxByHand(t *testing.T) {
	src := "---\ntitle: By hand\nrate: 10%\ntax rate: 30%\n---\n\n" +
		"```alternative m\nlife: 5\nfirst cost: 100k\nannual benefit: 40k\nannual cost: 10k\nsalvage: 20k\ndepreciation: straight line 5\n```\n\n" +
		"```compare c\nbasis: after tax\n```\n"
	rep := computeMemo(t, src)
	r := oneCompare(t, rep).Results[0]
	flows := []float64{-100000, 27000, 27000, 27000, 27000, 27000 + 14000}
	if want := discSum(0.10, flows); math.Abs(r.PW-want) > 1e-6 {
		t.Errorf("after-tax present worth %.4f, by hand %.4f", r.PW, want)
	}
	for k, y := range r.AfterTax.Years {
		if math.Abs(y.AfterTax-flows[k]) > 1e-9 {
			t.Errorf("year %d: %.4f after tax, by hand %.4f", k, y.AfterTax, flows[k])
		}
	}
	y5 := r.AfterTax.Years[5]
	if y5.Depreciation != 20000 || y5.TaxableIncome != 30000 || y5.Tax != 9000 || !y5.Disposal || y5.Gain != 20000 || y5.BookValue != 0 {
		t.Errorf("year 5: %+v", y5)
	}
}

// TestAfterTaxNeedsDepreciationForTheBasis: without a depreciation line
// the first cost is not written off (as land), a disposal is taxed on its
// gain over the first cost, and the report says so.
func TestAfterTaxNeedsDepreciationForTheBasis(t *testing.T) {
	src := "---\ntitle: Land\nrate: 8%\ntax rate: 20%\n---\n\n" +
		"```alternative lot\nlife: 10\nfirst cost: 50k\nannual benefit: 6k\nsalvage: 80k\n```\n\n" +
		"```compare c\nbasis: after tax\n```\n"
	r := oneCompare(t, computeMemo(t, src)).Results[0]
	// By hand: 6,000 x 0.8 a year; the sale pays 20% of the 30,000 gain.
	flows := make([]float64, 11)
	flows[0] = -50000
	for k := 1; k <= 10; k++ {
		flows[k] = 4800
	}
	flows[10] += 80000 - 0.2*30000
	if want := discSum(0.08, flows); math.Abs(r.PW-want) > 1e-6 {
		t.Errorf("present worth %.4f, by hand %.4f", r.PW, want)
	}
	if len(r.Warnings) == 0 || !strings.Contains(r.Warnings[0], "not depreciated") {
		t.Errorf("no warning that the first cost is not depreciated: %q", r.Warnings)
	}
}

// TestConstantMoneyMatchesThenCurrent: the same project written in
// constant money (with its real rate) and in then-current money (every
// amount inflated by (1 + f)^t, discounted at the market rate) has the
// same present worth, before tax and after tax with depreciation and a
// loan, whose amounts are then-current by nature. The Fisher equation
// (references.md) links the rates.
func TestConstantMoneyMatchesThenCurrent(t *testing.T) {
	f := 0.03
	grow := func(x float64, t int) string { return fmt.Sprintf("%.10f", x*math.Pow(1+f, float64(t))) }
	for _, basis := range []string{"before tax", "after tax"} {
		for _, horizon := range []string{"study period 6", "study period 4"} {
			constant := "---\ntitle: Constant\nrate: 9%\ninflation: 3%\ntax rate: 25%\namounts: constant\n---\n\n" +
				"```alternative m\nlife: 6\nfirst cost: 100k\nannual benefit: 40k\nannual cost from year 2: 5k escalating 1%\n" +
				"cost at year 3: 12k\nsalvage: 10k\nresidual: 30k\ndepreciation: macrs 5\nloan: 60k at 8% over 5 years\n```\n\n" +
				"```compare c\nbasis: " + basis + "\nhorizon: " + horizon + "\n```\n"
			// Then-current: a series X (1+f)^t escalating g becomes one
			// starting at X (1+f)^from escalating (1+g)(1+f) - 1.
			cut := 6
			if horizon == "study period 4" {
				cut = 4
			}
			current := "---\ntitle: Then-current\nrate: 9%\ninflation: 3%\ntax rate: 25%\n---\n\n" +
				"```alternative m\nlife: 6\nfirst cost: 100k\n" +
				"annual benefit: " + grow(40000, 1) + " escalating " + fmt.Sprintf("%.10f%%", f*100) + "\n" +
				"annual cost from year 2: " + grow(5000, 2) + " escalating " + fmt.Sprintf("%.10f%%", ((1.01)*(1+f)-1)*100) + "\n" +
				"cost at year 3: " + grow(12000, 3) + "\nsalvage: " + grow(10000, 6) + "\nresidual: " + grow(30000, cut) + "\n" +
				"depreciation: macrs 5\nloan: 60k at 8% over 5 years\n```\n\n" +
				"```compare c\nbasis: " + basis + "\nhorizon: " + horizon + "\n```\n"
			rc := oneCompare(t, computeMemo(t, constant))
			rt := oneCompare(t, computeMemo(t, current))
			real := 1.09/1.03 - 1
			if math.Abs(rc.Rate.Effective-real) > 1e-12 {
				t.Errorf("constant money discounts at %.6f, want the real rate %.6f", rc.Rate.Effective, real)
			}
			if a, b := rc.Results[0].PW, rt.Results[0].PW; math.Abs(a-b) > 1e-6 {
				t.Errorf("%s, %s: constant money gives %.6f, then-current %.6f", basis, horizon, a, b)
			}
		}
	}
}

// TestAmountsConstantWithRealRate: with constant amounts, a rate written
// as real is the rate used, as written.
func TestAmountsConstantWithRealRate(t *testing.T) {
	src := "---\ntitle: R\nrate: 4% real\ninflation: 2.5%\namounts: constant\n---\n\n" +
		"```alternative a\nlife: 5\nfirst cost: 10k\nannual benefit: 3k\n```\n\n```compare c\n```\n"
	c := oneCompare(t, computeMemo(t, src))
	if c.Rate.Effective != 0.04 {
		t.Errorf("rate used %.8f, want the real rate 4%% as written", c.Rate.Effective)
	}
	want := -10000 + 3000*uniformPW(0.04, 5)
	if math.Abs(c.Results[0].PW-want) > 1e-6 {
		t.Errorf("present worth %.4f, want %.4f", c.Results[0].PW, want)
	}
}

// BenchmarkAfterTaxExamples parses and computes the after-tax and
// replacement examples (the target for an example: under 2 ms).
func BenchmarkAfterTaxExamples(b *testing.B) {
	for _, name := range []string{"laser-cutter", "dump-truck"} {
		src, err := os.ReadFile("../examples/" + name + ".md")
		if err != nil {
			b.Fatal(err)
		}
		b.Run(name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				memo, err := parse.Parse(name+".md", src)
				if err != nil {
					b.Fatal(err)
				}
				if _, err := compute.Compute(memo); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
