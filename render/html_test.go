package render

import (
	"bytes"
	"context"
	"flag"
	"fmt"
	"image/png"
	"io/fs"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"sync"
	"testing"
	"time"

	"golang.org/x/net/html"

	"worth/compute"
	"worth/parse"
	"worth/templates"
)

var updateHTML = flag.Bool("update", false, "rewrite the HTML golden files in testdata/golden/html from the current output")

// htmlOf builds a memo file into HTML with the embedded templates.
func htmlOf(t testing.TB, path string, opt DocOptions) []byte {
	t.Helper()
	out, err := HTML(BuildDoc(loadReport(t, path), opt), HTMLOptions{})
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return out
}

// htmlParse parses a page with a standards-following HTML parser.
func htmlParse(t testing.TB, b []byte) *html.Node {
	t.Helper()
	n, err := html.Parse(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	return n
}

// htmlEach calls fn for every element of the tree.
func htmlEach(n *html.Node, fn func(*html.Node)) {
	if n.Type == html.ElementNode {
		fn(n)
	}
	for c := n.FirstChild; c != nil; c = c.NextSibling {
		htmlEach(c, fn)
	}
}

func htmlAttr(n *html.Node, key string) (string, bool) {
	for _, a := range n.Attr {
		if a.Key == key {
			return a.Val, true
		}
	}
	return "", false
}

func htmlText(n *html.Node) string {
	var b strings.Builder
	var rec func(*html.Node)
	rec = func(n *html.Node) {
		if n.Type == html.TextNode {
			b.WriteString(n.Data)
		}
		for c := n.FirstChild; c != nil; c = c.NextSibling {
			rec(c)
		}
	}
	rec(n)
	return b.String()
}

// TestHTMLStructure: every test memo and example parses and holds its
// results tables with header cells, and charts with titles and text
// alternatives; nothing is scripted or fetched.
func TestHTMLStructure(t *testing.T) {
	for _, p := range memoFiles(t) {
		t.Run(filepath.Base(p), func(t *testing.T) {
			rep := loadReport(t, p)
			doc := htmlParse(t, htmlOf(t, p, DocOptions{}))
			var captions []string
			charts, titled, scripts := 0, 0, 0
			htmlEach(doc, func(n *html.Node) {
				switch n.Data {
				case "script", "iframe", "object", "embed", "link":
					scripts++
				case "table":
					// Every table has a header row of th cells.
					ths := 0
					htmlEach(n, func(c *html.Node) {
						if c.Data == "th" {
							ths++
						}
					})
					if ths == 0 {
						t.Errorf("a table without header cells")
					}
				case "figcaption":
					captions = append(captions, htmlText(n))
				case "svg":
					if role, _ := htmlAttr(n, "role"); role != "img" {
						return // legend swatches are decorative
					}
					charts++
					var title, desc string
					for c := n.FirstChild; c != nil; c = c.NextSibling {
						if c.Type == html.ElementNode && c.Data == "title" {
							title = htmlText(c)
						}
						if c.Type == html.ElementNode && c.Data == "desc" {
							desc = htmlText(c)
						}
					}
					if title != "" && len(desc) > 40 {
						titled++
					}
					if l, ok := htmlAttr(n, "aria-labelledby"); !ok || l == "" {
						t.Errorf("chart without aria-labelledby")
					}
				}
				for _, a := range n.Attr {
					if (a.Key == "src" || a.Key == "href" && n.Data != "a") && strings.Contains(a.Val, "//") {
						t.Errorf("<%s %s=%q> would fetch", n.Data, a.Key, a.Val)
					}
				}
			})
			if scripts > 0 {
				t.Errorf("%d script-like elements", scripts)
			}
			if charts == 0 || titled != charts {
				t.Errorf("%d charts, %d with title and description", charts, titled)
			}
			for _, c := range rep.Comparisons {
				if !hasString(captions, "Comparison "+c.ID) {
					t.Errorf("no results table for comparison %s in %q", c.ID, captions)
				}
			}
		})
	}
}

func hasString(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// TestHTMLHostile: script tags, event handlers and script links in the
// prose, the front matter, alternative names and expectations come out as
// text, never as live markup.
func TestHTMLHostile(t *testing.T) {
	check := func(t *testing.T, doc *html.Node, allowHTML bool) {
		htmlEach(doc, func(n *html.Node) {
			if n.Data == "script" && !allowHTML {
				t.Errorf("a <script> element: %q", htmlText(n))
			}
			for _, a := range n.Attr {
				if strings.HasPrefix(strings.ToLower(a.Key), "on") && !allowHTML {
					t.Errorf("<%s %s=%q>", n.Data, a.Key, a.Val)
				}
				v := strings.ToLower(strings.Join(strings.Fields(a.Val), ""))
				switch a.Key {
				case "href", "src", "action", "formaction", "xlink:href":
					if strings.HasPrefix(v, "javascript:") || strings.HasPrefix(v, "vbscript:") || strings.HasPrefix(v, "data:") {
						t.Errorf("<%s %s=%q>", n.Data, a.Key, a.Val)
					}
				}
			}
		})
	}
	t.Run("escaped", func(t *testing.T) {
		out := htmlOf(t, "testdata/hostile.md", DocOptions{})
		doc := htmlParse(t, out)
		check(t, doc, false)
		text := htmlText(doc)
		for _, want := range []string{
			`<script>alert("title")</script> Evil memo`,               // title, as text
			`<img src=x onerror=alert(1)>`,                            // front matter
			`<script>alert(5)</script>`,                               // raw HTML in prose
			`<script>alert(17)</script><img src=x onerror=alert(18)>`, // alternative name
			`javascript:alert(19) " onclick="alert(20)`,               // alternative name
			`best() == "<script>alert(21)</script>"`,                  // expectation
		} {
			if !strings.Contains(text, want) {
				t.Errorf("text %q not shown as text", want)
			}
		}
		// Links with script schemes keep their text but lose the link.
		if !strings.Contains(text, "click") || !strings.Contains(text, "vb") {
			t.Errorf("link text missing")
		}
		if bytes.Contains(out, []byte("example.org/x.png")) && !bytes.Contains(out, []byte("&lt;style&gt;")) {
			t.Errorf("raw <style> from the prose came through")
		}
	})
	t.Run("allow-html", func(t *testing.T) {
		out := htmlOf(t, "testdata/hostile.md", DocOptions{AllowHTML: true})
		doc := htmlParse(t, out)
		check(t, doc, true)
		// The author's own markup is kept, links neutralised.
		found := false
		htmlEach(doc, func(n *html.Node) {
			if n.Data == "a" && htmlText(n) == "raw link" {
				found = true
				if h, _ := htmlAttr(n, "href"); h != "#" {
					t.Errorf("raw link href = %q", h)
				}
			}
		})
		if !found {
			t.Errorf("raw HTML link not kept with AllowHTML")
		}
		// Strings from blocks are escaped all the same.
		if !strings.Contains(htmlText(doc), `<script>alert(17)</script>`) {
			t.Errorf("alternative name not escaped with AllowHTML")
		}
	})
	t.Run("content-security-policy", func(t *testing.T) {
		out := htmlOf(t, "testdata/hostile.md", DocOptions{AllowHTML: true})
		if !bytes.Contains(out, []byte(`content="default-src 'none'; style-src 'unsafe-inline'; img-src data:"`)) {
			t.Errorf("no content security policy")
		}
	})
}

func TestNeutraliseRaw(t *testing.T) {
	for in, want := range map[string]string{
		`<a href="javascript:x()">`:              `<a href="#">`,
		`<a HREF='vbscript:x'>`:                  `<a HREF="#">`,
		`<img src=data:image/png;base64,AAA>`:    `<img src="#">`,
		`<a href="&#106;avascript:x">`:           `<a href="#">`,
		`<a href="https://example.org/">`:        `<a href="https://example.org/">`,
		`<form action="javascript:x"><button>`:   `<form action="#"><button>`,
		`<svg><a xlink:href="javascript:x"></a>`: `<svg><a xlink:href="#"></a>`,
	} {
		if got := neutraliseRaw(in); got != want {
			t.Errorf("neutraliseRaw(%q) = %q, want %q", in, got, want)
		}
	}
}

// TestHTMLGolden compares the HTML of each example with its golden file;
// go test ./render -update rewrites them.
func TestHTMLGolden(t *testing.T) {
	examples, _ := filepath.Glob("../examples/*.md")
	if len(examples) == 0 {
		t.Skip("no examples yet")
	}
	dir := filepath.Join("..", "testdata", "golden", "html")
	for _, p := range examples {
		name := strings.TrimSuffix(filepath.Base(p), ".md") + ".html"
		got := htmlOf(t, p, DocOptions{})
		golden := filepath.Join(dir, name)
		if *updateHTML {
			if err := os.MkdirAll(dir, 0o755); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(golden, got, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		want, err := os.ReadFile(golden)
		if err != nil {
			t.Errorf("%s: %v (run go test ./render -update)", name, err)
			continue
		}
		if !bytes.Equal(got, want) {
			t.Errorf("%s differs from its golden file; review the change and run go test ./render -update", name)
		}
	}
}

func TestHTMLByteIdentical(t *testing.T) {
	for _, p := range memoFiles(t) {
		a := htmlOf(t, p, DocOptions{})
		b := htmlOf(t, p, DocOptions{})
		if !bytes.Equal(a, b) {
			t.Errorf("%s: two builds differ", p)
		}
	}
}

func TestHTMLAppendixOnly(t *testing.T) {
	out := htmlOf(t, "testdata/conveyor.md", DocOptions{AppendixOnly: true})
	doc := htmlParse(t, out)
	text := htmlText(doc)
	if !strings.Contains(text, "Calculation appendix") || !strings.Contains(text, "Cash flows of Full sortation system") {
		t.Errorf("appendix missing")
	}
	if strings.Contains(text, "Recommendation") || strings.Contains(text, "Summary") {
		t.Errorf("appendix-only page holds the memo's body")
	}
}

// TestHTMLTemplateDir: an organization's folder overrides the files it
// has; the others come from the embedded set.
func TestHTMLTemplateDir(t *testing.T) {
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "style.css"), []byte("body { color: #123456; }"), 0o644); err != nil {
		t.Fatal(err)
	}
	doc := BuildDoc(loadReport(t, "testdata/conveyor.md"), DocOptions{})
	out, err := HTML(doc, HTMLOptions{TemplateDir: dir})
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(out, []byte("color: #123456")) || bytes.Contains(out, []byte("--accent")) {
		t.Errorf("the folder's stylesheet was not used")
	}
	if !bytes.Contains(out, []byte("Comparison eastgate")) {
		t.Errorf("embedded templates not used for the files the folder lacks")
	}
	// A broken template is an error, not a panic or an empty page.
	if err := os.WriteFile(filepath.Join(dir, "page.html"), []byte(`{{define "page"}}{{.Nope`), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := HTML(doc, HTMLOptions{TemplateDir: dir}); err == nil {
		t.Errorf("a broken template gave no error")
	}
}

func TestHTMLLogo(t *testing.T) {
	dir := t.TempDir()
	pngBytes := []byte("\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR")
	os.WriteFile(filepath.Join(dir, "logo.png"), pngBytes, 0o644)
	os.WriteFile(filepath.Join(dir, "logo.gif"), []byte("GIF89a"), 0o644)
	outside := t.TempDir()
	os.WriteFile(filepath.Join(outside, "secret.png"), pngBytes, 0o644)
	for logo, want := range map[string]bool{
		"logo.png": true, "logo.gif": false, "missing.png": false,
		"../" + filepath.Base(outside) + "/secret.png": false, filepath.Join(outside, "secret.png"): false,
	} {
		got := logoURI(&Doc{Logo: logo, Dir: dir})
		if (got != "") != want {
			t.Errorf("logo %q: embedded = %v, want %v", logo, got != "", want)
		}
		if want && !strings.HasPrefix(string(got), "data:image/png;base64,") {
			t.Errorf("logo %q = %.40s", logo, got)
		}
	}
}

// TestHTMLChromium loads each page in headless Chromium from a file, takes
// a screenshot and checks that it is not blank and that the console
// reported no error.
func TestHTMLChromium(t *testing.T) {
	bin, err := exec.LookPath("chromium")
	if err != nil {
		if os.Getenv("WORTH_REQUIRE_TOOLS") == "1" {
			t.Fatal("chromium is not on PATH (WORTH_REQUIRE_TOOLS=1)")
		}
		t.Skip("chromium is not on PATH; install Debian's chromium to run this test")
	}
	dir := t.TempDir()
	// The hostile memo too: escaped, it must load without a refused
	// script or resource.
	for _, p := range append(memoFiles(t), "testdata/hostile.md") {
		name := strings.TrimSuffix(filepath.Base(p), ".md")
		page := filepath.Join(dir, name+".html")
		if err := os.WriteFile(page, htmlOf(t, p, DocOptions{}), 0o644); err != nil {
			t.Fatal(err)
		}
		shot := filepath.Join(dir, name+".png")
		ctx, cancel := context.WithTimeout(context.Background(), 60*time.Second)
		cmd := exec.CommandContext(ctx, bin, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
			"--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync",
			"--user-data-dir="+filepath.Join(dir, "profile"), "--enable-logging=stderr", "--v=0",
			"--screenshot="+shot, "--window-size=1200,1600", "file://"+page)
		var stderr bytes.Buffer
		cmd.Stderr = &stderr
		err := cmd.Run()
		cancel()
		if err != nil {
			t.Errorf("%s: chromium: %v\n%s", name, err, stderr.String())
			continue
		}
		if m := consoleError.FindString(stderr.String()); m != "" {
			t.Errorf("%s: the console reported %q", name, m)
		}
		f, err := os.Open(shot)
		if err != nil {
			t.Errorf("%s: no screenshot: %v", name, err)
			continue
		}
		img, err := png.Decode(f)
		f.Close()
		if err != nil {
			t.Errorf("%s: screenshot: %v", name, err)
			continue
		}
		b := img.Bounds()
		dark := 0
		for y := b.Min.Y; y < b.Max.Y; y += 2 {
			for x := b.Min.X; x < b.Max.X; x += 2 {
				r, g, bl, _ := img.At(x, y).RGBA()
				if r < 0xb000 || g < 0xb000 || bl < 0xb000 {
					dark++
				}
			}
		}
		if total := b.Dx() * b.Dy() / 4; dark < total/100 {
			t.Errorf("%s: the screenshot is blank (%d of %d sampled pixels inked)", name, dark, total)
		}
	}
}

// consoleError matches what Chromium logs for a script error, a console
// error or a resource the page's policy refused.
var consoleError = regexp.MustCompile(`(?i)Uncaught[^\n]*|CONSOLE[^\n]*error[^\n]*|Refused to [^\n]*|Failed to load resource[^\n]*`)

func BenchmarkHTML(b *testing.B) {
	path := "testdata/conveyor.md"
	if ex, _ := filepath.Glob("../examples/*.md"); len(ex) > 0 {
		path = ex[0]
	}
	rep := loadReport(b, path)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := HTML(BuildDoc(rep, DocOptions{}), HTMLOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkHTMLAndPDF is the measure: an example memo, from the
// computed report, to both HTML and PDF (target: well under 100 ms).
func BenchmarkHTMLAndPDF(b *testing.B) {
	path := "testdata/conveyor.md"
	if ex, _ := filepath.Glob("../examples/*.md"); len(ex) > 0 {
		path = ex[0]
	}
	rep := loadReport(b, path)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		doc := BuildDoc(rep, DocOptions{})
		if _, err := HTML(doc, HTMLOptions{}); err != nil {
			b.Fatal(err)
		}
		if _, err := PDF(doc, PDFOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

// fortyMemo writes a memo of forty invented alternatives (pump sets for a
// pumping station), with benefits, periodic costs, gradients and salvage,
// compared by present worth with most measures shown: the size of memo the
// HTML writer's speed is measured on.
func fortyMemo() string {
	var b strings.Builder
	b.WriteString(`---
title: Northfield pumping station — forty pump-set offers
to: Capital Works Committee
from: Network Engineering
date: 2027-05-11
currency: USD
rate: 6%
project: NET-27-040
---

## Why forty offers

The tender for the Northfield pumping station drew forty offers. Each is a
complete pump set with drives and controls; they differ in first cost, in
energy use (which saves more or less against today's station), in upkeep
and in how often the impellers & seals are rebuilt. The committee asked to
see them all side by side at the 6% rate.

` + "```assume\nenergy_price = 0.14   # $ per kWh\nbase_kwh = 1.9M       # today's station, a year\n```\n\n")
	for i := 1; i <= 40; i++ {
		life := 12 + i%4*4
		first := 180 + (i*37)%160
		saved := 260 + (i*53)%240
		upkeep := 9 + (i*7)%11
		fmt.Fprintf(&b, "Offer %d comes from bidder %c; its **rebuild** interval is %d years.\n\n", i, 'A'+rune(i%26), 3+i%5)
		fmt.Fprintf(&b, "```alternative p%02d\nname: Offer %d — %s pump set\nlife: %d\nfirst cost: %dk\n", i, i, []string{"split-case", "vertical turbine", "end-suction", "submersible", "mixed-flow"}[i%5], life, first)
		fmt.Fprintf(&b, "annual benefit: %dk * energy_price escalating 2%%\n", saved)
		fmt.Fprintf(&b, "annual cost: %d,%03d gradient %d\n", upkeep, (i*131)%1000, 100+i%5*50)
		fmt.Fprintf(&b, "cost every %d years: %dk   # impeller and seal rebuild\n", 3+i%5, 12+i%9*3)
		if i%3 == 0 {
			fmt.Fprintf(&b, "cost at year %d: %dk   # drive replacement\n", life/2, 20+i%7*5)
		}
		fmt.Fprintf(&b, "salvage: %dk\n```\n\n", 5+i%6*3)
	}
	b.WriteString("## Comparison\n\n```compare offers\nhorizon: study period 24\ndecide by: present worth\nshow: present worth, annual worth, irr, benefit-cost, payback\nbase: p01\n```\n\n")
	b.WriteString("The best offer is **`= best()`** with a present worth of `= pw(p07)` for offer 7 against `= pw(p01)` for offer 1.\n\n")
	b.WriteString("```schedule p07\n```\n")
	return b.String()
}

// fortyDoc builds the document of fortyMemo.
func fortyDoc(t testing.TB) *Doc {
	t.Helper()
	m, err := parse.Parse("forty.md", []byte(fortyMemo()))
	if err != nil {
		t.Fatal(err)
	}
	rep, err := compute.Compute(m)
	if err != nil {
		t.Fatal(err)
	}
	return BuildDoc(rep, DocOptions{})
}

// BenchmarkHTML40 times the HTML writer alone on a memo of forty
// alternatives; the document is built once, outside the timer.
func BenchmarkHTML40(b *testing.B) {
	doc := fortyDoc(b)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if _, err := HTML(doc, HTMLOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

// actionTemplates are the definitions of "runs", "table", "equations" and
// "chart" written with plain template actions, as an organization's
// templates may redefine them; the writer's own definitions call Go
// (runsHTML, tableHTML, equationsHTML, chartHTML) and must give the same
// bytes.
const actionNodes = `{{define "runs"}}{{range .}}{{template "run" .}}{{end}}{{end}}
{{define "run"}}{{if .Break}}<br>{{else if .RawHTML}}{{rawHTML .Text}}{{else}}{{with safeLink .Link}}<a href="{{.}}">{{end}}{{template "bold" .}}{{if safeLink .Link}}</a>{{end}}{{end}}{{end}}
{{define "bold"}}{{if .Bold}}<strong>{{template "italic" .}}</strong>{{else}}{{template "italic" .}}{{end}}{{end}}
{{define "italic"}}{{if .Italic}}<em>{{template "strike" .}}</em>{{else}}{{template "strike" .}}{{end}}{{end}}
{{define "strike"}}{{if .Strike}}<del>{{template "text" .}}</del>{{else}}{{template "text" .}}{{end}}{{end}}
{{define "text"}}{{if .Value}}<span class="value" title="= {{.Source}} (line {{.Line}})">{{.Text}}</span>{{else if .Code}}<code>{{.Text}}</code>{{else}}{{.Text}}{{end}}{{end}}

{{define "table"}}<figure class="table{{if .Caption}} computed{{end}}"{{with .ID}} id="{{.}}"{{end}}>
{{- if .Caption}}
<figcaption>{{.Caption}}</figcaption>
{{- end}}
<div class="scroll"><table>
<thead><tr>{{range $i, $h := .Header}}<th scope="col"{{with colClass $ $i}} class="{{.}}"{{end}}>{{$h}}</th>{{end}}</tr></thead>
<tbody>
{{- range $r, $row := .Rows}}
<tr{{with rowID $ $r}} id="{{.}}"{{end}}{{with rowClass $ $r}} class="{{.}}"{{end}}>{{range $i, $c := $row}}{{if and (eq $i 0) $.Caption}}<th scope="row"{{with colClass $ $i}} class="{{.}}"{{end}}>{{$c}}</th>{{else}}<td{{with colClass $ $i}} class="{{.}}"{{end}}{{$tr := cellTrace $ $r $i}}{{if $tr.Title}} title="{{$tr.Title}}">{{if $tr.Href}}<a class="trace" href="{{$tr.Href}}">{{$c}}</a>{{else}}{{$c}}{{end}}</td>{{else}}>{{$c}}</td>{{end}}{{end}}{{end}}</tr>
{{- end}}
</tbody>
</table></div>
{{- if or .Note .Source}}
<p class="table-note">{{.Note}}{{if .Source}} <span class="source">Source: {{.Source}}.</span>{{end}}</p>
{{- end}}
</figure>{{end}}

{{define "equations"}}<figure class="equations"{{with .ID}} id="{{.}}"{{end}}>
<figcaption>{{.Title}}</figcaption>
{{- range .Steps}}
<div class="eq">
<p class="eq-label">{{.Label}}</p>
<div class="eq-grid">
<span class="lhs">{{.LHS}}</span><span class="rel">=</span><span class="rhs">{{template "terms" .Symbolic}}</span>
{{- if not (sameTerms .Symbolic .Substituted)}}
<span class="lhs"></span><span class="rel">=</span><span class="rhs">{{template "terms" .Substituted}}</span>
{{- end}}
<span class="lhs"></span><span class="rel">=</span><span class="rhs result">{{.Result}}</span>
</div>
</div>
{{- end}}
</figure>{{end}}

{{define "terms"}}{{range $i, $t := .}}{{if $i}} {{end}}<span class="{{termClass $t}}">{{$t}}</span>{{end}}{{end}}
`

const actionChart = `{{define "chart"}}<figure class="chart {{.Kind}}">
<figcaption>{{.Title}}</figcaption>
<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {{.W}} {{.H}}" role="img" aria-labelledby="{{.ID}}-title {{.ID}}-desc">
<title id="{{.ID}}-title">{{.Title}}</title>
<desc id="{{.ID}}-desc">{{.Desc}}</desc>
{{- with .Clip}}
<defs><clipPath id="{{$.ID}}-clip"><rect x="{{.X}}" y="{{.Y}}" width="{{.W}}" height="{{.H}}"/></clipPath></defs>
{{- end}}
{{- range .Groups}}
<g class="{{.Class}}"{{with .Clip}} clip-path="url(#{{.}})"{{end}}>
{{- range .Rects}}<rect x="{{.X}}" y="{{.Y}}" width="{{.W}}" height="{{.H}}" class="{{.Class}}"/>{{end}}
{{- range .Lines}}<line x1="{{.X1}}" y1="{{.Y1}}" x2="{{.X2}}" y2="{{.Y2}}" class="{{.Class}}"/>{{end}}
{{- range .Paths}}<path d="{{.D}}" class="{{.Class}}"{{with .Width}} stroke-width="{{.}}"{{end}}/>{{end}}
{{- range .Circles}}<circle cx="{{.CX}}" cy="{{.CY}}" r="{{.R}}" class="{{.Class}}"/>{{end}}
{{- range .Texts}}<text x="{{.X}}" y="{{.Y}}" text-anchor="{{.Anchor}}" class="{{.Class}}"{{with .Rotate}} transform="{{.}}"{{end}}>{{.Text}}</text>{{end}}
</g>
{{- end}}
</svg>
{{- if .Legend}}
<ul class="legend">
{{- range .Legend}}
<li><svg class="swatch" viewBox="0 0 28 10" aria-hidden="true"><line x1="1" y1="5" x2="27" y2="5" class="curve {{.Class}}"/></svg>{{.Name}}</li>
{{- end}}
</ul>
{{- end}}
{{- if .Key}}
<dl class="key">
{{- range .Key}}
<div><dt>{{.Letter}}</dt><dd>{{.Text}}</dd></div>
{{- end}}
</dl>
{{- end}}
{{- if .Notes}}
<ul class="chart-notes">
{{- range .Notes}}
<li>{{.}}</li>
{{- end}}
</ul>
{{- end}}
</figure>{{end}}
`

// actionTemplateDir writes a template folder whose nodes.html is the
// embedded one with "runs", "table" and "equations" redefined by
// template actions (table given to replace the "table" definition when
// not empty), and whose chart.html redefines "chart" the same way.
func actionTemplateDir(t *testing.T, table string) string {
	t.Helper()
	embedded, err := fs.ReadFile(templates.FS, "nodes.html")
	if err != nil {
		t.Fatal(err)
	}
	nodes := string(embedded)
	for _, def := range []string{`{{define "runs"}}{{runsHTML .}}{{end}}`, `{{define "table"}}{{tableHTML .}}{{end}}`, `{{define "equations"}}{{equationsHTML .}}{{end}}`} {
		if !strings.Contains(nodes, def) {
			t.Fatalf("embedded nodes.html has no %s", def)
		}
		nodes = strings.Replace(nodes, def, "", 1)
	}
	actions := actionNodes
	if table != "" {
		i, j := strings.Index(actions, `{{define "table"}}`), strings.Index(actions, `{{define "equations"}}`)
		actions = actions[:i] + table + "\n\n" + actions[j:]
	}
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "nodes.html"), []byte(nodes+actions), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "chart.html"), []byte(actionChart), 0o644); err != nil {
		t.Fatal(err)
	}
	return dir
}

// hostileDoc is a document of hand-made blocks whose strings hold every
// character html/template escapes, NUL, invalid UTF-8, and links of every
// kind of scheme.
func hostileDoc() *Doc {
	nasty := "a<b>&c \"q\" 'p' 1+1 \x00 \xff\xfe é—€ </script><!--"
	var runs []Inline
	for _, l := range []string{"https://example.org/a b?q=1&r='x'+\"y\"<z>#f", "HTTP://EXAMPLE.ORG/%41%zz%4", "mailto:a+b@example.org",
		"ftp://example.org/x", "tel:+123", "/relative/path:x?y", "rel/a:b", "javascript:alert(1)", " JaVaScRiPt:alert(2)", "data:text/html,<x>",
		"vbscript:x", "#frag", "?q=é ü", "//example.org/\x00x"} {
		runs = append(runs, Inline{Text: "link " + nasty, Link: l})
	}
	runs = append(runs,
		Inline{Text: nasty, Bold: true, Italic: true, Strike: true, Link: "https://example.org/"},
		Inline{Text: nasty, Code: true, Italic: true},
		Inline{Text: "$1,234", Value: true, Source: "pw(a) + aw(b) > \"3\" & <4>", Line: 42, Bold: true},
		Inline{Break: true},
		Inline{Text: `<b onclick="x()">raw</b><a href="javascript:y">l</a>`, RawHTML: true},
		Inline{Text: nasty, Strike: true})
	long := strings.Repeat("é+", 31)
	lines := Chart{Kind: "lines", Title: "PW " + nasty, Alt: "alt " + nasty, XLabel: "rate " + nasty, YLabel: "PW " + nasty,
		XMin: 0, XMax: 0.2, YMin: -100, YMax: 100,
		XTicks: []Tick{{0, "0%"}, {0.1, "10% <&>"}, {0.2, "20%+"}}, YTicks: []Tick{{-100, "−100 \"k\""}, {0, "0"}, {100, "100 'k'"}},
		Series: []Series{{Name: "A " + nasty, X: []float64{0, 0.05, 0.1, 0.15, 0.2}, Y: []float64{90, 40, math.NaN(), -30, -300}, Emphasis: true},
			{Name: "B " + nasty, X: []float64{0, 0.1, 0.2}, Y: []float64{-50, 0.04, -0.04}}},
		Marks: []Mark{{X: 0.1, HasX: true, Label: "rate <10%>", Series: -1, Kind: "rate"}, {Y: 20, HasY: true, Series: -1},
			{X: 0.08, Y: 0, HasX: true, HasY: true, Label: "IRR 8% & \"more\"", Series: 0, Kind: "irr"},
			{X: 0.12, Y: 10, HasX: true, HasY: true, Label: "cross <x>", Series: 1, Kind: "crossover"}},
		Notes: []string{nasty, "plain"}}
	cash := Chart{Kind: "cashflow", Title: "Flows " + nasty, Alt: nasty, XLabel: "year", YLabel: "net <flow>",
		XMin: 0, XMax: 4, YMin: -500, YMax: 300,
		XTicks: []Tick{{0, "0"}, {2, "2"}, {4, "4"}}, YTicks: []Tick{{-500, "-500"}, {0, "0"}, {300, "+300"}},
		Arrows: []Arrow{{0, -500, "first cost <&>"}, {1, 120, ""}, {2, 0.5, "tiny; \"quoted\""}, {3, -40, "first cost <&>; overhaul 'x'"}, {4, 300, "salvage+"}},
		Notes:  []string{"annual cost: $12,500 + " + nasty}}
	table := Table{Caption: "Caption " + nasty, Header: []string{"h " + nasty, "n", "c", "b"},
		Rows:  [][]string{{"r " + nasty, "1+1", "<c>", "\"b\""}, {"total", "2", "c&d", "'e'"}, {"short"}},
		Align: []byte{'l', 'r', 'c', 'r'}, BoldRows: []bool{false, true}, BoldCols: []bool{false, false, false, true},
		Note: "note " + nasty, Source: "alternative <x>, line 3"}
	return &Doc{
		Title: "Title " + nasty, Date: "2027-01-01 <d>", Paper: "a4",
		Heading: []KV{{"To", nasty}},
		Body: []Node{
			Heading{Level: 2, Text: runs[:3], ID: "h-" + nasty},
			Paragraph{Text: runs},
			Paragraph{Text: []Inline{{Text: `<div onclick="x">block</div>`, RawHTML: true}}},
			List{Items: [][]Node{{Paragraph{Text: runs[10:]}}, {Heading{Level: 4, Text: runs[:1]}}}},
			table,
			Table{Header: []string{"a", "b"}, Rows: [][]string{{"1", nasty}}, Align: []byte{'c'}},
			Table{Header: []string{"x"}, Source: "only a source"},
			Equations{Title: "Worked " + nasty, Steps: []EqText{
				{LHS: "PW<sub>", Label: "label " + nasty, Symbolic: []string{"-610,000", "+ 6,000 (P/A, 7%, 30)", long}, Substituted: []string{"-610,000", "+ 6,000 × 12.4", long + "é"}, Result: "-$704,173 <&>"},
				{LHS: "AW", Label: "same", Symbolic: []string{"x", "y"}, Substituted: []string{"x", "y"}, Result: "'r'"}}},
			Callout{Kind: "recommendation", Title: "Rec " + nasty, Text: nasty, Items: []string{nasty}, Facts: []KV{{"k", nasty}}},
			lines,
			cash,
			Chart{Kind: "bars", Title: "empty"},
		},
		Appendix: []Node{cash, lines},
		Caution:  "caution " + nasty,
	}
}

// TestHTMLTemplateActions: a template folder that redefines "runs",
// "table", "equations" and "chart" with plain template actions gives the
// same page, byte for byte, as the writer's own definitions, which write
// those parts in Go; and a folder's own "table" is used.
func TestHTMLTemplateActions(t *testing.T) {
	dir := actionTemplateDir(t, "")
	docs := map[string]*Doc{"hostile-doc": hostileDoc()}
	allow := *hostileDoc()
	allow.AllowHTML = true
	docs["hostile-doc/allow-html"] = &allow
	for _, p := range append(memoFiles(t), "testdata/hostile.md") {
		rep := loadReport(t, p)
		docs[p] = BuildDoc(rep, DocOptions{})
		docs[p+"/allow-html"] = BuildDoc(rep, DocOptions{AllowHTML: true})
		docs[p+"/appendix-only"] = BuildDoc(rep, DocOptions{AppendixOnly: true})
	}
	for name, doc := range docs {
		want, err := HTML(doc, HTMLOptions{TemplateDir: dir})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		got, err := HTML(doc, HTMLOptions{})
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if !bytes.Equal(got, want) {
			i := 0
			for i < len(got) && i < len(want) && got[i] == want[i] {
				i++
			}
			t.Errorf("%s: Go-written parts differ from the template actions at byte %d:\n got %q\nwant %q", name,
				i, got[max(0, i-60):min(len(got), i+60)], want[max(0, i-60):min(len(want), i+60)])
		}
	}

	// An organization's own "table", written with template actions.
	dir = actionTemplateDir(t, `{{define "table"}}<table class="org-table">{{range .Rows}}<tr>{{range .}}<td>{{.}}</td>{{end}}</tr>{{end}}</table>{{end}}`)
	out, err := HTML(hostileDoc(), HTMLOptions{TemplateDir: dir})
	if err != nil {
		t.Fatal(err)
	}
	if n := bytes.Count(out, []byte(`<table class="org-table">`)); n != 3 {
		t.Errorf("%d tables from the folder's template, want 3", n)
	}
	if bytes.Contains(out, []byte(`<div class="scroll">`)) {
		t.Errorf("the writer's own table was used")
	}
	if !bytes.Contains(out, []byte(`<td>1&#43;1</td><td>&lt;c&gt;</td><td>&#34;b&#34;</td>`)) {
		t.Errorf("the folder's table not escaped by html/template")
	}
	// Only "table" redefined: the rest of nodes.html stays the embedded one.
	embedded, _ := fs.ReadFile(templates.FS, "nodes.html")
	nodes := strings.Replace(string(embedded), `{{define "table"}}{{tableHTML .}}{{end}}`,
		`{{define "table"}}<table class="org-table">{{range .Header}}<th>{{.}}</th>{{end}}</table>{{end}}`, 1)
	dir = t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "nodes.html"), []byte(nodes), 0o644); err != nil {
		t.Fatal(err)
	}
	doc := BuildDoc(loadReport(t, "testdata/conveyor.md"), DocOptions{})
	out, err = HTML(doc, HTMLOptions{TemplateDir: dir})
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(out, []byte(`<table class="org-table"><th>`)) || bytes.Contains(out, []byte(`<div class="scroll">`)) ||
		!bytes.Contains(out, []byte(`<figure class="equations"`)) || !bytes.Contains(out, []byte(`<figure class="chart cashflow">`)) {
		t.Errorf("a folder's nodes.html redefining only \"table\" not used as it should be")
	}
}

// TestHTMLConcurrent: documents written at the same time (each on its own
// copy of the templates) come out as when written one by one.
func TestHTMLConcurrent(t *testing.T) {
	var docs []*Doc
	var want [][]byte
	for _, p := range memoFiles(t) {
		for _, o := range []DocOptions{{}, {AllowHTML: true}, {AppendixOnly: true}} {
			doc := BuildDoc(loadReport(t, p), o)
			out, err := HTML(doc, HTMLOptions{})
			if err != nil {
				t.Fatal(err)
			}
			docs, want = append(docs, doc), append(want, out)
		}
	}
	errs := make(chan error, 4*len(docs))
	var wg sync.WaitGroup
	for range 4 {
		for i, doc := range docs {
			wg.Go(func() {
				out, err := HTML(doc, HTMLOptions{})
				if err == nil && !bytes.Equal(out, want[i]) {
					err = fmt.Errorf("document %d differs when written concurrently", i)
				}
				if err != nil {
					errs <- err
				}
			})
		}
	}
	wg.Wait()
	close(errs)
	for err := range errs {
		t.Error(err)
	}
}
