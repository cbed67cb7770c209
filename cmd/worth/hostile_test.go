package main

// Limits, files a memo reads and hostile shapes of memos that are too
// large to keep in testdata/errors (README.md, "Limits").

import (
	"bytes"
	"encoding/json"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"syscall"
	"testing"
)

// limitMemo is a small valid memo: n alternatives, each with `lines` money
// lines, compared over a study period of years; risk adds a risk block.
func limitMemo(n, lines, years int, risk bool) string {
	var b strings.Builder
	b.WriteString("---\ntitle: Limits\nrate: 7%\n---\n\n```assume\nprice = 0.1 ~ uniform(0.05, 0.15)\n```\n\n")
	for i := 0; i < n; i++ {
		fmt.Fprintf(&b, "```alternative opt%d\nlife: %d\nfirst cost: %d\n", i, 5+i%3, 1000+i)
		for k := 0; k < lines; k++ {
			fmt.Fprintf(&b, "cost at year %d: %d\n", 1+k%4, 10+k)
		}
		b.WriteString("annual benefit: 4000 * price\n```\n\n")
	}
	fmt.Fprintf(&b, "```compare pick\nhorizon: study period %d\n```\n", years)
	if risk {
		b.WriteString("\n```risk pick-risk\ntrials: 1000\n```\n")
	}
	return b.String()
}

// TestLimitFlag: each limit stops a memo past it with an error that names
// the limit and the flag that raises it, and --limit raises (or lowers)
// it.
func TestLimitFlag(t *testing.T) {
	dir := t.TempDir()
	small := limitMemo(3, 5, 60, true)
	cases := []struct {
		name  string
		memo  string
		flags []string
		code  int
		want  string // a part of standard error; "" for none
	}{
		{"defaults hold", small, nil, 0, ""},
		// The front matter is blanked to spaces before the Markdown is
		// read; a long line there is no indentation.
		{"long front matter line", strings.Replace(small, "title: Limits", "title: "+strings.Repeat("Limits ", 1000), 1), nil, 0, ""},
		{"alternatives", small, []string{"--limit", "alternatives=2"}, 2, ":32:4: the memo has more than 2 alternatives, the most worth reads in one memo (raise it with --limit alternatives=4)"},
		{"blocks", small, []string{"--limit", "blocks=3"}, 2, ":32:4: the memo has more than 3 worth blocks"},
		{"lines", small, []string{"--limit", "lines=4"}, 2, ":16:1: alternative opt0 has more than 4 money lines (CSV rows included), the most worth reads for one alternative (raise it with --limit lines=8)"},
		{"lines raised", limitMemo(1, 10001, 10, false), []string{"--limit", "lines=20000"}, 0, ""},
		{"lines default", limitMemo(1, 10001, 10, false), nil, 2, "more than 10,000 money lines"},
		{"memo-size", small, []string{"--limit", "memo-size=512"}, 2, ":1:1: the memo is larger than 512 bytes, the most worth reads (raise it with --limit memo-size=1KiB)"},
		{"memo-size default", small + strings.Repeat(" ", 4<<20), nil, 2, ":1:1: the memo is larger than 4 MiB, the most worth reads (raise it with --limit memo-size=8MiB)"},
		{"memo-size raised", small + strings.Repeat("\n", 4<<20), []string{"--limit", "memo-size=5MiB"}, 0, ""},
		{"schedule-years", small, []string{"--limit", "schedule-years=150"}, 2, "the year-by-year schedules of this memo would have 183 rows (alternatives × years, every comparison so far), more than the 150 worth makes for one memo (raise it with --limit schedule-years=300)"},
		{"line-years", small, []string{"--limit", "line-years=1000"}, 2, "compare pick would work through 1,281 money lines × years, more than the 1,000 worth does for one comparison (raise it with --limit line-years=2000)"},
		{"risk-values", small, []string{"--limit", "risk-values=2000"}, 2, "risk pick-risk would keep 3,000 present worths (1,000 trials × 3 alternatives), more than the 2,000 worth keeps for one risk block (raise it with --limit risk-values=4000)"},
		{"risk-work", small, []string{"--limit", "risk-work=500"}, 2, "more than the 500 worth evaluates for one risk block (raise it with --limit risk-work=1000)"},
		{"what-if-rows", small + "\n```scenario dear\nprice = 0.2\n```\n", []string{"--limit", "what-if-rows=100"}, 2, ":51:4: the scenarios and sensitivities up to this scenario block take about 1 recomputation of the memo's 183 schedule rows, more than the 100 rows of what-ifs worth computes for one memo (raise it with --limit what-if-rows=200)"},
		{"two limits", small, []string{"--limit", "alternatives=2", "--limit", "blocks=100000"}, 2, "more than 2 alternatives"},
		{"unknown limit", small, []string{"--limit", "trials=5"}, 2, `unknown limit "trials"; names: memo-size, blocks, alternatives, lines, file-size, schedule-years, line-years, risk-values, risk-work, what-if-rows`},
		{"no value", small, []string{"--limit", "alternatives"}, 2, "expected NAME=N"},
		{"not a number", small, []string{"--limit", "alternatives=many"}, 2, `alternatives: expected a positive whole number, got "many"`},
	}
	for k, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			memo := filepath.Join(dir, fmt.Sprintf("m%d.md", k))
			writeFile(t, memo, c.memo)
			for _, cmd := range []string{"check", "build"} {
				args := append([]string{cmd, memo}, c.flags...)
				out := filepath.Join(dir, fmt.Sprintf("m%d.json", k))
				if cmd == "build" {
					args = append(args, "-o", out)
				}
				code, _, stderr := worth(args...)
				if code != c.code {
					t.Errorf("%s: exit %d, want %d; standard error:\n%.600s", cmd, code, c.code, stderr)
				}
				if c.want == "" && stderr != "" || !strings.Contains(stderr, c.want) {
					t.Errorf("%s: standard error\n%.600s\nwant it to hold %q", cmd, stderr, c.want)
				}
				if _, err := os.Stat(out); cmd == "build" && (err == nil) != (c.code == 0) {
					t.Errorf("build: output written: %v, want %v", err == nil, c.code == 0)
				}
				os.Remove(out)
			}
		})
	}
}

// TestManyInlineValues: 10,000 inline values in one paragraph build, each
// replaced by its figure.
func TestManyInlineValues(t *testing.T) {
	dir := t.TempDir()
	memo := filepath.Join(dir, "many.md")
	writeFile(t, memo, limitMemo(2, 1, 20, false)+"\n"+strings.Repeat("PW `= pw(opt0)`; ", 10000)+"\n")
	for _, f := range []string{"json", "html", "md"} {
		out := filepath.Join(dir, "many."+f)
		if code, _, stderr := worth("build", memo, "-o", out); code != 0 {
			t.Fatalf("build %s: exit %d: %s", f, code, stderr)
		}
		b := readFile(t, out)
		if f == "json" {
			continue
		}
		if n := strings.Count(b, "PW "); n < 10000 {
			t.Errorf("%s: %d inline values, want 10,000", f, n)
		}
		if strings.Contains(b, "= pw(opt0)") && f == "md" {
			t.Errorf("%s: an inline value was not replaced", f)
		}
	}
}

// TestTextForms: the same memo with CRLF line endings, a byte-order mark
// and tabs gives the same figures as with LF and spaces.
func TestTextForms(t *testing.T) {
	dir := t.TempDir()
	base := limitMemo(2, 2, 30, false) + "\nThe choice: `= best()`, at `= pw(opt1)`.\n"
	forms := map[string]string{
		"lf":   base,
		"crlf": strings.ReplaceAll(base, "\n", "\r\n"),
		"bom":  "\xef\xbb\xbf" + base,
		"tabs": strings.NewReplacer("first cost: ", "first cost:\t", "life: ", "life:\t\t").Replace(base),
	}
	var want []byte
	for _, name := range []string{"lf", "crlf", "bom", "tabs"} {
		memo := filepath.Join(dir, name+".md")
		writeFile(t, memo, forms[name])
		code, stdout, stderr := worth("build", memo, "--format", "json", "-o", "-")
		if code != 0 {
			t.Fatalf("%s: exit %d: %s", name, code, stderr)
		}
		var rep struct {
			Comparisons []struct {
				Recommended string
				Results     []struct {
					PresentWorth float64 `json:"present_worth"`
				}
			}
		}
		if err := json.Unmarshal([]byte(stdout), &rep); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		got, _ := json.Marshal(rep)
		if want == nil {
			want = got
		} else if !bytes.Equal(got, want) {
			t.Errorf("%s: figures %s, want %s as with LF", name, got, want)
		}
	}
}

// TestHostileFiles: the files a memo names (a CSV, a logo) may not leave
// the memo's folder, by ../, an absolute path or a symbolic link, and a
// file that is huge, binary, a folder or a pipe is a clear error at the
// line that names it; nothing is written, and an earlier output stays.
func TestHostileFiles(t *testing.T) {
	root := t.TempDir()
	dir := filepath.Join(root, "memo")
	if err := os.MkdirAll(filepath.Join(dir, "sub"), 0o755); err != nil {
		t.Fatal(err)
	}
	writeFile(t, filepath.Join(root, "outside.csv"), "year,amount\n0,-1000\n")
	writeFile(t, filepath.Join(root, "outside.png"), string(tinyPNG))
	writeFile(t, filepath.Join(dir, "binary.csv"), "year,amount\n0,-10\x00\x01\x02\n")
	writeFile(t, filepath.Join(dir, "latin1.csv"), "year,amount,note\n0,-10,caf\xe9\n")
	writeFile(t, filepath.Join(dir, "image.csv"), string(tinyPNG))
	writeFile(t, filepath.Join(dir, "huge.csv"), "year,amount\n"+strings.Repeat("1,1\n", 300000))
	writeFile(t, filepath.Join(dir, "logo.png"), string(tinyPNG))
	writeFile(t, filepath.Join(dir, "fake.png"), "not an image at all")
	writeFile(t, filepath.Join(dir, "damaged.png"), string(damagedPNG))
	writeFile(t, filepath.Join(dir, "huge.png"), string(tinyPNG)+strings.Repeat("\x00", 6<<20))
	symlinks := os.Symlink(filepath.Join(root, "outside.csv"), filepath.Join(dir, "link.csv")) == nil &&
		os.Symlink(filepath.Join(root, "outside.png"), filepath.Join(dir, "link.png")) == nil &&
		os.Symlink(filepath.Join(dir, "logo.png"), filepath.Join(dir, "inner-link.png")) == nil
	pipe := syscall.Mkfifo(filepath.Join(dir, "pipe.csv"), 0o644) == nil

	const csvMemo = "---\ntitle: Files\nrate: 7%\n---\n\n```alternative a\nlife: 5\ncash flows from: PATH\nannual benefit: 400\n```\n"
	const logoMemo = "---\ntitle: Files\nrate: 7%\nlogo: PATH\n---\n\n```alternative a\nlife: 5\nfirst cost: 1000\nannual benefit: 400\n```\n"
	abs := func(p string) string { return filepath.ToSlash(p) }
	type fileCase struct {
		memo, path, format string
		symlink, pipe      bool
		want               string // standard error, after "m.md:" ("" to build)
	}
	cases := []fileCase{
		{csvMemo, "../outside.csv", "json", false, false, `8:18: cannot read cash flows from "../outside.csv": ` + abs(filepath.Join(root, "outside.csv")) + ` is outside the memo's folder`},
		{csvMemo, abs(filepath.Join(root, "outside.csv")), "json", false, false, `is outside the memo's folder`},
		{csvMemo, "/etc/passwd", "json", false, false, `8:18: cannot read cash flows from "/etc/passwd": /etc/passwd is outside the memo's folder`},
		{csvMemo, "sub/../../outside.csv", "json", false, false, `is outside the memo's folder`},
		{csvMemo, "link.csv", "json", true, false, `link.csv is outside the memo's folder`},
		{csvMemo, "binary.csv", "json", false, false, `binary.csv:2:6: the file holds a NUL byte, so it is not a CSV text file`},
		{csvMemo, "image.csv", "json", false, false, `image.csv:3:1: the file holds a NUL byte, so it is not a CSV text file`},
		{csvMemo, "latin1.csv", "json", false, false, `latin1.csv:2:10: the CSV is not valid UTF-8 here (byte 0xe9)`},
		{csvMemo, "huge.csv", "json", false, false, `8:18: cannot read cash flows from "huge.csv": the file is 1.1 MiB; a file a memo reads may be at most 1.0 MiB`},
		{csvMemo, "sub", "json", false, false, `is a folder, not a CSV file`},
		{csvMemo, "pipe.csv", "json", false, true, `pipe.csv is not a regular file (a pipe, device or socket)`},
		{logoMemo, "../outside.png", "pdf", false, false, `4:7: logo "../outside.png": leaves the memo's folder`},
		{logoMemo, abs(filepath.Join(root, "outside.png")), "pdf", false, false, `must be a path relative to the memo's folder`},
		{logoMemo, "link.png", "pdf", true, false, `4:7: logo "link.png": is or passes through a symbolic link`},
		{logoMemo, "inner-link.png", "pdf", true, false, `is or passes through a symbolic link`},
		{logoMemo, "fake.png", "pdf", false, false, `4:7: logo "fake.png": is not a PNG or JPEG image`},
		{logoMemo, "damaged.png", "pdf", false, false, `4:7: logo "damaged.png": cannot be read as an image`},
		{logoMemo, "huge.png", "pdf", false, false, `bytes; the limit is 5242880 (5 MB)`},
		{logoMemo, "sub", "pdf", false, false, `4:7: logo "sub": is not a regular file`},
		{logoMemo, "missing.png", "pdf", false, false, `4:7: logo "missing.png": no such file or directory`},
		{logoMemo, "logo.png", "pdf", false, false, ""},
		// A logo matters only to a PDF.
		{logoMemo, "../outside.png", "json", false, false, ""},
	}
	for k, c := range cases {
		if c.symlink && !symlinks || c.pipe && !pipe {
			continue
		}
		t.Run(fmt.Sprintf("%d-%s", k, c.path), func(t *testing.T) {
			memo := filepath.Join(dir, "m.md")
			writeFile(t, memo, strings.Replace(c.memo, "PATH", c.path, 1))
			out := filepath.Join(dir, "out."+c.format)
			writeFile(t, out, earlier)
			defer os.Remove(out)
			code, _, stderr := worth("build", memo, "-o", out)
			if c.want == "" {
				if code != 0 {
					t.Fatalf("exit %d: %s", code, stderr)
				}
				return
			}
			if code != 2 {
				t.Errorf("exit %d, want 2", code)
			}
			if !strings.Contains(stderr, c.want) || !regexp.MustCompile(`^\S+:\d+:\d+: `).MatchString(stderr) {
				t.Errorf("standard error\n%s\nwant file:line:col and %q", stderr, c.want)
			}
			if got := readFile(t, out); got != earlier {
				t.Errorf("the earlier output was changed")
			}
			es, _ := os.ReadDir(dir)
			for _, e := range es {
				if strings.HasPrefix(e.Name(), ".out.") {
					t.Errorf("a temporary file was left: %s", e.Name())
				}
			}
		})
	}
	// The memo itself may not be a pipe (which would block) or a device
	// that never ends.
	for _, p := range []string{filepath.Join(dir, "pipe.csv"), "/dev/zero"} {
		if _, err := os.Stat(p); err != nil {
			continue
		}
		code, _, stderr := worth("check", p)
		if code != 2 || !strings.Contains(stderr, p+" is not a regular file") {
			t.Errorf("check %s: exit %d, %q", p, code, stderr)
		}
	}
}

// tinyPNG is a 2×2 PNG image.
var tinyPNG = func() []byte {
	img := image.NewNRGBA(image.Rect(0, 0, 2, 2))
	img.Set(1, 1, color.NRGBA{200, 30, 30, 255})
	var b bytes.Buffer
	if err := png.Encode(&b, img); err != nil {
		panic(err)
	}
	return b.Bytes()
}()

// damagedPNG has a good header and damaged data: it made the PDF writer
// panic.
var damagedPNG = []byte("\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR\x00\x00\x00\x01\x00\x00\x00\x01\x08\x06\x00\x00\x00\x1f\x15\xc4\x89\x00\x00\x00\rIDATx\x9cc\xf8\x0f\x00\x00\x01\x01\x00\x05\x18\xd8N\x00\x00\x00\x00IEND\xaeB`\x82")
