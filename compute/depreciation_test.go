package compute_test

// Depreciation schedules against IRS Publication 946, Table A-1 (as
// written down in shared/references.md), against the methods' definitions,
// and against schedules worked by hand.

import (
	"math"
	"testing"

	"worth/compute"
)

// tableA1 is IRS Publication 946, Table A-1 (MACRS general depreciation
// system, half-year convention), percentages of basis by recovery year.
// Source: shared/references.md, "Tax depreciation" (from memory of the
// printed table, with its rounding).
var tableA1 = map[int][]float64{
	3:  {33.33, 44.45, 14.81, 7.41},
	5:  {20.00, 32.00, 19.20, 11.52, 11.52, 5.76},
	7:  {14.29, 24.49, 17.49, 12.49, 8.93, 8.92, 8.93, 4.46},
	10: {10.00, 18.00, 14.40, 11.52, 9.22, 7.37, 6.55, 6.55, 6.56, 6.55, 3.28},
	15: {5.00, 9.50, 8.55, 7.70, 6.93, 6.23, 5.90, 5.90, 5.91, 5.90, 5.91, 5.90, 5.91, 5.90, 5.91, 2.95},
	20: {3.750, 7.219, 6.677, 6.177, 5.713, 5.285, 4.888, 4.522, 4.462, 4.461, 4.462, 4.461, 4.462, 4.461, 4.462, 4.461, 4.462, 4.461, 4.462, 4.461, 2.231},
}

// TestMACRSScheduleIsTableA1: the schedule of every class, on a basis of
// 100, is Table A-1 exactly, and adds up to the basis.
func TestMACRSScheduleIsTableA1(t *testing.T) {
	for class, want := range tableA1 {
		d := &compute.DepreciationPlan{Method: "macrs", Years: class}
		got := d.Deductions(100, 0)
		if len(got) != len(want) {
			t.Errorf("MACRS %d: %d recovery years, Table A-1 prints %d", class, len(got), len(want))
			continue
		}
		sum := 0.0
		for k := range want {
			if math.Abs(got[k]-want[k]) > 1e-12 {
				t.Errorf("MACRS %d, year %d: %.4f%%, Table A-1 prints %.3f%%", class, k+1, got[k], want[k])
			}
			sum += got[k]
		}
		// Each printed column adds up to 100% of the basis.
		if math.Abs(sum-100) > 1e-9 {
			t.Errorf("MACRS %d: the schedule adds up to %.6f%%, want 100%%", class, sum)
		}
		// A basis other than 100 scales the percentages.
		for k, x := range d.Deductions(48_500, 0) {
			if math.Abs(x-48_500*want[k]/100) > 1e-6 {
				t.Errorf("MACRS %d, year %d on a basis of 48,500: %.4f", class, k+1, x)
			}
		}
	}
}

// gdsPercent computes the GDS percentages from the method the table is
// built on (Publication 946: 200% declining balance for the 3- to 10-year
// classes, 150% for 15 and 20 years, half-year convention, switching to
// straight line over the remaining recovery period when that is larger).
// Written here from that definition, not from the program.
func gdsPercent(class int) []float64 {
	mult := 2.0
	if class >= 15 {
		mult = 1.5
	}
	rate := mult / float64(class)
	bv := 100.0
	var out []float64
	remaining := float64(class) // years of recovery left at the start of a year
	for year := 1; year <= class+1; year++ {
		frac := 1.0
		if year == 1 || year == class+1 {
			frac = 0.5
		}
		db := bv * rate * frac
		sl := 0.0
		if remaining > 0 {
			sl = bv / remaining * frac
		}
		x := math.Max(db, sl)
		if year == class+1 {
			x = bv
		}
		out = append(out, x)
		bv -= x
		remaining -= frac
	}
	return out
}

// TestTableA1AgainstTheMethod: each printed percentage is within the
// table's rounding (0.01, or 0.001 for the 20-year class printed to three
// decimals; the printed columns are adjusted so that they add up to 100)
// of the percentage the method gives: a check of the data as typed.
func TestTableA1AgainstTheMethod(t *testing.T) {
	for class, printed := range compute.MACRSPercent {
		tol := 0.0100001
		if class == 20 {
			tol = 0.0010001
		}
		method := gdsPercent(class)
		for k, p := range printed {
			if math.Abs(p-method[k]) > tol {
				t.Errorf("MACRS %d, year %d: table %.3f, method %.4f", class, k+1, p, method[k])
			}
		}
	}
}

// TestMACRSDisposalTakesHalfAYear: disposing of the asset in a year
// before its recovery period ends takes half of that year's deduction
// (the half-year convention in the year of disposal, Publication 946);
// disposing in the last table year, or later, takes the table in full.
func TestMACRSDisposalTakesHalfAYear(t *testing.T) {
	d := &compute.DepreciationPlan{Method: "macrs", Years: 7}
	for end := 1; end <= 10; end++ {
		got := d.Deductions(1000, end)
		if len(got) != end {
			t.Fatalf("disposal at %d: %d years of deductions", end, len(got))
		}
		for k := 0; k < end; k++ {
			want := 0.0
			if k < 8 {
				want = 10 * tableA1[7][k]
				if k == end-1 && end <= 7 {
					want /= 2
				}
			}
			if math.Abs(got[k]-want) > 1e-9 {
				t.Errorf("disposal at year %d: year %d deducts %.4f, want %.4f", end, k+1, got[k], want)
			}
		}
	}
}

// TestBookSchedulesByHand checks straight line, sum-of-years digits and
// declining balance with the switch against schedules worked by hand
// (common practice: the textbook definitions, written out in the
// comments).
func TestBookSchedulesByHand(t *testing.T) {
	cases := []struct {
		name  string
		plan  compute.DepreciationPlan
		basis float64
		want  []float64
	}{
		// (50,000 - 5,000) / 5 = 9,000 a year.
		{"straight line to a salvage", compute.DepreciationPlan{Method: "straight line", Years: 5, Salvage: 5000}, 50000, []float64{9000, 9000, 9000, 9000, 9000}},
		// Sum of digits 15: 45,000 x 5/15, 4/15, 3/15, 2/15, 1/15.
		{"sum of years", compute.DepreciationPlan{Method: "sum of years", Years: 5, Salvage: 5000}, 50000, []float64{15000, 12000, 9000, 6000, 3000}},
		// Double declining, 40%: 4,000; 2,400; 1,440; then book value
		// 2,160 over two years is 1,080 a year, more than 40% of 2,160
		// (864): the switch.
		{"double declining with the switch", compute.DepreciationPlan{Method: "declining balance", Years: 5, Rate: 0.4, Multiple: 2}, 10000, []float64{4000, 2400, 1440, 1080, 1080}},
		// 150% over 4 years, 37.5%: 3,750; 2,343.75; then straight line
		// of 3,906.25 over two years, 1,953.125, beats 37.5% of it.
		{"150% declining", compute.DepreciationPlan{Method: "declining balance", Years: 4, Rate: 0.375, Multiple: 1.5}, 10000, []float64{3750, 2343.75, 1953.125, 1953.125}},
		// Double declining to a salvage of 2,000 over 5 years: 4,000;
		// 2,400; then 40% of 3,600 = 1,440 beats the straight line
		// (3,600 - 2,000) / 3 = 533.33; then 40% of 2,160 would go below
		// the salvage, so only the 160 left above it; then nothing.
		{"declining balance floored at the salvage", compute.DepreciationPlan{Method: "declining balance", Years: 5, Rate: 0.4, Multiple: 2, Salvage: 2000}, 10000, []float64{4000, 2400, 1440, 160, 0}},
	}
	for _, tc := range cases {
		got := tc.plan.Deductions(tc.basis, 0)
		if len(got) != len(tc.want) {
			t.Errorf("%s: %d years, want %d", tc.name, len(got), len(tc.want))
			continue
		}
		sum := 0.0
		for k := range got {
			sum += got[k]
			if math.Abs(got[k]-tc.want[k]) > 1e-9 {
				t.Errorf("%s, year %d: %.4f, want %.4f", tc.name, k+1, got[k], tc.want[k])
			}
		}
		if math.Abs(sum-(tc.basis-tc.plan.Salvage)) > 1e-9 {
			t.Errorf("%s: deductions add up to %.4f, want basis less salvage %.4f", tc.name, sum, tc.basis-tc.plan.Salvage)
		}
	}
}

// TestBookSchedulesSumToBasisLessSalvage: over many methods, periods,
// rates and salvage values, every schedule adds up to basis less salvage,
// never takes book value below the salvage, and declining balance never
// deducts less than its rate or the straight line of what is left would.
func TestBookSchedulesSumToBasisLessSalvage(t *testing.T) {
	for n := 1; n <= 25; n++ {
		for _, s := range []float64{0, 1000, 37_500} {
			basis := 100_000.0
			plans := []compute.DepreciationPlan{
				{Method: "straight line", Years: n, Salvage: s},
				{Method: "sum of years", Years: n, Salvage: s},
			}
			for _, m := range []float64{1, 1.5, 2, 2.5} {
				if m/float64(n) < 1 {
					plans = append(plans, compute.DepreciationPlan{Method: "declining balance", Years: n, Rate: m / float64(n), Multiple: m, Salvage: s})
				}
			}
			for _, p := range plans {
				got := p.Deductions(basis, 0)
				sum, bv := 0.0, basis
				for k, x := range got {
					if x < -1e-9 || bv-x < s-1e-6 {
						t.Errorf("%s %d to %v: year %d deducts %.2f from book value %.2f", p.Method, n, s, k+1, x, bv)
					}
					if p.Method == "declining balance" && bv-s > 1e-6 {
						want := math.Min(math.Max(p.Rate*bv, (bv-s)/float64(n-k)), bv-s)
						if math.Abs(x-want) > 1e-6 {
							t.Errorf("declining balance %d to %v, year %d: %.4f, want %.4f", n, s, k+1, x, want)
						}
					}
					sum += x
					bv -= x
				}
				if math.Abs(sum-(basis-s)) > 1e-6 {
					t.Errorf("%s %d to %v: adds up to %.4f, want %.4f", p.Method, n, s, sum, basis-s)
				}
			}
		}
	}
}

// TestDepreciationLines reads every form of the depreciation line through
// a memo.
func TestDepreciationLines(t *testing.T) {
	cases := []struct {
		line     string
		method   string
		years    int
		rate     float64
		salvage  float64
		multiple float64
	}{
		{"straight line 10", "straight line", 10, 0, 0, 0},
		{"straight line 10 to 5k", "straight line", 10, 0, 5000, 0},
		{"declining balance 200% 5", "declining balance", 5, 0.4, 0, 2},
		{"declining balance 150% 10 to 2,000", "declining balance", 10, 0.15, 2000, 1.5},
		{"declining balance 25% 8", "declining balance", 8, 0.25, 0, 2},
		{"sum of years 6", "sum of years", 6, 0, 0, 0},
		{"sum of years digits 6 to 1000", "sum of years", 6, 0, 1000, 0},
		{"macrs 7", "macrs", 7, 0, 0, 0},
		{"MACRS 15-year", "macrs", 15, 0, 0, 0},
	}
	for _, tc := range cases {
		src := "---\ntitle: D\nrate: 8%\n---\n\n```alternative a\nlife: 10\nfirst cost: 100k\ndepreciation: " + tc.line + "\n```\n"
		rep := computeMemo(t, src)
		d := rep.Alternatives[0].Depreciation
		if d == nil {
			t.Errorf("%q: no depreciation", tc.line)
			continue
		}
		if d.Method != tc.method || d.Years != tc.years || math.Abs(d.Rate-tc.rate) > 1e-12 || d.Salvage != tc.salvage || math.Abs(d.Multiple-tc.multiple) > 1e-12 {
			t.Errorf("%q: read as %+v", tc.line, *d)
		}
	}
}
