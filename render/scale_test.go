package render

import (
	"fmt"
	"strings"
	"testing"

	"worth/compute"
	"worth/parse"
)

// manyMemo writes a memo of n invented alternatives (roof coatings for a
// depot) with benefits, compared over a study period by present worth.
func manyMemo(n int) string {
	var b strings.Builder
	b.WriteString("---\ntitle: Depot roof coatings\nrate: 6%\n---\n\n")
	for k := 1; k <= n; k++ {
		fmt.Fprintf(&b, "```alternative c%02d\nname: Coating %d\nlife: %d\nfirst cost: %dk\nannual cost: %d\nannual benefit: %d\nsalvage: %dk\n```\n\n",
			k, k, 8+k%5*3, 60+(k*37)%90, 1500+(k*211)%900, 14000+(k*733)%6000, k%4)
	}
	b.WriteString("```compare roofs\nhorizon: study period 20\nshow: present worth, annual worth, irr, payback\n```\n")
	return b.String()
}

func manyReport(t *testing.T, n int) *compute.Report {
	t.Helper()
	m, err := parse.Parse("roofs.md", []byte(manyMemo(n)))
	if err != nil {
		t.Fatal(err)
	}
	rep, err := compute.Compute(m)
	if err != nil {
		t.Fatal(err)
	}
	return rep
}

// docParts finds a comparison's results table and its charts in a
// document.
func docParts(doc *Doc) (results *Table, charts []Chart) {
	walk(doc.Body, func(n Node) {
		switch x := n.(type) {
		case Table:
			if strings.HasPrefix(x.Caption, "Comparison ") && results == nil {
				results = &x
			}
		case Chart:
			if x.Kind == "lines" {
				charts = append(charts, x)
			}
		}
	})
	return results, charts
}

// TestManyAlternatives: past six alternatives the results table has a row
// an alternative, best first by present worth, the recommendation in bold
// and each figure's trace carried along; the charts draw the six leaders
// with a note. Up to six, a row a measure and every alternative drawn.
func TestManyAlternatives(t *testing.T) {
	for _, n := range []int{3, 6, 7, 40} {
		rep := manyReport(t, n)
		c := rep.Comparisons[0]
		results, charts := docParts(BuildDoc(rep, DocOptions{}))
		if results == nil || len(charts) != 2 {
			t.Fatalf("n=%d: results table %v, %d line charts", n, results != nil, len(charts))
		}
		if n <= manySeries {
			if results.Header[0] != "Measure" || len(results.Header) != n+1 || len(results.Rows) != 4 {
				t.Errorf("n=%d: header %q with %d rows, want a row a measure", n, results.Header, len(results.Rows))
			}
			for _, ch := range charts {
				if len(ch.Series) != n || len(ch.Notes) != 0 {
					t.Errorf("n=%d: %s draws %d series with notes %q", n, ch.Title, len(ch.Series), ch.Notes)
				}
			}
			continue
		}
		want := []string{"Rank", "Alternative", "Present worth", "Annual worth", "Rate of return", "Payback"}
		if strings.Join(results.Header, "|") != strings.Join(want, "|") {
			t.Errorf("n=%d: header %q, want %q", n, results.Header, want)
		}
		if len(results.Rows) != n || len(results.Trace) != n || len(results.BoldRows) != n {
			t.Fatalf("n=%d: %d rows, %d trace rows, %d bold flags", n, len(results.Rows), len(results.Trace), len(results.BoldRows))
		}
		byName := map[string]*compute.Result{}
		for _, r := range c.Results {
			byName[r.Alt.Name] = r
		}
		f := NewFormat(rep, true)
		last := 0.0
		for k, row := range results.Rows {
			r := byName[row[1]]
			if r == nil {
				t.Fatalf("n=%d: row %d names %q", n, k, row[1])
			}
			if row[0] != fmt.Sprint(k+1) || row[2] != f.Money(r.PW) || row[3] != f.Money(r.AW) {
				t.Errorf("n=%d: row %d is %q, want rank %d and %s's worths %s, %s", n, k, row, k+1, r.Alt.ID, f.Money(r.PW), f.Money(r.AW))
			}
			if k > 0 && r.PW > last {
				t.Errorf("n=%d: row %d (%s) is worth more than the row above", n, k, r.Alt.ID)
			}
			last = r.PW
			if results.BoldRows[k] != (r.Alt.ID == c.Recommended) {
				t.Errorf("n=%d: row %d (%s) bold %v, recommended %s", n, k, r.Alt.ID, results.BoldRows[k], c.Recommended)
			}
			if tr := results.Trace[k][2]; !strings.Contains(tr.Title, r.Alt.Name) || tr.Href != "#"+workID(c, r) {
				t.Errorf("n=%d: row %d present worth traced to %+v", n, k, tr)
			}
		}
		if !strings.Contains(results.Note, "One row an alternative, in order of present worth, best first.") {
			t.Errorf("n=%d: note %q", n, results.Note)
		}
		for _, ch := range charts {
			if len(ch.Series) != manySeries || len(ch.Notes) != 1 || !strings.Contains(ch.Alt, ch.Notes[0]) {
				t.Errorf("n=%d: %s draws %d series, notes %q", n, ch.Title, len(ch.Series), ch.Notes)
			}
			drawn := map[string]bool{}
			for _, s := range ch.Series {
				drawn[s.Name] = true
			}
			for _, id := range []string{c.Recommended, c.RunnerUp} {
				if !drawn[name(c, id)] {
					t.Errorf("n=%d: %s leaves out %s", n, ch.Title, id)
				}
			}
			for k, id := range c.Ranking[:manySeries] {
				if ch.Series[k].Name != name(c, id) {
					t.Errorf("n=%d: %s series %d is %s, want %s (rank %d)", n, ch.Title, k, ch.Series[k].Name, name(c, id), k+1)
				}
			}
		}
		md := string(Markdown(rep))
		head := "| Rank | Alternative | Present worth | Annual worth | Rate of return | Payback |\n| ---: | --- | ---: | ---: | ---: | ---: |\n| 1 | " + name(c, c.Ranking[0]) + " |"
		if !strings.Contains(md, head) {
			t.Errorf("n=%d: the Markdown results table does not start %q", n, head)
		}
	}
}

// TestChartResultsKeepLeaders: the leaders are drawn even when a tie puts
// the recommendation below the six of highest present worth.
func TestChartResultsKeepLeaders(t *testing.T) {
	c := &compute.Comparison{}
	for k := 0; k < 10; k++ {
		id := fmt.Sprintf("a%d", k)
		c.Results = append(c.Results, &compute.Result{Alt: &compute.Alternative{ID: id}})
		c.Ranking = append(c.Ranking, id)
	}
	c.Recommended, c.RunnerUp = "a8", "a0"
	var got []string
	for _, r := range chartResults(c) {
		got = append(got, r.Alt.ID)
	}
	if want := "a0 a1 a2 a3 a4 a8"; strings.Join(got, " ") != want {
		t.Errorf("drawn %q, want %q", got, want)
	}
}
