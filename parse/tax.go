package parse

import (
	"regexp"
	"strings"

	"worth/expr"
)

// This file reads the memo language's forms for after-tax analysis,
// financing, money basis and replacement decisions: the "loan:" line of an
// alternative, the "amounts:" front-matter key and the replacement block.
// (The "depreciation:" line is read in blocks.go.)

// Loan is a "loan: AMOUNT at R% over N years" line of an alternative: part
// of the first cost borrowed at year 0 of each life cycle and repaid in
// equal payments at the end of each year of the term.
type Loan struct {
	Pos    Pos // the value's start
	Line   int
	Amount Text
	Rate   *RateSpec
	Years  Text
}

var reLoan = regexp.MustCompile(`(?i)^(.+?)\s+at\s+(.+?)\s+over\s+(\S+)(?:\s+years?)?$`)

// loan reads the value of a "loan:" line.
func (p *parser) loan(val Text) *Loan {
	m := reLoan.FindStringSubmatchIndex(val.Src)
	if m == nil {
		p.errorf(val.Pos, "cannot read loan %q; expected \"AMOUNT at R%% over N years\", e.g. \"loan: 300k at 6.5%% over 7 years\"", val.Src)
		return nil
	}
	at := func(g int) Text {
		return Text{Src: val.Src[m[2*g]:m[2*g+1]], Pos: val.Pos.Shift(len([]rune(val.Src[:m[2*g]])))}
	}
	l := &Loan{Pos: val.Pos, Line: val.Pos.Line, Amount: at(1), Years: at(3)}
	l.Rate = p.rateSpec(at(2))
	if l.Rate == nil {
		return nil
	}
	return l
}

// Money bases of the "amounts:" front-matter key.
const (
	ThenCurrent = "then-current"
	Constant    = "constant"
)

var amountsWords = map[string]string{
	"then-current": ThenCurrent, "then current": ThenCurrent, "current": ThenCurrent,
	"actual": ThenCurrent, "nominal": ThenCurrent, "market": ThenCurrent,
	"constant": Constant, "real": Constant, "constant money": Constant, "constant dollars": Constant,
	"today's money": Constant, "todays money": Constant,
}

// amounts reads the "amounts:" key: the money the memo's amounts are in.
// The value kept is ThenCurrent or Constant.
func (p *parser) amounts(f Field) Field {
	v := normKey(f.Value.Src)
	w, ok := amountsWords[v]
	if !ok {
		msg := "unknown money basis %q for amounts; expected \"then-current\" (the money of the year each amount falls in) or \"constant\" (today's money)"
		if s := expr.Closest(v, []string{ThenCurrent, Constant}); s != "" {
			p.errorf(f.Value.Pos, msg+"; did you mean %q?", f.Value.Src, s)
		} else {
			p.errorf(f.Value.Pos, msg, f.Value.Src)
		}
		return Field{}
	}
	f.Value.Src = w
	return f
}

// Replacement is a `replacement ID` block: keep the asset in service (the
// defender) or replace it with a new one (the challenger).
type Replacement struct {
	BlockHead
	Defender   *Ref
	Challenger *Ref
	// DefenderValue is its market value by age ("market value:" or
	// "defender market value:"); ChallengerValue the challenger's
	// ("challenger market value:"), nil for the default rule.
	DefenderValue   *MarketValue
	ChallengerValue *MarketValue
	Rate            *RateSpec
}

// MarketValue is a market value by age: "X declining R%" (X now, then
// X (1 - R)^k after k years) or a list of values now and after each year.
// A line that could not be read (its error reported) has neither.
type MarketValue struct {
	Pos       Pos
	Start     Text  // X of the declining form
	Declining *Text // R
	List      []Text
}

var (
	replacementKeys = []string{"defender", "challenger", "market value", "defender market value", "challenger market value", "rate"}
	reDeclines      = regexp.MustCompile(`(?i)\s+declining(?:\s+|$)`)
)

func (p *parser) replacement(h BlockHead, lines []srcLine) Block {
	r := &Replacement{BlockHead: h}
	canon := func(key string) string {
		if key == "defender market value" {
			return "market value"
		}
		return key
	}
	for _, kl := range p.keyLines(h, lines, "defender: old-pump", canon) {
		key, keyText, val := kl.key, kl.keyText, kl.val
		switch key {
		case "defender":
			r.Defender = &Ref{ID: val.Src, Pos: val.Pos}
		case "challenger":
			r.Challenger = &Ref{ID: val.Src, Pos: val.Pos}
		case "market value":
			r.DefenderValue = p.marketValue(val)
		case "challenger market value":
			r.ChallengerValue = p.marketValue(val)
		case "rate":
			r.Rate = p.rateSpec(val)
		default:
			msg := "unknown line %q in replacement %s; expected one of %s"
			if s := suggestKey(key, replacementKeys); s != "" {
				p.errorf(keyText.Pos, msg+"; did you mean %q?", keyText.Src, h.ID, quoteList(replacementKeys), s)
			} else {
				p.errorf(keyText.Pos, msg, keyText.Src, h.ID, quoteList(replacementKeys))
			}
		}
	}
	if r.Defender == nil {
		p.errorf(h.Pos, "replacement %s needs a \"defender: ID\" line naming the alternative that describes the asset in service", h.ID)
	}
	if r.Challenger == nil {
		p.errorf(h.Pos, "replacement %s needs a \"challenger: ID\" line naming the alternative that would replace it", h.ID)
	}
	return r
}

// marketValue reads "X declining R%" or a list "X0, X1, X2, ...".
func (p *parser) marketValue(val Text) *MarketValue {
	mv := &MarketValue{Pos: val.Pos}
	if m := reDeclines.FindStringIndex(val.Src); m != nil {
		word := m[0] + strings.Index(strings.ToLower(val.Src[m[0]:m[1]]), "declining")
		mv.Start = Text{Src: strings.TrimSpace(val.Src[:m[0]]), Pos: val.Pos}
		rest := val.Src[m[1]:]
		lead := len(rest) - len(strings.TrimLeft(rest, " \t"))
		r := Text{Src: strings.TrimSpace(rest), Pos: val.Pos.Shift(len([]rune(val.Src[:m[1]+lead])))}
		if r.Src == "" {
			p.errorf(val.Pos.Shift(len([]rune(val.Src[:word]))), "declining needs a rate after it, e.g. \"30000 declining 15%%\"")
			return &MarketValue{Pos: val.Pos}
		}
		if mv.Start.Src == "" {
			p.errorf(val.Pos, "the market value today is missing before \"declining\", e.g. \"30000 declining 15%%\"")
			return &MarketValue{Pos: val.Pos}
		}
		mv.Declining = &r
		return mv
	}
	for _, a := range SplitArgs(val.Src) {
		lead := len(a.S) - len(strings.TrimLeft(a.S, " \t"))
		t := Text{Src: strings.TrimSpace(a.S), Pos: val.Pos.Shift(len([]rune(val.Src[:a.Off+lead])))}
		if t.Src == "" {
			p.errorf(t.Pos, "empty value in the list of market values")
			return &MarketValue{Pos: val.Pos}
		}
		mv.List = append(mv.List, t)
	}
	if len(mv.List) < 2 {
		p.errorf(val.Pos, "a market value is \"X declining R%%\" or a list of values now and after each year (\"30000, 24000, 19000\"); one value gives no life to try")
		return &MarketValue{Pos: val.Pos}
	}
	return mv
}
