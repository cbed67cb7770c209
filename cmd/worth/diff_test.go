package main

import (
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// needGit skips a test when git is missing (failing it instead under
// WORTH_REQUIRE_TOOLS=1).
func needGit(t *testing.T) {
	t.Helper()
	if _, err := exec.LookPath("git"); err != nil {
		if os.Getenv("WORTH_REQUIRE_TOOLS") == "1" {
			t.Fatal("git is not on PATH, and WORTH_REQUIRE_TOOLS=1 requires it")
		}
		t.Skip("git is not on PATH")
	}
}

func gitIn(t *testing.T, dir string, args ...string) {
	t.Helper()
	cmd := exec.Command("git", append([]string{"-C", dir, "-c", "user.name=worth test", "-c", "user.email=test@example.invalid", "-c", "commit.gpgsign=false"}, args...)...)
	cmd.Env = append(os.Environ(), "GIT_CONFIG_NOSYSTEM=1", "GIT_CONFIG_GLOBAL=/dev/null")
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("git %v: %v\n%s", args, err, out)
	}
}

// diffRepo makes a git repository holding the depot-roof example (and a
// CSV it reads) committed, then changed in the work tree: a unit price,
// a row of the CSV, and a removed residual; it returns the memo's path.
func diffRepo(t *testing.T) string {
	t.Helper()
	needGit(t)
	dir := t.TempDir()
	src := readFile(t, filepath.Join(repoRoot, "examples", "depot-roof.md"))
	src = strings.Replace(src, "annual cost: 1,900\n", "annual cost: 1,900\ncash flows from: data/tpo.csv\n", 1)
	if err := os.MkdirAll(filepath.Join(dir, "data"), 0o755); err != nil {
		t.Fatal(err)
	}
	memo := filepath.Join(dir, "roof.md")
	writeFile(t, memo, src)
	writeFile(t, filepath.Join(dir, "data", "tpo.csv"), "year,amount,kind,note\n4,3000,cost,drain repairs\n")
	gitIn(t, dir, "init", "-q")
	gitIn(t, dir, "add", ".")
	gitIn(t, dir, "commit", "-q", "-m", "first issue")
	src = strings.Replace(src, "tpo_per_m2      = 96 ", "tpo_per_m2      = 131", 1)
	src = strings.Replace(src, "residual: 310k ", "# removed ", 1)
	writeFile(t, memo, src)
	writeFile(t, filepath.Join(dir, "data", "tpo.csv"), "year,amount,kind,note\n4,3500,cost,drain repairs\n")
	return memo
}

// TestDiffCommand: worth diff REV:PATH PATH reads the old version (and the
// CSV it names) through git, prints the changed inputs by block and line
// and the results' changes, and flags the changed recommendation; -o
// writes the revision note as Markdown, HTML and PDF.
func TestDiffCommand(t *testing.T) {
	memo := diffRepo(t)
	code, out, stderr := worth("diff", "HEAD:"+memo, memo)
	if code != 0 || stderr != "" {
		t.Fatalf("diff: exit %d: %s", code, stderr)
	}
	for _, want := range []string{
		"Changes from HEAD:" + memo + " to " + memo,
		"3 inputs changed; the recommendation changed.",
		"assume, line 33",
		"tpo_per_m2", "96", "→ 131",
		"alternative tpo, tpo.csv:2", "cost at year 4 (drain repairs)", "$3,000", "→ $3,500",
		"alternative metal, line 85", "residual", "310k ($310,000)", "→ (removed)",
		"first cost", "area_m2 * tpo_per_m2", "$499,200", "→ $681,200",
		"Comparison roof: RECOMMENDATION CHANGED: was TPO single-ply membrane, now Modified-bitumen built-up roof",
		"Present cost", "Equivalent annual cost", "Future cost",
		`best(roof) == "tpo"  held, now fails`,
	} {
		if !strings.Contains(out, want) {
			t.Errorf("the terminal report lacks %q:\n%s", want, out)
		}
	}
	dir := filepath.Dir(memo)
	for _, ext := range []string{"md", "html", "pdf"} {
		note := filepath.Join(dir, "note."+ext)
		if code, _, stderr := worth("diff", "HEAD:"+memo, memo, "-o", note); code != 0 {
			t.Fatalf("diff -o note.%s: exit %d: %s", ext, code, stderr)
		}
		data := readFile(t, note)
		switch ext {
		case "md":
			for _, want := range []string{"# Changes since HEAD:" + memo, "> **Warning:** Comparison roof: the recommendation changed", "| alternative tpo, tpo.csv:2 |"} {
				if !strings.Contains(data, want) {
					t.Errorf("note.md lacks %q:\n%s", want, data)
				}
			}
		case "html":
			if !strings.Contains(data, "The recommendation changed") || strings.Contains(data, "<script") {
				t.Errorf("note.html lacks the flagged change, or holds a script")
			}
		case "pdf":
			if !strings.HasPrefix(data, "%PDF-") {
				t.Errorf("note.pdf is not a PDF")
			}
		}
	}
	// A version that does not exist.
	code, _, stderr = worth("diff", "HEAD~5:"+memo, memo)
	if code != 2 || !strings.Contains(stderr, "git show HEAD~5:"+memo+":") {
		t.Errorf("diff with a missing revision: exit %d, stderr %q", code, stderr)
	}
}

// TestBuildChangesSince: build --changes-since REV adds the revision note
// as a section of the memo, in Markdown, HTML and JSON.
func TestBuildChangesSince(t *testing.T) {
	memo := diffRepo(t)
	code, out, stderr := worth("build", memo, "--changes-since", "HEAD", "--format", "md", "-o", "-")
	if code != 0 {
		t.Fatalf("build: exit %d: %s", code, stderr)
	}
	title := strings.Index(out, "# Kestrel Road")
	section := strings.Index(out, "## Changes since HEAD:"+filepath.ToSlash(memo))
	body := strings.Index(out, "## Why a decision is needed now")
	if title < 0 || section < title || body < section {
		t.Errorf("the revision section is not between the heading and the memo's first section (at %d, %d, %d)", title, section, body)
	}
	code, out, _ = worth("build", memo, "--changes-since", "HEAD", "--format", "json", "-o", "-")
	var rep struct {
		Revision struct {
			Inputs      []struct{ Block, Name, Change string }
			Comparisons []struct {
				RecommendationChanged bool `json:"recommendation_changed"`
			}
		}
	}
	if err := json.Unmarshal([]byte(out), &rep); err != nil || code != 0 {
		t.Fatalf("json: exit %d, %v", code, err)
	}
	if len(rep.Revision.Inputs) != 3 || len(rep.Revision.Comparisons) != 1 || !rep.Revision.Comparisons[0].RecommendationChanged {
		t.Errorf("json revision: %+v", rep.Revision)
	}
	code, out, _ = worth("build", memo, "--changes-since", "HEAD", "--format", "html", "-o", "-")
	if code != 0 || !strings.Contains(out, "Changes since HEAD:") {
		t.Errorf("html: exit %d; no revision section", code)
	}
	// Without --changes-since, nothing of it.
	_, out, _ = worth("build", memo, "--format", "md", "-o", "-")
	if strings.Contains(out, "Changes since") {
		t.Errorf("a build without --changes-since has a revision section")
	}
}
