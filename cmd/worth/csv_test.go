package main

import (
	"encoding/csv"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// csvMemo is a memo whose alternative reads its flows from PATH.
const csvMemo = "---\nrate: 7%\n---\n\n```alternative a\nlife: 3\ncash flows from: PATH\n```\n\n```compare c\n```\n"

// TestCashFlowsFrom: the folder rule, the size bound and a missing file,
// each reported at the "cash flows from:" line; --allow-outside lifts the
// folder rule; errors inside the CSV name the CSV's own lines.
func TestCashFlowsFrom(t *testing.T) {
	root := t.TempDir()
	dir := filepath.Join(root, "memo")
	if err := os.MkdirAll(filepath.Join(dir, "data"), 0o755); err != nil {
		t.Fatal(err)
	}
	good := "year,amount\n0,-1000\n1,400\n2,400\n3,400\n"
	writeFile(t, filepath.Join(dir, "data", "flows.csv"), good)
	writeFile(t, filepath.Join(root, "outside.csv"), good)
	writeFile(t, filepath.Join(dir, "big.csv"), "year,amount\n"+strings.Repeat("1,1\n", maxIncludeBytes/4+1))
	writeFile(t, filepath.Join(dir, "bad.csv"), "year,amount\n0,-1000\n1,four hundred\n")
	symlinked := true
	if err := os.Symlink(filepath.Join(root, "outside.csv"), filepath.Join(dir, "link.csv")); err != nil {
		symlinked = false // a file system without symbolic links
	}
	memo := filepath.Join(dir, "m.md")
	at := memo + ":7:18: "
	cases := []struct {
		path  string
		flags []string
		code  int
		err   string // standard error; "" for none
	}{
		{"data/flows.csv", nil, 0, ""},
		{"./data/../data/flows.csv", nil, 0, ""},
		{"../outside.csv", nil, 2, at + `cannot read cash flows from "../outside.csv": ` + filepath.ToSlash(filepath.Join(dir, "..", "outside.csv")) + ` is outside the memo's folder (` + filepath.ToSlash(dir) + `); a memo reads only files in its own folder, unless --allow-outside is given` + "\n"},
		{"../outside.csv", []string{"--allow-outside"}, 0, ""},
		{filepath.Join(root, "outside.csv"), nil, 2, at + `cannot read cash flows from "` + filepath.Join(root, "outside.csv") + `": ` + filepath.ToSlash(filepath.Join(root, "outside.csv")) + ` is outside the memo's folder (` + filepath.ToSlash(dir) + `); a memo reads only files in its own folder, unless --allow-outside is given` + "\n"},
		{"missing.csv", nil, 2, at + `cannot read cash flows from "missing.csv": no such file ` + filepath.Join(dir, "missing.csv") + "\n"},
		{"big.csv", nil, 2, at + `cannot read cash flows from "big.csv": the file is 1.0 MiB; a file a memo reads may be at most 1.0 MiB (split it, or summarize the flows by year) (raise it with --limit file-size=2MiB)` + "\n"},
		{"big.csv", []string{"--limit", "file-size=2MiB", "--limit", "lines=300000"}, 0, ""},
		{"bad.csv", nil, 2, filepath.Join(dir, "bad.csv") + `:3:3: the amount must be a number, e.g. -12500 or 12,500, got "four hundred"` + "\n"},
	}
	if symlinked {
		cases = append(cases, struct {
			path  string
			flags []string
			code  int
			err   string
		}{"link.csv", nil, 2, at + `cannot read cash flows from "link.csv": ` + filepath.ToSlash(filepath.Join(dir, "link.csv")) + ` is outside the memo's folder (` + filepath.ToSlash(dir) + `); a memo reads only files in its own folder, unless --allow-outside is given` + "\n"})
	}
	for _, c := range cases {
		t.Run(c.path+strings.Join(c.flags, ""), func(t *testing.T) {
			writeFile(t, memo, strings.Replace(csvMemo, "PATH", c.path, 1))
			code, _, stderr := worth(append([]string{"check", memo}, c.flags...)...)
			if code != c.code || stderr != c.err {
				t.Errorf("check: exit %d, want %d; standard error\n got: %q\nwant: %q", code, c.code, stderr, c.err)
			}
		})
	}
}

// TestFormatCSV: --format csv holds one row per comparison, alternative
// and year of every schedule, in the JSON output's order, and its columns
// add up: net = costs + benefits, the categories sum to the totals, the
// running totals accumulate, and the present worth is the sum of the
// discounted column (the JSON output's present worth, for a finite
// horizon).
func TestFormatCSV(t *testing.T) {
	atRoot(t)
	memo := filepath.Join("examples", "depot-roof.md")
	code, out, stderr := worth("build", memo, "--format", "csv", "-o", "-")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	rows, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	_, js, _ := worth("build", memo, "--format", "json", "-o", "-")
	var rep struct {
		Comparisons []struct {
			ID      string
			Years   *int
			Results []struct {
				Alternative  string
				PresentWorth float64 `json:"present_worth"`
			}
		}
	}
	if err := json.Unmarshal([]byte(js), &rep); err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for i, h := range rows[0] {
		col[h] = i
	}
	for _, need := range []string{"comparison", "alternative", "year", "costs", "benefits", "net", "discounted", "cumulative"} {
		if _, ok := col[need]; !ok {
			t.Fatalf("no %s column in %v", need, rows[0])
		}
	}
	v := func(r []string, name string) float64 {
		x, err := strconv.ParseFloat(r[col[name]], 64)
		if err != nil {
			t.Fatalf("%s %q: %v", name, r[col[name]], err)
		}
		return x
	}
	close := func(a, b float64) bool { return math.Abs(a-b) <= 1e-6*math.Max(1, math.Abs(b)) }
	k := 1
	for _, c := range rep.Comparisons {
		for _, res := range c.Results {
			sum, cum, year := 0.0, 0.0, 0
			for ; k < len(rows) && rows[k][col["comparison"]] == c.ID && rows[k][col["alternative"]] == res.Alternative; k++ {
				r := rows[k]
				if y := int(v(r, "year")); y != year {
					t.Fatalf("%s/%s: year %d, want %d", c.ID, res.Alternative, y, year)
				}
				year++
				if !close(v(r, "net"), v(r, "costs")+v(r, "benefits")) {
					t.Errorf("%s/%s year %s: net %s is not costs + benefits", c.ID, res.Alternative, r[col["year"]], r[col["net"]])
				}
				if !close(v(r, "costs"), v(r, "first_costs")+v(r, "other_costs")+v(r, "disbenefits")) ||
					!close(v(r, "benefits"), v(r, "other_benefits")+v(r, "salvage_and_residual")) {
					t.Errorf("%s/%s year %s: the categories do not add up to the totals", c.ID, res.Alternative, r[col["year"]])
				}
				cum += v(r, "net")
				sum += v(r, "discounted")
				if !close(v(r, "cumulative"), cum) || !close(v(r, "cumulative_discounted"), sum) {
					t.Errorf("%s/%s year %s: running totals %s, %s; want %v, %v", c.ID, res.Alternative, r[col["year"]], r[col["cumulative"]], r[col["cumulative_discounted"]], cum, sum)
				}
			}
			if c.Years == nil || year != *c.Years+1 {
				t.Fatalf("%s/%s: %d years of rows, want %v+1", c.ID, res.Alternative, year, c.Years)
			}
			if !close(sum, res.PresentWorth) {
				t.Errorf("%s/%s: discounted flows sum to %v, the present worth is %v", c.ID, res.Alternative, sum, res.PresentWorth)
			}
		}
	}
	if k != len(rows) {
		t.Errorf("%d rows left over after the last schedule", len(rows)-k)
	}
}
