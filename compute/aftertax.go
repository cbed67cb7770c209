package compute

import (
	"fmt"
	"math"

	"worth/parse"
)

// After-tax analysis, financing and the money basis of amounts.
//
// A comparison "after tax" values each alternative's after-tax cash flows;
// an alternative with a loan carries the loan's flows on either basis. Both
// are done by valuing a derived alternative (a view) whose line items are
// the after-tax (and financed) flows in the engine's own forms: every
// measure, decision, worked equation and chart of the before-tax engine
// then applies to them unchanged. After tax at rate T, per life cycle:
//
//   - first costs stay as they are (they are depreciated, not expensed);
//   - every other cost and benefit becomes x (1 - T) (taxable income less
//     its tax); disbenefits, a loss to the public, are not taxed;
//   - depreciation saves T D_t in year t of the cycle;
//   - a loan brings its amount at year 0 and costs its payment A each year
//     of its term; its interest saves T I_t, written in closed form as
//     T A (a uniform series) less T P_1 (1 + r)^(t-1) (the principal, a
//     geometric series at the loan's rate);
//   - at disposal (salvage at the end of a life, or the residual value at
//     a study period's end) the gain over book value pays T x gain (a loss
//     saves), and a balance still owed is repaid.
//
// Taxable income of a year = benefits - costs other than first costs -
// depreciation - loan interest + gain on disposal; tax = T x taxable income,
// a negative tax being a saving taken against the firm's other income. The
// year-by-year table (AfterTax.Years) is computed directly from these
// definitions, separately from the view, and the tests hold the two equal.
//
// Money basis: with "amounts: constant" the memo's amounts are in today's
// money and are discounted at the real rate. Depreciation, loan payments
// and book values are fixed in the money of the year they fall in, so they
// are deflated by (1 + f)^-t, t counted from the start of the life cycle
// (whose first cost sets the basis in that year's money).

// taxSettings are a memo's tax rate, inflation and money basis.
type taxSettings struct {
	rate      *Rate // nil when the memo gives no tax rate
	inflation *Rate
	constant  bool
}

// readTaxSettings reads the memo-wide settings once the front matter's
// rates are known.
func (e *env) readTaxSettings(memo *parse.Memo, rep *Report) {
	e.tax = &taxSettings{rate: rep.TaxRate, inflation: rep.Inflation}
	rep.Amounts = parse.ThenCurrent
	if f := memo.Front.Amounts; f.Value.Src == parse.Constant {
		rep.Amounts = parse.Constant
		e.tax.constant = true
		if memo.Front.Inflation == nil {
			e.errs.Add(f.Value.Pos, "amounts in constant money need the general inflation rate in the front matter (inflation: 2.5%%), to find the real rate and to deflate depreciation and loan payments")
		}
	}
	// The memo's rate is the rate its amounts are discounted at; a compare
	// or replacement block's own rate is converted where it is read.
	if rep.Rate != nil {
		r := e.moneyRate(*rep.Rate)
		rep.Rate = &r
	}
}

// deflator is the factor that turns an amount fixed in the money of age t
// of a cycle into the memo's money: 1 for then-current amounts,
// (1 + f)^-t for constant ones.
func (s *taxSettings) deflator(t int) float64 {
	if !s.constant || s.inflation == nil {
		return 1
	}
	return math.Pow(1+s.inflation.Effective, -float64(t))
}

// deflation is the growth rate a year of the deflator: 1/(1 + f) - 1
// (zero for then-current amounts).
func (s *taxSettings) deflation() float64 {
	if !s.constant || s.inflation == nil {
		return 0
	}
	return 1/(1+s.inflation.Effective) - 1
}

// moneyRate turns a rate as read into the rate the amounts are
// discounted at: the market rate for then-current amounts, as read; for
// constant amounts the real rate, (1 + i) / (1 + f) - 1, or the real rate
// as written.
func (e *env) moneyRate(r Rate) Rate {
	if e.tax == nil || !e.tax.constant || e.tax.inflation == nil || (e.overrides != nil && e.overrides.Rate != nil) {
		return r
	}
	f := e.tax.inflation.Effective
	if r.Mode == "real" {
		r.Effective = r.Stated
		r.Conversion = fmt.Sprintf("the real rate %s as written, since the amounts are in constant money", pct(r.Stated))
		return r
	}
	market := r.Effective
	r.Effective = (1+market)/(1+f) - 1
	conv := fmt.Sprintf("(1 + %s)/(1 + %s) − 1 = %s real rate, since the amounts are in constant money (Fisher equation, inflation %s)", plain(market), plain(f), pct(r.Effective), pct(f))
	if r.Conversion != "" {
		conv = r.Conversion + "; then " + conv
	}
	r.Conversion = conv
	return r
}

// taxLines evaluates an alternative's depreciation and loan lines.
func (e *env) taxLines(a *Alternative, src *parse.Alternative) bool {
	ok := true
	if src.Depreciation != nil {
		d, good := e.depreciation(a, src.Depreciation)
		a.Depreciation = d
		ok = ok && good
	}
	if src.Loan != nil {
		l, good := e.loan(a, src.Loan)
		a.Loan = l
		ok = ok && good
	}
	return ok
}

// afterTaxReady checks that an after-tax comparison can be made.
func (e *env) afterTaxReady(src *parse.Compare) bool {
	if e.tax == nil || e.tax.rate == nil {
		e.errs.Add(src.Basis.Value.Pos, "an after-tax comparison needs the tax rate in the front matter (tax rate: 25%%)")
		return false
	}
	return true
}

// AfterTax is an alternative's after-tax cash flows in one comparison,
// year by year over the years its Flows show.
type AfterTax struct {
	TaxRate float64
	// Constant is set when the amounts are in constant money: the
	// depreciation, interest and book values shown are deflated.
	Constant  bool
	Inflation float64
	Years     []TaxYear
}

// TaxYear is one year of an after-tax cash-flow table. Amounts are
// signed like cash flows except Depreciation, Interest and BookValue,
// which are positive.
type TaxYear struct {
	Year int
	// BeforeTax is the net cash flow before tax, loan flows included.
	BeforeTax    float64
	Depreciation float64
	Interest     float64
	// Principal is the loan principal repaid (a balance repaid at
	// disposal included), positive.
	Principal float64
	// Disposal is set in a year an asset is disposed of (salvage at the
	// end of its life, or its residual value at a study period's end);
	// Gain is the value recovered less BookValue.
	Disposal      bool
	BookValue     float64
	Gain          float64
	TaxableIncome float64
	Tax           float64
	AfterTax      float64
}

// evaluateOn values an alternative in a comparison on its basis: as it is
// before tax without a loan, else through its view (after tax and/or
// financed).
func (e *env) evaluateOn(c *Comparison, a *Alternative, i float64, hz Horizon) *Result {
	after := c.Basis == "after tax"
	if !after && a.Loan == nil {
		return evaluate(a, i, hz)
	}
	v := e.view(a, after, hz)
	r := evaluate(v, i, hz)
	// The view's one-time tax items are not events of the year.
	for k := range r.Flows {
		y := &r.Flows[k]
		var keep []string
		for _, n := range y.Notes {
			if !syntheticLabels[n] {
				keep = append(keep, n)
			}
		}
		y.Notes = keep
	}
	if after {
		t := e.tax.rate.Effective
		what := fmt.Sprintf("after tax at %s: benefits and costs other than first costs count × (1 − %s)", pct(t), pct(t))
		if a.Depreciation != nil {
			what += fmt.Sprintf("; depreciation saves %s of each year's deduction", pct(t))
		}
		if a.Loan != nil && a.Loan.Rate.Effective > 0 {
			what += fmt.Sprintf("; loan interest saves %s of it, I_t = A − P₁(1 + r)^(t − 1)", pct(t))
		}
		if a.Life > 0 || !hz.Perpetual() {
			what += "; a disposal pays tax on its gain over book value"
		}
		for _, w := range r.Work {
			if len(w.Terms) > 0 && w.Terms[0].Symbol == "" {
				w.Label += " — " + what
			}
		}
		r.AfterTax = e.afterTaxTable(a, hz, len(r.Flows)-1)
		if a.Depreciation == nil && a.FirstCost > 0 {
			r.Warnings = append(r.Warnings, fmt.Sprintf("%s has no depreciation line, so its first cost is not depreciated (as for land); a disposal is taxed on its gain over the first cost.", a.Name))
		}
	}
	return r
}

// Labels of the view's items; one-time ones are kept out of the notes of
// the year.
const (
	labelDepSaving      = "depreciation tax saving"
	labelInterestSaving = "interest tax saving"
	labelLoan           = "loan"
	labelPayments       = "loan payments"
	labelBalance        = "loan balance repaid"
	labelLossSaving     = "tax saved on the loss at disposal"
)

var syntheticLabels = map[string]bool{labelDepSaving: true, labelInterestSaving: true}

// cutAge is the age at which a finite horizon cuts the last life cycle of
// a, or -1 when it cuts none.
func cutAge(a *Alternative, hz Horizon) int {
	if hz.Perpetual() {
		return -1
	}
	if a.Life == 0 {
		return hz.Years
	}
	if r := hz.Years % a.Life; r > 0 {
		return r
	}
	return -1
}

// view builds the alternative whose items are a's flows after tax (when
// after is set) and with its loan, for the comparison's horizon (which
// fixes the age at which a study period cuts the last cycle).
func (e *env) view(a *Alternative, after bool, hz Horizon) *Alternative {
	v := *a
	v.Items = nil
	T := 0.0
	if after {
		T = e.tax.rate.Effective
	}
	s := e.tax
	L := a.Life
	add := func(it *Item) { v.Items = append(v.Items, it) }
	line := a.Line
	if a.Depreciation != nil {
		line = a.Depreciation.Line
	}
	// First costs, then the loan's amount.
	for _, it := range a.Items {
		if it.Kind == parse.FirstCost {
			add(it)
		}
	}
	ln := a.Loan
	if ln != nil {
		add(&Item{Line: ln.Line, Label: labelLoan, Kind: parse.FirstCost, Sign: parse.Cost, Amount: -ln.Amount})
	}
	// Other costs and benefits, less their tax.
	salvage := 0.0
	for _, it := range a.Items {
		switch {
		case it.Kind == parse.FirstCost:
		case it.Kind == parse.Salvage:
			salvage += it.Amount
			if !after {
				add(it)
			}
		case !after || it.Sign == parse.Disbenefit:
			add(it)
		default:
			x := *it
			x.Amount *= 1 - T
			x.Gradient *= 1 - T
			add(&x)
		}
	}
	// The loan's payments, and the balance left at the end of a life.
	term := 0
	if ln != nil {
		term = ln.Years
		if L > 0 && term > L {
			term = L
		}
		g := s.deflation()
		add(&Item{Line: ln.Line, Label: labelPayments, Kind: parse.Annual, Sign: parse.Cost, Amount: ln.Payment * s.deflator(1),
			From: 1, To: term, Escalation: g, HasEscalation: g != 0})
		if L > 0 && ln.Years > L {
			add(&Item{Line: ln.Line, Label: labelBalance, Kind: parse.Once, Sign: parse.Cost, Amount: ln.BalanceAfter(L) * s.deflator(L), At: L})
		}
	}
	if after {
		// Depreciation saves T D_t.
		var deps []float64
		if a.Depreciation != nil {
			deps = a.Depreciation.Deductions(a.FirstCost, L)
		}
		saving := make([]float64, len(deps))
		for k, d := range deps {
			saving[k] = T * d * s.deflator(k+1)
		}
		// MACRS is printed year by year (Table A-1), so its savings are
		// written so, or as uniform runs; the other methods' shapes
		// (a gradient for sum of years, a geometric run for a declining
		// balance) are closed forms.
		shapes := a.Depreciation != nil && a.Depreciation.Method != "macrs"
		for _, it := range seriesItems(saving, line, labelDepSaving, shapes) {
			add(it)
		}
		// Loan interest saves T I_t = T A - T P_1 (1 + r)^(t-1).
		if ln != nil && ln.Rate.Effective > 0 && T > 0 {
			r := ln.Rate.Effective
			p1 := ln.Schedule[0].Principal
			g := s.deflation()
			add(&Item{Line: ln.Line, Label: labelInterestSaving, Kind: parse.Annual, Sign: parse.Cost, Amount: -T * ln.Payment * s.deflator(1),
				From: 1, To: term, Escalation: g, HasEscalation: g != 0})
			add(&Item{Line: ln.Line, Label: labelInterestSaving, Kind: parse.Annual, Sign: parse.Cost, Amount: T * p1 * s.deflator(1),
				From: 1, To: term, Escalation: (1+r)*(1+g) - 1, HasEscalation: true})
		}
		// Disposal at the end of a life: salvage less the tax on its gain
		// over book value.
		if L > 0 {
			bv := a.FirstCost
			if a.Depreciation != nil {
				bv = BookValue(a.FirstCost, deps)
			}
			x := salvage - T*(salvage-bv*s.deflator(L))
			switch {
			case salvage != 0:
				// The original label: a diagram names the year's event.
				add(&Item{Line: a.salvageLine(), Label: a.salvageLabel(), Kind: parse.Salvage, Sign: parse.Benefit, Amount: x})
			case x != 0:
				add(&Item{Line: line, Label: labelLossSaving, Kind: parse.Salvage, Sign: parse.Benefit, Amount: x})
			}
		}
	}
	// The value at a study period's end, after tax and less what is owed.
	zero := 0.0
	v.Residual = &zero
	if c := cutAge(a, hz); c >= 0 {
		res := a.ResidualAt(c)
		x := res
		if after {
			var full, cut []float64
			if a.Depreciation != nil {
				full = a.Depreciation.Deductions(a.FirstCost, L)
				cut = a.Depreciation.Deductions(a.FirstCost, c)
			}
			bv := BookValue(a.FirstCost, cut)
			x -= T * (res - bv*s.deflator(c))
			// The deduction of the year of the cut, where it differs from
			// the cycle's (MACRS's half year), is corrected here.
			if c >= 1 && c <= len(cut) {
				dc := cut[c-1]
				df := 0.0
				if c <= len(full) {
					df = full[c-1]
				}
				x += T * (dc - df) * s.deflator(c)
			}
		}
		if ln != nil {
			x -= ln.BalanceAfter(c) * s.deflator(c)
		}
		v.Residual = &x
	}
	return &v
}

// salvageLine is the source line of a's salvage.
func (a *Alternative) salvageLine() int {
	for _, it := range a.Items {
		if it.Kind == parse.Salvage {
			return it.Line
		}
	}
	return a.Line
}

// salvageLabel is the label of a's salvage line.
func (a *Alternative) salvageLabel() string {
	for _, it := range a.Items {
		if it.Kind == parse.Salvage {
			return it.Label
		}
	}
	return "salvage"
}

// seriesItems writes the savings x_1, x_2, ... (x_t in year t) as items of
// the engine: runs of three or more equal amounts as one annual series,
// and, with shapes set, runs of three or more in arithmetic or geometric
// progression as a series with a gradient or escalating; the rest one year
// each. The items are costs with negative amounts, since a saving lowers
// what is paid.
func seriesItems(x []float64, line int, label string, shapes bool) []*Item {
	var out []*Item
	scale := 0.0
	for _, v := range x {
		scale = math.Max(scale, math.Abs(v))
	}
	tol := 1e-9 * scale
	near := func(a, b float64) bool { return math.Abs(a-b) <= tol }
	run := func(a int, same func(k int) bool) int {
		b := a
		for b+1 < len(x) && same(b+1) {
			b++
		}
		return b - a + 1
	}
	for a := 0; a < len(x); {
		if near(x[a], 0) {
			a++
			continue
		}
		uni := run(a, func(k int) bool { return near(x[k], x[a]) })
		ari, geo := 1, 1
		if shapes && a+1 < len(x) {
			d := x[a+1] - x[a]
			ari = run(a, func(k int) bool { return !near(x[k], 0) && near(x[k]-x[k-1], d) })
			if q := x[a+1] / x[a]; q > 0 {
				geo = run(a, func(k int) bool { return !near(x[k], 0) && near(x[k], x[k-1]*q) })
			}
		}
		it := &Item{Line: line, Label: label, Kind: parse.Annual, Sign: parse.Cost, Amount: -x[a], From: a + 1}
		n := 1
		switch {
		case uni >= 3 && uni >= ari && uni >= geo:
			n = uni
		case ari >= 3 && ari >= geo:
			n = ari
			it.Gradient, it.HasGradient = -(x[a+1] - x[a]), true
		case geo >= 3:
			n = geo
			it.Escalation, it.HasEscalation = x[a+1]/x[a]-1, true
		default:
			it.Kind, it.At, it.From = parse.Once, a+1, 0
		}
		if it.Kind == parse.Annual {
			it.To = a + n
		}
		out = append(out, it)
		a += n
	}
	return out
}

// afterTaxTable computes the after-tax cash flows of a year by year over
// years 0..n of the horizon, from the definitions (see the top of this
// file), independently of the view.
func (e *env) afterTaxTable(a *Alternative, hz Horizon, n int) *AfterTax {
	s := e.tax
	T := s.rate.Effective
	at := &AfterTax{TaxRate: T, Constant: s.constant && s.inflation != nil}
	if at.Constant {
		at.Inflation = s.inflation.Effective
	}
	at.Years = make([]TaxYear, n+1)
	for y := range at.Years {
		at.Years[y].Year = y
	}
	// cycle adds a life cycle that starts at year start and ends at age
	// end, with a disposal there when disposal is set (cut: a study
	// period's residual value rather than salvage).
	cycle := func(start, end int, disposal, cut bool) {
		var flows []YearFlow
		if a.Life == 0 {
			flows = a.Flows(end, cut)
		} else {
			flows = a.Flows(end, cut)
		}
		var deps []float64
		if a.Depreciation != nil {
			if disposal {
				deps = a.Depreciation.Deductions(a.FirstCost, end)
			} else {
				deps = a.Depreciation.Deductions(a.FirstCost, 0)
			}
		}
		ln := a.Loan
		for t := 0; t <= end && start+t <= n; t++ {
			y := &at.Years[start+t]
			f := flows[t]
			d := s.deflator(t)
			bt := f.Net
			ti := f.ByCategory[Benefits] - f.ByCategory[Operating]
			if t >= 1 && t <= len(deps) {
				y.Depreciation += deps[t-1] * d
				ti -= deps[t-1] * d
			}
			if ln != nil {
				if t == 0 {
					bt += ln.Amount
				}
				if t >= 1 && t <= ln.Years {
					row := ln.Schedule[t-1]
					bt -= row.Payment * d
					y.Interest += row.Interest * d
					y.Principal += row.Principal * d
					ti -= row.Interest * d
				}
				if disposal && t == end && t < ln.Years {
					b := ln.BalanceAfter(t) * d
					bt -= b
					y.Principal += b
				}
			}
			if disposal && t == end {
				bv := BookValue(a.FirstCost, deps) * d
				gain := f.ByCategory[Recovery] - bv
				y.Disposal = true
				y.BookValue += bv
				y.Gain += gain
				ti += gain
			}
			y.BeforeTax += bt
			y.TaxableIncome += ti
			y.Tax += T * ti
			y.AfterTax += bt - T*ti
		}
	}
	switch {
	case hz.Perpetual() && a.Life == 0:
		cycle(0, n, false, false)
	case hz.Perpetual():
		cycle(0, a.Life, true, false)
	case a.Life == 0:
		cycle(0, n, true, true)
	default:
		for start := 0; start < n; start += a.Life {
			if start+a.Life <= n {
				cycle(start, a.Life, true, false)
			} else {
				cycle(start, n-start, true, true)
			}
		}
	}
	return at
}
