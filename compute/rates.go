package compute

import (
	"fmt"
	"math"
	"strings"

	"worth/parse"
)

// NominalToEffective is the effective annual rate of a nominal rate r
// compounded m times a year: (1 + r/m)^m - 1.
func NominalToEffective(r float64, m int) float64 {
	return math.Expm1(float64(m) * math.Log1p(r/float64(m)))
}

// ContinuousToEffective is the effective annual rate of a nominal rate r
// compounded continuously: e^r - 1.
func ContinuousToEffective(r float64) float64 { return math.Expm1(r) }

// Fisher is the market (nominal) rate of a real rate with inflation f:
// (1 + real)(1 + f) - 1.
func Fisher(real, f float64) float64 { return (1+real)*(1+f) - 1 }

// pct formats a fraction as a percentage for conversions, with up to four
// decimals.
func pct(x float64) string {
	s := fmt.Sprintf("%.4f", x*100)
	s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	return s + "%"
}

func plain(x float64) string {
	s := fmt.Sprintf("%.6f", x)
	return strings.TrimRight(strings.TrimRight(s, "0"), ".")
}

// rate evaluates a rate as written and converts it to an effective annual
// rate. inflation is needed for real rates (nil when none is given).
func (e *env) rate(rs *parse.RateSpec, what string, inflation *Rate) (*Rate, bool) {
	if rs == nil {
		return nil, false
	}
	// A rate that cannot be read says it is the rate ("cannot read rate
	// \"seven percent\": ..."): its words are easily mistaken for a
	// compounding.
	if e.compileFor(rs.Value, false, what) == nil {
		return nil, false
	}
	v, ok := e.number(rs.Value, what)
	if !ok {
		return nil, false
	}
	if v <= -1 || v > 10 {
		e.errs.Add(rs.Value.Pos, "%s of %s is outside the range this tool accepts (above -100%% and at most 1000%%); write a percentage such as 7%% or a fraction such as 0.07", what, pct(v))
		return nil, false
	}
	if v > 1 && !strings.Contains(rs.Value.Src, "%") {
		e.errs.Add(rs.Value.Pos, "%s of %s reads as %s; write %s%% if that is meant, or a fraction such as 0.07", what, rs.Value.Src, pct(v), rs.Value.Src)
		return nil, false
	}
	r := &Rate{Text: rs.Text.Src, Stated: v, Mode: rs.Mode, PerYear: rs.PerYear, Effective: v}
	switch rs.Mode {
	case "nominal":
		r.Effective = NominalToEffective(v, rs.PerYear)
		if rs.PerYear > 1 {
			r.Conversion = fmt.Sprintf("(1 + %s/%d)^%d − 1 = %s effective a year", plain(v), rs.PerYear, rs.PerYear, pct(r.Effective))
		}
	case "continuous":
		r.Effective = ContinuousToEffective(v)
		r.Conversion = fmt.Sprintf("e^%s − 1 = %s effective a year", plain(v), pct(r.Effective))
	case "real":
		if inflation == nil {
			e.errs.Add(rs.Text.Pos, "%s is given as real, which needs an inflation rate in the front matter (inflation: 2.5%%)", what)
			return nil, false
		}
		r.Inflation = inflation.Effective
		r.Effective = Fisher(v, inflation.Effective)
		r.Conversion = fmt.Sprintf("(1 + %s)(1 + %s) − 1 = %s market rate (Fisher equation, inflation %s)", plain(v), plain(inflation.Effective), pct(r.Effective), pct(inflation.Effective))
	}
	return r, true
}

// currencies maps ISO 4217 codes to their symbols and minor-unit decimals.
// Codes not listed print with the code itself before the amount.
var currencies = map[string]Currency{
	"USD": {"USD", "$", 2}, "EUR": {"EUR", "€", 2}, "GBP": {"GBP", "£", 2}, "JPY": {"JPY", "¥", 0},
	"CAD": {"CAD", "CA$", 2}, "AUD": {"AUD", "A$", 2}, "NZD": {"NZD", "NZ$", 2}, "CHF": {"CHF", "CHF ", 2},
	"CNY": {"CNY", "CN¥", 2}, "INR": {"INR", "₹", 2}, "KRW": {"KRW", "₩", 0}, "SEK": {"SEK", "SEK ", 2},
	"NOK": {"NOK", "NOK ", 2}, "DKK": {"DKK", "DKK ", 2}, "MXN": {"MXN", "MX$", 2}, "BRL": {"BRL", "R$", 2},
	"ZAR": {"ZAR", "R ", 2}, "SGD": {"SGD", "S$", 2}, "HKD": {"HKD", "HK$", 2}, "PLN": {"PLN", "PLN ", 2},
	"ISK": {"ISK", "ISK ", 0}, "CLP": {"CLP", "CLP ", 0}, "VND": {"VND", "₫", 0}, "KWD": {"KWD", "KWD ", 3},
}

// CurrencyOf returns the currency for an ISO 4217 code.
func CurrencyOf(code string) (Currency, bool) {
	c, ok := currencies[code]
	if ok {
		return c, true
	}
	if len(code) == 3 && strings.ToUpper(code) == code && strings.Trim(code, "ABCDEFGHIJKLMNOPQRSTUVWXYZ") == "" {
		return Currency{Code: code, Symbol: code + " ", Decimals: 2}, true
	}
	return Currency{}, false
}
