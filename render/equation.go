package render

import (
	"math"
	"strings"

	"worth/compute"
)

// EqText is a worked equation as text: the left side, the terms in factor
// notation, the same terms with the factor values substituted, and the
// result. Terms after the first carry their operator ("+ ..." or "− ...").
type EqText struct {
	LHS         string
	Label       string
	Symbolic    []string
	Substituted []string
	Result      string
}

// Equation writes one step of a worked solution.
func (f Format) Equation(eq *compute.Equation) EqText {
	out := EqText{LHS: eq.LHS, Label: eq.Label, Result: f.Money(eq.Value)}
	for k, t := range eq.Terms {
		var sym, sub string
		neg := t.Coef < 0
		if t.Symbol != "" {
			// An earlier result: its name in the symbolic line, its value
			// in the substituted one.
			sym = t.Symbol
			if k > 0 {
				sym = "+ " + sym
			}
		} else {
			sym = f.Amount(math.Abs(t.Coef))
			if k > 0 {
				sym = f.op(neg) + sym
			} else if neg {
				sym = f.Minus + sym
			}
		}
		sub = f.Amount(math.Abs(t.Coef))
		if k > 0 {
			sub = f.op(neg) + sub
		} else if neg {
			sub = f.Minus + sub
		}
		for _, x := range t.Factors {
			sym += " " + f.FactorNotation(x)
			sub += " × " + f.FactorValue(x.Value)
		}
		out.Symbolic = append(out.Symbolic, sym)
		out.Substituted = append(out.Substituted, sub)
	}
	if len(eq.Terms) == 0 {
		out.Symbolic = []string{"0"}
		out.Substituted = []string{"0"}
	}
	return out
}

func (f Format) op(neg bool) string {
	if neg {
		return f.Minus + " "
	}
	return "+ "
}

// Lines writes the equation as three aligned lines:
//
//	PW = -480,000 - 12,500 (P/A, 7%, 24)
//	   = -480,000 - 12,500 × 11.4693
//	   = -$623,366
//
// A line longer than width is wrapped before a term.
func (e EqText) Lines(width int) []string {
	pad := strings.Repeat(" ", len([]rune(e.LHS))+1)
	var out []string
	wrap := func(first string, terms []string) {
		line := first
		for k, t := range terms {
			if k > 0 && len([]rune(line))+1+len([]rune(t)) > width {
				out = append(out, line)
				line = pad + "  " + t
				continue
			}
			if k > 0 {
				line += " "
			}
			line += t
		}
		out = append(out, line)
	}
	wrap(e.LHS+" = ", e.Symbolic)
	if !sameTerms(e.Symbolic, e.Substituted) {
		wrap(pad+"= ", e.Substituted)
	}
	out = append(out, pad+"= "+e.Result)
	return out
}

func sameTerms(a, b []string) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}
