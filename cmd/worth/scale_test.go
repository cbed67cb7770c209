package main

import (
	"path/filepath"
	"strings"
	"testing"
)

// TestBuildStagesOutputs: build writes each output to a temporary file as
// soon as it is made (to hold one output in memory at a time). When a
// later one cannot be written (here its folder is missing) nothing is
// renamed into place, the earlier file is left as it was and no temporary
// file is left behind; when all succeed both are written, and no
// temporary file is left either.
func TestBuildStagesOutputs(t *testing.T) {
	dir := t.TempDir()
	src := readFile(t, filepath.Join(repoRoot, "examples", "water-main-lining.md"))
	writeFile(t, filepath.Join(dir, "m.md"), src)
	writeFile(t, filepath.Join(dir, "m.html"), earlier)
	rep, err := load(filepath.Join(dir, "m.md"))
	if err != nil {
		t.Fatal(err)
	}
	var stdout strings.Builder
	paths := []string{filepath.Join(dir, "m.html"), filepath.Join(dir, "missing", "m.pdf")}
	if err := writeOutputs(rep, paths, []string{"html", "pdf"}, buildOptions{}, &stdout); err == nil {
		t.Fatal("writing into a missing folder did not fail")
	}
	if got := listDir(t, dir); strings.Join(got, " ") != "m.html m.md" {
		t.Errorf("after a failed build the folder holds %q", got)
	}
	if readFile(t, filepath.Join(dir, "m.html")) != earlier {
		t.Error("a failed build changed m.html")
	}

	if code, _, stderr := worth("build", filepath.Join(dir, "m.md")); code != 0 {
		t.Fatalf("build: exit %d, stderr %q", code, stderr)
	}
	if got := listDir(t, dir); strings.Join(got, " ") != "m.html m.md m.pdf" {
		t.Errorf("after a build the folder holds %q", got)
	}
	if h := readFile(t, filepath.Join(dir, "m.html")); !strings.HasPrefix(h, "<!DOCTYPE html>") {
		t.Errorf("m.html starts %q", h[:min(40, len(h))])
	}
	if p := readFile(t, filepath.Join(dir, "m.pdf")); !strings.HasPrefix(p, "%PDF-") {
		t.Errorf("m.pdf starts %q", p[:min(40, len(p))])
	}
}
