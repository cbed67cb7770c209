package render

import (
	"bytes"
	"encoding/json"
	"regexp"
	"strings"
	"testing"

	"golang.org/x/net/html"
)

// hostileEverywhere is a memo whose every string that reaches a report
// (title, front matter, headings, prose, link and image targets, table
// cells, alternative names, CSV notes, scenario names, inline values,
// expectations) holds markup, script links, file references or template
// actions.
const hostileEverywhere = "testdata/hostile-everywhere/memo.md"

// hostileTexts must each appear in the report as text, exactly.
var hostileTexts = []string{
	`<script>alert('t')</script> {{.}} [x](javascript:alert(1))`, // title
	`{{template "memo" .}} <img src=x onerror=alert(2)>`,         // to
	`<iframe src="javascript:alert(4)"></iframe> {{define "x"}}y{{end}}`,
	`Heading {{.Title}} <script>alert(5)</script>`,
	`{{printf "%s" "x"}}`,
	`{{.}} <script>alert(10)</script> [l](javascript:alert(11))`, // a name
	`javascript:alert(12) data:text/html,x`,                      // b name
	`<script>alert(18)</script> {{.}} javascript:alert(19)`,      // a CSV note
}

// TestHTMLHostileEverywhere: the page holds no live markup (no script,
// iframe or img element from the memo, no event handler, no link or
// source with a javascript:, vbscript:, data: or file: scheme), and every
// hostile string, template actions included, is shown literally.
func TestHTMLHostileEverywhere(t *testing.T) {
	out := htmlOf(t, hostileEverywhere, DocOptions{})
	doc := htmlParse(t, out)
	bad := regexp.MustCompile(`^(javascript|vbscript|data|file):`)
	htmlEach(doc, func(n *html.Node) {
		if n.Type != html.ElementNode {
			return
		}
		switch n.Data {
		case "script", "iframe", "img", "object", "embed", "base", "form", "meta":
			if n.Data != "meta" {
				t.Errorf("a <%s> element", n.Data)
			}
		}
		for _, a := range n.Attr {
			if strings.HasPrefix(strings.ToLower(a.Key), "on") {
				t.Errorf("<%s %s=%q>", n.Data, a.Key, a.Val)
			}
			v := strings.ToLower(strings.Map(func(r rune) rune {
				if r <= ' ' {
					return -1
				}
				return r
			}, a.Val))
			switch a.Key {
			case "href", "src", "action", "formaction", "xlink:href", "srcset":
				if bad.MatchString(v) {
					t.Errorf("<%s %s=%q>", n.Data, a.Key, a.Val)
				}
			}
		}
	})
	text := htmlText(doc)
	for _, want := range hostileTexts {
		if !strings.Contains(text, want) {
			t.Errorf("%q is not shown as text", want)
		}
	}
	// Link texts stay, their script, data and file targets go.
	for _, word := range []string{"js", "data", "vb", "file"} {
		if !strings.Contains(text, word) {
			t.Errorf("link text %q is missing", word)
		}
	}
	// The inline value's expression, shown when hovering over it, is an
	// attribute value, never markup.
	if !bytes.Contains(out, []byte(`&lt;script&gt;alert(15)&lt;/script&gt;{{.}}`)) && !bytes.Contains(out, []byte(`&#34;&lt;script&gt;alert(15)`)) {
		t.Errorf("the inline value's expression is not escaped in its title")
	}
}

// TestPDFHostileEverywhere: pdftotext reads every hostile string back
// literally, and the PDF holds no link to a script, data or file target and
// no action that runs or opens anything.
func TestPDFHostileEverywhere(t *testing.T) {
	b := pdfOf(t, hostileEverywhere, DocOptions{})
	for _, m := range regexp.MustCompile(`/URI\s*\(([^)]*)\)`).FindAllSubmatch(b, -1) {
		u := strings.ToLower(string(m[1]))
		if !strings.HasPrefix(u, "http://") && !strings.HasPrefix(u, "https://") && !strings.HasPrefix(u, "mailto:") {
			t.Errorf("a clickable link to %q", m[1])
		}
	}
	for _, action := range []string{"/JavaScript", "/JS ", "/JS(", "/Launch", "/SubmitForm", "/GoToR", "/ImportData"} {
		if bytes.Contains(b, []byte(action)) {
			t.Errorf("the PDF holds %s", action)
		}
	}
	// pdftotext -layout wraps long lines and spaces columns: compare with
	// runs of spaces and line breaks squeezed to one space.
	squeeze := regexp.MustCompile(`\s+`)
	all := squeeze.ReplaceAllString(strings.Join(pdfText(t, b), " "), " ")
	for _, want := range hostileTexts {
		if !strings.Contains(all, squeeze.ReplaceAllString(want, " ")) {
			t.Errorf("pdftotext does not read %q", want)
		}
	}
}

// TestJSONHostileEverywhere: the JSON holds every name as written (so a
// program reading it sees the author's text), as valid JSON.
func TestJSONHostileEverywhere(t *testing.T) {
	b, err := JSON(loadReport(t, hostileEverywhere))
	if err != nil {
		t.Fatal(err)
	}
	var j struct {
		Title        string
		Alternatives []struct{ Name string }
	}
	if err := json.Unmarshal(b, &j); err != nil {
		t.Fatal(err)
	}
	if j.Title != hostileTexts[0] || len(j.Alternatives) != 2 || j.Alternatives[0].Name != hostileTexts[5] {
		t.Errorf("title %q, alternatives %+v", j.Title, j.Alternatives)
	}
}
