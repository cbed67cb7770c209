package compute_test

import (
	"fmt"
	"reflect"
	"strings"
	"testing"

	"worth/compute"
	"worth/parse"
)

// memFiles is a parse.Resolver over files held in memory: compute reads no
// files, and neither do its tests.
func memFiles(files map[string]string) parse.Resolver {
	return func(path string) (string, []byte, error) {
		s, ok := files[path]
		if !ok {
			return "", nil, fmt.Errorf("no such file %s", path)
		}
		return path, []byte(s), nil
	}
}

// TestCSVFlowsEqualLines: an alternative whose flows come from a CSV file
// ("cash flows from:") gives exactly the results of the same flows written
// as lines, on every horizon and for both CSV styles (signed amounts, or a
// kind column): the same year-by-year flows by category, the same present,
// annual and future worth, rates of return, ratios, paybacks and worked
// equations' values. Exact equality, not a tolerance: the rows become the
// same items as the lines, in the same order.
func TestCSVFlowsEqualLines(t *testing.T) {
	cases := []struct {
		name    string
		lines   string // the money lines of the written alternative
		csv     string
		horizon string
	}{
		{
			name:    "signed amounts, study period cutting the second cycle",
			lines:   "first cost: 120000\nbenefit at year 1: 30000\nbenefit at year 2: 31000\ncost at year 3: 8000\nbenefit at year 3: 32000\nbenefit at year 4: 33000\nbenefit at year 5: 28000\n",
			csv:     "year,amount\n0,-120000\n1,30000\n2,\"31,000\"\n3,(8000)\n3,32000\n4,$33000\n5,28000\n",
			horizon: "study period 8",
		},
		{
			name:    "kind column with salvage and disbenefit, repeated lives",
			lines:   "first cost: 250k\nbenefit at year 1: 61000\nbenefit at year 2: 61000\ndisbenefit at year 2: 4000\nbenefit at year 3: 64000\ncost at year 3: 15000\nbenefit at year 4: 64000\nsalvage: 20000\n",
			csv:     "# prepared by the consultant\nYear, Amount, Kind, Note\n0,250000,cost,purchase\n1,61000,benefit\n2,61000,benefit\n2,4000,disbenefit,noise\n3,64000,benefit\n3,15000,cost,overhaul\n4,64000,benefit\n4,20000,salvage\n",
			horizon: "repeat lives",
		},
		{
			name:    "kind column, perpetual horizon",
			lines:   "first cost: 90000\ncost at year 2: 5000\nbenefit at year 1: 26000\nbenefit at year 2: 26000\nbenefit at year 3: 26000\nbenefit at year 4: 26000\nbenefit at year 5: 26000\nsalvage: 6000\n",
			csv:     "year,kind,amount\n0,cost,90000\n2,cost,5000\n1,benefit,26000\n2,benefit,26000\n3,benefit,26000\n4,benefit,26000\n5,benefit,26000\n5,salvage,6000\n",
			horizon: "perpetual",
		},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			life := "4"
			if strings.Contains(c.lines, "year 5") {
				life = "5"
			}
			src := "---\nrate: 8%\n---\n\n" +
				"```alternative written\nlife: " + life + "\n" + c.lines + "```\n\n" +
				"```alternative fromcsv\nlife: " + life + "\ncash flows from: flows.csv\n```\n\n" +
				"```alternative other\nlife: 6\nfirst cost: 100k\nannual benefit: 24k\n```\n\n" +
				"```compare c\nhorizon: " + c.horizon + "\nshow: present worth, annual worth, future worth, irr, benefit-cost, modified benefit-cost, payback, discounted payback\n```\n"
			m, err := parse.ParseWith("m.md", []byte(src), parse.Options{Resolve: memFiles(map[string]string{"flows.csv": c.csv})})
			if err != nil {
				t.Fatal(err)
			}
			rep, err := compute.Compute(m)
			if err != nil {
				t.Fatal(err)
			}
			res := map[string]*compute.Result{}
			for _, r := range rep.Comparisons[0].Results {
				res[r.Alt.ID] = r
			}
			w, f := res["written"], res["fromcsv"]
			if w.Alt.FirstCost != f.Alt.FirstCost {
				t.Errorf("first cost: lines %v, CSV %v", w.Alt.FirstCost, f.Alt.FirstCost)
			}
			if len(w.Alt.Items) != len(f.Alt.Items) {
				t.Fatalf("items: lines %d, CSV %d", len(w.Alt.Items), len(f.Alt.Items))
			}
			for k := range w.Alt.Items {
				a, b := *w.Alt.Items[k], *f.Alt.Items[k]
				if b.File != "flows.csv" {
					t.Errorf("item %d: File %q, want flows.csv", k, b.File)
				}
				a.Line, a.Label, a.File, b.Line, b.Label, b.File = 0, "", "", 0, "", ""
				if a != b {
					t.Errorf("item %d: lines %+v, CSV %+v", k, a, b)
				}
			}
			same := func(what string, x, y any) {
				if !reflect.DeepEqual(x, y) {
					t.Errorf("%s: lines %v, CSV %v", what, x, y)
				}
			}
			same("present worth", w.PW, f.PW)
			same("annual worth", w.AW, f.AW)
			same("future worth", w.FW, f.FW)
			same("rates of return", w.IRRRoots, f.IRRRoots)
			same("benefit-cost", w.BC, f.BC)
			same("modified benefit-cost", w.ModifiedBC, f.ModifiedBC)
			same("payback", w.Payback, f.Payback)
			same("discounted payback", w.DiscPayback, f.DiscPayback)
			same("present worth by category", w.ByCategory, f.ByCategory)
			if len(w.Flows) != len(f.Flows) {
				t.Fatalf("years of flows: lines %d, CSV %d", len(w.Flows), len(f.Flows))
			}
			for k := range w.Flows {
				a, b := w.Flows[k], f.Flows[k]
				a.Notes, b.Notes = nil, nil
				same(fmt.Sprintf("flows of year %d", a.Year), a, b)
			}
			if len(w.Work) != len(f.Work) {
				t.Fatalf("worked equations: lines %d, CSV %d", len(w.Work), len(f.Work))
			}
			for k := range w.Work {
				same("worked equation "+w.Work[k].LHS, w.Work[k].Value, f.Work[k].Value)
			}
		})
	}
}

// TestCSVFlowErrors: mistakes in a cash-flow CSV are reported at the CSV's
// own lines and columns, all at once, beside the memo's own errors.
func TestCSVFlowErrors(t *testing.T) {
	cases := []struct {
		name, csv string
		life      string
		want      []string
	}{
		{"no header", "0,-1000\n1,300\n", "5",
			[]string{`f.csv:1:1: the first row must be a header naming the columns, e.g. "year,amount"; got "0,-1000"`}},
		{"misspelt column", "yaer,amount\n0,-1000\n", "5",
			[]string{`f.csv:1:1: unknown column "yaer" in the header; expected year, amount and optionally kind and note; did you mean "year"?`}},
		{"missing amount column", "year,kind\n0,cost\n", "5",
			[]string{`f.csv:1:1: the header has no amount column; expected e.g. "year,amount" (costs negative) or "year,amount,kind"`}},
		{"bad cells, every one reported", "year,amount\n0,-1000\n1.5,300\n2,3oo\n-1,5\n", "5",
			[]string{
				`f.csv:3:1: the year must be a whole number of years from 0, got "1.5"`,
				`f.csv:4:3: the amount must be a number, e.g. -12500 or 12,500, got "3oo"`,
				`f.csv:5:1: the year must be a whole number of years from 0, got "-1"`,
			}},
		{"kind misspelt and a negative amount with a kind", "year,amount,kind\n0,1000,cots\n1,-50,benefit\n", "5",
			[]string{
				`f.csv:2:8: unknown kind "cots"; expected cost, benefit, disbenefit or salvage; did you mean "cost"?`,
				`f.csv:3:3: with a kind column, amounts are written as positive numbers and the kind says which way the money goes, got -50`,
			}},
		{"year past the life and salvage before the end", "year,amount,kind\n0,1000,cost\n7,50,benefit\n3,100,salvage\n", "5",
			[]string{
				`f.csv:3:1: year 7 is past the life of a (5 years); years count from the start of each life cycle`,
				`f.csv:4:1: salvage falls at the end of a life, year 5 of a, not at year 3`,
			}},
		{"quote never closed", "year,amount\n0,\"-1000\n", "5",
			[]string{`f.csv:2:1: cannot read the CSV: a quote opened in this row is never closed`}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := "---\nrate: 8%\n---\n\n```alternative a\nlife: " + c.life + "\ncash flows from: f.csv\n```\n\n```compare c\n```\n"
			m, perr := parse.ParseWith("m.md", []byte(src), parse.Options{Resolve: memFiles(map[string]string{"f.csv": c.csv})})
			_, cerr := compute.Compute(m)
			var got []string
			for _, err := range []error{perr, cerr} {
				if list, ok := err.(parse.ErrorList); ok {
					for _, e := range list {
						got = append(got, e.Error())
					}
				}
			}
			if !reflect.DeepEqual(got, c.want) {
				t.Errorf("errors:\n got: %q\nwant: %q", got, c.want)
			}
		})
	}
}
