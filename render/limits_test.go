package render

// Numerical edge cases through the whole pipeline: parse, compute and the
// JSON writer (README.md, "Limits"). Every figure comes out finite and
// explained, or the memo is a clear error at its place.

import (
	"encoding/json"
	"math"
	"strings"
	"testing"

	"worth/compute"
	"worth/parse"
)

// edgeReport parses and computes src; it returns the report or the errors
// as text.
func edgeReport(t *testing.T, src string) (*compute.Report, string) {
	t.Helper()
	m, err := parse.Parse("edge.md", []byte(src))
	if err == nil {
		var rep *compute.Report
		if rep, err = compute.Compute(m); err == nil {
			return rep, ""
		}
	}
	return nil, err.Error()
}

// edgeJSON is the part of the JSON report these tests read.
type edgeJSON struct {
	Assumptions []struct {
		Name  string
		Value float64
	}
	Comparisons []struct {
		Recommended string
		Warnings    []string
		Results     []struct {
			Alternative  string
			PresentWorth float64  `json:"present_worth"`
			AnnualWorth  float64  `json:"annual_worth"`
			FutureWorth  *float64 `json:"future_worth"`
			IRR          *float64 `json:"irr"`
			Payback      *float64 `json:"payback_years"`
		}
	}
	Warnings []string
}

func (j edgeJSON) assumption(name string) float64 {
	for _, a := range j.Assumptions {
		if a.Name == name {
			return a.Value
		}
	}
	return math.NaN()
}

func edgeMemo(rate, horizon, lines string) string {
	return "---\ntitle: Edge\nrate: " + rate + "\n---\n\n```alternative a\nlife: 10\nfirst cost: 1000\n" + lines +
		"```\n\n```compare pick\nhorizon: " + horizon + "\n```\n\nFuture worth: `= fw(a)`.\n"
}

// near reports whether got is within a relative 1e-9 of want.
func near(got, want float64) bool {
	return math.Abs(got-want) <= 1e-9*math.Max(1, math.Abs(want))
}

func TestNumericalEdgeCases(t *testing.T) {
	cases := []struct {
		name string
		memo string
		err  string // a part of the error text; "" for a memo that builds
		// check looks at the JSON of a memo that builds.
		check func(t *testing.T, j edgeJSON)
	}{
		{
			// At 0% the factors take their limits (common practice: the
			// closed forms' limits as i -> 0): (P/A, 0, n) = n,
			// (A/P, 0, n) = 1/n, (P/F, 0, n) = (F/P, 0, n) = 1,
			// (F/A, 0, n) = n, (A/F, 0, n) = 1/n, (P/G, 0, n) =
			// n(n-1)/2, (A/G, 0, n) = (n-1)/2, and the geometric gradient
			// at g = 0 is n.
			name: "factors at 0%",
			memo: "---\ntitle: Edge\nrate: 7%\n---\n\n```assume\npa0 = pa(0, 12)\nap0 = ap(0%, 12)\npf0 = pf(0, 12)\nfp0 = fp(0, 12)\nfa0 = fa(0, 12)\naf0 = af(0, 12)\npg0 = pg(0, 12)\nag0 = ag(0, 12)\npgeo0 = pgeo(0, 0, 12)\n```\n",
			check: func(t *testing.T, j edgeJSON) {
				for name, want := range map[string]float64{"pa0": 12, "ap0": 1.0 / 12, "pf0": 1, "fp0": 1, "fa0": 12, "af0": 1.0 / 12, "pg0": 66, "ag0": 5.5, "pgeo0": 12} {
					if got := j.assumption(name); !near(got, want) {
						t.Errorf("%s = %v, want %v", name, got, want)
					}
				}
			},
		},
		{
			// At 0% over a finite horizon every measure is the plain sum
			// of the flows: -1000 + 10 × 250 + 100 = 1600; the annual
			// worth that sum over 10 years; the future worth the same sum.
			name: "rate 0% on a study period",
			memo: edgeMemo("0%", "study period 10", "annual benefit: 250\nsalvage: 100\n"),
			check: func(t *testing.T, j edgeJSON) {
				r := j.Comparisons[0].Results[0]
				if !near(r.PresentWorth, 1600) || !near(r.AnnualWorth, 160) || r.FutureWorth == nil || !near(*r.FutureWorth, 1600) {
					t.Errorf("PW %v AW %v FW %v; want 1600, 160, 1600", r.PresentWorth, r.AnnualWorth, r.FutureWorth)
				}
				// Payback: 1000 is repaid by 250 a year after 4 years.
				if r.Payback == nil || !near(*r.Payback, 4) {
					t.Errorf("payback %v, want 4", r.Payback)
				}
			},
		},
		{
			name: "rate 0% repeating lives",
			memo: edgeMemo("0%", "repeat lives", "annual benefit: 250\n"),
			check: func(t *testing.T, j edgeJSON) {
				if r := j.Comparisons[0].Results[0]; !near(r.PresentWorth, 1500) {
					t.Errorf("PW %v, want 1500", r.PresentWorth)
				}
			},
		},
		{name: "rate 0% perpetual", memo: edgeMemo("0%", "perpetual", "annual benefit: 250\n"), err: "edge.md:13:10: a perpetual horizon needs a positive rate; present worth forever does not converge at 0%"},
		{
			// A negative rate on a finite horizon discounts upward:
			// PW = -1000 + 250 (P/A, -5%, 10), (P/A, i, n) = (1 -
			// (1+i)^-n)/i, summed here year by year.
			name: "negative rate on a study period",
			memo: edgeMemo("-5%", "study period 10", "annual benefit: 250\n"),
			check: func(t *testing.T, j edgeJSON) {
				want := -1000.0
				for y := 1; y <= 10; y++ {
					want += 250 * math.Pow(0.95, -float64(y))
				}
				if r := j.Comparisons[0].Results[0]; !near(r.PresentWorth, want) {
					t.Errorf("PW %v, want %v", r.PresentWorth, want)
				}
			},
		},
		{name: "negative rate perpetual", memo: edgeMemo("-5%", "perpetual", "annual benefit: 250\n"), err: "a perpetual horizon needs a positive rate"},
		{name: "rate -100%", memo: edgeMemo("-100%", "study period 10", "annual benefit: 250\n"), err: "edge.md:3:7: rate of -100% is outside the range this tool accepts (above -100% and at most 1000%)"},
		{name: "rate below -100%", memo: edgeMemo("-180%", "study period 10", "annual benefit: 250\n"), err: "rate of -180% is outside the range"},
		{name: "factor at -100%", memo: "---\ntitle: Edge\nrate: 7%\n---\n\n```assume\nx = pa(-100%, 5)\n```\n", err: "edge.md:7:5: pa: the rate must be above -100%"},
		{
			// Escalation equal to the rate: each year's amount A(1+g)^(t-1)
			// discounted by (1+i)^t is A/(1+i), so n years give
			// n A / (1 + i) (the limit of the geometric-gradient factor).
			name: "escalation equal to the rate, finite",
			memo: edgeMemo("7%", "study period 10", "annual cost: 500 escalating 7%\n"),
			check: func(t *testing.T, j edgeJSON) {
				want := -1000 - 10*500/1.07
				if r := j.Comparisons[0].Results[0]; !near(r.PresentWorth, want) {
					t.Errorf("PW %v, want %v", r.PresentWorth, want)
				}
			},
		},
		{name: "escalation equal to the rate, forever", memo: "---\ntitle: Edge\nrate: 7%\n---\n\n```alternative a\nfirst cost: 1000\nannual cost: 500 escalating 7%\n```\n\n```compare pick\n```\n", err: "at or above the rate of 7%, so its present worth on a perpetual horizon has no finite value"},
		{name: "zero life", memo: strings.Replace(edgeMemo("7%", "repeat lives", ""), "life: 10", "life: 0", 1), err: "edge.md:7:7: life must be a whole number of years of at least 1, got 0"},
		{
			// (F/P, 1000%, 10000) = 11^10000 is past 10^308: the future
			// worth is dropped (null) with a warning, the present and
			// annual worths stay finite.
			name: "overflow of (1+i)^n in the future worth",
			memo: edgeMemo("1000%", "study period 10000", "annual benefit: 250\n"),
			check: func(t *testing.T, j edgeJSON) {
				c := j.Comparisons[0]
				if r := c.Results[0]; r.FutureWorth != nil || math.IsNaN(r.PresentWorth) || math.IsInf(r.AnnualWorth, 0) {
					t.Errorf("FW %v, PW %v, AW %v; want null and two finite figures", r.FutureWorth, r.PresentWorth, r.AnnualWorth)
				}
				if !strings.Contains(strings.Join(c.Warnings, "\n"), "The future worth of a over 10,000 years at 1000% is beyond the largest number worth can hold") {
					t.Errorf("no warning about the future worth: %q", c.Warnings)
				}
			},
		},
		{name: "overflow of the present worth at a negative rate", memo: edgeMemo("-10%", "study period 10000", "annual benefit: 250\n"), err: "edge.md:13:10: the present worth of a over 10,000 years at -10% is beyond the largest number worth can hold"},
		{name: "amounts that overflow", memo: strings.Replace(edgeMemo("7%", "study period 400", "annual cost: 500 escalating 900%\n"), "life: 10", "life: 1000", 1), err: "edge.md:6:4: the present worth of a over 400 years at 7% is beyond the largest number worth can hold (about 1.8 × 10^308): its amounts grow too large"},
		{name: "0/0", memo: edgeMemo("7%", "study period 10", "annual cost: 0/0\n"), err: "edge.md:9:15: division by zero"},
		{name: "1/0", memo: edgeMemo("7%", "study period 10", "annual cost: 5 + 1/0\n"), err: "edge.md:9:19: division by zero: the value after / is 0"},
		{name: "a huge power", memo: edgeMemo("7%", "study period 10", "annual cost: 10^400\n"), err: "edge.md:9:16: the result is past the largest number worth can hold"},
		{name: "a huge literal", memo: edgeMemo("7%", "study period 10", "annual cost: 1e999\n"), err: `edge.md:9:14: number "1e999" is out of range`},
		{name: "a root of a negative number", memo: edgeMemo("7%", "study period 10", "annual cost: (-8)^0.5\n"), err: "edge.md:9:18: a negative number to a fractional power ((-8)^0.5) is not a real number"},
		{name: "a remainder by zero", memo: edgeMemo("7%", "study period 10", "annual cost: 7 % 0\n"), err: "edge.md:9:16: the remainder of a division by zero"},
		{name: "division by zero in an expectation", memo: edgeMemo("7%", "study period 10", "annual benefit: 250\n") + "\n```expect\npw(a) / 0 > 1\n```\n", err: "edge.md:19:7: division by zero"},
		{name: "division by zero inline", memo: edgeMemo("7%", "study period 10", "annual benefit: 250\n") + "\nRatio `= pw(a) / (aw(a) - aw(a))`.\n", err: "edge.md:18:16: division by zero"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rep, errs := edgeReport(t, c.memo)
			if c.err != "" {
				if !strings.Contains(errs, c.err) {
					t.Fatalf("errors\n%s\nwant one holding %q", errs, c.err)
				}
				return
			}
			if errs != "" {
				t.Fatalf("unexpected errors:\n%s", errs)
			}
			b, err := JSON(rep)
			if err != nil {
				t.Fatalf("JSON: %v", err)
			}
			var j edgeJSON
			if err := json.Unmarshal(b, &j); err != nil {
				t.Fatalf("the JSON does not read back: %v", err)
			}
			if c.check != nil {
				c.check(t, j)
			}
			// No writer shows a figure that is not finite.
			md := string(Markdown(rep))
			for _, bad := range []string{"NaN", "Inf"} {
				if strings.Contains(md, bad) {
					t.Errorf("the Markdown report shows %s", bad)
				}
			}
		})
	}
}

// TestJSONNonFinite: a NaN or infinity that reaches the JSON writer is
// written as null with a warning naming where, never as a failure.
func TestJSONNonFinite(t *testing.T) {
	rep, errs := edgeReport(t, edgeMemo("7%", "study period 10", "annual benefit: 250\n"))
	if errs != "" {
		t.Fatal(errs)
	}
	r := rep.Comparisons[0].Results[0]
	r.PW = math.NaN()
	inf := math.Inf(1)
	r.FW = &inf
	rep.Assumptions = append(rep.Assumptions, &compute.Assumption{Name: "x", Value: math.Inf(-1)})
	b, err := JSON(rep)
	if err != nil {
		t.Fatalf("JSON failed: %v", err)
	}
	var j struct {
		Assumptions []struct{ Value *float64 }
		Comparisons []struct {
			Results []struct {
				PW *float64 `json:"present_worth"`
				FW *float64 `json:"future_worth"`
				AW *float64 `json:"annual_worth"`
			}
		}
		Warnings []string
	}
	if err := json.Unmarshal(b, &j); err != nil {
		t.Fatalf("the JSON does not read back: %v\n%s", err, b)
	}
	res := j.Comparisons[0].Results[0]
	if res.PW != nil || res.FW != nil || res.AW == nil {
		t.Errorf("present worth %v, future worth %v, annual worth %v; want null, null and a number", res.PW, res.FW, res.AW)
	}
	if last := j.Assumptions[len(j.Assumptions)-1]; last.Value != nil {
		t.Errorf("assumption x = %v, want null", *last.Value)
	}
	want := []string{
		"comparisons[0].results[0].present_worth is not a finite number (NaN or infinite), written as null",
		"comparisons[0].results[0].future_worth is not a finite number (NaN or infinite), written as null",
	}
	got := strings.Join(j.Warnings, "\n")
	for _, w := range want {
		if !strings.Contains(got, w) {
			t.Errorf("warnings\n%s\nwant %q", got, w)
		}
	}
	if !strings.Contains(got, "assumptions[") {
		t.Errorf("no warning for the assumption: %s", got)
	}
	// A report with nothing to hide is written by the fast path, without
	// a warnings key.
	rep2, _ := edgeReport(t, edgeMemo("7%", "study period 10", "annual benefit: 250\n"))
	b2, err := JSON(rep2)
	if err != nil || strings.Contains(string(b2), "\n  \"warnings\":") {
		t.Errorf("a finite report: %v, or a top-level warnings key", err)
	}
}
