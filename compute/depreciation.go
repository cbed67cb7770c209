package compute

import (
	"math"

	"worth/parse"
)

// DepreciationPlan is an alternative's "depreciation:" line, evaluated.
// The basis is the alternative's first cost; each life cycle depreciates
// afresh.
type DepreciationPlan struct {
	// Method is "straight line", "declining balance", "sum of years" or
	// "macrs".
	Method string
	// Years is N: the recovery period, or the MACRS property class.
	Years int
	// Rate is the fraction of book value a declining balance takes a year;
	// Multiple is its multiple of the straight-line rate 1/N (2 for a
	// double-declining balance).
	Rate, Multiple float64
	// Salvage is the value depreciated to ("to S"; zero when not given, and
	// always zero for MACRS).
	Salvage float64
	Line    int
}

// MACRSPercent holds IRS Publication 946, Table A-1 (MACRS general
// depreciation system, half-year convention): the percentage of the basis
// deducted in each recovery year, as printed, for the property classes of
// 3, 5, 7, 10, 15 and 20 years. It is data, not a formula: the printed
// rounding is what a tax return uses. Source: shared/references.md.
var MACRSPercent = map[int][]float64{
	3:  {33.33, 44.45, 14.81, 7.41},
	5:  {20.00, 32.00, 19.20, 11.52, 11.52, 5.76},
	7:  {14.29, 24.49, 17.49, 12.49, 8.93, 8.92, 8.93, 4.46},
	10: {10.00, 18.00, 14.40, 11.52, 9.22, 7.37, 6.55, 6.55, 6.56, 6.55, 3.28},
	15: {5.00, 9.50, 8.55, 7.70, 6.93, 6.23, 5.90, 5.90, 5.91, 5.90, 5.91, 5.90, 5.91, 5.90, 5.91, 2.95},
	20: {3.750, 7.219, 6.677, 6.177, 5.713, 5.285, 4.888, 4.522, 4.462, 4.461, 4.462, 4.461, 4.462, 4.461, 4.462, 4.461, 4.462, 4.461, 4.462, 4.461, 2.231},
}

// RecoveryYears is how many years the method deducts over when the asset is
// kept: N, or N + 1 for MACRS, whose half-year convention spreads an
// N-year class over N + 1 tax years.
func (d *DepreciationPlan) RecoveryYears() int {
	if d.Method == "macrs" {
		return d.Years + 1
	}
	return d.Years
}

// Deductions returns the deduction of each age 1, 2, ... of a life cycle
// for a basis, the asset being disposed of at age end (end <= 0: kept, the
// full schedule). The slice has end entries (zeros past the recovery
// period), or RecoveryYears entries when end <= 0.
//
//   - straight line: (B - S) / N a year for N years;
//   - sum of years: (B - S) (N - t + 1) / (N (N + 1) / 2) in year t;
//   - declining balance: Rate x book value, or, when larger, straight line
//     of what is left above S over the remaining years (the switch), never
//     below S;
//   - MACRS: B x the Table A-1 percentage of year t; a disposal before the
//     recovery period ends (end <= N) takes half of that year's deduction
//     (the half-year convention in the year of disposal).
//
// The other methods take the full deduction of the year of disposal.
func (d *DepreciationPlan) Deductions(basis float64, end int) []float64 {
	n := d.RecoveryYears()
	length := n
	if end > 0 {
		length = end
	}
	out := make([]float64, length)
	depreciable := basis - d.Salvage
	bv := basis
	for t := 1; t <= length && t <= n; t++ {
		var x float64
		switch d.Method {
		case "straight line":
			x = depreciable / float64(d.Years)
		case "sum of years":
			x = depreciable * float64(d.Years-t+1) / float64(d.Years*(d.Years+1)/2)
		case "declining balance":
			db := d.Rate * bv
			sl := (bv - d.Salvage) / float64(d.Years-t+1)
			x = math.Max(db, sl)
			x = math.Min(x, bv-d.Salvage)
			if x < 0 {
				x = 0
			}
		case "macrs":
			x = basis * MACRSPercent[d.Years][t-1] / 100
			if t == end && end <= d.Years {
				x /= 2
			}
		}
		out[t-1] = x
		bv -= x
	}
	return out
}

// BookValue is the basis less the deductions.
func BookValue(basis float64, deductions []float64) float64 {
	bv := basis
	for _, x := range deductions {
		bv -= x
	}
	return bv
}

// depreciation evaluates an alternative's depreciation line.
func (e *env) depreciation(a *Alternative, src *parse.Depreciation) (*DepreciationPlan, bool) {
	d := &DepreciationPlan{Method: src.Method, Line: src.Pos.Line}
	n, ok := e.year(src.Years, "the recovery period", 1)
	if !ok {
		return nil, false
	}
	d.Years = n
	switch src.Method {
	case "macrs":
		if _, known := MACRSPercent[n]; !known {
			e.errs.Add(src.Years.Pos, "MACRS general-depreciation classes are 3, 5, 7, 10, 15 and 20 years (IRS Publication 946, Table A-1), got %d", n)
			return nil, false
		}
	case "declining balance":
		r, good := e.number(*src.Rate, "the declining-balance rate")
		if !good {
			return nil, false
		}
		// 200% (or more) is a multiple of the straight-line rate 1/N, as
		// the trade writes double-declining balance; below 100% it is the
		// fraction of book value taken each year.
		if r >= 1 {
			d.Multiple, d.Rate = r, r/float64(n)
		} else {
			d.Rate, d.Multiple = r, r*float64(n)
		}
		if r <= 0 || d.Rate > 1 {
			e.errs.Add(src.Rate.Pos, "a declining balance takes a share of book value each year, above 0%% and at most 100%% (200%% means twice the straight-line rate 1/N); %s over %d years gives %s", src.Rate.Src, n, pct(d.Rate))
			return nil, false
		}
	}
	if src.To != nil {
		s, good := e.number(*src.To, "the salvage value to depreciate to")
		if !good {
			return nil, false
		}
		if s < 0 || s > a.FirstCost {
			e.errs.Add(src.To.Pos, "the value to depreciate to must be from 0 to the first cost (%s), got %s", trimFloat(a.FirstCost), trimFloat(s))
			return nil, false
		}
		d.Salvage = s
	}
	return d, true
}
