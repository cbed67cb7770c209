package main

import (
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"time"
	"unicode/utf8"

	"golang.org/x/net/html"

	"worth/parse"
)

// FuzzPipeline runs the whole of worth on arbitrary bytes, as `worth build`
// does: a memo (and the CSV file it may read) in, parsed and computed, and
// when it has no error, written as JSON, Markdown, CSV and HTML.
//
//	go test ./cmd/worth -run XXX -fuzz FuzzPipeline -fuzztime 10m
//
// Whatever the input:
//   - nothing panics, and one input finishes within pipelineTime and
//     allocates at most pipelineBytes;
//   - a memo with errors gives an ErrorList whose every error has a message
//     and a position inside the memo or the CSV file;
//   - a memo without errors renders in every format without an error; the
//     JSON is valid; the HTML parses and holds no <script> element, no
//     on* event attribute and no link that runs script (javascript:,
//     vbscript:, data: other than an embedded image). With allowHTML (the
//     --allow-html flag) the author's own markup is kept, but its links are
//     still neutralised.
//
// The PDF writer is left out: it draws the same document model as the
// HTML writer, and is a hundred times slower a run.
func FuzzPipeline(f *testing.F) {
	seeds := 0
	for _, pat := range []string{"examples/*.md", "testdata/errors/*.md", "testdata/csv/*.md", "render/testdata/*.md"} {
		files, err := filepath.Glob(filepath.Join(repoRoot, pat))
		if err != nil {
			f.Fatal(err)
		}
		for _, p := range files {
			b, err := os.ReadFile(p)
			if err != nil {
				f.Fatal(err)
			}
			csv := []byte(fuzzCSV)
			// A memo that names a CSV file beside it gets that file.
			for _, name := range []string{"arena-chiller-flows.csv", "retrofit.csv"} {
				if bytes.Contains(b, []byte(name)) {
					if c, err := os.ReadFile(filepath.Join(filepath.Dir(p), name)); err == nil {
						csv = c
					}
				}
			}
			f.Add(b, csv, false)
			seeds++
		}
	}
	if seeds < 20 {
		f.Fatalf("only %d seed memos found", seeds)
	}
	for _, s := range pipelineSeeds {
		f.Add([]byte(s), []byte(fuzzCSV), false)
		f.Add([]byte(s), []byte(fuzzCSV), true)
	}
	f.Fuzz(func(t *testing.T, memo, csv []byte, allowHTML bool) {
		checkPipeline(t, memo, csv, allowHTML)
	})
}

// The bounds of one input: a memo of a few kilobytes, the fuzzer's
// inputs, computes in milliseconds; a risk analysis of the most trials
// allowed in about a second.
const (
	pipelineTime  = 20 * time.Second
	pipelineBytes = 2 << 30
)

// fuzzCSV is the CSV a fuzzed memo reads by default: every column, a
// comment, a quoted amount and a salvage.
const fuzzCSV = "year,amount,kind,note\n# a comment\n0,-480000,,first cost\n1,12500,benefit,rent\n" +
	"2,\"1,250\",cost,\"a note, quoted\"\n10,40000,salvage,\n"

// pipelineSeeds are hand-made memos at the edges: live markup in every
// string that reaches the page, a memo that reads a CSV, the numerical
// edges (rate 0, rate -100%, escalation equal to the rate, long
// horizons, huge and tiny amounts), and analyses at their limits.
var pipelineSeeds = []string{
	"---\ntitle: \"<script>alert(1)</script>\"\nto: '<img src=x onerror=alert(2)>'\nlogo: ../../etc/passwd\nrate: 7%\n---\n\n" +
		"[x](javascript:alert(3)) <a href=\"&#x6A;avascript:alert(4)\" onclick=\"alert(5)\">y</a> ![i](data:text/html,<b>)\n\n" +
		"```alternative a\nname: </title><script>alert(6)</script>\nlife: 5\nfirst cost: 1000\nannual benefit: 400\n```\n\n" +
		"```alternative b\nname: \"><svg/onload=alert(7)>{{.}}\nlife: 10\nfirst cost: 2000\nannual benefit: 500\n```\n\n" +
		"```compare c\nalternatives: a, b\nshow: present worth, irr, payback\n```\n\n`= best(c)` `= pw(a)`\n\n```diagram a\n```\n```schedule b\n```\n",
	"---\nrate: 7%\n---\n```alternative a\nlife: 10\ncash flows from: flows.csv\n```\n```compare c\nalternatives: a\n```\n",
	"---\nrate: 0%\n---\n```alternative a\nlife: 1000\nfirst cost: 1e300\nannual cost: 1e-300 escalating 0%\n```\n" +
		"```alternative b\nlife: 999\nfirst cost: 1\nannual benefit: 1e300\n```\n```compare c\nhorizon: study period 10000 years\n```\n",
	"---\nrate: -99.99%\n---\n```alternative a\nlife: 7\nfirst cost: 1\nannual cost: 2 escalating -99.99%\nsalvage: 1e308\n```\n" +
		"```compare c\nhorizon: perpetual\ndecide by: incremental rate of return\n```\n",
	"---\nrate: 1000%\ninflation: 999%\namounts: constant\n---\n```alternative a\nlife: 997\nfirst cost: 1\n```\n```alternative b\nlife: 991\nfirst cost: 2\n```\n```compare c\n```\n",
	"```assume\nx = 1 / 0\ny = (-1) ^ 0.5\nz = 10 ^ 400\n```\n```alternative a\nlife: x\nfirst cost: y\nannual cost: z\n```\n```compare c\n```\n",
	"---\nrate: 7%\n---\n```assume\ncost = 100 ~ triangular(1, 100, 1e300)\n```\n```alternative a\nlife: 5\nfirst cost: cost\n```\n" +
		"```alternative b\nlife: 3\nfirst cost: 50\n```\n```compare c\n```\n```risk r\ncompare: c\ntrials: 1000000\n```\n" +
		"```sensitivity s\ncompare: c\nvary: cost, rate by 100%\nrange cost: 1 to 1e300\nbreakeven: cost, rate\n```\n",
}

// checkPipeline runs one input, within bounds of time and memory.
func checkPipeline(t *testing.T, memo, csv []byte, allowHTML bool) {
	t.Helper()
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	done := make(chan struct{})
	start := time.Now()
	var failure any
	var problems []string
	go func() {
		defer close(done)
		defer func() { failure = recover() }()
		problems = pipeline(memo, csv, allowHTML)
	}()
	select {
	case <-done:
	case <-time.After(pipelineTime):
		t.Fatalf("the memo took more than %v", pipelineTime)
	}
	if failure != nil {
		t.Fatalf("panic: %v", failure)
	}
	for _, p := range problems {
		t.Error(p)
	}
	runtime.ReadMemStats(&after)
	if n := after.TotalAlloc - before.TotalAlloc; n > pipelineBytes {
		t.Fatalf("the memo allocated %d MiB (bound %d MiB) in %v", n>>20, pipelineBytes>>20, time.Since(start))
	}
	if dir := os.Getenv("WORTH_FUZZ_SLOW"); dir != "" && time.Since(start) > time.Second {
		// Where a long run keeps the inputs that took over a second, to
		// look at afterwards.
		name := filepath.Join(dir, fmt.Sprintf("%d-%x.md", time.Since(start).Milliseconds(), len(memo)))
		_ = os.WriteFile(name, memo, 0o644)
	}
}

// pipeline is `worth build --format json,md,csv,html` on memo and csv. It
// returns what is wrong with the result.
func pipeline(memo, csv []byte, allowHTML bool) (problems []string) {
	fail := func(format string, args ...any) { problems = append(problems, fmt.Sprintf(format, args...)) }
	const memoName, csvName = "memo.md", "flows.csv"
	open := func(path string) ([]byte, error) {
		if path != csvName {
			return nil, fmt.Errorf("no such file %s", path)
		}
		return csv, nil
	}
	l, err := loadSource(memoName, memo, loadOptions{}, open)
	if err != nil {
		var list parse.ErrorList
		if !errors.As(err, &list) {
			fail("error is a %T, not an ErrorList: %v", err, err)
			return
		}
		files := map[string][]byte{memoName: memo, csvName: csv}
		for _, e := range list {
			checkErrorAt(fail, e, files)
		}
		return
	}
	out, err := renderAll(l.rep, []string{"json", "md", "csv", "html"}, buildOptions{allowHTML: allowHTML})
	if err != nil {
		fail("a memo without errors does not render: %v", err)
		return
	}
	if !json.Valid(out[0]) {
		fail("invalid JSON:\n%s", out[0])
	}
	if len(out[1]) == 0 {
		fail("empty Markdown")
	}
	checkHTML(fail, out[3], allowHTML)
	return problems
}

// checkErrorAt fails when an error has no message or is not inside a file.
func checkErrorAt(fail func(string, ...any), e *parse.Error, files map[string][]byte) {
	if e.Msg == "" {
		fail("%v: an error without a message", e.Pos)
	}
	src, ok := files[e.Pos.File]
	if !ok || !e.Pos.IsValid() {
		fail("%q: an error not placed in the memo or its CSV: %v", e.Msg, e.Pos)
		return
	}
	lines := bytes.Split(src, []byte("\n"))
	if e.Pos.Line > len(lines) {
		fail("%v: %s: the file has %d lines", e.Pos, e.Msg, len(lines))
		return
	}
	if n := utf8.RuneCount(lines[e.Pos.Line-1]); e.Pos.Col < 0 || e.Pos.Col > n+1 {
		fail("%v: %s: line %d has %d characters", e.Pos, e.Msg, e.Pos.Line, n)
	}
}

// checkHTML: the page parses, and nothing in it runs script.
func checkHTML(fail func(string, ...any), page []byte, allowHTML bool) {
	doc, err := html.Parse(bytes.NewReader(page))
	if err != nil {
		fail("the HTML does not parse: %v", err)
		return
	}
	var walk func(n *html.Node)
	walk = func(n *html.Node) {
		if n.Type == html.ElementNode {
			if strings.EqualFold(n.Data, "script") && !allowHTML {
				fail("a <script> element in the page")
			}
			for _, a := range n.Attr {
				key := strings.ToLower(a.Key)
				if strings.HasPrefix(key, "on") && !allowHTML {
					fail("<%s %s=%q>: an event attribute", n.Data, a.Key, a.Val)
				}
				switch key {
				case "href", "src", "action", "formaction", "xlink:href", "poster", "background", "cite", "data", "srcset":
					if u := scriptLink(a.Val); u != "" && !(key == "src" && isImageData(u)) {
						fail("<%s %s=%q>: a link that runs script", n.Data, a.Key, a.Val)
					}
				}
			}
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			walk(c)
		}
	}
	walk(doc)
}

// scriptLink returns the URL v as a browser reads its scheme (control
// characters and spaces dropped, lower case) when that scheme can run
// script or carry a page, else "".
func scriptLink(v string) string {
	u := strings.ToLower(strings.Map(func(r rune) rune {
		if r <= ' ' {
			return -1
		}
		return r
	}, v))
	for _, s := range []string{"javascript:", "vbscript:", "data:"} {
		if strings.HasPrefix(u, s) {
			return u
		}
	}
	return ""
}

// isImageData reports whether u is an embedded PNG or JPEG (the memo's
// logo).
func isImageData(u string) bool {
	return strings.HasPrefix(u, "data:image/png;base64,") || strings.HasPrefix(u, "data:image/jpeg;base64,")
}
