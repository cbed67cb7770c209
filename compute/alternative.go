package compute

import (
	"worth/parse"
)

// alternative evaluates every line of an alternative block and checks the
// years against its life.
func (e *env) alternative(src *parse.Alternative) *Alternative {
	a := &Alternative{ID: src.ID, Name: src.DisplayName(), Line: src.Pos.Line, Source: src}
	ok := true
	if src.Life != nil {
		life, good := e.year(*src.Life, "life", 1)
		ok = ok && good
		a.Life = life
	}
	if src.Residual != nil {
		v, good := e.number(*src.Residual, "residual")
		if good && v < 0 {
			e.errs.Add(src.Residual.Pos, "residual is written as a positive amount (a value recovered), got %s", trimFloat(v))
			good = false
		}
		if good {
			a.Residual = &v
			a.ResidualLine = src.Residual.Pos.Line
		}
		ok = ok && good
	}
	for _, l := range src.Lines {
		it := &Item{Line: l.Line, Label: l.Label, Kind: l.Kind, Sign: l.Sign}
		if l.Pos.File != src.Pos.File {
			it.File = l.Pos.File // a row of a CSV file ("cash flows from:")
		}
		v, good := e.number(l.Amount, l.Label)
		if good && v < 0 {
			e.errs.Add(l.Amount.Pos, "amounts are written as positive numbers; the label (%s) says which way the money goes, got %s", l.Label, trimFloat(v))
			good = false
		}
		it.Amount = v
		lifeNote := func(t *parse.Text, y int) bool {
			if a.Life > 0 && y > a.Life {
				e.errs.Add(t.Pos, "year %d is past the life of %s (%d years); years count from the start of each life cycle", y, a.ID, a.Life)
				return false
			}
			return true
		}
		switch l.Kind {
		case parse.Once:
			y, g := e.year(*l.At, "the year", 0)
			good = good && g && lifeNote(l.At, y)
			it.At = y
		case parse.Annual:
			it.From = 1
			if l.From != nil {
				y, g := e.year(*l.From, "the first year", 1)
				good = good && g && lifeNote(l.From, y)
				it.From = y
			}
			if l.To != nil {
				y, g := e.year(*l.To, "the last year", 1)
				good = good && g && lifeNote(l.To, y)
				it.To = y
				if g && y < it.From {
					e.errs.Add(l.To.Pos, "the last year (%d) is before the first (%d)", y, it.From)
					good = false
				}
			}
			if l.Escalating != nil {
				g, gg := e.number(*l.Escalating, "escalation")
				if gg && g <= -1 {
					e.errs.Add(l.Escalating.Pos, "escalation must be above -100%%")
					gg = false
				}
				good = good && gg
				it.Escalation, it.HasEscalation = g, true
			}
			if l.Gradient != nil {
				g, gg := e.number(*l.Gradient, "gradient")
				good = good && gg
				it.Gradient, it.HasGradient = g, true
			}
		case parse.Periodic:
			k, g := e.year(*l.Every, "the interval", 1)
			good = good && g
			it.Every = k
			it.From = k
			if l.From != nil {
				y, g := e.year(*l.From, "the first year", 1)
				good = good && g && lifeNote(l.From, y)
				it.From = y
			}
			if l.To != nil {
				y, g := e.year(*l.To, "the last year", 1)
				good = good && g && lifeNote(l.To, y)
				it.To = y
			}
			if good && a.Life > 0 && it.From >= a.Life {
				e.errs.Add(l.Pos, "the first amount of \"%s\" falls at year %d, not before the end of the life (%d years); periodic amounts fall strictly before the end of each life", l.Label, it.From, a.Life)
				good = false
			}
		case parse.Salvage:
			if src.Life == nil {
				e.errs.Add(l.Pos, "salvage comes at the end of a life, and %s has no life; add \"life: N\" or remove the salvage", a.ID)
				good = false
			} else if l.At != nil {
				// A salvage row of a CSV names its year: the end of the life.
				y, g := e.year(*l.At, "the year", 0)
				if g && y != a.Life {
					e.errs.Add(l.At.Pos, "salvage falls at the end of a life, year %d of %s, not at year %d", a.Life, a.ID, y)
					g = false
				}
				good = good && g
			}
		}
		ok = ok && good
		if l.Kind == parse.FirstCost {
			a.FirstCost += it.Amount
		}
		if l.Sign == parse.Benefit && l.Kind != parse.Salvage {
			a.HasBenefits = true
		}
		a.Items = append(a.Items, it)
	}
	if !ok {
		return nil
	}
	return a
}
