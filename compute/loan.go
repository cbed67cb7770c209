package compute

import (
	"worth/parse"
)

// Loan is an alternative's "loan:" line, evaluated: Amount of the first
// cost borrowed at year 0 of each life cycle at Rate, repaid in Years equal
// payments at the end of each year, Payment = Amount (A/P, r, n). Each
// payment is the year's interest on the balance plus a repayment of
// principal. Where the life cycle (or a study period) ends before the
// loan's term, the balance left is repaid then.
type Loan struct {
	Amount  float64
	Rate    Rate
	Years   int
	Payment float64
	Line    int
	// Schedule is the amortization: one row for each year of the term.
	Schedule []LoanYear
}

// LoanYear is one year of a loan's amortization.
type LoanYear struct {
	Year      int
	Payment   float64
	Interest  float64 // rate x the balance at the start of the year
	Principal float64 // payment less interest
	Balance   float64 // owed after the payment
}

// Amortize is the level-payment schedule of a loan of amount at rate r
// over n years: A = amount (A/P, r, n); interest_t = r B_(t-1);
// principal_t = A - interest_t; B_t = B_(t-1) - principal_t. The last
// balance is set to exactly zero.
func Amortize(amount, r float64, n int) []LoanYear {
	a := amount * AP(r, float64(n))
	out := make([]LoanYear, n)
	b := amount
	for t := 1; t <= n; t++ {
		in := r * b
		p := a - in
		b -= p
		if t == n {
			b = 0
		}
		out[t-1] = LoanYear{Year: t, Payment: a, Interest: in, Principal: p, Balance: b}
	}
	return out
}

// BalanceAfter is what is owed after t payments (the whole amount at t = 0,
// nothing after the term).
func (l *Loan) BalanceAfter(t int) float64 {
	switch {
	case t <= 0:
		return l.Amount
	case t >= l.Years:
		return 0
	}
	return l.Schedule[t-1].Balance
}

// loan evaluates an alternative's loan line.
func (e *env) loan(a *Alternative, src *parse.Loan) (*Loan, bool) {
	l := &Loan{Line: src.Line}
	amount, ok := e.number(src.Amount, "the loan")
	if ok && (amount <= 0 || amount > a.FirstCost) {
		e.errs.Add(src.Amount.Pos, "a loan borrows part of the first cost: more than 0 and at most %s, got %s", trimFloat(a.FirstCost), trimFloat(amount))
		ok = false
	}
	l.Amount = amount
	n, good := e.year(src.Years, "the loan's term", 1)
	ok = ok && good
	l.Years = n
	r, good := e.rate(src.Rate, "the loan's rate", e.tax.inflation)
	if !good {
		return nil, false
	}
	if r.Effective < 0 {
		e.errs.Add(src.Rate.Text.Pos, "the loan's rate must not be negative, got %s", pct(r.Effective))
		ok = false
	}
	if !ok {
		return nil, false
	}
	l.Rate = *r
	l.Schedule = Amortize(amount, r.Effective, n)
	l.Payment = l.Schedule[0].Payment
	return l, true
}
