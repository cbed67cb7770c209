package compute

import (
	"math"
	"sort"
)

// Curve is an alternative's present worth at a range of rates, for the
// present-worth-versus-rate chart.
type Curve struct {
	Alt    string
	Rates  []float64
	Worths []float64 // NaN where the present worth does not converge
}

// Crossover is a rate at which two alternatives have equal present worth.
type Crossover struct {
	A, B  string
	Rate  float64
	Worth float64
}

// curveRates is the span of the chart: from 0 (or just above it on a
// perpetual horizon) to twice the larger of the comparison's rate and the
// alternatives' rates of return, at most 60%.
func curveSpan(c *Comparison) (lo, hi float64) {
	hi = 2 * c.Rate.Effective
	for _, r := range c.Results {
		if r.IRR != nil && *r.IRR*1.3 > hi {
			hi = *r.IRR * 1.3
		}
	}
	if hi < 0.1 {
		hi = 0.1
	}
	if hi > 0.6 {
		hi = 0.6
	}
	lo = 0
	if c.Horizon.Perpetual() {
		lo = 0.005
	}
	return lo, hi
}

// worthFunc returns an alternative's present worth as a function of the
// rate over the comparison's horizon (its net flows taken once).
func worthFunc(c *Comparison, r *Result) func(float64) float64 {
	if c.Horizon.Perpetual() {
		return r.Alt.perpetualPW
	}
	net := netFlows(r.Flows)
	return func(x float64) float64 { return NPV(x, net) }
}

// maxCrossoverAlternatives: up to this many alternatives, crossovers are
// found between every pair; beyond it, only between the recommended
// alternative and each other one (the pairs a reader asks about), which
// keeps the work linear in the number of alternatives.
const maxCrossoverAlternatives = 6

// Curves samples each alternative's present worth over the chart's span
// of rates (101 points) and finds the crossover rates between pairs.
func (c *Comparison) Curves() ([]Curve, []Crossover) {
	lo, hi := curveSpan(c)
	const n = 100
	var curves []Curve
	pw := make([]func(float64) float64, len(c.Results))
	for k, r := range c.Results {
		pw[k] = worthFunc(c, r)
	}
	for k, r := range c.Results {
		cv := Curve{Alt: r.Alt.ID}
		for s := 0; s <= n; s++ {
			x := lo + (hi-lo)*float64(s)/n
			cv.Rates = append(cv.Rates, x)
			cv.Worths = append(cv.Worths, pw[k](x))
		}
		curves = append(curves, cv)
	}
	var xs []Crossover
	all := len(c.Results) <= maxCrossoverAlternatives
	for i := 0; i < len(c.Results); i++ {
		for j := i + 1; j < len(c.Results); j++ {
			a, b := c.Results[i], c.Results[j]
			if !all && a.Alt.ID != c.Recommended && b.Alt.ID != c.Recommended {
				continue
			}
			fa, fb := pw[i], pw[j]
			f := func(x float64) float64 { return fa(x) - fb(x) }
			// The chart spans at most 60%: 400 intervals are about 0.15% apart.
			for _, root := range RatesOfReturnGrid(f, math.Max(lo, -0.99), hi, 400) {
				xs = append(xs, Crossover{A: a.Alt.ID, B: b.Alt.ID, Rate: root, Worth: fa(root)})
			}
		}
	}
	sort.Slice(xs, func(i, j int) bool { return xs[i].Rate < xs[j].Rate })
	return curves, xs
}
