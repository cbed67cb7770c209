package compute_test

import (
	"reflect"
	"strconv"
	"strings"
	"testing"

	"worth/compute"
	"worth/parse"
)

// diffMemo is a memo whose copies the diff tests change.
const diffMemo = `---
title: Screens
rate: 7%
---

` + "```assume" + `
price = 0.11
kwh = 40,000
` + "```" + `

` + "```alternative steel" + `
life: 20
first cost: 400k
annual cost: kwh * price
salvage: 10k
` + "```" + `

` + "```alternative mesh" + `
life: 20
first cost: 600k          # a comment is not part of the input
annual cost: 30k
cost every 5 years: 15k
cash flows from: extra.csv
` + "```" + `

` + "```compare screens" + `
show: present worth, annual worth
` + "```" + `

` + "```expect" + `
best(screens) == "steel"
` + "```" + `
`

const diffCSV = "year,amount\n3,-2000\n4,-2500\n"

func computeDiffMemo(t *testing.T, name, src, csv string) *compute.Report {
	t.Helper()
	m, err := parse.ParseWith(name, []byte(src), parse.Options{Resolve: memFiles(map[string]string{"extra.csv": csv})})
	if err != nil {
		t.Fatal(err)
	}
	rep, err := compute.Compute(m)
	if err != nil {
		t.Fatal(err)
	}
	return rep
}

// editOnce applies replacements that must each match once.
func editOnce(t *testing.T, s string, pairs ...string) string {
	t.Helper()
	for i := 0; i < len(pairs); i += 2 {
		if strings.Count(s, pairs[i]) != 1 {
			t.Fatalf("%q occurs %d times", pairs[i], strings.Count(s, pairs[i]))
		}
		s = strings.Replace(s, pairs[i], pairs[i+1], 1)
	}
	return s
}

// lineOf is the number of the line of src that holds text (once).
func lineOf(t *testing.T, src, text string) string {
	t.Helper()
	if strings.Count(src, text) != 1 {
		t.Fatalf("%q occurs %d times", text, strings.Count(src, text))
	}
	return strconv.Itoa(strings.Count(src[:strings.Index(src, text)], "\n") + 1)
}

// change is an InputChange without its values, for exact comparison.
type change struct {
	Block, Name, OldAt, NewAt, Old, New, Change string
}

func changesOf(cs []compute.InputChange) []change {
	var out []change
	for _, c := range cs {
		out = append(out, change{c.Block, c.Name, c.OldAt, c.NewAt, c.Old, c.New, c.Change})
	}
	return out
}

// TestDiffInputs: a memo and a changed copy give exactly the lines that
// changed, were added or were removed, by block and line, with their old
// and new text and values; the lines whose text is the same but whose
// value follows a changed input are listed apart; a comment change is no
// change.
func TestDiffInputs(t *testing.T) {
	old := computeDiffMemo(t, "m.md", diffMemo, diffCSV)
	newSrc := editOnce(t, diffMemo,
		"price = 0.11", "price = 0.09",
		"first cost: 600k          # a comment is not part of the input", "first cost: 150k          # another comment",
		"cost every 5 years: 15k\n", "",
		"annual cost: kwh * price\n", "annual cost: kwh * price\ncost at year 10: 20k\n",
		"show: present worth, annual worth\n", "show: present worth, annual worth\nhorizon: study period 15\n",
	)
	newRep := computeDiffMemo(t, "m.md", newSrc, "year,amount\n3,-2000\n4,-2600\n")
	rev := compute.Diff(old, newRep)

	// Lines as the two sources number them.
	o := func(text string) string { return lineOf(t, diffMemo, text) }
	n := func(text string) string { return lineOf(t, newSrc, text) }
	want := []change{
		{"assume", "price", o("price ="), n("price ="), "0.11", "0.09", compute.RevChanged},
		{"alternative steel", "cost at year 10", "", n("cost at year 10"), "", "20k", compute.RevAdded},
		{"alternative mesh", "first cost", o("first cost: 600k"), n("first cost: 150k"), "600k", "150k", compute.RevChanged},
		{"alternative mesh", "cost every 5 years", o("cost every 5"), "", "15k", "", compute.RevRemoved},
		{"alternative mesh", "cost at year 4", "extra.csv:3", "extra.csv:3", "2500", "2600", compute.RevChanged},
		{"compare screens", "horizon", "", n("horizon:"), "", "study period 15", compute.RevAdded},
	}
	if got := changesOf(rev.Inputs); !reflect.DeepEqual(got, want) {
		t.Errorf("inputs:\n got: %+v\nwant: %+v", got, want)
	}
	wantFollows := []change{{"alternative steel", "annual cost", o("kwh * price"), n("kwh * price"), "kwh * price", "kwh * price", compute.RevChanged}}
	if got := changesOf(rev.Follows); !reflect.DeepEqual(got, wantFollows) {
		t.Errorf("follows:\n got: %+v\nwant: %+v", got, wantFollows)
	}
	// Values: as evaluated in each version.
	if c := rev.Inputs[0]; *c.OldValue != 0.11 || *c.NewValue != 0.09 {
		t.Errorf("price: values %v, %v", *c.OldValue, *c.NewValue)
	}
	if c := rev.Follows[0]; *c.OldValue != 40000*0.11 || *c.NewValue != 40000*0.09 {
		t.Errorf("steel's annual cost: values %v, %v; want 4400 and 3600", *c.OldValue, *c.NewValue)
	}
	if c := rev.Inputs[2]; *c.OldValue != 600000 || *c.NewValue != 150000 {
		t.Errorf("mesh's first cost: values %v, %v", *c.OldValue, *c.NewValue)
	}
}

// TestDiffResults: every measure of every alternative appears with its
// old and new value (those of each version's own report) and the change
// between them; a changed recommendation is flagged; an expectation that
// held and now fails is listed.
func TestDiffResults(t *testing.T) {
	old := computeDiffMemo(t, "m.md", diffMemo, diffCSV)
	// Mesh becomes cheaper than steel both to buy (150k against 400k)
	// and to run (3k a year against 4,400, plus small periodic and CSV
	// amounts), so by inspection it must now be recommended.
	newRep := computeDiffMemo(t, "m.md", editOnce(t, diffMemo, "first cost: 600k", "first cost: 150k", "annual cost: 30k", "annual cost: 3k"), diffCSV)
	if old.Comparisons[0].Recommended != "steel" || newRep.Comparisons[0].Recommended != "mesh" {
		t.Fatalf("the test memo does not change its recommendation: %s, then %s", old.Comparisons[0].Recommended, newRep.Comparisons[0].Recommended)
	}
	rev := compute.Diff(old, newRep)
	if len(rev.Comparisons) != 1 {
		t.Fatalf("%d comparisons", len(rev.Comparisons))
	}
	c := rev.Comparisons[0]
	if !c.RecommendationChanged || c.OldBest != "steel" || c.NewBest != "mesh" {
		t.Errorf("recommendation: changed %v, %q to %q", c.RecommendationChanged, c.OldBest, c.NewBest)
	}
	type key struct{ alt, m string }
	got := map[key]compute.MeasureChange{}
	for _, m := range c.Measures {
		got[key{m.Alt, m.Measure}] = m
	}
	for k, r := range old.Comparisons[0].Results {
		nr := newRep.Comparisons[0].Results[k]
		for _, m := range []struct {
			name     string
			old, new float64
		}{{"present worth", r.PW, nr.PW}, {"annual worth", r.AW, nr.AW}} {
			mc, ok := got[key{r.Alt.ID, m.name}]
			if !ok {
				t.Errorf("%s of %s is missing", m.name, r.Alt.ID)
				continue
			}
			if *mc.Old != m.old || *mc.New != m.new || *mc.Delta != m.new-m.old {
				t.Errorf("%s of %s: %v -> %v (%v); want %v -> %v", m.name, r.Alt.ID, *mc.Old, *mc.New, *mc.Delta, m.old, m.new)
			}
		}
	}
	if len(c.Measures) != 4 {
		t.Errorf("%d measures; want present and annual worth of two alternatives", len(c.Measures))
	}
	line, _ := strconv.Atoi(lineOf(t, diffMemo, "best(screens)"))
	wantX := []compute.ExpectationChange{{Text: `best(screens) == "steel"`, Line: line, Old: "holds", New: "fails"}}
	if !reflect.DeepEqual(rev.Expectations, wantX) {
		t.Errorf("expectations: %+v", rev.Expectations)
	}
}

// TestDiffUnchanged: a memo against itself has no changes, every measure
// moves by zero, and no recommendation changes.
func TestDiffUnchanged(t *testing.T) {
	a := computeDiffMemo(t, "m.md", diffMemo, diffCSV)
	b := computeDiffMemo(t, "m.md", diffMemo, diffCSV)
	rev := compute.Diff(a, b)
	if len(rev.Inputs)+len(rev.Follows)+len(rev.Expectations) != 0 {
		t.Errorf("changes in an unchanged memo: %+v %+v %+v", rev.Inputs, rev.Follows, rev.Expectations)
	}
	for _, c := range rev.Comparisons {
		if c.RecommendationChanged {
			t.Errorf("%s: recommendation changed", c.ID)
		}
		for _, m := range c.Measures {
			if m.Delta == nil || *m.Delta != 0 {
				t.Errorf("%s %s moved by %v", m.Alt, m.Measure, m.Delta)
			}
		}
	}
}
