//go:build linux

package main

import (
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"worth/bench"
)

// peakLimit is the bound on the peak memory of building the memo
// of 1,000 alternatives.
const peakLimit = 200 << 20

// TestPeakMemory builds the generated memo of 1,000 offers (bench.Memo) to
// HTML, to PDF, and to both as `worth build` does by default, each in a
// process of its own, and checks each process's peak resident size against
// the 200 MB bound (the child's VmHWM, what /usr/bin/time -v reports as the
// maximum resident set size of a build started afresh). The process is
// this test binary running build, so it keeps to worth's own memory
// settings (scale.go).
func TestPeakMemory(t *testing.T) {
	if args := os.Getenv("WORTH_PEAK_ARGS"); args != "" {
		// The child: build, say its peak resident size (the VmHWM of its
		// own memory, which begins at exec), and exit with build's code.
		code := run(strings.Split(args, "\x1f"), os.Stdout, os.Stderr)
		status, err := os.ReadFile("/proc/self/status")
		if err != nil {
			os.Exit(3)
		}
		for _, line := range strings.Split(string(status), "\n") {
			if strings.HasPrefix(line, "VmHWM:") {
				fmt.Println(line)
			}
		}
		os.Exit(code)
	}
	if testing.Short() {
		t.Skip("builds the memo of 1,000 alternatives three times")
	}
	dir := t.TempDir()
	memo := filepath.Join(dir, "offers.md")
	if err := os.WriteFile(memo, bench.Memo(1000), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name string
		args []string
	}{
		{"HTML", []string{"build", memo, "-o", filepath.Join(dir, "x.html")}},
		{"PDF", []string{"build", memo, "-o", filepath.Join(dir, "x.pdf")}},
		{"HTML and PDF", []string{"build", memo}},
	} {
		cmd := exec.Command(os.Args[0], "-test.run=^TestPeakMemory$")
		// worth's own collector settings, whatever this shell has.
		for _, kv := range os.Environ() {
			if !strings.HasPrefix(kv, "GOGC=") && !strings.HasPrefix(kv, "GOMEMLIMIT=") {
				cmd.Env = append(cmd.Env, kv)
			}
		}
		cmd.Env = append(cmd.Env, "WORTH_PEAK_ARGS="+strings.Join(c.args, "\x1f"))
		out, err := cmd.CombinedOutput()
		if err != nil {
			t.Fatalf("%s: %v\n%s", c.name, err, out)
		}
		// The child's own high-water mark: the rusage of a child started
		// from this (large) test process counts the parent's pages it
		// shared until exec.
		var kb int64
		for _, line := range strings.Split(string(out), "\n") {
			if f := strings.Fields(line); len(f) == 3 && f[0] == "VmHWM:" && f[2] == "kB" {
				kb, _ = strconv.ParseInt(f[1], 10, 64)
			}
		}
		if kb == 0 {
			t.Fatalf("%s: no VmHWM line in the child's output:\n%s", c.name, out)
		}
		peak := kb << 10
		t.Logf("%s: peak resident size %.0f MB", c.name, float64(peak)/(1<<20))
		if peak > peakLimit {
			t.Errorf("%s: peak resident size %.0f MB, over the %d MB bound", c.name, float64(peak)/(1<<20), peakLimit>>20)
		}
	}
	for _, f := range []string{"x.html", "x.pdf", "offers.html", "offers.pdf"} {
		if st, err := os.Stat(filepath.Join(dir, f)); err != nil || st.Size() == 0 {
			t.Errorf("%s was not written: %v", f, err)
		}
	}
}
