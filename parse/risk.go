package parse

import (
	"math"
	"strconv"
	"strings"

	"worth/expr"
)

// Risk is a `risk ID` block: a Monte Carlo simulation of one comparison
// over the assumptions that carry a distribution.
type Risk struct {
	BlockHead
	// Compare names the comparison; nil means the memo's only one.
	Compare *Ref
	// Trials is the number of trials (DefaultTrials when not given);
	// TrialsPos is where it was written.
	Trials    int
	TrialsPos Pos
	// Seed starts the random streams (DefaultSeed when not given).
	Seed    uint64
	SeedSet bool
	SeedPos Pos
	// Vary restricts the draws to the named assumptions; nil draws every
	// assumption that has a distribution.
	Vary []Ref
}

// The defaults and bounds of a risk block.
const (
	DefaultTrials = 10000
	MinTrials     = 100
	MaxTrials     = 1000000
	DefaultSeed   = 1
)

var riskKeys = []string{"compare", "trials", "seed", "vary"}

// riskSynonyms are words an author may use for a risk block's keys; they
// are not accepted, but the error suggests the key meant.
var riskSynonyms = map[string]string{
	"iterations": "trials", "samples": "trials", "runs": "trials", "draws": "trials", "simulations": "trials",
	"random seed": "seed", "comparison": "compare", "inputs": "vary", "uncertain": "vary", "variables": "vary",
}

func (p *parser) risk(h BlockHead, lines []srcLine) Block {
	r := &Risk{BlockHead: h, Trials: DefaultTrials, Seed: DefaultSeed}
	for _, kl := range p.keyLines(h, lines, "trials: 20000", nil) {
		key, keyText, val := kl.key, kl.keyText, kl.val
		switch key {
		case "compare":
			if strings.ContainsAny(val.Src, ", ") {
				p.errorf(val.Pos, "a risk block simulates one comparison; give one id after \"compare:\", got %q", val.Src)
				continue
			}
			r.Compare = &Ref{ID: val.Src, Pos: val.Pos}
		case "trials":
			v, ok := expr.ParseNumber(val.Src)
			if !ok || v != math.Trunc(v) {
				p.errorf(val.Pos, "trials must be a whole number, e.g. trials: 20000, got %q", val.Src)
				continue
			}
			if v < MinTrials || v > MaxTrials {
				p.errorf(val.Pos, "trials must be from %d to %s, got %s", MinTrials, "1,000,000", val.Src)
				continue
			}
			r.Trials, r.TrialsPos = int(v), val.Pos
		case "seed":
			s, err := strconv.ParseUint(strings.ReplaceAll(val.Src, "_", ""), 10, 64)
			if err != nil {
				p.errorf(val.Pos, "seed must be a whole number from 0 to 18446744073709551615 (digits only), e.g. seed: 42, got %q", val.Src)
				continue
			}
			r.Seed, r.SeedSet, r.SeedPos = s, true, val.Pos
		case "vary":
			r.Vary = []Ref{}
			for _, a := range SplitArgs(val.Src) {
				name := strings.TrimSpace(a.S)
				lead := len(a.S) - len(strings.TrimLeft(a.S, " \t"))
				pos := val.Pos.Shift(len([]rune(val.Src[:a.Off+lead])))
				if name == "" {
					p.errorf(pos, "empty name in the list of assumptions to vary")
					continue
				}
				if !namePattern.MatchString(name) {
					p.errorf(pos, "%q is not an assumption's name; list names separated by commas, e.g. vary: power_price, overhaul", name)
					continue
				}
				r.Vary = append(r.Vary, Ref{ID: name, Pos: pos})
			}
		default:
			msg := "unknown line %q in risk %s; expected one of %s"
			s := suggestKey(key, riskKeys)
			if s == "" {
				s = riskSynonyms[key]
			}
			if s != "" {
				p.errorf(keyText.Pos, msg+"; did you mean %q?", keyText.Src, h.ID, quoteList(riskKeys), s)
			} else {
				p.errorf(keyText.Pos, msg, keyText.Src, h.ID, quoteList(riskKeys))
			}
		}
	}
	return r
}
