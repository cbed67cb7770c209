package main

// These tests drive run(args, stdout, stderr) in-process, from the
// repository root, so that file names in messages read as a user would type
// them (testdata/errors/NAME.md:LINE:COL: ...).
//
//	go test ./cmd/worth            the malformed-memo corpus, the golden
//	                               reports of the examples, exit codes
//	go test ./cmd/worth -update    rewrite testdata/golden/* and the .err
//	                               files from the current output; review the
//	                               diff before committing it

import (
	"bytes"
	"encoding/json"
	"flag"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite testdata/golden and testdata/errors/*.err from the current output")

// repoRoot is the repository root, relative to this package's folder.
var repoRoot = filepath.Join("..", "..")

// worth runs the command line in-process and returns its exit code and
// what it wrote.
func worth(args ...string) (code int, stdout, stderr string) {
	var out, errw bytes.Buffer
	code = run(args, &out, &errw)
	return code, out.String(), errw.String()
}

// atRoot makes the repository root the working folder for the test.
func atRoot(t *testing.T) {
	t.Helper()
	t.Chdir(repoRoot)
}

// listDir returns the names in dir, sorted.
func listDir(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range es {
		names = append(names, e.Name())
	}
	slices.Sort(names)
	return names
}

func writeFile(t *testing.T, path, content string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
}

func readFile(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

// copyFile copies src to dst.
func copyFile(t *testing.T, src, dst string) {
	t.Helper()
	writeFile(t, dst, readFile(t, src))
}

// earlier is the content of output files that exist before a failed build;
// they must come out of it byte for byte the same.
const earlier = "earlier output, which a memo with an error must leave alone\n"

// TestMalformedMemos runs every memo of testdata/errors. Each must fail with
// exit code 2 and exactly the lines of its .err file on standard error, from
// check and from build, and build must write nothing: neither the file named
// with -o nor the files beside the memo, and an earlier file of that name
// must be left untouched.
func TestMalformedMemos(t *testing.T) {
	atRoot(t)
	memos, err := filepath.Glob(filepath.Join("testdata", "errors", "*.md"))
	if err != nil {
		t.Fatal(err)
	}
	if len(memos) < 30 {
		t.Fatalf("testdata/errors holds %d memos; expected at least 30", len(memos))
	}
	for _, memo := range memos {
		name := strings.TrimSuffix(filepath.Base(memo), ".md")
		errFile := strings.TrimSuffix(memo, ".md") + ".err"
		t.Run(name, func(t *testing.T) {
			code, stdout, stderr := worth("check", memo)
			if *update {
				writeFile(t, errFile, stderr)
			}
			want := readFile(t, errFile)
			if want == "" {
				t.Fatalf("%s is empty: every malformed memo must name its errors", errFile)
			}
			if code != 2 {
				t.Errorf("check: exit code %d, want 2", code)
			}
			if stderr != want {
				t.Errorf("check: standard error differs from %s\n got:\n%s\nwant:\n%s", errFile, stderr, want)
			}
			if stdout != "" {
				t.Errorf("check: wrote to standard output:\n%s", stdout)
			}

			// build -o FILE, in each format: exit 2, the same errors, and
			// the earlier FILE unchanged and alone in its folder.
			for _, out := range []string{"report.md", "report.json"} {
				dir := t.TempDir()
				path := filepath.Join(dir, out)
				writeFile(t, path, earlier)
				code, stdout, stderr := worth("build", memo, "-o", path)
				if code != 2 {
					t.Errorf("build -o %s: exit code %d, want 2", out, code)
				}
				if stderr != want {
					t.Errorf("build -o %s: standard error differs from %s\n got:\n%s\nwant:\n%s", out, errFile, stderr, want)
				}
				if stdout != "" {
					t.Errorf("build -o %s: wrote to standard output:\n%s", out, stdout)
				}
				if got := readFile(t, path); got != earlier {
					t.Errorf("build -o %s: the earlier output was changed to:\n%s", out, got)
				}
				if got := listDir(t, dir); !slices.Equal(got, []string{out}) {
					t.Errorf("build -o %s: the output folder holds %v, want only the earlier file", out, got)
				}
			}

			// build -o -: nothing on standard output.
			code, stdout, _ = worth("build", memo, "-o", "-")
			if code != 2 || stdout != "" {
				t.Errorf("build -o -: exit code %d and %d bytes on standard output, want 2 and none", code, len(stdout))
			}

			// build without -o, on a copy of the memo beside earlier
			// reports: both must be left as they were, and nothing added.
			dir := t.TempDir()
			cp := filepath.Join(dir, name+".md")
			copyFile(t, memo, cp)
			beside := []string{name + ".html", name + ".md", name + ".pdf"}
			writeFile(t, filepath.Join(dir, name+".html"), earlier)
			writeFile(t, filepath.Join(dir, name+".pdf"), earlier)
			code, _, stderr = worth("build", cp)
			if code != 2 {
				t.Errorf("build (outputs beside the memo): exit code %d, want 2", code)
			}
			if wantCp := strings.ReplaceAll(want, memo+":", cp+":"); stderr != wantCp {
				t.Errorf("build (outputs beside the memo): standard error\n got:\n%s\nwant:\n%s", stderr, wantCp)
			}
			for _, f := range []string{name + ".html", name + ".pdf"} {
				if got := readFile(t, filepath.Join(dir, f)); got != earlier {
					t.Errorf("build (outputs beside the memo): %s was changed to:\n%s", f, got)
				}
			}
			if got := listDir(t, dir); !slices.Equal(got, beside) {
				t.Errorf("build (outputs beside the memo): the folder holds %v, want %v", got, beside)
			}
		})
	}
	// Nothing may have been written beside the corpus itself.
	for _, f := range listDir(t, filepath.Join("testdata", "errors")) {
		if !strings.HasSuffix(f, ".md") && !strings.HasSuffix(f, ".err") {
			t.Errorf("testdata/errors/%s was written by a failed build", f)
		}
	}
	errs, _ := filepath.Glob(filepath.Join("testdata", "errors", "*.err"))
	if len(errs) != len(memos) {
		t.Errorf("testdata/errors has %d .err files for %d memos; every memo needs one, and every .err a memo", len(errs), len(memos))
	}
}

// examples returns the example memos.
func examples(t *testing.T) []string {
	t.Helper()
	memos, err := filepath.Glob(filepath.Join("examples", "*.md"))
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, m := range memos {
		if !strings.HasSuffix(m, ".report.md") {
			out = append(out, m)
		}
	}
	if len(out) < 3 {
		t.Fatalf("examples/ holds %d memos; expected at least 3", len(out))
	}
	return out
}

// TestGolden builds every example to Markdown and to JSON and compares the
// reports with testdata/golden/NAME.md and NAME.json. Run with -update to
// rewrite them after an intended change, and read the diff.
func TestGolden(t *testing.T) {
	atRoot(t)
	golden := filepath.Join("testdata", "golden")
	if *update {
		if err := os.MkdirAll(golden, 0o755); err != nil {
			t.Fatal(err)
		}
	}
	for _, memo := range examples(t) {
		name := strings.TrimSuffix(filepath.Base(memo), ".md")
		for _, format := range []string{"md", "json"} {
			t.Run(name+"."+format, func(t *testing.T) {
				code, stdout, stderr := worth("build", memo, "--format", format, "-o", "-")
				if code != 0 || stderr != "" {
					t.Fatalf("build: exit code %d, standard error:\n%s", code, stderr)
				}
				if format == "json" && !json.Valid([]byte(stdout)) {
					t.Fatalf("build --format json wrote invalid JSON")
				}
				path := filepath.Join(golden, name+"."+format)
				if *update {
					writeFile(t, path, stdout)
					return
				}
				want, err := os.ReadFile(path)
				if err != nil {
					t.Fatalf("%v (run go test ./cmd/worth -update to create it)", err)
				}
				if stdout != string(want) {
					t.Errorf("the report differs from %s (run go test ./cmd/worth -update if the change is intended)\n%s", path, firstDiff(string(want), stdout))
				}
			})
		}
	}
	// No golden file may outlive its example.
	if !*update {
		for _, f := range listDir(t, golden) {
			if st, err := os.Stat(filepath.Join(golden, f)); err == nil && st.IsDir() {
				continue // another writer's goldens (html/)
			}
			memo := filepath.Join("examples", strings.TrimSuffix(strings.TrimSuffix(f, ".md"), ".json")+".md")
			if _, err := os.Stat(memo); err != nil {
				t.Errorf("testdata/golden/%s has no example %s", f, memo)
			}
		}
	}
}

// firstDiff shows the first line where two texts differ.
func firstDiff(want, got string) string {
	w, g := strings.Split(want, "\n"), strings.Split(got, "\n")
	for i := 0; i < len(w) || i < len(g); i++ {
		var wl, gl string
		if i < len(w) {
			wl = w[i]
		}
		if i < len(g) {
			gl = g[i]
		}
		if wl != gl {
			return "first difference at line " + strconv.Itoa(i+1) + ":\nwant: " + wl + "\n got: " + gl
		}
	}
	return "(no line differs)"
}

// TestExamplesHold checks every example at once: every expectation holds.
func TestExamplesHold(t *testing.T) {
	atRoot(t)
	memos := examples(t)
	code, stdout, stderr := worth(append([]string{"check"}, memos...)...)
	if code != 0 {
		t.Fatalf("check examples: exit code %d\n%s%s", code, stdout, stderr)
	}
	for _, m := range memos {
		if !strings.Contains(stdout, m+": ok, ") {
			t.Errorf("check did not report %s as ok:\n%s", m, stdout)
		}
	}
}

// A small memo whose one expectation holds, one whose second fails, and
// one with an error.
const (
	goodMemo = "---\ntitle: Pumps\nrate: 7%\n---\n\n```alternative a\nlife: 10\nfirst cost: 100k\nannual cost: 5k\n```\n\n```alternative b\nlife: 10\nfirst cost: 80k\nannual cost: 9k\n```\n\n```compare pumps\n```\n\nBest: `= best()`.\n\n```expect\nbest() == \"a\"\n```\n"
	failMemo = "---\ntitle: Pumps\nrate: 7%\n---\n\n```alternative a\nlife: 10\nfirst cost: 100k\nannual cost: 5k\n```\n\n```alternative b\nlife: 10\nfirst cost: 80k\nannual cost: 9k\n```\n\n```compare pumps\n```\n\n```expect\nbest() == \"a\"\npw(b) > pw(a)\n```\n"
	badMemo  = "---\ntitle: Pumps\nrate: 7%\n---\n\n```alternative a\nlife: 10\nfrist cost: 100k\n```\n"
)

// TestCheckExitCodes: 0 when every expectation holds, 1 when one fails, 2
// on an error in a memo; with several memos the worst wins; check writes no
// file.
func TestCheckExitCodes(t *testing.T) {
	dir := t.TempDir()
	good, fail, bad := filepath.Join(dir, "good.md"), filepath.Join(dir, "fail.md"), filepath.Join(dir, "bad.md")
	writeFile(t, good, goodMemo)
	writeFile(t, fail, failMemo)
	writeFile(t, bad, badMemo)
	cases := []struct {
		args   []string
		code   int
		stdout []string // substrings of standard output
		stderr []string // substrings of standard error
	}{
		{[]string{good}, 0, []string{good + ": ok, 1 expectation holds"}, nil},
		{[]string{"-q", good}, 0, nil, nil},
		{[]string{fail}, 1, []string{fail + ":23:1: expectation fails: pw(b) > pw(a)"}, nil},
		{[]string{bad}, 2, nil, []string{bad + ":8:1: unknown line \"frist cost\""}},
		{[]string{good, fail}, 1, []string{good + ": ok", fail + ":23:1: expectation fails"}, nil},
		{[]string{fail, bad}, 2, []string{fail + ":23:1: expectation fails"}, []string{bad + ":8:1:"}},
		{[]string{bad, good}, 2, []string{good + ": ok"}, []string{bad + ":8:1:"}},
		{[]string{filepath.Join(dir, "missing.md")}, 2, nil, []string{"missing.md"}},
		{nil, 2, nil, []string{"give one or more memo files"}},
	}
	for _, c := range cases {
		code, stdout, stderr := worth(append([]string{"check"}, c.args...)...)
		if code != c.code {
			t.Errorf("check %v: exit code %d, want %d\nstdout:\n%s\nstderr:\n%s", c.args, code, c.code, stdout, stderr)
		}
		for _, s := range c.stdout {
			if !strings.Contains(stdout, s) {
				t.Errorf("check %v: standard output lacks %q:\n%s", c.args, s, stdout)
			}
		}
		for _, s := range c.stderr {
			if !strings.Contains(stderr, s) {
				t.Errorf("check %v: standard error lacks %q:\n%s", c.args, s, stderr)
			}
		}
	}
	if code, stdout, _ := worth("check", "-q", good); code != 0 || stdout != "" {
		t.Errorf("check -q on a memo that holds: exit code %d, output %q; want 0 and nothing", code, stdout)
	}
	if got := listDir(t, dir); !slices.Equal(got, []string{"bad.md", "fail.md", "good.md"}) {
		t.Errorf("check wrote files: the folder holds %v", got)
	}
}

// TestBuildOutputs: without -o, build writes NAME.html and NAME.pdf beside
// the memo, the same bytes as -o - writes to standard output; -o
// takes the format from the extension or from --format; an unknown format is
// an error that writes nothing; a failing expectation is a warning.
func TestBuildOutputs(t *testing.T) {
	dir := t.TempDir()
	memo := filepath.Join(dir, "pumps.md")
	writeFile(t, memo, goodMemo)

	code, md, stderr := worth("build", memo, "-o", "-")
	if code != 0 || stderr != "" {
		t.Fatalf("build -o -: exit code %d, standard error:\n%s", code, stderr)
	}
	if !strings.HasPrefix(md, "# Pumps\n") || !strings.Contains(md, "Best: a.") {
		t.Errorf("build -o - did not write the Markdown report to standard output:\n%s", md)
	}
	code, js, stderr := worth("build", memo, "--format", "json", "-o", "-")
	if code != 0 || stderr != "" || !json.Valid([]byte(js)) {
		t.Fatalf("build --format json -o -: exit code %d, valid JSON %v, standard error:\n%s", code, json.Valid([]byte(js)), stderr)
	}
	var report struct {
		Title       string `json:"title"`
		Comparisons []struct {
			ID          string `json:"id"`
			Recommended string `json:"recommended"`
		} `json:"comparisons"`
	}
	if err := json.Unmarshal([]byte(js), &report); err != nil {
		t.Fatal(err)
	}
	if report.Title != "Pumps" || len(report.Comparisons) != 1 || report.Comparisons[0].Recommended != "a" {
		t.Errorf("JSON report: %+v", report)
	}

	// Without -o: the HTML and PDF memo beside the memo, nothing else.
	if code, stdout, stderr := worth("build", memo); code != 0 || stdout != "" || stderr != "" {
		t.Fatalf("build: exit code %d, stdout %q, stderr %q", code, stdout, stderr)
	}
	if got := listDir(t, dir); !slices.Equal(got, []string{"pumps.html", "pumps.md", "pumps.pdf"}) {
		t.Fatalf("build wrote %v; want pumps.html and pumps.pdf beside pumps.md", got)
	}
	_, html, _ := worth("build", memo, "--format", "html", "-o", "-")
	if got := readFile(t, filepath.Join(dir, "pumps.html")); got != html || !strings.HasPrefix(html, "<!DOCTYPE html>") {
		t.Errorf("pumps.html differs from what --format html -o - writes, or is not HTML")
	}
	_, pdf, _ := worth("build", memo, "--format", "pdf", "-o", "-")
	if got := readFile(t, filepath.Join(dir, "pumps.pdf")); got != pdf || !strings.HasPrefix(pdf, "%PDF-") {
		t.Errorf("pumps.pdf differs from what --format pdf -o - writes, or is not a PDF")
	}
	// --format md beside the memo never overwrites the memo itself.
	if code, _, stderr := worth("build", "--format", "md", memo); code != 0 {
		t.Fatalf("build --format md: exit code %d\n%s", code, stderr)
	}
	if got := readFile(t, filepath.Join(dir, "pumps.report.md")); got != md {
		t.Errorf("pumps.report.md differs from what -o - writes")
	}
	os.Remove(filepath.Join(dir, "pumps.report.md"))
	if got := readFile(t, memo); got != goodMemo {
		t.Errorf("build changed the memo itself")
	}
	// A second build replaces the reports, and leaves no temporary file.
	if code, _, _ := worth("build", memo); code != 0 {
		t.Fatalf("second build: exit code %d", code)
	}
	if got := listDir(t, dir); len(got) != 3 {
		t.Errorf("after a second build the folder holds %v", got)
	}

	// --format alone: one file beside the memo.
	dir2 := t.TempDir()
	memo2 := filepath.Join(dir2, "pumps.md")
	writeFile(t, memo2, goodMemo)
	if code, _, stderr := worth("build", "--format", "json", memo2); code != 0 {
		t.Fatalf("build --format json: exit code %d\n%s", code, stderr)
	}
	if got := listDir(t, dir2); !slices.Equal(got, []string{"pumps.json", "pumps.md"}) {
		t.Errorf("build --format json wrote %v", got)
	}

	// -o with an extension picks the format; flags may follow the memo.
	out := filepath.Join(dir2, "out.json")
	if code, _, stderr := worth("build", memo2, "-o", out); code != 0 {
		t.Fatalf("build -o out.json: exit code %d\n%s", code, stderr)
	}
	if got := readFile(t, out); got != js {
		t.Errorf("-o out.json did not write the JSON report")
	}
	out = filepath.Join(dir2, "out.md")
	if code, _, _ := worth("build", "-o", out, memo2); code != 0 || readFile(t, out) != md {
		t.Errorf("-o out.md did not write the Markdown report")
	}

	// Unknown formats: an error, and nothing written.
	for _, args := range [][]string{
		{"build", memo2, "--format", "xml", "-o", "-"},
		{"build", memo2, "--format", "xml"},
		{"build", memo2, "-o", filepath.Join(dir2, "out.txt")},
		{"build", memo2, "-o", filepath.Join(dir2, "noextension")},
	} {
		before := listDir(t, dir2)
		code, stdout, stderr := worth(args...)
		if code != 2 || stdout != "" || !strings.Contains(stderr, "unknown output format") {
			t.Errorf("%v: exit code %d, stdout %q, stderr %q; want 2 and an unknown-format error", args, code, stdout, stderr)
		}
		if after := listDir(t, dir2); !slices.Equal(before, after) {
			t.Errorf("%v wrote files: %v", args, after)
		}
	}

	// Usage errors.
	for _, args := range [][]string{
		{"build"},
		{"build", memo2, memo},
		{"build", "--no-such-flag", memo2},
		{"frobnicate"},
		{},
	} {
		if code, _, stderr := worth(args...); code != 2 || stderr == "" {
			t.Errorf("%v: exit code %d, stderr %q; want 2 and a message", args, code, stderr)
		}
	}

	// A failing expectation does not stop a build; it warns.
	fail := filepath.Join(dir2, "fail.md")
	writeFile(t, fail, failMemo)
	code, _, stderr = worth("build", fail, "-o", "-")
	if code != 0 || !strings.Contains(stderr, fail+":23:1: warning: expectation does not hold: pw(b) > pw(a)") {
		t.Errorf("build of a memo with a failing expectation: exit code %d, standard error:\n%s", code, stderr)
	}
}

// TestHelp: --help (and -h) on the program and on every command exits 0 and
// prints the usage.
func TestHelp(t *testing.T) {
	for _, args := range [][]string{
		{"--help"}, {"-h"}, {"help"},
		{"build", "--help"}, {"build", "-h"},
		{"check", "--help"}, {"check", "-h"},
	} {
		code, stdout, stderr := worth(args...)
		if code != 0 {
			t.Errorf("%v: exit code %d, want 0", args, code)
		}
		if !strings.Contains(stdout+stderr, "Usage") {
			t.Errorf("%v printed no usage:\n%s%s", args, stdout, stderr)
		}
	}
}

// TestBuildHTMLAndPDFOptions: --appendix-only writes only the calculation
// appendix and only as HTML or PDF; --template must name a folder;
// --allow-html lets raw HTML of the prose through.
func TestBuildHTMLAndPDFOptions(t *testing.T) {
	dir := t.TempDir()
	memo := filepath.Join(dir, "pumps.md")
	writeFile(t, memo, strings.Replace(goodMemo, "Best:", "<b>Raw</b> best:", 1))

	code, full, stderr := worth("build", memo, "--format", "html", "-o", "-")
	if code != 0 {
		t.Fatalf("build --format html: exit %d\n%s", code, stderr)
	}
	code, appendix, stderr := worth("build", memo, "--appendix-only", "--format", "html", "-o", "-")
	if code != 0 {
		t.Fatalf("build --appendix-only: exit %d\n%s", code, stderr)
	}
	if !strings.Contains(full, "Raw") || strings.Contains(appendix, "Raw") {
		t.Errorf("--appendix-only still holds the prose")
	}
	if !strings.Contains(appendix, "Appendix") || len(appendix) >= len(full) {
		t.Errorf("--appendix-only did not write the appendix alone (%d bytes against %d)", len(appendix), len(full))
	}
	if strings.Contains(full, "<b>Raw</b>") {
		t.Errorf("raw HTML of the prose reached the page without --allow-html")
	}
	_, allowed, _ := worth("build", memo, "--allow-html", "--format", "html", "-o", "-")
	if !strings.Contains(allowed, "<b>Raw</b>") {
		t.Errorf("--allow-html did not let raw HTML through")
	}
	out := filepath.Join(dir, "calc.pdf")
	if code, _, stderr := worth("build", memo, "--appendix-only", "-o", out); code != 0 || !strings.HasPrefix(readFile(t, out), "%PDF-") {
		t.Fatalf("build --appendix-only -o calc.pdf: exit %d\n%s", code, stderr)
	}
	for _, args := range [][]string{
		{"build", memo, "--appendix-only", "--format", "md", "-o", "-"},
		{"build", memo, "--template", filepath.Join(dir, "no-such-folder"), "-o", "-"},
	} {
		if code, stdout, _ := worth(args...); code != 2 || stdout != "" {
			t.Errorf("%v: exit %d with %d bytes of output, want 2 and none", args, code, len(stdout))
		}
	}
}
