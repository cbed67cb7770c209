package compute

import (
	"math"

	"worth/parse"
)

// category is where an item's amount counts.
func (it *Item) category() Category {
	switch {
	case it.Kind == parse.FirstCost:
		return Investment
	case it.Kind == parse.Salvage:
		return Recovery
	case it.Sign == parse.Benefit:
		return Benefits
	case it.Sign == parse.Disbenefit:
		return Disbenefits
	}
	return Operating
}

// sign is +1 for money received and -1 for money paid or lost.
func (c Category) sign() float64 {
	if c == Benefits || c == Recovery {
		return 1
	}
	return -1
}

// lastYear is the last year of an annual or periodic series in a cycle, or
// -1 when it runs forever.
func (it *Item) lastYear(life int) int {
	switch {
	case it.Kind == parse.Periodic && life > 0 && it.To >= life:
		// Fix (tests): a periodic amount falls strictly before the end of
		// life even when "to year B" names the life's last year.
		return life - 1
	case it.To > 0:
		return it.To
	case it.Kind == parse.Periodic && life > 0:
		return life - 1 // strictly before the end of life
	case life > 0:
		return life
	}
	return -1
}

// amountAt is the item's amount at age t of a cycle (0 when none), not
// counting salvage, which the horizon places.
func (it *Item) amountAt(t, life int) float64 {
	switch it.Kind {
	case parse.FirstCost:
		if t == 0 {
			return it.Amount
		}
	case parse.Once:
		if t == it.At {
			return it.Amount
		}
	case parse.Annual:
		last := it.lastYear(life)
		if t >= it.From && (last < 0 || t <= last) {
			k := float64(t - it.From)
			switch {
			case it.HasEscalation:
				return it.Amount * math.Pow(1+it.Escalation, k)
			case it.HasGradient:
				return it.Amount + it.Gradient*k
			}
			return it.Amount
		}
	case parse.Periodic:
		last := it.lastYear(life)
		if t >= it.From && (last < 0 || t <= last) && (t-it.From)%it.Every == 0 {
			return it.Amount
		}
	}
	return 0
}

// ResidualAt is the value of the alternative at age t of a cycle cut by a
// study period: the stated residual, or straight line between first cost
// and salvage over the life (zero for an alternative with no life).
func (a *Alternative) ResidualAt(t int) float64 {
	if a.Residual != nil {
		return *a.Residual
	}
	if a.Life == 0 {
		return 0
	}
	salvage := 0.0
	for _, it := range a.Items {
		if it.Kind == parse.Salvage {
			salvage += it.Amount
		}
	}
	return a.FirstCost - (a.FirstCost-salvage)*float64(t)/float64(a.Life)
}

// addAge adds the flows of age t of one cycle to y. full says whether the
// cycle ends at its life (salvage) at this age; cut whether the horizon cuts
// the cycle at this age (residual).
func (a *Alternative) addAge(y *YearFlow, t int, cut bool) {
	for _, it := range a.Items {
		var v float64
		if it.Kind == parse.Salvage {
			if a.Life > 0 && t == a.Life {
				v = it.Amount
			}
		} else {
			v = it.amountAt(t, a.Life)
		}
		if v != 0 {
			c := it.category()
			y.ByCategory[c] += v
			if it.Kind == parse.Once || it.Kind == parse.Periodic || it.Kind == parse.Salvage || (it.Kind == parse.FirstCost && y.Year > 0) {
				y.Notes = addNote(y.Notes, it.Label)
			}
		}
	}
	if cut {
		if r := a.ResidualAt(t); r != 0 {
			y.ByCategory[Recovery] += r
			y.Notes = append(y.Notes, "residual value")
		}
	}
}

// Flows returns the year-by-year cash flows of a over years 0..n: life
// cycles start at 0, L, 2L, ... before n; a cycle that the end cuts ends
// with its residual value at n. With residual false the end is not a cut
// (flows simply stop), as for a look at the first years of a perpetual
// horizon.
func (a *Alternative) Flows(n int, residual bool) []YearFlow {
	ys := make([]YearFlow, n+1)
	for t := range ys {
		ys[t].Year = t
	}
	if a.Life == 0 {
		for t := 0; t <= n; t++ {
			a.addAge(&ys[t], t, residual && t == n)
		}
	} else {
		for s := 0; s < n || (s == 0 && n == 0); s += a.Life {
			for t := 0; t <= a.Life && s+t <= n; t++ {
				cut := residual && s+t == n && t < a.Life
				a.addAge(&ys[s+t], t, cut)
			}
		}
	}
	for t := range ys {
		y := &ys[t]
		for c := Category(0); c < numCategories; c++ {
			y.Net += c.sign() * y.ByCategory[c]
		}
	}
	return ys
}

// discount fills the discounted values and running totals at rate i.
func discount(ys []YearFlow, i float64) {
	cum, cumD := 0.0, 0.0
	for t := range ys {
		y := &ys[t]
		y.Discounted = y.Net * PF(i, float64(y.Year))
		cum += y.Net
		cumD += y.Discounted
		y.Cumulative, y.CumDiscounted = cum, cumD
	}
}

// netFlows returns the net flow of each year.
func netFlows(ys []YearFlow) []float64 {
	out := make([]float64, len(ys))
	for t, y := range ys {
		out[t] = y.Net
	}
	return out
}

// cycleTerms returns the present worth at age 0 of one life cycle of a, as
// terms in factor notation at rate i. cutAge >= 0 cuts the cycle at that age
// (flows up to and including it, then the residual value); cutAge < 0 is the
// whole cycle, ending with salvage; for an alternative with no life and
// cutAge < 0 the flows run forever.
func (a *Alternative) cycleTerms(i float64, cutAge int) []Term {
	var terms []Term
	end := float64(cutAge) // last age included
	if cutAge < 0 {
		if a.Life > 0 {
			end = float64(a.Life)
		} else {
			end = math.Inf(1)
		}
	}
	pfShift := func(fs []Factor, shift int) []Factor {
		if shift > 0 {
			fs = append(fs, factor("P/F", i, 0, float64(shift)))
		}
		return fs
	}
	for _, it := range a.Items {
		cat := it.category()
		coef := cat.sign() * it.Amount
		add := func(c float64, fs []Factor) {
			t := Term{Coef: c, Factors: fs, Label: it.Label, Line: it.Line, Cat: cat}
			t.Value = c
			for _, f := range fs {
				t.Value *= f.Value
			}
			terms = append(terms, t)
		}
		switch it.Kind {
		case parse.FirstCost:
			add(coef, nil)
		case parse.Once:
			if float64(it.At) <= end {
				add(coef, pfShift(nil, it.At))
			}
		case parse.Salvage:
			if cutAge < 0 && a.Life > 0 {
				add(coef, []Factor{factor("P/F", i, 0, float64(a.Life))})
			}
		case parse.Annual:
			last := math.Inf(1)
			if l := it.lastYear(a.Life); l >= 0 {
				last = float64(l)
			}
			last = math.Min(last, end)
			if last < float64(it.From) {
				continue
			}
			m := last - float64(it.From) + 1
			switch {
			case it.HasEscalation:
				add(coef, pfShift([]Factor{factor("P/A,g", i, it.Escalation, m)}, it.From-1))
			default:
				add(coef, pfShift([]Factor{factor("P/A", i, 0, m)}, it.From-1))
				// (P/G, i, 1) = 0: a one-year series has no gradient term.
				if it.HasGradient && it.Gradient != 0 && m >= 2 {
					add(cat.sign()*it.Gradient, pfShift([]Factor{factor("P/G", i, 0, m)}, it.From-1))
				}
			}
		case parse.Periodic:
			last := math.Inf(1)
			if l := it.lastYear(a.Life); l >= 0 {
				last = float64(l)
			}
			last = math.Min(last, end)
			if math.IsInf(last, 1) {
				// X at f, f+K, f+2K, ... forever:
				// X (A/F, i, K) (P/A, i, ∞) shifted from K to f.
				fs := []Factor{factor("A/F", i, 0, float64(it.Every)), factor("P/A", i, 0, math.Inf(1))}
				switch {
				case it.From > it.Every:
					fs = append(fs, factor("P/F", i, 0, float64(it.From-it.Every)))
				case it.From < it.Every:
					fs = append(fs, factor("F/P", i, 0, float64(it.Every-it.From)))
				}
				add(coef, fs)
				continue
			}
			var years []int
			for t := it.From; float64(t) <= last; t += it.Every {
				years = append(years, t)
			}
			switch len(years) {
			case 0:
			case 1:
				add(coef, []Factor{factor("P/F", i, 0, float64(years[0]))})
			default:
				f := Factor{Name: "P/F", I: i, Sum: years}
				for _, t := range years {
					f.Value += PF(i, float64(t))
				}
				add(coef, []Factor{f})
			}
		}
	}
	if cutAge >= 0 {
		if r := a.ResidualAt(cutAge); r != 0 {
			t := Term{Coef: r, Factors: []Factor{factor("P/F", i, 0, float64(cutAge))}, Label: "residual value", Line: a.ResidualLine, Cat: Recovery}
			t.Value = r * t.Factors[0].Value
			terms = append(terms, t)
		}
	}
	return terms
}

// factor builds a factor with its value.
func factor(name string, i, g, n float64) Factor {
	f := Factor{Name: name, I: i, G: g, N: n}
	switch name {
	case "P/F":
		f.Value = PF(i, n)
	case "F/P":
		f.Value = FP(i, n)
	case "P/A":
		f.Value = PA(i, n)
	case "A/P":
		f.Value = AP(i, n)
	case "F/A":
		f.Value = FA(i, n)
	case "A/F":
		f.Value = AF(i, n)
	case "P/G":
		f.Value = PG(i, n)
	case "A/G":
		f.Value = AG(i, n)
	case "P/A,g":
		f.Value = PGeo(g, i, n)
	}
	return f
}

func sumTerms(ts []Term) float64 {
	s := 0.0
	for _, t := range ts {
		s += t.Value
	}
	return s
}

// perpetualPW is the capitalized worth of a at rate i: a life cycle
// repeated forever, PW = PW₁ (A/P, i, L) (P/A, i, ∞), or, with no life, the
// flows as written forever. NaN where the sum does not converge.
func (a *Alternative) perpetualPW(i float64) float64 {
	if i <= 0 {
		return math.NaN()
	}
	if a.Life == 0 {
		for _, it := range a.Items {
			if it.Kind == parse.Annual && it.HasEscalation && it.lastYear(0) < 0 && it.Escalation >= i {
				return math.NaN()
			}
		}
	}
	v := a.cycleValue(i) // sumTerms(a.cycleTerms(i, -1)), without building the terms (scale.go)
	if a.Life > 0 {
		v *= AP(i, float64(a.Life)) / i
	}
	if math.IsInf(v, 0) {
		return math.NaN()
	}
	return v
}
