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

// pwAt is an alternative's present worth at rate x over the comparison's
// horizon.
func pwAt(c *Comparison, r *Result, x float64) float64 {
	if c.Horizon.Perpetual() {
		return r.Alt.perpetualPW(x)
	}
	return NPV(x, netFlows(r.Flows))
}

// Curves samples each alternative's present worth over the chart's span
// of rates (101 points) and finds the crossover rates between every pair.
func (c *Comparison) Curves() ([]Curve, []Crossover) {
	lo, hi := curveSpan(c)
	const n = 100
	var curves []Curve
	for _, r := range c.Results {
		cv := Curve{Alt: r.Alt.ID}
		for k := 0; k <= n; k++ {
			x := lo + (hi-lo)*float64(k)/n
			cv.Rates = append(cv.Rates, x)
			cv.Worths = append(cv.Worths, pwAt(c, r, x))
		}
		curves = append(curves, cv)
	}
	var xs []Crossover
	for i := 0; i < len(c.Results); i++ {
		for j := i + 1; j < len(c.Results); j++ {
			a, b := c.Results[i], c.Results[j]
			f := func(x float64) float64 { return pwAt(c, a, x) - pwAt(c, b, x) }
			for _, root := range RatesOfReturn(f, math.Max(lo, -0.99), hi) {
				xs = append(xs, Crossover{A: a.Alt.ID, B: b.Alt.ID, Rate: root, Worth: pwAt(c, a, root)})
			}
		}
	}
	sort.Slice(xs, func(i, j int) bool { return xs[i].Rate < xs[j].Rate })
	return curves, xs
}
