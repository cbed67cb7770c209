package parse

import (
	"strings"
	"testing"
)

// TestRiskBlock: the lines of a risk block, their defaults, number forms
// and positions.
func TestRiskBlock(t *testing.T) {
	cases := []struct {
		body          string
		compare       string
		trials        int
		seed          uint64
		seedSet       bool
		vary          []string
		wantErr       string
		trialsLine    int
		compareColumn int
	}{
		{body: "", trials: DefaultTrials, seed: DefaultSeed},
		{body: "compare: screens\ntrials: 20000\nseed: 42\n", compare: "screens", trials: 20000, seed: 42, seedSet: true, trialsLine: 3, compareColumn: 10},
		{body: "trials: 20,000\n", trials: 20000, seed: DefaultSeed, trialsLine: 2},
		{body: "trials: 50k   # enough for P90 to a few hundred dollars\nseed: 0\n", trials: 50000, seed: 0, seedSet: true, trialsLine: 2},
		{body: "vary: power_price, overhaul\n", trials: DefaultTrials, seed: DefaultSeed, vary: []string{"power_price", "overhaul"}},
		{body: "trials: 99\n", wantErr: "trials must be from 100"},
		{body: "trials: 2.5k\n", trials: 2500, seed: DefaultSeed, trialsLine: 2},
		{body: "trials: 1500.5\n", wantErr: "whole number"},
		{body: "seed: -1\n", wantErr: "seed must be a whole number"},
		{body: "compare: a, b\n", wantErr: "one comparison"},
		{body: "runs: 5000\n", wantErr: `did you mean "trials"?`},
		{body: "trails: 5000\n", wantErr: `did you mean "trials"?`},
		{body: "trials: 5000\ntrials: 6000\n", wantErr: "given twice"},
		{body: "vary: power price\n", wantErr: "is not an assumption's name"},
		{body: "trials 5000\n", wantErr: `expected "key: value"`},
	}
	for _, tc := range cases {
		src := "```risk r\n" + tc.body + "```\n"
		m, err := Parse("r.md", []byte(src))
		if tc.wantErr != "" {
			if err == nil || !strings.Contains(err.Error(), tc.wantErr) {
				t.Errorf("%q: error %v, want one saying %q", tc.body, err, tc.wantErr)
			}
			continue
		}
		if err != nil {
			t.Errorf("%q: %v", tc.body, err)
			continue
		}
		r, ok := m.Blocks[0].(*Risk)
		if !ok {
			t.Fatalf("%q: block %T", tc.body, m.Blocks[0])
		}
		if (r.Compare == nil) != (tc.compare == "") || (r.Compare != nil && r.Compare.ID != tc.compare) {
			t.Errorf("%q: compare %v, want %q", tc.body, r.Compare, tc.compare)
		}
		if tc.compareColumn > 0 && r.Compare.Pos.Col != tc.compareColumn {
			t.Errorf("%q: compare at column %d, want %d", tc.body, r.Compare.Pos.Col, tc.compareColumn)
		}
		if r.Trials != tc.trials || r.Seed != tc.seed || r.SeedSet != tc.seedSet || r.TrialsPos.Line != tc.trialsLine {
			t.Errorf("%q: trials %d (line %d), seed %d (%v); want %d (line %d), %d (%v)", tc.body, r.Trials, r.TrialsPos.Line, r.Seed, r.SeedSet, tc.trials, tc.trialsLine, tc.seed, tc.seedSet)
		}
		var vary []string
		for _, v := range r.Vary {
			vary = append(vary, v.ID)
		}
		if strings.Join(vary, ",") != strings.Join(tc.vary, ",") {
			t.Errorf("%q: vary %v, want %v", tc.body, vary, tc.vary)
		}
		if len(r.Vary) == 2 && r.Vary[1].Pos.Col != 20 {
			t.Errorf("%q: second name at column %d, want 20", tc.body, r.Vary[1].Pos.Col)
		}
	}
}
