package compute_test

// Loans: the amortization against the printed capital-recovery factor and
// its defining properties; a loan at the comparison's rate leaves present
// worth unchanged without tax, and with tax raises it by exactly the
// present worth of the interest tax savings.

import (
	"fmt"
	"math"
	"math/rand"
	"strings"
	"testing"

	"worth/compute"
)

// TestAmortizeAgainstPrintedFactor: the level payment of a loan is the
// amount times (A/P, r, n). Source: shared/references.md, printed
// compound-interest tables (from memory): (A/P, 10%, 5) = 0.26380,
// (A/P, 8%, 10) = 0.14903, (A/P, 6%, 20) = 0.08718; five decimals, so the
// payment on 100,000 is within 0.5 of 100,000 x the printed factor.
func TestAmortizeAgainstPrintedFactor(t *testing.T) {
	cases := []struct {
		r       float64
		n       int
		printed float64
	}{{0.10, 5, 0.26380}, {0.08, 10, 0.14903}, {0.06, 20, 0.08718}}
	for _, tc := range cases {
		s := compute.Amortize(100000, tc.r, tc.n)
		if got := s[0].Payment; math.Abs(got-100000*tc.printed) > 0.5 {
			t.Errorf("%v over %d: payment %.2f, printed factor gives %.0f", tc.r, tc.n, got, 100000*tc.printed)
		}
	}
}

// TestAmortizeProperties: interest is the rate times the balance at the
// start of the year, principal the rest of the payment; the principal
// repaid adds up to the amount and the last balance is zero; the payments
// discounted at the loan's rate are worth the amount (common practice).
func TestAmortizeProperties(t *testing.T) {
	for _, r := range []float64{0, 0.035, 0.08, 0.15} {
		for _, n := range []int{1, 2, 7, 30} {
			amount := 250000.0
			s := compute.Amortize(amount, r, n)
			if len(s) != n {
				t.Fatalf("%v over %d: %d rows", r, n, len(s))
			}
			b, sum, pw := amount, 0.0, 0.0
			for k, y := range s {
				if math.Abs(y.Interest-r*b) > 1e-6 || math.Abs(y.Principal-(y.Payment-y.Interest)) > 1e-6 {
					t.Errorf("%v over %d, year %d: %+v on a balance of %.2f", r, n, k+1, y, b)
				}
				b -= y.Principal
				sum += y.Principal
				pw += y.Payment * math.Pow(1+r, -float64(k+1))
			}
			if math.Abs(sum-amount) > 1e-6 || s[n-1].Balance != 0 || math.Abs(b) > 1e-6 {
				t.Errorf("%v over %d: principal adds up to %.6f, last balance %.6f", r, n, sum, s[n-1].Balance)
			}
			if math.Abs(pw-amount) > 1e-6 {
				t.Errorf("%v over %d: payments worth %.6f at the loan's rate, want %.2f", r, n, pw, amount)
			}
		}
	}
}

// loanMemo writes one alternative, with or without a loan line, and three
// comparisons on the given basis.
func loanMemo(a *propAlt, rateText, taxRate, loan, basis string, study int) string {
	var b strings.Builder
	fmt.Fprintf(&b, "---\ntitle: Loan\nrate: %s\ntax rate: %s\n---\n\n", rateText, taxRate)
	s := a.memoText()
	k := strings.LastIndex(s, "```")
	b.WriteString(s[:k] + loan + s[k:])
	fmt.Fprintf(&b, "```compare sp\nbasis: %s\nhorizon: study period %d\n```\n\n", basis, study)
	fmt.Fprintf(&b, "```compare perp\nbasis: %s\nhorizon: perpetual\n```\n\n", basis)
	return b.String()
}

// interestSavings is the present worth at rate i of T x the interest of a
// loan taken at the start of each life cycle over a study period of n
// years (n < 0: perpetual), the loan ending with the cycle.
func interestSavings(l *loanSpec, life, n int, i, T float64) float64 {
	cycle := func(end int) float64 {
		s := 0.0
		for t := 1; t <= end && t <= l.years; t++ {
			s += T * l.interest[t-1] * math.Pow(1+i, -float64(t))
		}
		return s
	}
	switch {
	case n < 0 && life == 0:
		return cycle(l.years)
	case n < 0:
		return cycle(life) * capRecovery(i, life) / i
	case life == 0:
		return cycle(n)
	}
	s := 0.0
	for start := 0; start < n; start += life {
		s += cycle(min(life, n-start)) * math.Pow(1+i, -float64(start))
	}
	return s
}

// TestLoanAtTheRate: over random alternatives, horizons and loans at the
// comparison's own rate, borrowing leaves the present worth as it is
// before tax (and after tax at a zero tax rate): the loan's flows are
// worth nothing at the rate it costs. After tax, the loan raises the
// present worth by exactly the present worth of its interest tax savings
// (common practice; the savings summed here year by year).
func TestLoanAtTheRate(t *testing.T) {
	for seed := int64(1); seed <= 150; seed++ {
		rng := rand.New(rand.NewSource(seed))
		bp := 400 + rng.Intn(1101)
		rate := float64(bp) / 10000
		rateText := fmt.Sprintf("%d.%02d%%", bp/100, bp%100)
		a := randomAlt(rng, "a", rate)
		fc := a.firstCost()
		if fc == 0 {
			continue
		}
		l := newLoan(math.Round(fc*(0.1+0.9*rng.Float64())), rate, 1+rng.Intn(25))
		line := fmt.Sprintf("loan: %v at %s over %d years\n", l.amount, rateText, l.years)
		study := 1 + rng.Intn(70)
		T := float64(10+rng.Intn(31)) / 100
		for _, basis := range []string{"before tax", "after tax"} {
			tax := "0%"
			if basis == "after tax" {
				tax = fmt.Sprintf("%v%%", T*100)
			}
			with := computeMemo(t, loanMemo(a, rateText, tax, line, basis, study))
			without := computeMemo(t, loanMemo(a, rateText, tax, "", basis, study))
			for _, id := range []string{"sp", "perp"} {
				pw1 := findComparison(with, id).Results[0].PW
				pw0 := findComparison(without, id).Results[0].PW
				n := study
				if id == "perp" {
					n = -1
				}
				zero := 0.0
				scale := 1e3 * (1 + fc)
				if basis == "before tax" {
					if !closeTo(pw1-pw0, zero, scale) {
						t.Errorf("seed %d, %s, before tax: a loan at the rate changes present worth from %.6f to %.6f", seed, id, pw0, pw1)
					}
					// At a zero tax rate the after-tax flows are the
					// before-tax ones.
					z := computeMemo(t, loanMemo(a, rateText, "0%", line, "after tax", study))
					if pz := findComparison(z, id).Results[0].PW; !closeTo(pz, pw0, scale) {
						t.Errorf("seed %d, %s, after tax at 0%%: %.6f, before tax without the loan %.6f", seed, id, pz, pw0)
					}
					continue
				}
				want := interestSavings(l, a.life, n, rate, T)
				if !closeTo(pw1-pw0, want, scale) {
					t.Errorf("seed %d, %s, after tax: the loan adds %.6f, the interest tax savings are worth %.6f", seed, id, pw1-pw0, want)
				}
			}
		}
	}
}

// TestLoanLines reads the loan line's forms and checks what a loan may
// borrow.
func TestLoanLines(t *testing.T) {
	src := "---\ntitle: L\nrate: 7%\n---\n\n```alternative a\nlife: 10\nfirst cost: 500k\nloan: 300k at 6% nominal monthly over 8 years\n```\n"
	l := computeMemo(t, src).Alternatives[0].Loan
	if l == nil || l.Amount != 300000 || l.Years != 8 || math.Abs(l.Rate.Effective-(math.Pow(1.005, 12)-1)) > 1e-12 {
		t.Fatalf("loan read as %+v", l)
	}
	if l.BalanceAfter(0) != 300000 || l.BalanceAfter(8) != 0 || l.BalanceAfter(3) != l.Schedule[2].Balance {
		t.Errorf("balances: %v %v %v", l.BalanceAfter(0), l.BalanceAfter(8), l.BalanceAfter(3))
	}
}
