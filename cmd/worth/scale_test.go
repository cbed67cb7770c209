package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestBuildStagesOutputs: build writes each output to a temporary file as
// soon as it is made (to hold one output in memory at a time); when a
// later one fails (a logo that is not an image stops the PDF after the
// HTML is made) nothing is renamed into place, the earlier files are left
// as they were and no temporary file is left behind; when all succeed
// both are written and no temporary file is left either.
func TestBuildStagesOutputs(t *testing.T) {
	dir := t.TempDir()
	src := readFile(t, filepath.Join(repoRoot, "examples", "water-main-lining.md"))
	memo := strings.Replace(src, "rate: 4%\n", "rate: 4%\nlogo: mark.png\n", 1)
	if memo == src {
		t.Fatal("the example's front matter changed; put the logo line elsewhere")
	}
	writeFile(t, filepath.Join(dir, "m.md"), memo)
	writeFile(t, filepath.Join(dir, "mark.png"), "not an image")
	for _, f := range []string{"m.html", "m.pdf"} {
		writeFile(t, filepath.Join(dir, f), earlier)
	}
	code, _, stderr := worth("build", filepath.Join(dir, "m.md"))
	if code != 2 || !strings.Contains(stderr, "logo") {
		t.Fatalf("build with a bad logo: exit %d, stderr %q", code, stderr)
	}
	if got := listDir(t, dir); strings.Join(got, " ") != "m.html m.md m.pdf mark.png" {
		t.Errorf("after a failed build the folder holds %q", got)
	}
	for _, f := range []string{"m.html", "m.pdf"} {
		if readFile(t, filepath.Join(dir, f)) != earlier {
			t.Errorf("a failed build changed %s", f)
		}
	}

	if err := os.Remove(filepath.Join(dir, "mark.png")); err != nil {
		t.Fatal(err)
	}
	writeFile(t, filepath.Join(dir, "m.md"), src)
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
