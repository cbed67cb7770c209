package parse

import (
	"strings"
	"testing"
)

// TestTaxForms reads the loan line, the amounts key, the depreciation
// forms with a salvage and the replacement block, with their positions.
func TestTaxForms(t *testing.T) {
	src := "---\ntitle: T\nrate: 7%\namounts: Today's money\n---\n\n" +
		"```alternative a\nlife: 8\nfirst cost: 500k\nloan: 0.6 * 500k at 6% nominal monthly over 5 years\ndepreciation: declining balance 150% 8 to 20k\n```\n\n" +
		"```alternative b\nlife: 8\nfirst cost: 10k\ndepreciation: sum of years 8 to 1,000\n```\n\n" +
		"```replacement r\ndefender: a\nchallenger: b\nmarket value: 30,000, 24,000, 19,500\nchallenger market value: 10k declining 12%\nrate: 5%\n```\n"
	m, err := Parse("m.md", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if m.Front.Amounts.Value.Src != Constant {
		t.Errorf("amounts: %q, want %q", m.Front.Amounts.Value.Src, Constant)
	}
	a := m.Blocks[0].(*Alternative)
	l := a.Loan
	if l == nil || l.Amount.Src != "0.6 * 500k" || l.Years.Src != "5" || l.Rate == nil || l.Rate.Mode != "nominal" || l.Rate.PerYear != 12 {
		t.Fatalf("loan: %+v", l)
	}
	if l.Amount.Pos.Line != 10 || l.Amount.Pos.Col != 7 || l.Years.Pos.Col != 45 {
		t.Errorf("loan positions: amount %v, years %v", l.Amount.Pos, l.Years.Pos)
	}
	d := a.Depreciation
	if d == nil || d.Method != "declining balance" || d.Rate.Src != "150%" || d.Years.Src != "8" || d.To == nil || d.To.Src != "20k" {
		t.Errorf("declining balance: %+v", d)
	}
	if s := m.Blocks[1].(*Alternative).Depreciation; s == nil || s.Method != "sum of years" || s.To == nil || s.To.Src != "1,000" {
		t.Errorf("sum of years: %+v", s)
	}
	r := m.Blocks[2].(*Replacement)
	if r.Defender.ID != "a" || r.Challenger.ID != "b" || r.Rate == nil {
		t.Errorf("replacement: %+v", r)
	}
	if mv := r.DefenderValue; mv == nil || len(mv.List) != 3 || mv.List[1].Src != "24,000" || mv.List[1].Pos.Col != 23 {
		t.Errorf("market value list: %+v", mv)
	}
	if mv := r.ChallengerValue; mv == nil || mv.Declining == nil || mv.Start.Src != "10k" || mv.Declining.Src != "12%" {
		t.Errorf("challenger market value: %+v", mv)
	}
}

// TestTaxFormErrors: the forms' mistakes are reported where they are.
func TestTaxFormErrors(t *testing.T) {
	cases := []struct{ src, want string }{
		{"```alternative a\nfirst cost: 1\nloan: 1 for 2 years\n```\n", `m.md:3:7: cannot read loan "1 for 2 years"`},
		{"```replacement r\ndefender: a\n```\n", `m.md:1:4: replacement r needs a "challenger: ID" line`},
		{"```replacement r\ndefender: a\nchallenger: b\nmarket value: 5 declining\n```\n", `m.md:4:17: declining needs a rate after it`},
		{"```replacement r\ndefender: a\nchallenger: b\nmarkt value: 5\n```\n", `did you mean "market value"?`},
	}
	for _, tc := range cases {
		_, err := Parse("m.md", []byte(tc.src))
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%q: got %v, want %s", tc.src, err, tc.want)
		}
	}
}
