package parse

import (
	"strings"
	"testing"
)

const memoSrc = "---\ntitle: Pump station\nrate: 6% nominal monthly\nprepared by: Capital Planning\n---\n\n" +
	"Intro with `= pw(a)` and `code`.\n\n" +
	"```assume\nflow = 1,250 # m3/day\nprice = 0.11 ~ triangular(0.09, 0.11, 1,500)\n```\n\n" +
	"```alternative a\nname: Pump A # the small one\nlife: 20\nfirst cost: $480k\nannual cost from year 3 to year 18: 900 escalating 2%\ncost every 5 years from year 5: 7k\nsalvage: 10k\n```\n\n" +
	"- a list\n\n  ```compare c\n  alternatives: a\n  horizon: study period 30 years\n  show: pw, irr\n  ```\n"

func TestParsePositions(t *testing.T) {
	m, err := Parse("m.md", []byte(memoSrc))
	if err != nil {
		t.Fatal(err)
	}
	if m.Front.Title.Value.Src != "Pump station" || m.Front.Title.Value.Pos.Line != 2 {
		t.Errorf("title: %+v", m.Front.Title)
	}
	r := m.Front.Rate
	if r == nil || r.Mode != "nominal" || r.PerYear != 12 || r.Value.Src != "6%" {
		t.Errorf("rate: %+v", r)
	}
	if len(m.Front.Extra) != 1 || m.Front.Extra[0].Key != "prepared by" {
		t.Errorf("extra keys: %+v", m.Front.Extra)
	}
	if len(m.Inline) != 1 {
		t.Fatalf("inline values: %d, want 1 (a code span without = is ordinary code)", len(m.Inline))
	}
	in := m.Inline[0]
	if in.Expr.Src != "pw(a)" || in.Expr.Pos.Line != 7 || in.Expr.Pos.Col != 15 {
		t.Errorf("inline value %q at %v, want pw(a) at 7:15", in.Expr.Src, in.Expr.Pos)
	}
	if got := memoSrc[in.Offset:in.End]; got != "= pw(a)" {
		t.Errorf("inline offsets cover %q", got)
	}
	if len(m.Blocks) != 3 {
		t.Fatalf("blocks: %d, want 3", len(m.Blocks))
	}
	as := m.Blocks[0].(*Assume)
	if len(as.Items) != 2 || as.Items[0].Expr.Src != "1,250" || as.Items[0].Expr.Pos.Col != 8 {
		t.Errorf("assume: %+v", as.Items[0])
	}
	d := as.Items[1].Dist
	if d == nil || d.Kind != "triangular" || len(d.Args) != 3 || d.Args[2].Src != "1,500" {
		t.Errorf("distribution: %+v", d)
	}
	alt := m.Blocks[1].(*Alternative)
	if alt.ID != "a" || alt.DisplayName() != "Pump A" || alt.Life.Src != "20" {
		t.Errorf("alternative: id %q name %q", alt.ID, alt.DisplayName())
	}
	if len(alt.Lines) != 4 {
		t.Fatalf("money lines: %d, want 4", len(alt.Lines))
	}
	an := alt.Lines[1]
	if an.Kind != Annual || an.From.Src != "3" || an.To.Src != "18" || an.Escalating == nil || an.Escalating.Src != "2%" || an.Amount.Src != "900" {
		t.Errorf("annual line: %+v", an)
	}
	if an.From.Pos.Line != 18 || an.From.Pos.Col != 23 {
		t.Errorf("from year at %v, want 18:23", an.From.Pos)
	}
	per := alt.Lines[2]
	if per.Kind != Periodic || per.Every.Src != "5" || per.From.Src != "5" || per.To != nil {
		t.Errorf("periodic line: %+v", per)
	}
	c := m.Blocks[2].(*Compare)
	if c.Horizon == nil || c.Horizon.Kind != "study period" || c.Horizon.Years.Src != "30" {
		t.Errorf("horizon: %+v", c.Horizon)
	}
	if len(c.Show) != 2 || c.Show[0].Value.Src != "present worth" || c.Show[1].Value.Src != "irr" {
		t.Errorf("show: %+v", c.Show)
	}
	if c.Pos.Line != 25 || c.Pos.Col != 6 || c.Alternatives[0].Pos.Line != 26 || c.Alternatives[0].Pos.Col != 17 {
		t.Errorf("compare inside a list at %v, its first alternative at %v", c.Pos, c.Alternatives[0].Pos)
	}
}

func TestParseErrorsAreCollected(t *testing.T) {
	src := "---\nrat: 7%\n---\n\n```alternative\n```\n\n```alternative x\nfrist cost: 5\nlife: 5\nlife: 6\n```\n\n```alternative x\n```\n"
	_, err := Parse("e.md", []byte(src))
	list, ok := err.(ErrorList)
	if !ok {
		t.Fatalf("want an ErrorList, got %v", err)
	}
	want := []string{
		`e.md:2:1: unknown front matter key "rat"; did you mean "rate"?`,
		"e.md:5:15: an alternative block needs an id",
		`e.md:9:1: unknown line "frist cost" in alternative x`,
		"e.md:11:1: life is given twice in alternative x (first at line 10)",
		`e.md:14:16: duplicate alternative id "x" (first defined at line 8)`,
	}
	if len(list) != len(want) {
		t.Fatalf("got %d errors, want %d:\n%v", len(list), len(want), list)
	}
	for i, w := range want {
		if !strings.HasPrefix(list[i].Error(), w) {
			t.Errorf("error %d:\n got %s\nwant %s...", i, list[i].Error(), w)
		}
	}
}

func TestSplitArgs(t *testing.T) {
	for _, c := range []struct {
		in   string
		want []string
	}{
		{"0.09, 0.11, 0.15", []string{"0.09", " 0.11", " 0.15"}},
		{"1,250,000, 2,000", []string{"1,250,000", " 2,000"}},
		{"pf(7%, 10), 3", []string{"pf(7%, 10)", " 3"}},
		{`"a,b", c`, []string{`"a,b"`, " c"}},
		{"7,100", []string{"7,100"}},
		{"7,10", []string{"7", "10"}},
	} {
		var got []string
		for _, a := range SplitArgs(c.in) {
			got = append(got, a.S)
		}
		if strings.Join(got, "|") != strings.Join(c.want, "|") {
			t.Errorf("SplitArgs(%q) = %q, want %q", c.in, got, c.want)
		}
	}
}

func TestRateSpec(t *testing.T) {
	for _, c := range []struct {
		in, value, mode string
		per             int
		bad             bool
	}{
		{"7%", "7%", "", 0, false},
		{"0.07", "0.07", "", 0, false},
		{"6% nominal monthly", "6%", "nominal", 12, false},
		{"8% nominal compounded quarterly", "8%", "nominal", 4, false},
		{"5% compounded semiannually", "5%", "nominal", 2, false},
		{"8% continuous", "8%", "continuous", 0, false},
		{"8% compounded continuously", "8%", "continuous", 0, false},
		{"3% real", "3%", "real", 0, false},
		{"7% effective", "7%", "", 0, false},
		{"realr real", "realr", "real", 0, false},
		{"nominal_rate nominal monthly", "nominal_rate", "nominal", 12, false},
		{"6% nominal fortnightly", "", "", 0, true},
		{"nominal monthly", "", "", 0, true},
	} {
		p := &parser{memo: &Memo{File: "r.md"}}
		rs := p.rateSpec(Text{Src: c.in, Pos: Pos{File: "r.md", Line: 1, Col: 1}})
		if c.bad {
			if rs != nil || len(p.errs) != 1 {
				t.Errorf("%q: want one error, got %v and %v", c.in, rs, p.errs)
			}
			continue
		}
		if rs == nil || rs.Value.Src != c.value || rs.Mode != c.mode || rs.PerYear != c.per {
			t.Errorf("%q: got %+v (errors %v)", c.in, rs, p.errs)
		}
	}
}

func TestStripComment(t *testing.T) {
	for in, want := range map[string]string{
		"a = 5 # five":          "a = 5 ",
		`name: "Pump #2" # yes`: `name: "Pump #2" `,
		"no comment":            "no comment",
	} {
		if got := stripComment(in); got != want {
			t.Errorf("stripComment(%q) = %q, want %q", in, got, want)
		}
	}
}

// TestKeyLines: the blocks read as "key: value" lines report a line without
// a colon, a key given twice (after its synonym is mapped) and a key
// without a value, and keep reading.
func TestKeyLines(t *testing.T) {
	src := "```compare c\nhorizon perpetual\nrate: 5%\nrate: 6%\nbase:\n```\n\n" +
		"```replacement r\ndefender: a\nchallenger: b\nmarket value: 10k declining 10%\ndefender market value: 12k declining 10%\n```\n"
	_, err := Parse("k.md", []byte(src))
	list, _ := err.(ErrorList)
	want := []string{
		`k.md:2:1: expected "key: value" in compare c; got "horizon perpetual"`,
		"k.md:4:1: rate is given twice in compare c (first at line 3)",
		"k.md:5:6: base has no value after the colon",
		"k.md:12:1: market value is given twice in replacement r (first at line 11)",
	}
	if len(list) != len(want) {
		t.Fatalf("got %d errors, want %d:\n%v", len(list), len(want), err)
	}
	for i, w := range want {
		if list[i].Error() != w {
			t.Errorf("error %d:\n got %s\nwant %s", i, list[i].Error(), w)
		}
	}
}
