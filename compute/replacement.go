package compute

import (
	"fmt"
	"math"
	"sort"

	"worth/expr"
	"worth/parse"
)

// Replacement is an evaluated replacement block: keep the asset in
// service (the defender) or replace it with a new one (the challenger).
//
// For each asset and each number of years k it could be kept, the
// equivalent annual cost of keeping it k years is
//
//	EAC(k) = -AW(k) = -PW(k) (A/P, i, k),
//	PW(k)  = -P + sum_t CF_t (P/F, i, t) + MV_k (P/F, i, k),
//
// where P is the first cost (for the defender, its market value today: the
// money given up by keeping it), CF_t the flows of its alternative's lines
// in year t of the k (a life of k years: periodic amounts fall strictly
// before year k), and MV_k its market value after k years. The economic
// service life is the k of least EAC. The defender is kept when its least
// EAC is at most the challenger's; it is then best replaced after the K
// years that minimize the cost of keeping it K years and then serving with
// challengers at their least EAC forever:
//
//	C(K) = -PW_D(K) + (P/F, i, K) EAC_C* / i,   K = 0 (replace now), 1, 2, ...
//
// (keeping beats replacing now exactly when some EAC_D(k) is below EAC_C*,
// so the two rules agree).
type Replacement struct {
	ID         string
	Line       int
	Rate       Rate
	Defender   *ServiceAsset
	Challenger *ServiceAsset
	// Keep is the recommendation: keep the defender (true) or replace it
	// now. ReplaceAfter is the number of years to keep it before replacing
	// it, the year to revisit the decision (0 when replacing now).
	Keep         bool
	ReplaceAfter int
	// Costs is C(K) for K = 0, 1, ..., the defender's longest life.
	Costs  []float64
	Source *parse.Replacement
}

// ServiceAsset is the defender or the challenger of a replacement study.
type ServiceAsset struct {
	Alt  *Alternative
	Role string // "defender" or "challenger"
	// FirstCost is the challenger's first cost, or the defender's market
	// value today (its opportunity cost).
	FirstCost float64
	// SunkCost is a first cost written in the defender's alternative: a
	// past cost that the decision does not use (0 when none).
	SunkCost float64
	// MarketValue holds the value after 0, 1, 2, ... years; Market says how
	// it was given: "declining", "list" or "straight line" (the
	// challenger's default, between first cost and salvage over its life).
	MarketValue []float64
	Market      string
	Decline     float64 // the declining form's rate
	// Lives holds the cost of keeping the asset 1, 2, ... years.
	Lives []ServiceLife
	// Economic is the economic service life (years) and AW the annual
	// worth at it (a cost is negative): EAC* = -AW.
	Economic int
	AW       float64
	// Work is the worked solution at the economic service life.
	Work []*Equation
}

// ServiceLife is the cost of keeping an asset k years.
type ServiceLife struct {
	Years       int
	MarketValue float64 // after k years
	PW, AW      float64
}

// replacement evaluates a replacement block.
func (e *env) replacement(src *parse.Replacement, byID map[string]*Alternative, failed map[string]bool, front *Rate) *Replacement {
	rp := &Replacement{ID: src.ID, Line: src.Pos.Line, Source: src}
	ok := true
	find := func(ref *parse.Ref) *Alternative {
		if ref == nil {
			return nil
		}
		a, found := byID[ref.ID]
		if found {
			return a
		}
		if !failed[ref.ID] {
			ids := make([]string, 0, len(byID))
			for id := range byID {
				ids = append(ids, id)
			}
			sort.Strings(ids)
			msg := fmt.Sprintf("unknown alternative %q", ref.ID)
			if s := expr.Closest(ref.ID, ids); s != "" {
				msg += fmt.Sprintf("; did you mean %q?", s)
			}
			e.errs.Add(ref.Pos, "%s", msg)
		}
		ok = false
		return nil
	}
	def, ch := find(src.Defender), find(src.Challenger)
	if def != nil && ch != nil && def == ch {
		e.errs.Add(src.Challenger.Pos, "the challenger must be another alternative than the defender (%s)", def.ID)
		ok = false
	}
	// Rate.
	switch {
	case e.overrides != nil && e.overrides.Rate != nil:
		v := *e.overrides.Rate
		rp.Rate = Rate{Text: pct(v), Stated: v, Effective: v}
	case src.Rate != nil:
		r, good := e.rate(src.Rate, "rate", e.tax.inflation)
		if good {
			rp.Rate = e.moneyRate(*r)
		}
		ok = ok && good
	case front != nil:
		rp.Rate = *front
	case e.frontRateFailed:
		ok = false
	default:
		e.errs.Add(src.Pos, "replacement %s has no interest rate; give \"rate: 7%%\" in the front matter or in the block", src.ID)
		ok = false
	}
	if ok && rp.Rate.Effective <= 0 {
		pos := src.Pos
		if src.Rate != nil {
			pos = src.Rate.Text.Pos
		}
		e.errs.Add(pos, "a replacement study needs a positive rate, got %s", pct(rp.Rate.Effective))
		ok = false
	}
	if src.DefenderValue == nil && src.Defender != nil {
		e.errs.Add(src.Pos, "replacement %s needs the defender's market value, which is its first cost in the study: \"market value: 30000 declining 15%%\" or a list of values now and after each year", src.ID)
		ok = false
	}
	var d, c *ServiceAsset
	if def != nil && src.DefenderValue != nil {
		d = e.serviceAsset(def, "defender", src.DefenderValue)
	}
	if ch != nil {
		c = e.serviceAsset(ch, "challenger", src.ChallengerValue)
	}
	if !ok || d == nil || c == nil {
		return nil
	}
	i := rp.Rate.Effective
	d.value(i)
	c.value(i)
	rp.Defender, rp.Challenger = d, c
	// Keep or replace, and when.
	eac := -c.AW
	rp.Costs = make([]float64, len(d.Lives)+1)
	rp.Costs[0] = eac / i
	best := 0
	for _, l := range d.Lives {
		k := l.Years
		rp.Costs[k] = -l.PW + PF(i, float64(k))*eac/i
	}
	rp.Keep = -d.AW <= eac
	if rp.Keep {
		best = 1
		for k := 2; k < len(rp.Costs); k++ {
			if rp.Costs[k] < rp.Costs[best] {
				best = k
			}
		}
	}
	rp.ReplaceAfter = best
	return rp
}

// serviceAsset evaluates an asset's market values by age; nil after an
// error.
func (e *env) serviceAsset(a *Alternative, role string, mv *parse.MarketValue) *ServiceAsset {
	s := &ServiceAsset{Alt: a, Role: role, FirstCost: a.FirstCost}
	maxLife := a.Life
	switch {
	case mv == nil:
		// The challenger's default: straight line between first cost and
		// salvage over its life.
		if a.Life == 0 {
			e.errs.Add(a.Source.IDPos, "the challenger %s has no life, so its market value after each year cannot be set by straight line; give it a life or a \"challenger market value:\" line", a.ID)
			return nil
		}
		salvage := 0.0
		for _, it := range a.Items {
			if it.Kind == parse.Salvage {
				salvage += it.Amount
			}
		}
		s.Market = "straight line"
		for k := 0; k <= a.Life; k++ {
			s.MarketValue = append(s.MarketValue, a.FirstCost-(a.FirstCost-salvage)*float64(k)/float64(a.Life))
		}
	case mv.Declining != nil:
		x, ok := e.number(mv.Start, "the market value")
		r, ok2 := e.number(*mv.Declining, "the decline of the market value")
		if !ok || !ok2 {
			return nil
		}
		if x < 0 {
			e.errs.Add(mv.Start.Pos, "a market value is written as a positive amount, got %s", trimFloat(x))
			return nil
		}
		if r < 0 || r >= 1 {
			e.errs.Add(mv.Declining.Pos, "the market value's decline must be from 0%% to below 100%% a year, got %s", pct(r))
			return nil
		}
		if a.Life == 0 {
			e.errs.Add(mv.Pos, "%s has no life: give it \"life: N\", the longest it could serve, so that every life up to N can be tried", a.ID)
			return nil
		}
		s.Market, s.Decline = "declining", r
		for k := 0; k <= a.Life; k++ {
			s.MarketValue = append(s.MarketValue, x*math.Pow(1-r, float64(k)))
		}
	case len(mv.List) == 0:
		return nil // a line that could not be read, reported already
	default:
		s.Market = "list"
		good := true
		for _, t := range mv.List {
			v, ok := e.number(t, "the market value")
			if ok && v < 0 {
				e.errs.Add(t.Pos, "a market value is written as a positive amount, got %s", trimFloat(v))
				ok = false
			}
			good = good && ok
			s.MarketValue = append(s.MarketValue, v)
		}
		if !good {
			return nil
		}
		if maxLife == 0 || len(s.MarketValue)-1 < maxLife {
			maxLife = len(s.MarketValue) - 1
		}
		s.MarketValue = s.MarketValue[:maxLife+1]
	}
	if role == "defender" {
		s.SunkCost = a.FirstCost
		s.FirstCost = s.MarketValue[0]
	}
	return s
}

// retention is the alternative "keep the asset k years": its first cost
// (the market value today for the defender), the lines of its alternative
// other than first cost and salvage over a life of k years, and its market
// value after k years as salvage.
func (s *ServiceAsset) retention(k int) *Alternative {
	v := *s.Alt
	v.Life = k
	v.Items = nil
	v.Residual = nil
	label := "first cost"
	if s.Role == "defender" {
		label = "market value today (opportunity cost)"
	}
	v.Items = append(v.Items, &Item{Line: s.Alt.Line, Label: label, Kind: parse.FirstCost, Sign: parse.Cost, Amount: s.FirstCost})
	for _, it := range s.Alt.Items {
		if it.Kind == parse.FirstCost || it.Kind == parse.Salvage {
			continue
		}
		if it.Kind == parse.Once && it.At > k {
			continue
		}
		v.Items = append(v.Items, it)
	}
	v.Items = append(v.Items, &Item{Line: s.Alt.Line, Label: fmt.Sprintf("market value after %d years", k), Kind: parse.Salvage, Sign: parse.Benefit, Amount: s.MarketValue[k]})
	v.FirstCost = s.FirstCost
	return &v
}

// value computes the cost of keeping the asset each number of years and
// its economic service life.
func (s *ServiceAsset) value(i float64) {
	for k := 1; k < len(s.MarketValue); k++ {
		terms := s.retention(k).cycleTerms(i, -1)
		pw := sumTerms(terms)
		aw := pw * AP(i, float64(k))
		s.Lives = append(s.Lives, ServiceLife{Years: k, MarketValue: s.MarketValue[k], PW: pw, AW: aw})
		if s.Economic == 0 || aw > s.AW+1e-9*math.Abs(aw) {
			s.Economic, s.AW = k, aw
			s.Work = []*Equation{
				{LHS: "PW", Label: fmt.Sprintf("present worth of keeping %s %s: %s, its costs over those years, and its market value then", s.Alt.Name, yearsWord(k), firstCostWord(s.Role)), Terms: terms, Value: pw},
				{LHS: "AW", Label: fmt.Sprintf("equal annual amount over %s; the equivalent annual cost is its negative", yearsWord(k)), Terms: []Term{symbolTerm("PW", pw, factor("A/P", i, 0, float64(k)))}, Value: aw},
			}
		}
	}
}

func firstCostWord(role string) string {
	if role == "defender" {
		return "its market value today (the opportunity cost of keeping it)"
	}
	return "its first cost"
}

func yearsWord(k int) string {
	if k == 1 {
		return "1 year"
	}
	return fmt.Sprintf("%d years", k)
}
