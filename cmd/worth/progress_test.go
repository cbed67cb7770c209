package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"worth/compute"
)

// TestProgressSilentOffTerminal: standard error redirected to a file gets
// no progress bar at all.
func TestProgressSilentOffTerminal(t *testing.T) {
	f, err := os.Create(filepath.Join(t.TempDir(), "stderr"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if progressBar(f) != nil {
		t.Error("a progress bar for a file")
	}
}

// TestProgressDelay: the bar appears only after half a second, shows the
// trials done and the leader's probability with its standard error, and
// is erased at the end.
func TestProgressDelay(t *testing.T) {
	var out strings.Builder
	clock := time.Unix(0, 0)
	p := &progress{w: &out, now: func() time.Time { return clock }}
	step := func(d time.Duration, done int) {
		clock = clock.Add(d)
		p.update(compute.RiskProgress{Risk: "r", Done: done, Total: 1000, Leader: "steel", Probability: 0.623, SE: 0.0041})
	}
	step(0, 0)
	step(100*time.Millisecond, 100)
	if out.Len() != 0 {
		t.Fatalf("drawn before the delay: %q", out.String())
	}
	step(500*time.Millisecond, 600)
	if s := out.String(); !strings.Contains(s, "600/1000 trials") || !strings.Contains(s, "steel best 62.3% ± 0.41%") || !strings.Contains(s, "[##################------------]") {
		t.Fatalf("bar %q", s)
	}
	n := out.Len()
	step(10*time.Millisecond, 700) // too soon to redraw
	if out.Len() != n {
		t.Errorf("redrawn within 100 ms")
	}
	step(time.Second, 1000)
	if !strings.HasSuffix(out.String(), "\r\033[K") {
		t.Errorf("not erased at the end: %q", out.String())
	}
}
