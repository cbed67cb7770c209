package parse

import (
	"strings"
	"testing"
)

// TestSensitivityLines: the forms of a sensitivity block's lines, with the
// positions of the names and values they hold.
func TestSensitivityLines(t *testing.T) {
	src := "```sensitivity s\n" + // line 1
		"compare: screens\n" +
		"vary: overhaul, power_price, rate by ±20%\n" +
		"vary: crew by +-35%   # comment\n" +
		"vary: fuel by +/-5%\n" +
		"vary: standby\n" +
		"range rate: 3% to 10%\n" +
		"range overhaul: 40k to 1.2M\n" +
		"breakeven: power_price, rate\n" +
		"```\n"
	m, err := Parse("s.md", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	s := m.Blocks[0].(*Sensitivity)
	if s.Compare == nil || s.Compare.ID != "screens" || s.Compare.Pos.Line != 2 || s.Compare.Pos.Col != 10 {
		t.Errorf("compare: %+v", s.Compare)
	}
	type vary struct {
		names string
		by    string
		col   int
	}
	want := []vary{{"overhaul,power_price,rate", "20%", 39}, {"crew", "35%", 17}, {"fuel", "5%", 18}, {"standby", "", 0}}
	if len(s.Vary) != len(want) {
		t.Fatalf("%d vary lines", len(s.Vary))
	}
	for k, w := range want {
		v := s.Vary[k]
		var names []string
		for _, n := range v.Names {
			names = append(names, n.ID)
		}
		if strings.Join(names, ",") != w.names || v.By.Src != w.by || (w.col > 0 && v.By.Pos.Col != w.col) {
			t.Errorf("vary %d: names %v, by %q at col %d; want %s, %q at %d", k, names, v.By.Src, v.By.Pos.Col, w.names, w.by, w.col)
		}
	}
	if n := s.Vary[0].Names[1]; n.Pos.Line != 3 || n.Pos.Col != 17 {
		t.Errorf("power_price at %v", n.Pos)
	}
	if len(s.Ranges) != 2 {
		t.Fatalf("%d ranges", len(s.Ranges))
	}
	r := s.Ranges[1]
	if r.Name.ID != "overhaul" || r.From.Src != "40k" || r.To.Src != "1.2M" || r.Name.Pos.Col != 7 || r.To.Pos.Col != 24 {
		t.Errorf("range: %+v", r)
	}
	if len(s.Breakevens) != 2 || s.Breakevens[1].ID != "rate" || s.Breakevens[1].Pos.Col != 25 {
		t.Errorf("breakevens: %+v", s.Breakevens)
	}
}

// TestAnalysisErrors: every malformed line of the analysis blocks is
// reported at its position, all at once.
func TestAnalysisErrors(t *testing.T) {
	src := "```sensitivity s\n" + // 1
		"vary: by 20%\n" + // 2
		"vary: a, b by\n" + // 3
		"vary: a by -20%\n" + // 4
		"range: 1 to 2\n" + // 5
		"range x: 1 .. 2\n" + // 6
		"brekeven: a\n" + // 7
		"vary: 2x\n" + // 8
		"```\n" +
		"```scenario sc\n" + // 10
		"rate: 5%\n" + // 11
		"a = 1\n" + // 12
		"a = 2\n" + // 13
		"b =\n" + // 14
		"```\n" +
		"```budget bu\n" + // 16
		"project: x\n" + // 17
		"```\n" +
		"```scenario empty\n```\n" // 19
	_, err := Parse("e.md", []byte(src))
	if err == nil {
		t.Fatal("no errors")
	}
	want := []string{
		"e.md:2:7: vary needs the inputs to swing",
		"e.md:3:12: \"by\" needs a percentage",
		"e.md:4:12: a swing is the same both ways",
		"e.md:5:1: range needs the input it sweeps",
		"e.md:6:10: expected \"A to B\" after range x:",
		"e.md:7:1: unknown line \"brekeven\" in sensitivity s",
		"did you mean \"breakeven\"?",
		"e.md:8:7: \"2x\" is not a name of an input",
		"e.md:11:1: in scenario sc, write an override as \"NAME = value\" (e.g. rate = 5%)",
		"e.md:13:1: a is overridden twice in scenario sc (first at line 12)",
		"e.md:14:4: b has no value after =",
		"e.md:16:4: budget bu needs a \"projects:\" line",
		"e.md:16:4: budget bu needs a \"limit:\" line",
		"e.md:17:1: unknown line \"project\" in budget bu",
		"e.md:19:4: scenario empty overrides nothing",
	}
	got := err.Error()
	for _, w := range want {
		if !strings.Contains(got, w) {
			t.Errorf("missing %q in\n%s", w, got)
		}
	}
}
