// Package render turns a compute.Report into bytes: Markdown, JSON, HTML
// and PDF. Every writer walks the same report and the same memo document;
// none recomputes anything. Formatting of money, rates and factor notation
// lives here, once, for all writers.
package render

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"worth/compute"
)

// Format holds the conventions of one report: its currency and the minus
// sign to print (ASCII for Markdown, U+2212 for typeset output).
type Format struct {
	Cur   compute.Currency
	Minus string
}

// NewFormat returns the format for a report.
func NewFormat(rep *compute.Report, typeset bool) Format {
	f := Format{Cur: rep.Currency, Minus: "-"}
	if typeset {
		f.Minus = "−"
	}
	return f
}

// group writes the integer part of a non-negative number with thousands
// separators.
func group(s string) string {
	if len(s) <= 3 {
		return s
	}
	var b strings.Builder
	pre := len(s) % 3
	if pre > 0 {
		b.WriteString(s[:pre])
	}
	for i := pre; i < len(s); i += 3 {
		if b.Len() > 0 {
			b.WriteByte(',')
		}
		b.WriteString(s[i : i+3])
	}
	return b.String()
}

// number formats |x| with the given decimals and thousands separators.
func number(x float64, decimals int) string {
	// Fix (limits): a figure that is not finite prints "n/a" (compute keeps
	// them out of reports; this is the last guard), and one of 10^15 or
	// more prints as 1.235 × 10^300, not as 301 digits.
	switch {
	case math.IsNaN(x) || math.IsInf(x, 0):
		return "n/a"
	case math.Abs(x) >= 1e15:
		m, e, _ := strings.Cut(strconv.FormatFloat(math.Abs(x), 'e', 3, 64), "e")
		return m + " × 10^" + strings.TrimLeft(strings.TrimPrefix(e, "+"), "0")
	}
	s := strconv.FormatFloat(math.Abs(x), 'f', decimals, 64)
	intPart, frac, _ := strings.Cut(s, ".")
	out := group(intPart)
	if frac != "" {
		out += "." + frac
	}
	return out
}

// amountDecimals is how many decimals an amount prints with: whole units
// for amounts of 100 and more (a memo's figures), the currency's minor
// units for small amounts with cents (a unit price).
func (f Format) amountDecimals(x float64) int {
	if math.Abs(x) < 100 && x != math.Trunc(x) {
		return f.Cur.Decimals
	}
	return 0
}

// isZero reports whether x prints as zero.
func isZero(s string) bool { return strings.Trim(s, "0.,") == "" }

// Money formats a signed amount with the currency symbol: -$1,094,310.
func (f Format) Money(x float64) string {
	s := number(x, f.amountDecimals(x))
	if x < 0 && !isZero(s) {
		return f.Minus + f.Cur.Symbol + s
	}
	return f.Cur.Symbol + s
}

// Amount formats a signed amount without the symbol, as in equations.
func (f Format) Amount(x float64) string {
	s := number(x, f.amountDecimals(x))
	if x < 0 && !isZero(s) {
		return f.Minus + s
	}
	return s
}

// Num formats a plain number: thousands separators and up to four
// significant decimals.
func (f Format) Num(x float64) string {
	d := 0
	if x != math.Trunc(x) {
		d = 4
		if math.Abs(x) >= 100 {
			d = 2
		}
	}
	s := number(x, d)
	if d > 0 && !strings.Contains(s, "×") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	if x < 0 && !isZero(s) {
		return f.Minus + s
	}
	return s
}

// Percent formats a measured rate (a rate of return) with one decimal:
// 11.4%.
func (f Format) Percent(x float64) string {
	s := strconv.FormatFloat(math.Abs(x)*100, 'f', 1, 64)
	if x < 0 && !isZero(s) {
		return f.Minus + s + "%"
	}
	return s + "%"
}

// Rate formats a stated rate with as many decimals as it needs, up to four:
// 7%, 2.5%, 6.1678%.
func (f Format) Rate(x float64) string {
	s := strconv.FormatFloat(math.Abs(x)*100, 'f', 4, 64)
	s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	if x < 0 && !isZero(s) {
		return f.Minus + s + "%"
	}
	return s + "%"
}

// Ratio formats a benefit-cost or savings-to-investment ratio: 1.35.
func (f Format) Ratio(x float64) string {
	s := strconv.FormatFloat(math.Abs(x), 'f', 2, 64)
	if x < 0 && !isZero(s) {
		return f.Minus + s
	}
	return s
}

// Years formats a payback period: 6.3 years.
func (f Format) Years(x float64) string {
	s := strconv.FormatFloat(x, 'f', 1, 64)
	if s == "1.0" {
		return "1.0 year"
	}
	return s + " years"
}

// FactorValue formats a factor's value as interest tables print it: four
// decimals, five below 0.1.
func (f Format) FactorValue(x float64) string {
	if math.Abs(x) < 0.1 && x != 0 {
		return strconv.FormatFloat(x, 'f', 5, 64)
	}
	return number(x, 4)
}

// FactorNotation writes a factor in the trade's notation:
// (P/A, 7%, 24), (P/A, 2.5%, 7%, 24) for a geometric gradient,
// (P/A, 7%, ∞) for a perpetuity, and a sum of (P/F, i, t) over years.
func (f Format) FactorNotation(x compute.Factor) string {
	n := "∞"
	if !math.IsInf(x.N, 1) {
		n = strconv.FormatFloat(x.N, 'f', -1, 64)
	}
	switch {
	case x.Sum != nil:
		ys := make([]string, len(x.Sum))
		for i, t := range x.Sum {
			ys[i] = strconv.Itoa(t)
		}
		return fmt.Sprintf("Σ(P/F, %s, t) for t = %s", f.Rate(x.I), strings.Join(ys, ", "))
	case x.Name == "P/A,g":
		return fmt.Sprintf("(P/A, %s, %s, %s)", f.Rate(x.G), f.Rate(x.I), n)
	}
	return fmt.Sprintf("(%s, %s, %s)", x.Name, f.Rate(x.I), n)
}

// Value formats an inline value by its kind.
func (f Format) Value(v compute.Value) string {
	if v.Null {
		return "n/a"
	}
	switch v.Kind {
	case compute.Money:
		return f.Money(v.Num)
	case compute.Percent:
		return f.Percent(v.Num)
	case compute.Ratio:
		return f.Ratio(v.Num)
	case compute.Years:
		return f.Years(v.Num)
	case compute.Text, compute.Bool:
		return v.Str
	}
	return f.Num(v.Num)
}
