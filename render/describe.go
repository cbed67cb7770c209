package render

import (
	"fmt"
	"strings"

	"worth/compute"
	"worth/parse"
)

// ItemWhen describes when an item's amount falls, in words.
func ItemWhen(a *compute.Alternative, it *compute.Item) string {
	lifeEnd := "the end of the life"
	if a.Life > 0 {
		lifeEnd = fmt.Sprintf("year %d", a.Life)
	}
	switch it.Kind {
	case parse.FirstCost:
		if a.Life > 0 {
			return "year 0 of each life cycle"
		}
		return "year 0"
	case parse.Once:
		return fmt.Sprintf("year %d", it.At)
	case parse.Salvage:
		return fmt.Sprintf("end of life (%s)", lifeEnd)
	case parse.Annual:
		switch {
		case it.To > 0:
			return fmt.Sprintf("years %d to %d", it.From, it.To)
		case a.Life > 0:
			return fmt.Sprintf("years %d to %d", it.From, a.Life)
		}
		return fmt.Sprintf("every year from year %d, forever", it.From)
	case parse.Periodic:
		s := fmt.Sprintf("every %d years from year %d", it.Every, it.From)
		switch {
		case it.To > 0:
			s += fmt.Sprintf(" to year %d", it.To)
		case a.Life > 0:
			s += fmt.Sprintf(", before year %d", a.Life)
		default:
			s += ", forever"
		}
		return s
	}
	return ""
}

// ItemAmount describes an item's amount, with its gradient.
func (f Format) ItemAmount(it *compute.Item) string {
	s := f.Money(it.Amount)
	switch {
	case it.HasEscalation:
		s += fmt.Sprintf(" in year %d, escalating %s a year", it.From, f.Rate(it.Escalation))
	case it.HasGradient:
		s += fmt.Sprintf(" in year %d, then %s%s a year", it.From, sign(it.Gradient), f.Money(abs(it.Gradient)))
	}
	return s
}

func sign(x float64) string {
	if x < 0 {
		return "−"
	}
	return "+"
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// KindWord names the direction of an item.
func KindWord(it *compute.Item) string {
	switch {
	case it.Kind == parse.Salvage:
		return "salvage (benefit)"
	case it.Kind == parse.FirstCost:
		return "first cost"
	}
	return it.Sign.String()
}

// LifeText describes an alternative's life.
func LifeText(a *compute.Alternative) string {
	if a.Life == 0 {
		return "serves forever (no life given)"
	}
	if a.Life == 1 {
		return "1 year"
	}
	return fmt.Sprintf("%d years", a.Life)
}

// FlowNotes joins the notes of one year.
func FlowNotes(y compute.YearFlow) string {
	return strings.Join(y.Notes, "; ")
}
