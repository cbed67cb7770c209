package render

import (
	"bytes"
	"context"
	"flag"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"golang.org/x/net/html"
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
