package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"worth/scaffold"
)

// TestNewStartersBuild: every starter memo is written by "worth new", and
// builds as is to every format with every expectation holding.
func TestNewStartersBuild(t *testing.T) {
	if len(scaffold.Kinds) < 3 {
		t.Fatalf("%d starters; the issue asks for at least three", len(scaffold.Kinds))
	}
	for _, k := range scaffold.Kinds {
		t.Run(k.Name, func(t *testing.T) {
			dir := t.TempDir()
			memo := filepath.Join(dir, "kestrel-pump_station.md")
			code, stdout, stderr := worth("new", memo, "--kind", k.Name)
			if code != 0 || stderr != "" || !strings.Contains(stdout, memo) {
				t.Fatalf("new: exit %d, stdout %q, stderr %q", code, stdout, stderr)
			}
			src := readFile(t, memo)
			if !strings.Contains(src, "title: Kestrel pump station\n") {
				t.Errorf("the title is not taken from the file name:\n%s", src[:200])
			}
			code, stdout, stderr = worth("check", memo)
			if code != 0 || stderr != "" {
				t.Fatalf("check: exit %d\n%s%s", code, stdout, stderr)
			}
			for _, f := range []string{"html", "pdf", "md", "json", "csv"} {
				if code, _, stderr := worth("build", memo, "--format", f); code != 0 || stderr != "" {
					t.Errorf("build --format %s: exit %d: %s", f, code, stderr)
				}
			}
		})
	}
}

// TestNewRefuses: an existing file is never overwritten; an unknown kind
// gets a suggestion; a file name that is not a memo's is refused.
func TestNewRefuses(t *testing.T) {
	dir := t.TempDir()
	memo := filepath.Join(dir, "m.md")
	writeFile(t, memo, "mine\n")
	cases := []struct {
		args []string
		err  string
	}{
		{[]string{"new", memo}, "worth new: " + memo + " already exists; it is left as it is (choose another name)\n"},
		{[]string{"new", filepath.Join(dir, "x.md"), "--kind", "studyperiod"}, `worth new: no starter memo of kind "studyperiod"; the kinds are study-period, forever, revenue; did you mean "study-period"?` + "\n"},
		{[]string{"new", filepath.Join(dir, "x.txt")}, "worth new: " + filepath.Join(dir, "x.txt") + ": a memo's file name ends in .md\n"},
	}
	for _, c := range cases {
		code, _, stderr := worth(c.args...)
		if code != 2 || stderr != c.err {
			t.Errorf("%v: exit %d, stderr\n got: %q\nwant: %q", c.args, code, stderr, c.err)
		}
	}
	if got := readFile(t, memo); got != "mine\n" {
		t.Errorf("the existing memo was changed to %q", got)
	}
	if _, err := os.Stat(filepath.Join(dir, "x.md")); err == nil {
		t.Errorf("a memo was written for an unknown kind")
	}
}

// TestTitleFromFile: the default title of a new memo.
func TestTitleFromFile(t *testing.T) {
	for in, want := range map[string]string{
		"pump-station.md":        "Pump station",
		"dir/roof_2027.md":       "Roof 2027",
		"Ice rink chiller.md":    "Ice rink chiller",
		"écluse-nord.md":         "Écluse nord",
		".md":                    "Decision memo",
		"a/b/c.intake-screen.md": "C intake screen",
	} {
		if got := titleFromFile(in); got != want {
			t.Errorf("titleFromFile(%q) = %q, want %q", in, got, want)
		}
	}
}
